package calibrate

import (
	"context"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"cureslab/cases"
	"cureslab/physics"
	"cureslab/physics/lsq"
	"cureslab/solver"
)

// The engine's tests set the free values on the solver problem directly;
// the key-path tests (calibrate_test.go) go through the case text.

func loadSlab(t testing.TB) *cases.Case {
	t.Helper()
	c, err := cases.Load("testdata/slab.toml")
	if err != nil {
		t.Fatal(err)
	}
	return c
}

// slabParam makes the Param of a free value of the slab case.
func slabParam(key string, start float64) Param {
	inf := math.Inf(1)
	switch key {
	case "top.h", "bottom.h":
		return Param{Key: key, Unit: "W/m^2/K", Lo: -inf, Hi: inf, Log: true, Ratio: true, Start: start}
	case "total_heat":
		return Param{Key: key, Unit: "J/g", Lo: -inf, Hi: inf, Ratio: true, Start: start}
	}
	panic(key)
}

// direct returns a builder that puts the values of keys into a copy of
// the slab's problem.
func direct(c *cases.Case, keys []string) builder {
	return func(vals []float64) (*solver.Problem, error) {
		p := *c.Problem
		m := *p.Materials[0]
		cu := *m.Cure
		m.Cure = &cu
		p.Materials = []*physics.Material{&m}
		for i, k := range keys {
			switch k {
			case "top.h":
				p.Top.H = vals[i]
			case "bottom.h":
				p.Bottom.H = vals[i]
			case "total_heat":
				cu.TotalHeat = vals[i] * 1e3
			}
		}
		return &p, nil
	}
}

// slabLog makes a log of the slab at the values vals of keys: readings
// every minute over the whole run at depths (m).
func slabLog(t testing.TB, c *cases.Case, keys []string, vals, depths []float64, sigma float64, seed uint64) *Log {
	t.Helper()
	p, _ := direct(c, keys)(vals)
	return logOf(t, p, depths, sigma, seed)
}

// logOf makes the log of p: readings every minute over the whole run at
// depths (m), with Gaussian noise sigma rounded to 0.01 °C, or exact when
// sigma is 0.
func logOf(t testing.TB, p *solver.Problem, depths []float64, sigma float64, seed uint64) *Log {
	t.Helper()
	var times []float64
	for tm := 0.0; tm <= p.End; tm += 60 {
		times = append(times, tm)
	}
	dec := 2
	if sigma == 0 {
		dec = -1
	}
	data, err := SyntheticLog(context.Background(), p, Synth{Depths: depths, Times: times, Sigma: sigma, Seed: seed, Decimals: dec})
	if err != nil {
		t.Fatal(err)
	}
	l, err := ReadLog("log.csv", data)
	if err != nil {
		t.Fatal(err)
	}
	return l
}

var (
	slabKeys  = []string{"top.h", "bottom.h", "total_heat"}
	slabTruth = []float64{8, 18, 120} // W/m²K, W/m²K, J/g; the case has 12, 12, 100
)

func slabParams() []Param {
	return []Param{slabParam("top.h", 12), slabParam("bottom.h", 12), slabParam("total_heat", 100)}
}

func TestRecoveryWithoutNoise(t *testing.T) {
	// A log made by the solver at known values, without noise: the fit
	// returns those values (analytic: the residuals vanish there). The
	// simulated temperatures carry the solver's own error only where the
	// step sequence changes with the values, far below 1e-3 K here;
	// 1e-4 relative on the values is what that allows.
	c := loadSlab(t)
	l := slabLog(t, c, slabKeys, slabTruth, []float64{0, 2e-3, 6e-3}, 0, 1)
	r, err := run(context.Background(), l, direct(c, slabKeys), slabParams(), Options{Jobs: 2})
	if err != nil {
		t.Fatal(err)
	}
	if !r.Converged() {
		t.Fatalf("status %v after %d iterations", r.Status, r.Iterations)
	}
	for i, p := range r.Params {
		if math.Abs(p.Value/slabTruth[i]-1) > 1e-4 {
			t.Errorf("%s = %.8g, made with %g", p.Key, p.Value, slabTruth[i])
		}
	}
	if r.RMSAll > 1e-3 {
		t.Errorf("RMS residual %.3g K, want ~0", r.RMSAll)
	}
	t.Logf("%d iterations, %d runs, RMS %.2g K", r.Iterations, r.Runs, r.RMSAll)
}

func TestIntervalCoverage(t *testing.T) {
	// Logs made at known values with Gaussian noise (σ = 0.3 K, readings
	// rounded to 0.01 °C): the 95 % intervals must hold the true values in
	// 95 % of the logs. For a model this close to linear in its values
	// over a few standard errors, each interval holds its value with
	// probability 0.95 (Bates & Watts, Nonlinear Regression Analysis and
	// Its Applications, 1988, ch. 2).
	//
	// How many logs: a value's misses in n logs are Binomial(n, 0.05). In
	// 40 logs that is 2 ± 1.4: "at least 38 of 40" fails by chance 32 % of
	// the time even with exact intervals, and a share of 0.90 passes half
	// the time, so 40 logs cannot tell right intervals from wrong ones.
	// The fits are cheap (16 cells), so we use 400 seeds: the share has a
	// standard deviation of 0.011, and [0.92, 0.98] (±2.75 of them) fails
	// by chance 0.6 % of the time per value. The first 40 seeds' counts
	// are logged too. The spread of the estimates over the logs must match
	// their mean standard error within 15 % (the sampling error of a
	// standard deviation from 400 values is 3.5 %).
	if testing.Short() {
		t.Skip("400 fits")
	}
	c := loadSlab(t)
	const seeds = 400
	n := len(slabKeys)
	hits, hits40 := make([]int, n), make([]int, n)
	sum, sum2, seSum := make([]float64, n), make([]float64, n), make([]float64, n)
	var runs int
	for seed := range uint64(seeds) {
		l := slabLog(t, c, slabKeys, slabTruth, []float64{0, 2e-3, 6e-3}, 0.3, seed+1)
		r, err := run(context.Background(), l, direct(c, slabKeys), slabParams(), Options{Jobs: 1})
		if err != nil {
			t.Fatal(err)
		}
		if !r.Converged() {
			t.Fatalf("seed %d: status %v", seed+1, r.Status)
		}
		runs += r.Runs
		for i, p := range r.Params {
			if p.Low <= slabTruth[i] && slabTruth[i] <= p.High {
				hits[i]++
				if seed < 40 {
					hits40[i]++
				}
			}
			sum[i] += p.Value
			sum2[i] += p.Value * p.Value
			seSum[i] += p.SE
		}
	}
	for i, key := range slabKeys {
		share := float64(hits[i]) / seeds
		mean := sum[i] / seeds
		sd := math.Sqrt((sum2[i] - seeds*mean*mean) / (seeds - 1))
		se := seSum[i] / seeds
		t.Logf("%s: intervals hold the true value in %d of %d logs (%.3f), %d of the first 40; estimates %.5g ± %.4g (truth %g), mean standard error %.4g",
			key, hits[i], seeds, share, hits40[i], mean, sd, slabTruth[i], se)
		if share < 0.92 || share > 0.98 {
			t.Errorf("%s: coverage %.3f outside [0.92, 0.98]", key, share)
		}
		if math.Abs(sd/se-1) > 0.15 {
			t.Errorf("%s: spread of the estimates %.4g, mean standard error %.4g", key, sd, se)
		}
	}
	t.Logf("%d runs in all", runs)
}

func TestStandardErrorsAgainstCentralDifferences(t *testing.T) {
	// At the fitted values, the covariance s²(JᵀJ)⁻¹ computed here with
	// J by central differences in the values themselves (step 1e-3
	// relative, error O(1e-6)) must give the standard errors the fit
	// reports (forward differences of 1e-4 in the scaled variables, delta
	// method): Bates & Watts 1988, ch. 2. 1 % covers the finite-difference
	// errors of both and the solver's noise.
	c := loadSlab(t)
	l := slabLog(t, c, slabKeys, slabTruth, []float64{0, 2e-3, 6e-3}, 0.3, 5)
	b := direct(c, slabKeys)
	r, err := run(context.Background(), l, b, slabParams(), Options{Jobs: 2})
	if err != nil {
		t.Fatal(err)
	}
	e := newEngine(context.Background(), l, b, 1, 3)
	m := len(e.obs)
	J := mat.NewDense(m, 3, nil)
	rp, rm := make([]float64, m), make([]float64, m)
	x := []float64{r.Params[0].Value, r.Params[1].Value, r.Params[2].Value}
	for k := range 3 {
		h := 1e-3 * x[k]
		xp, xm := append([]float64(nil), x...), append([]float64(nil), x...)
		xp[k] += h
		xm[k] -= h
		e.residuals(rp, xp)
		e.residuals(rm, xm)
		for i := range rp {
			J.Set(i, k, (rp[i]-rm[i])/(2*h))
		}
	}
	e.residuals(rp, x)
	var ssr float64
	for _, v := range rp {
		ssr += v * v
	}
	cov, ok := lsq.Covariance(J, ssr/2)
	if !ok {
		t.Fatal("singular")
	}
	for k, p := range r.Params {
		want := math.Sqrt(cov.At(k, k))
		if math.Abs(p.SE/want-1) > 0.01 {
			t.Errorf("%s: standard error %.5g, central differences %.5g", p.Key, p.SE, want)
		}
	}
}

func TestIdentifiabilityWarning(t *testing.T) {
	// Both faces in the same air with the same h, a symmetric stack, one
	// thermocouple at the mid-plane: by symmetry the mid-plane reads the
	// same for (h_top, h_bottom) and (h_bottom, h_top), and to first order
	// it depends on h_top + h_bottom only (analytic), so the two cannot
	// be separated: the fit must say so.
	c := loadSlab(t)
	keys := []string{"top.h", "bottom.h"}
	l := slabLog(t, c, keys, []float64{14, 14}, []float64{4e-3}, 0.3, 3)
	r, err := run(context.Background(), l, direct(c, keys), []Param{slabParam("top.h", 12), slabParam("bottom.h", 12)}, Options{Jobs: 2})
	if err != nil {
		t.Fatal(err)
	}
	found := false
	for _, w := range r.Warnings {
		if strings.Contains(w, "top.h") && strings.Contains(w, "bottom.h") && strings.Contains(w, cannotTell) {
			found = true
		}
	}
	if !found {
		t.Errorf("no identifiability warning; warnings %q, correlation %v", r.Warnings, r.Corr)
	}
	// With a thermocouple near each face as well, the same log
	// separates them: no such warning.
	l = slabLog(t, c, keys, []float64{14, 14}, []float64{0, 4e-3, 8e-3}, 0.3, 3)
	r, err = run(context.Background(), l, direct(c, keys), []Param{slabParam("top.h", 12), slabParam("bottom.h", 12)}, Options{Jobs: 2})
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range r.Warnings {
		if strings.Contains(w, cannotTell) {
			t.Errorf("three depths: %s", w)
		}
	}
}
