package physics

import (
	"errors"
	"math"
	"testing"
)

const (
	celsius = 273.15 // K at 0 °C (SI definition)
	perMin  = 1.0 / 60
)

// ovenProgram is a typical oven program (our own example): from 23 °C, ramp
// 2 °C/min to 70 °C, hold 90 min, ramp 2 °C/min to 120 °C, hold 60 min,
// ramp −3 °C/min to 40 °C.
func ovenProgram(t *testing.T) Schedule {
	t.Helper()
	s, err := FromSegments(23+celsius, []Segment{
		{Rate: 2 * perMin, To: 70 + celsius},
		{Hold: 90 * 60},
		{Rate: 2 * perMin, To: 120 + celsius},
		{Hold: 60 * 60},
		{Rate: -3 * perMin, To: 40 + celsius},
	})
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func TestFromSegmentsOven(t *testing.T) {
	s := ovenProgram(t)
	// Source: analytic, times by hand: (70 − 23)/2 = 23.5 min;
	// + 90 = 113.5 min; + (120 − 70)/2 = 138.5 min; + 60 = 198.5 min;
	// + (120 − 40)/3 = 225.1667 min.
	wantT := []float64{0, 23.5 * 60, 113.5 * 60, 138.5 * 60, 198.5 * 60, 198.5*60 + 80.0/3*60}
	wantV := []float64{23, 70, 70, 120, 120, 40}
	times, values := s.Points()
	if len(times) != len(wantT) {
		t.Fatalf("%d points, want %d: %v", len(times), len(wantT), times)
	}
	for i := range wantT {
		if math.Abs(times[i]-wantT[i]) > 1e-9*max(1, wantT[i]) || math.Abs(values[i]-(wantV[i]+celsius)) > 1e-9 {
			t.Errorf("point %d = (%v s, %v K), want (%v s, %v K)", i, times[i], values[i], wantT[i], wantV[i]+celsius)
		}
	}
	if bp := s.Breakpoints(); len(bp) != len(wantT) || bp[1] != times[1] {
		t.Errorf("Breakpoints = %v, want the point times %v", bp, times)
	}
	// Source: same program; 225 min 10 s in all.
	if math.Abs(s.End()-13510) > 1e-9 {
		t.Errorf("End = %v s, want 13510", s.End())
	}
	if math.Abs(s.Max()-(120+celsius)) > 1e-12 {
		t.Errorf("Max = %v, want %v", s.Max(), 120+celsius)
	}
	// Source: analytic — linear in time on each segment, held before the
	// first point and after the last (README Case file reference, [schedules.NAME]).
	at := []struct{ t, wantC float64 }{
		{-600, 23},         // before the start: first value
		{0, 23},            // start
		{705, 23 + 23.5},   // half way up the first ramp (11.75 min at 2 °C/min)
		{1410, 70},         // end of the first ramp
		{3000, 70},         // in the hold
		{6810 + 750, 95},   // 12.5 min into the second ramp
		{11910 + 800, 80},  // half way down the cool-down
		{13510, 40},        // end
		{1e7, 40},          // long after the end: last value
		{math.Inf(1), 40},  // and at +Inf
		{math.Inf(-1), 23}, // and at −Inf
	}
	for _, tc := range at {
		if got := s.At(tc.t); math.Abs(got-(tc.wantC+celsius)) > 1e-9 {
			t.Errorf("At(%g s) = %v K, want %v K", tc.t, got, tc.wantC+celsius)
		}
	}
}

func TestFromSegmentsErrors(t *testing.T) {
	start := 23 + celsius
	tests := []struct {
		name  string
		segs  []Segment
		index int
	}{
		{"zero rate", []Segment{{Rate: 0, To: 350}}, 0},
		{"rate away from target (up)", []Segment{{Rate: -2 * perMin, To: 350}}, 0},
		{"rate away from target (down)", []Segment{{Rate: 2 * perMin, To: 350}, {Rate: 1 * perMin, To: 300}}, 1},
		{"target equals current", []Segment{{Rate: 2 * perMin, To: 350}, {Hold: 60}, {Rate: 1 * perMin, To: 350}}, 2},
		{"target equals start", []Segment{{Rate: 2 * perMin, To: start}}, 0},
		{"negative hold", []Segment{{Rate: 2 * perMin, To: 350}, {Hold: -60}}, 1},
		{"infinite hold", []Segment{{Hold: math.Inf(1)}}, 0},
		{"NaN hold", []Segment{{Hold: math.NaN()}}, 0},
		{"NaN rate", []Segment{{Rate: math.NaN(), To: 350}}, 0},
		{"infinite rate", []Segment{{Rate: math.Inf(1), To: 350}}, 0},
		{"NaN target", []Segment{{Rate: 2 * perMin, To: math.NaN()}}, 0},
		{"infinite target", []Segment{{Rate: 2 * perMin, To: math.Inf(1)}}, 0},
	}
	for _, tc := range tests {
		_, err := FromSegments(start, tc.segs)
		var se *SegmentError
		if !errors.As(err, &se) || se.Index != tc.index || !errors.Is(err, ErrSchedule) {
			t.Errorf("%s: err = %v, want a SegmentError at segment %d wrapping ErrSchedule", tc.name, err, tc.index)
		}
	}
	if _, err := FromSegments(math.NaN(), []Segment{{Hold: 60}}); !errors.Is(err, ErrSchedule) {
		t.Errorf("NaN start: err = %v, want ErrSchedule", err)
	}
	// No segments is a steady value.
	s, err := FromSegments(start, nil)
	if err != nil || s.At(1e5) != start || s.End() != 0 {
		t.Errorf("no segments: %v, At = %v, End = %v", err, s.At(1e5), s.End())
	}
}

func TestNewSchedule(t *testing.T) {
	s, err := NewSchedule([]float64{0, 1800, 3600}, []float64{296.15, 333.15, 333.15})
	if err != nil {
		t.Fatal(err)
	}
	// Source: analytic, linear between (0, 296.15) and (1800, 333.15).
	if got := s.At(900); math.Abs(got-314.65) > 1e-12 {
		t.Errorf("At(900) = %v, want 314.65", got)
	}
	// The slices are copied.
	times := []float64{10, 20}
	s2, err := NewSchedule(times, []float64{1, 2})
	if err != nil {
		t.Fatal(err)
	}
	times[1] = 5
	if s2.End() != 20 {
		t.Errorf("schedule changed with its input slice: End = %v", s2.End())
	}
	// A single point is steady; the first value holds before it.
	one, err := NewSchedule([]float64{100}, []float64{7})
	if err != nil || one.At(0) != 7 || one.At(200) != 7 {
		t.Errorf("one point: %v, %v, %v", err, one.At(0), one.At(200))
	}
	for _, tc := range []struct {
		name          string
		times, values []float64
	}{
		{"equal times", []float64{0, 60, 60}, []float64{1, 2, 3}},
		{"decreasing times", []float64{0, 60, 30}, []float64{1, 2, 3}},
		{"no points", nil, nil},
		{"length mismatch", []float64{0, 60}, []float64{1}},
		{"NaN time", []float64{0, math.NaN()}, []float64{1, 2}},
		{"infinite value", []float64{0, 60}, []float64{1, math.Inf(-1)}},
	} {
		if _, err := NewSchedule(tc.times, tc.values); !errors.Is(err, ErrSchedule) {
			t.Errorf("%s: err = %v, want ErrSchedule", tc.name, err)
		}
	}
}

func TestSteady(t *testing.T) {
	s := Steady(353.15)
	for _, tt := range []float64{-1, 0, 1e9} {
		if s.At(tt) != 353.15 {
			t.Errorf("Steady.At(%g) = %v", tt, s.At(tt))
		}
	}
	if s.End() != 0 || s.Max() != 353.15 {
		t.Errorf("Steady End = %v, Max = %v", s.End(), s.Max())
	}
}
