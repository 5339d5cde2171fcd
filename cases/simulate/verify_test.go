package simulate

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"

	"cureslab/cases/results"
	"cureslab/solver"
)

// TestVerifyCoarseCase: the potting example run with deliberately loose
// step tolerances (2 K and 0.05 per step, 100 and 50 times the defaults)
// and --verify reports, in summary.json, an estimated error close to its
// true error, measured against the same case at tolerances 10 000 times
// tighter than the loose ones. The estimate keeps 1 − 10^(−q) of the error
// for an error scaling as tolerance^q (q between 1/2 and 1: 0.68 to 0.9;
// common practice), so it must lie between 0.5 and 1.2 times the truth.
func TestVerifyCoarseCase(t *testing.T) {
	c := exampleCase(t, "thick-potting-oven")
	c.Problem.TemperatureTolerance, c.Problem.CureTolerance = 2, 0.05
	// Nothing else holds the steps short: no max_step, one output time.
	c.Problem.MaxStep, c.Problem.OutputTimes = 0, []float64{c.Problem.End}
	dir := t.TempDir()
	out := Case(context.Background(), c, dir, Options{Verify: true})
	if out.Err != nil || !out.Ran {
		t.Fatalf("run: %v", out.Err)
	}
	data, err := os.ReadFile(filepath.Join(dir, results.SummaryFile))
	if err != nil {
		t.Fatal(err)
	}
	var s results.Summary
	if err := json.Unmarshal(data, &s); err != nil {
		t.Fatal(err)
	}
	e := s.EstimatedError
	if e == nil {
		t.Fatalf("summary.json has no estimated_error:\n%s", data)
	}
	fine := *c.Problem
	fine.TemperatureTolerance, fine.CureTolerance = 2e-4, 5e-6
	fine.NoFields = true
	f, err := solver.Run(context.Background(), &fine)
	if err != nil || f.Status != solver.OK {
		t.Fatalf("fine run: %v %v", err, f.Err)
	}
	truth := solver.EstimateError(out.Result.Summary, f.Summary)
	for _, x := range []struct {
		name       string
		est, truth float64
	}{
		{"peak temperature", float64(e.PeakTemperatureK), truth.PeakTemperature},
		{"least final cure", float64(e.MinFinalCure), truth.MinFinalCure},
		{"time to min cure", float64(e.TimeToMinCureS), truth.TimeToMinCure},
	} {
		t.Logf("%s: estimated %.4g, true %.4g", x.name, x.est, x.truth)
		if r := x.est / x.truth; !(r >= 0.5 && r <= 1.2) {
			t.Errorf("%s: estimated error %.4g, true %.4g (ratio %.3g)", x.name, x.est, x.truth, r)
		}
	}
	line, warn := e.Words()
	t.Logf("terminal: %s; warnings %q", line, warn)
	if math.Abs(float64(e.PeakTemperatureK)) > results.VerifyPeakLimit && len(warn) == 0 {
		t.Error("the peak moved more than the limit but no warning was given")
	}
}
