package ttt

import (
	"bytes"
	"context"
	"cureslab/cases"
	"cureslab/cases/internal/testkit"
	"errors"
	"math"
	"strings"
	"testing"
)

// rk4Time integrates dα/dt = rate(α) from a0 by RK4 at step h until α
// reaches target, and returns the time (interpolated in the last step), or
// +Inf after tmax.
func rk4Time(rate func(a float64) float64, a0, target, h, tmax float64) float64 {
	a, t := a0, 0.0
	for t < tmax {
		k1 := rate(a)
		k2 := rate(a + h/2*k1)
		k3 := rate(a + h/2*k2)
		k4 := rate(a + h*k3)
		an := a + h/6*(k1+2*k2+2*k3+k4)
		if an >= target {
			return t + h*(target-a)/(an-a)
		}
		a, t = an, t+h
	}
	return math.Inf(1)
}

func TestTTT(t *testing.T) {
	c, err := cases.Parse("ttt.toml", []byte(testkit.TTTCase), "")
	if err != nil {
		t.Fatal(err)
	}
	tab, err := Tabulate(context.Background(), c, "resin-T", Options{})
	if err != nil {
		t.Fatal(err)
	}
	cure := c.Materials["resin-T"].Cure
	g := cure.Glass
	// Defaults: max(Tg0, 20 C) = 20 C to Tg_full + 20 K = 150 C, step 10 K;
	// the target is criteria.min_cure.
	if n := len(tab.Rows); n != 14 || tab.Rows[0].Temp != 293.15 || math.Abs(tab.Rows[n-1].Temp-423.15) > 1e-9 || tab.Target != 0.85 {
		t.Errorf("default table: %d rows from %g K to %g K, target %g", n, tab.Rows[0].Temp, tab.Rows[n-1].Temp, tab.Target)
	}
	for _, r := range tab.Rows {
		// The gel time is the isothermal time to the gel point from the
		// case's initial cure.
		if want := cure.IsothermalTime(r.Temp, 0.01, 0.58); r.Gel != want {
			t.Errorf("%g K: gel %g s, IsothermalTime %g s", r.Temp, r.Gel, want)
		}
		switch {
		case r.Temp >= g.TgFull:
			if !math.IsInf(r.Vitrify, 1) {
				t.Errorf("%g K, above Tg_full: vitrification at %g s, want never", r.Temp, r.Vitrify)
			}
			continue
		}
		// Source: DiBenedetto in the Pascault–Williams form
		// (Pascault & Williams, J. Polym. Sci. B 28:85, 1990; formula from
		// memory): the cure av at which Tg(av) = T, found here by bisection
		// of the forward formula, independently of CureAt.
		tg := func(a float64) float64 { return g.Tg0 + (g.TgFull-g.Tg0)*g.Lambda*a/(1-(1-g.Lambda)*a) }
		lo, hi := 0.0, 1.0
		for range 200 {
			if mid := (lo + hi) / 2; tg(mid) < r.Temp {
				lo = mid
			} else {
				hi = mid
			}
		}
		av := (lo + hi) / 2
		want := cure.IsothermalTime(r.Temp, 0.01, av)
		if math.Abs(r.Vitrify-want) > 1e-9*want && !(math.IsInf(r.Vitrify, 1) && math.IsInf(want, 1)) {
			t.Errorf("%g K: vitrification %g s, time to Tg(α) = T (α = %.6f) %g s", r.Temp, r.Vitrify, av, want)
		}
	}
	// Independent check of two rows by RK4 on the rate law.
	for _, i := range []int{4, 8} { // 60 C and 100 C
		r := tab.Rows[i]
		rate := func(a float64) float64 { v, _, _ := cure.Rate(r.Temp, a); return v }
		h := r.Gel / 20000
		if got := rk4Time(rate, 0.01, 0.58, h, 10*r.Gel); math.Abs(got/r.Gel-1) > 1e-6 {
			t.Errorf("%g K: gel %g s, RK4 %g s", r.Temp, r.Gel, got)
		}
		if got := rk4Time(rate, 0.01, 0.85, r.Target/20000, 10*r.Target); math.Abs(got/r.Target-1) > 1e-6 {
			t.Errorf("%g K: time to 0.85 %g s, RK4 %g s", r.Temp, r.Target, got)
		}
	}
	// At 20 C the diffusion limit (αc = −0.98 + 0.0052·293 = 0.54) holds
	// 0.85 off for years.
	if !(tab.Rows[0].Target > 3e7) {
		t.Errorf("20 C: time to 0.85 = %g s, want years", tab.Rows[0].Target)
	}

	var csvOut, txt bytes.Buffer
	if err := writeCSV(&csvOut, tab); err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(csvOut.String()), "\n")
	if lines[0] != "temperature_C,gel_time_s,vitrification_time_s,time_to_0.85_s" || len(lines) != 15 {
		t.Errorf("CSV header %q, %d lines", lines[0], len(lines))
	}
	if !strings.HasPrefix(lines[14], "150,") || !strings.Contains(lines[14], ",,") || !strings.HasPrefix(lines[1], "20,") {
		t.Errorf("CSV rows: %q ... %q", lines[1], lines[14])
	}
	if err := Print(&txt, tab); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(txt.String(), "never") || !strings.Contains(txt.String(), "to cure 0.85") {
		t.Errorf("printed table:\n%s", txt.String())
	}
}

func TestTTTBelowTg0AndOptions(t *testing.T) {
	c, err := cases.Parse("ttt.toml", []byte(testkit.TTTCase), "")
	if err != nil {
		t.Fatal(err)
	}
	tab, err := Tabulate(context.Background(), c, "resin-T", Options{From: 273.15 - 40, To: 273.15 - 30, Step: 5, Target: 0.5})
	if err != nil {
		t.Fatal(err)
	}
	// At or below Tg0 (−35 C) the resin is glassy from the start.
	if len(tab.Rows) != 3 || tab.Rows[0].Vitrify != 0 || tab.Rows[1].Vitrify != 0 || !(tab.Rows[2].Vitrify > 0) || tab.Target != 0.5 {
		t.Errorf("rows %+v", tab.Rows)
	}
	for _, tc := range []struct {
		material string
		opt      Options
		want     string
	}{
		{"resin-t", Options{}, `did you mean "resin-T"?`},
		{"aluminium", Options{}, `material "aluminium" does not cure`},
		{"resin-T", Options{From: 400, To: 300}, "is below --from"},
		{"resin-T", Options{Target: 1.5}, "the target cure must be in (0, 1]"},
		{"resin-T", Options{From: 300, To: 400, Step: 0.01}, "more than 1000 rows"},
	} {
		if _, err := Tabulate(context.Background(), c, tc.material, tc.opt); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s %+v: %v, want %q", tc.material, tc.opt, err, tc.want)
		}
	}
}

func TestDefaultTTTRangeWithoutGlass(t *testing.T) {
	text := strings.Replace(testkit.TTTCase, "[materials.resin-T.cure.glass_transition]\nTg0 = \"-35 C\"\nTg_full = \"130 C\"\nlambda = 0.42\n", "", 1)
	c, err := cases.Parse("ttt.toml", []byte(text), "")
	if err != nil {
		t.Fatal(err)
	}
	// The oven reaches 80 C: 20 C to 100 C in steps of 5 K.
	from, to, step := defaultRange(c, c.Materials["resin-T"].Cure)
	if math.Abs(from-293.15) > 1e-9 || math.Abs(to-373.15) > 1e-9 || step != 5 {
		t.Errorf("range %g to %g step %g", from, to, step)
	}
	tab, err := Tabulate(context.Background(), c, "resin-T", Options{})
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range tab.Rows {
		if !math.IsNaN(r.Vitrify) {
			t.Errorf("%g K: vitrification %g without a glass transition", r.Temp, r.Vitrify)
		}
	}
	var csvOut bytes.Buffer
	writeCSV(&csvOut, tab)
	if !strings.Contains(strings.Split(csvOut.String(), "\n")[1], ",,") {
		t.Errorf("no empty vitrification field: %q", strings.Split(csvOut.String(), "\n")[1])
	}
}

// Ctrl-C stops the table between rows: the context's error, no table.
func TestTabulateInterrupted(t *testing.T) {
	c, err := cases.Parse("ttt.toml", []byte(testkit.TTTCase), "")
	if err != nil {
		t.Fatal(err)
	}
	for _, n := range []int64{0, 1, 5} {
		tab, err := Tabulate(testkit.NewStopAfter(n), c, "resin-T", Options{})
		if tab != nil || !errors.Is(err, context.Canceled) {
			t.Errorf("cancelled after %d rows: %v", n, err)
		}
	}
}
