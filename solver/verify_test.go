package solver

import (
	"context"
	"math"
	"testing"
)

// TestVerifyEstimatesTheError: a deliberately coarse run of a 10 mm
// exothermic potting (tolerances 100 times the defaults) against the same
// case at tolerances 1000 times tighter still (the "true" answer, its own
// error far below the coarse one's). The estimate (coarse − tightened by
// VerifyFactor) recovers the true error to within the factor
// 1 − 10^(−q) expected for an error scaling as tolerance^q with q between
// 1/2 and 1 (0.68 to 0.9 of the true error; see ErrorEstimate), allowed
// 0.5 to 1.2 here. Source: the error model of the estimate (common practice).
func TestVerifyEstimatesTheError(t *testing.T) {
	p := thickPotting(t, 40)
	p.End = 4 * 3600
	p.MinCure = 0.7
	p.TemperatureTolerance = 100 * DefaultTemperatureTolerance
	p.CureTolerance = 100 * DefaultCureTolerance
	run := func(p *Problem) Summary {
		r, err := Run(context.Background(), p)
		if err != nil || r.Status != OK {
			t.Fatalf("run: %v %v", err, r.Err)
		}
		return r.Summary
	}
	coarse := run(p)
	est := EstimateError(coarse, run(Tightened(p)))
	fine := *p
	fine.TemperatureTolerance /= 1000 * VerifyFactor
	fine.CureTolerance /= 1000 * VerifyFactor
	fs := run(&fine)
	t.Logf("coarse: peak %.3f, cure %.4f, ttm %.0f; fine: %.3f %.4f %.0f", coarse.PeakTemperature, coarse.MinFinalCure, coarse.TimeToMinCure, fs.PeakTemperature, fs.MinFinalCure, fs.TimeToMinCure)
	truth := EstimateError(coarse, fs)
	for _, c := range []struct {
		name       string
		est, truth float64
	}{
		{"peak temperature", est.PeakTemperature, truth.PeakTemperature},
		{"least final cure", est.MinFinalCure, truth.MinFinalCure},
		{"time to min cure", est.TimeToMinCure, truth.TimeToMinCure},
	} {
		t.Logf("%s: estimated %.4g, true %.4g", c.name, c.est, c.truth)
		if r := c.est / c.truth; !(r >= 0.5 && r <= 1.2) {
			t.Errorf("%s: estimated error %.4g, true %.4g (ratio %.3g)", c.name, c.est, c.truth, r)
		}
	}
	if math.IsNaN(est.TimeToMinCure) {
		t.Error("time to min cure estimate is NaN")
	}
}
