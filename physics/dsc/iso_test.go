package dsc

import (
	"math"
	"testing"

	"cureslab/physics"
)

// twoStepScans returns dynamic scans of an invented resin that cures by two
// independent parallel reactions, 40 % of the heat by a first-order
// reaction with E = 55 kJ/mol and 60 % by a second-order one with
// E = 95 kJ/mol. Its state is two-dimensional (α1, α2), so no single rate
// law r(T, α) describes it, and Friedman's E rises with α (measured: from
// 63 kJ/mol at α = 0.1 to 94 kJ/mol at 0.75, as the slower, steeper
// reaction takes over). Integrated by RK4 in the test with 16 steps per sample
// of 0.25 K, from 20 °C to 300 °C, no baseline, no noise.
func twoStepScans(rates []float64) []*Scan {
	const R = 8.314462618
	const H = 450e3 // J/kg
	r1 := func(T, a float64) float64 { return 2e5 * math.Exp(-55e3/(R*T)) * (1 - a) }
	r2 := func(T, a float64) float64 { return 1.5e10 * math.Exp(-95e3/(R*T)) * (1 - a) * (1 - a) }
	var out []*Scan
	for _, K := range rates {
		beta := K / 60
		step := 0.25 / beta
		n := int(280/0.25) + 1
		s := &Scan{Name: "two-step", Time: make([]float64, n), Temp: make([]float64, n), HeatFlow: make([]float64, n)}
		a1, a2 := 0.0, 0.0
		T := func(t float64) float64 { return 293.15 + beta*t }
		for i := range n {
			t := float64(i) * step
			if i > 0 {
				h := step / 16
				for j := range 16 {
					tj := t - step + float64(j)*h
					k1, l1 := r1(T(tj), a1), r2(T(tj), a2)
					k2, l2 := r1(T(tj+h/2), a1+h/2*k1), r2(T(tj+h/2), a2+h/2*l1)
					k3, l3 := r1(T(tj+h/2), a1+h/2*k2), r2(T(tj+h/2), a2+h/2*l2)
					k4, l4 := r1(T(tj+h), a1+h*k3), r2(T(tj+h), a2+h*l3)
					a1 += h / 6 * (k1 + 2*k2 + 2*k3 + k4)
					a2 += h / 6 * (l1 + 2*l2 + 2*l3 + l4)
				}
			}
			s.Time[i], s.Temp[i] = t, T(t)
			s.HeatFlow[i] = H * (0.4*r1(T(t), a1) + 0.6*r2(T(t), a2))
		}
		out = append(out, s)
	}
	return out
}

// peaksOf returns the peak temperatures of the curves of scans synthesized
// from law c at the given heating rates (K/min), as Process finds them.
func peaksOf(t *testing.T, c *physics.Cure, rates []float64) []float64 {
	t.Helper()
	var out []float64
	for _, K := range rates {
		beta := K / 60
		s, err := Synthesize(Synth{Name: "model", Cure: c, Start: 293.15, Rate: beta, Duration: 280 / beta, Step: 0.25 / beta})
		if err != nil {
			t.Fatal(err)
		}
		cv, err := Process(s, LinearBaseline, Window{})
		if err != nil {
			t.Fatal(err)
		}
		out = append(out, cv.Peak.Temp)
	}
	return out
}

func TestIsoconversionalReproducesTwoStepScans(t *testing.T) {
	rates := []float64{2, 5, 10, 20}
	scans := twoStepScans(rates)
	iso, err := Analyze(scans, Options{Model: Isoconversional})
	if err != nil || iso.Fit == nil {
		t.Fatalf("isoconversional: %v, refused: %q", err, iso.FitRefused)
	}
	// The resin is two-step: Friedman's E rises with α (the analysis warns).
	if !(iso.EaSpread > MaxEaSpread) {
		t.Errorf("Friedman E spread %.2f, want above %.2f for a two-step resin", iso.EaSpread, MaxEaSpread)
	}
	al, E, _ := iso.Fit.Cure.Model.(*physics.Isoconversional).Table()
	t.Logf("table: %d rows, α %g … %g, E %.1f kJ/mol at α = 0.1, %.1f at 0.9; R² %.5f", len(al), al[0], al[len(al)-1], E[3]/1e3, E[len(E)-4]/1e3, iso.Fit.R2)
	want := make([]float64, len(rates))
	for i, c := range iso.Curves {
		want[i] = c.Peak.Temp
	}
	got := peaksOf(t, &iso.Fit.Cure, rates)
	worst := 0.0
	for i := range rates {
		// Source: the scans the table was built from (their peak
		// temperatures as Process finds them); the isoconversional
		// prediction must reproduce them within 1 K.
		worst = max(worst, math.Abs(got[i]-want[i]))
		if math.Abs(got[i]-want[i]) > 1 {
			t.Errorf("%g K/min: simulated peak %.2f K, scan %.2f K", rates[i], got[i], want[i])
		}
	}
	// No single-step model fits: the autocatalytic law, fitted to all
	// scans at once, misses a peak by more than 1 K.
	auto, err := Analyze(scans, Options{Model: Autocatalytic})
	if err != nil || auto.Fit == nil {
		t.Fatalf("autocatalytic: %v, refused: %q", err, auto.FitRefused)
	}
	gotAuto := peaksOf(t, &auto.Fit.Cure, rates)
	worstAuto := 0.0
	for i := range rates {
		worstAuto = max(worstAuto, math.Abs(gotAuto[i]-want[i]))
	}
	t.Logf("worst peak error: isoconversional %.3f K, autocatalytic %.3f K (R² %.4f)", worst, worstAuto, auto.Fit.R2)
	if !(worstAuto > 1) {
		t.Errorf("the autocatalytic fit reproduces every peak within %.2f K: the test resin is not two-step enough", worstAuto)
	}
}

func TestIsoconversionalTableOfSingleStep(t *testing.T) {
	// A first-order resin: E = 80 kJ/mol at every α, and ln[A f(α)] =
	// ln A + ln(1 − α) (the synthetic first-order set of refFirstOrder: A = 1e10 1/min).
	curves := firstOrderScans(t, []float64{1, 2, 5, 10, 20}, 0)
	res, err := Fit(curves, nil, FitSpec{Model: Isoconversional})
	if err != nil {
		t.Fatal(err)
	}
	al, E, L := res.Cure.Model.(*physics.Isoconversional).Table()
	if len(al) != len(IsoconversionalLevels()) {
		t.Errorf("%d rows, want %d", len(al), len(IsoconversionalLevels()))
	}
	for j := range al {
		// Source: first-order law (analytic) with the worked set's E and A.
		if math.Abs(E[j]/80e3-1) > 0.005 || math.Abs(L[j]-math.Log(1e10/60*(1-al[j]))) > 0.05 {
			t.Errorf("α = %g: E = %.5g J/mol, lnAf = %.4f; want 80 kJ/mol, %.4f", al[j], E[j], L[j], math.Log(1e10/60*(1-al[j])))
		}
	}
	if res.R2 < 0.999 || len(res.Curves) != len(curves) {
		t.Errorf("R² = %v, %d curves", res.R2, len(res.Curves))
	}
	if _, err := Fit(curves, nil, FitSpec{Model: Isoconversional, Diffusion: true}); err == nil {
		t.Errorf("diffusion with the isoconversional table accepted")
	}
}
