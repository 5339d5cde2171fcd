package physics

import (
	"errors"
	"fmt"
	"math"
	"sort"
)

// Schedule is a quantity programmed in time (an air temperature, a platen
// temperature, a lamp flux): piecewise linear between its points, holding
// its first value before the first point and its last value after the last
// (README Case file reference, [schedules.NAME]). The zero value is not usable; build one with NewSchedule,
// FromSegments or Steady.
type Schedule struct {
	t, v []float64 // strictly increasing times (s), values
}

// ErrSchedule is returned (wrapped) for an invalid schedule.
var ErrSchedule = errors.New("invalid schedule")

// Steady returns the schedule that is v at every time.
func Steady(v float64) Schedule { return Schedule{t: []float64{0}, v: []float64{v}} }

// NewSchedule returns the piecewise-linear schedule through (times[i],
// values[i]). Times must be strictly increasing and finite, with at least one
// point; the slices are copied.
func NewSchedule(times, values []float64) (Schedule, error) {
	if len(times) != len(values) {
		return Schedule{}, fmt.Errorf("%w: %d times but %d values", ErrSchedule, len(times), len(values))
	}
	if len(times) == 0 {
		return Schedule{}, fmt.Errorf("%w: no points", ErrSchedule)
	}
	for i := range times {
		if math.IsNaN(times[i]) || math.IsInf(times[i], 0) || math.IsNaN(values[i]) || math.IsInf(values[i], 0) {
			return Schedule{}, fmt.Errorf("%w: point %d is not finite", ErrSchedule, i+1)
		}
		if i > 0 && !(times[i] > times[i-1]) {
			return Schedule{}, fmt.Errorf("%w: times must be strictly increasing (point %d at %g s is not after point %d at %g s)",
				ErrSchedule, i+1, times[i], i, times[i-1])
		}
	}
	return Schedule{t: append([]float64(nil), times...), v: append([]float64(nil), values...)}, nil
}

// Segment is one step of a temperature program: a ramp at Rate (K/s) to To
// (K), or, when Hold > 0, a hold of Hold seconds at the current value.
type Segment struct {
	Rate float64 // K/s, nonzero, for a ramp
	To   float64 // K, for a ramp
	Hold float64 // s, > 0 for a hold
}

// SegmentError reports which segment of a program is invalid.
type SegmentError struct {
	Index int // 0-based
	Err   error
}

func (e *SegmentError) Error() string { return fmt.Sprintf("segment %d: %v", e.Index, e.Err) }
func (e *SegmentError) Unwrap() error { return e.Err }

// FromSegments builds the schedule that starts at start (K) at time 0 and
// runs the segments in order. A ramp whose rate is zero, whose sign disagrees
// with its target, or whose target equals the current value is an error, as
// is a hold that is not positive (README Case file reference, [schedules.NAME]).
func FromSegments(start float64, segs []Segment) (Schedule, error) {
	times := []float64{0}
	vals := []float64{start}
	now, cur := 0.0, start
	for i, s := range segs {
		switch {
		case s.Hold != 0:
			if !(s.Hold > 0) || math.IsInf(s.Hold, 0) {
				return Schedule{}, &SegmentError{i, fmt.Errorf("%w: a hold must last a positive, finite time", ErrSchedule)}
			}
			now += s.Hold
		default:
			switch {
			case s.Rate == 0 || math.IsNaN(s.Rate) || math.IsInf(s.Rate, 0):
				return Schedule{}, &SegmentError{i, fmt.Errorf("%w: a ramp needs a nonzero, finite rate", ErrSchedule)}
			case math.IsNaN(s.To) || math.IsInf(s.To, 0):
				return Schedule{}, &SegmentError{i, fmt.Errorf("%w: a ramp needs a finite target", ErrSchedule)}
			case s.To == cur:
				return Schedule{}, &SegmentError{i, fmt.Errorf("%w: the ramp's target equals the temperature it starts from (%.6g K)", ErrSchedule, cur)}
			case (s.To-cur)*s.Rate < 0:
				return Schedule{}, &SegmentError{i, fmt.Errorf("%w: the ramp never reaches its target: rate %.6g K/min points away from %.6g K (starting at %.6g K)",
					ErrSchedule, s.Rate*60, s.To, cur)}
			}
			now += (s.To - cur) / s.Rate
			cur = s.To
		}
		times = append(times, now)
		vals = append(vals, cur)
	}
	return NewSchedule(times, vals)
}

// At returns the value at time t.
func (s *Schedule) At(t float64) float64 {
	n := len(s.t)
	switch {
	case n == 1 || t <= s.t[0]:
		return s.v[0]
	case t >= s.t[n-1]:
		return s.v[n-1]
	}
	i := sort.SearchFloat64s(s.t, t)
	if i == 0 {
		i = 1
	}
	if t == s.t[i] {
		return s.v[i]
	}
	w := (t - s.t[i-1]) / (s.t[i] - s.t[i-1])
	return s.v[i-1] + w*(s.v[i]-s.v[i-1])
}

// Points returns the schedule's times and values. The caller must not
// modify them.
func (s *Schedule) Points() (times, values []float64) { return s.t, s.v }

// End returns the time of the last point (0 for a steady schedule).
func (s *Schedule) End() float64 { return s.t[len(s.t)-1] }

// Max returns the largest value the schedule takes.
func (s *Schedule) Max() float64 {
	m := s.v[0]
	for _, x := range s.v[1:] {
		m = max(m, x)
	}
	return m
}

// Breakpoints returns the times at which the schedule's slope changes.
// The caller must not modify the slice.
func (s *Schedule) Breakpoints() []float64 { return s.t }

// Hottest returns the largest value of the schedule and the interval during
// which it holds it: from the first time it reaches it to the last time it
// has it (+Inf when it ends there, since a schedule holds its last value).
// For a program whose hottest segment is a hold, that is the hold.
func (s *Schedule) Hottest() (value, from, to float64) {
	value = s.Max()
	first, last := -1, -1
	for i, v := range s.v {
		if v == value {
			if first < 0 {
				first = i
			}
			last = i
		}
	}
	from, to = s.t[first], s.t[last]
	if first == 0 {
		from = math.Inf(-1)
	}
	if last == len(s.t)-1 {
		to = math.Inf(1)
	}
	return value, from, to
}
