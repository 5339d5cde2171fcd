package dsc

import (
	"fmt"
	"math"
	"sort"
)

// MinPoints is the fewest samples a scan may have.
const MinPoints = 20

// Scan is one DSC measurement: heat flow against time and sample
// temperature.
type Scan struct {
	Name     string    // label used in messages (the file name)
	Time     []float64 // s, strictly increasing
	Temp     []float64 // sample temperature, K
	HeatFlow []float64 // W/kg, exothermic positive
}

// ScanError is a problem with one scan: too few points, a temperature
// program that is neither a ramp nor an isotherm, no exotherm, a bad
// integration window.
type ScanError struct {
	Scan string // Scan.Name
	Msg  string
}

// Error implements error: "name: message".
func (e *ScanError) Error() string { return e.Scan + ": " + e.Msg }

func scanErr(s *Scan, format string, a ...any) error {
	return &ScanError{Scan: s.Name, Msg: fmt.Sprintf(format, a...)}
}

// Validate checks that s has at least MinPoints samples, equal lengths,
// finite values, strictly increasing times and positive temperatures.
// The error is a *ScanError that names the first offending sample (0-based).
// Cost O(n).
func (s *Scan) Validate() error {
	n := len(s.Time)
	if len(s.Temp) != n || len(s.HeatFlow) != n {
		return scanErr(s, "time, temperature and heat flow have different lengths (%d, %d, %d)", n, len(s.Temp), len(s.HeatFlow))
	}
	if n < MinPoints {
		return scanErr(s, "has %d samples; at least %d are needed", n, MinPoints)
	}
	for i := range n {
		t, T, q := s.Time[i], s.Temp[i], s.HeatFlow[i]
		switch {
		case !finite(t) || !finite(T) || !finite(q):
			return scanErr(s, "sample %d is not finite", i)
		case !(T > 0):
			return scanErr(s, "sample %d: temperature %g K is not above absolute zero", i, T)
		case i > 0 && !(t > s.Time[i-1]):
			return scanErr(s, "sample %d: time %g s does not come after %g s", i, t, s.Time[i-1])
		}
	}
	return nil
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// Kind is the kind of a temperature program.
type Kind int

// The temperature programs that DetectProgram recognises.
const (
	Dynamic    Kind = iota + 1 // constant heating rate
	Isothermal                 // constant temperature
)

// String returns "dynamic" or "isothermal".
func (k Kind) String() string {
	switch k {
	case Dynamic:
		return "dynamic"
	case Isothermal:
		return "isothermal"
	}
	return fmt.Sprintf("Kind(%d)", int(k))
}

// Program is the temperature program of a scan.
type Program struct {
	Kind        Kind
	Rate        float64 // heating rate, K/s (Dynamic)
	Temperature float64 // K: the isotherm (Isothermal), the mean (Dynamic)
	// Start is the first sample of the program: for an isothermal scan,
	// the first sample within IsoBand of the isotherm after which every
	// sample stays within it; 0 for a dynamic scan.
	Start int
}

// IsoBand is how far, in K, the samples of an isothermal scan may stray
// from its median temperature.
const IsoBand = 1.5

// DetectProgram returns the temperature program of s.
//
// Method: s is isothermal if, from some sample on, every sample lies within
// IsoBand of the median temperature and those samples make at least 80 % of
// the scan (the samples before are the approach to the isotherm, which the
// analysis skips). Otherwise the temperature is fitted by a straight line
// in time (least squares): the scan is dynamic if the slope is positive and
// no sample departs from the line by more than max(2 K, 3 % of the span).
//
// Errors (*ScanError): a cooling scan, or a program that is neither (a ramp
// followed by a hold, say). Preconditions: s passed Validate. Cost O(n log n).
func DetectProgram(s *Scan) (Program, error) {
	n := len(s.Temp)
	sorted := append([]float64(nil), s.Temp...)
	sort.Float64s(sorted)
	med := sorted[n/2]
	k := n
	for k > 0 && math.Abs(s.Temp[k-1]-med) <= IsoBand {
		k--
	}
	if n-k >= (4*n+4)/5 {
		var sum float64
		for _, T := range s.Temp[k:] {
			sum += T
		}
		return Program{Kind: Isothermal, Temperature: sum / float64(n-k), Start: k}, nil
	}
	l := fitLine(s.Time, s.Temp)
	span := l.Slope * (s.Time[n-1] - s.Time[0])
	if !(l.Slope > 0) {
		return Program{}, scanErr(s, "the temperature falls (%.3g K/min): cooling scans are not analysed", l.Slope*60)
	}
	worst, at := 0.0, 0
	for i, T := range s.Temp {
		if d := math.Abs(T - (l.Intercept + l.Slope*s.Time[i])); d > worst {
			worst, at = d, i
		}
	}
	if worst > max(2, 0.03*span) {
		return Program{}, scanErr(s, "the temperature program is neither a constant heating rate nor isothermal: "+
			"it departs from a straight line by %.3g K at %g s (split a ramp-and-hold scan into its parts)", worst, s.Time[at])
	}
	mean := l.Intercept + l.Slope*0.5*(s.Time[0]+s.Time[n-1])
	return Program{Kind: Dynamic, Rate: l.Slope, Temperature: mean}, nil
}

// interp returns y at x by linear interpolation in the increasing xs,
// clamped at the ends.
func interp(xs, ys []float64, x float64) float64 {
	n := len(xs)
	switch {
	case x <= xs[0]:
		return ys[0]
	case x >= xs[n-1]:
		return ys[n-1]
	}
	i := sort.SearchFloat64s(xs, x) // xs[i-1] < x ≤ xs[i]
	f := (x - xs[i-1]) / (xs[i] - xs[i-1])
	return ys[i-1] + f*(ys[i]-ys[i-1])
}
