package solver

// VerifyFactor is how much tighter the step tolerances of a verification
// run are than those of the run it checks.
const VerifyFactor = 10

// Tightened returns a copy of p whose temperature and cure tolerances are
// VerifyFactor times tighter (defaults resolved first). Everything else,
// the mesh included, is shared with p: the second run measures the error
// of the time stepping, not of the mesh.
func Tightened(p *Problem) *Problem {
	q := *p
	if q.TemperatureTolerance == 0 {
		q.TemperatureTolerance = DefaultTemperatureTolerance
	}
	if q.CureTolerance == 0 {
		q.CureTolerance = DefaultCureTolerance
	}
	q.TemperatureTolerance /= VerifyFactor
	q.CureTolerance /= VerifyFactor
	return &q
}

// ErrorEstimate is the estimated error of a run's headline figures: the
// run's value minus that of the same case at tolerances VerifyFactor times
// tighter (Tightened). Since the time-stepping error falls with the
// tolerance, the difference estimates most of the run's own error (global
// error estimated by integrating again at a tighter tolerance: common
// practice). It is about (1 − VerifyFactor^(−q))·error when the error
// scales as tolerance^q: 0.78 of it for q = 2/3 (a second-order scheme
// with error-per-step control), 0.9 for q = 1. A value is NaN where a run
// lacks it (no curing layer, min cure never reached in one of the two).
type ErrorEstimate struct {
	PeakTemperature float64 // K
	MinFinalCure    float64
	TimeToMinCure   float64 // s
}

// EstimateError returns the differences run − tighter of the figures of
// ErrorEstimate.
func EstimateError(run, tighter Summary) ErrorEstimate {
	return ErrorEstimate{
		PeakTemperature: run.PeakTemperature - tighter.PeakTemperature,
		MinFinalCure:    run.MinFinalCure - tighter.MinFinalCure,
		TimeToMinCure:   run.TimeToMinCure - tighter.TimeToMinCure,
	}
}
