package solver

import (
	"context"
	"math"
	"testing"

	"cureslab/physics"
)

// publishedLLS is the published two-regime epoxy of Lee, Loos & Springer
// (J. Composite Materials 16:510, 1982; values from memory), A in 1/s.
var publishedLLS = physics.LeeLoosSpringer{
	A1: 2.101e9 / 60, E1: 80.7e3,
	A2: -2.014e9 / 60, E2: 77.8e3,
	A3: 1.960e5 / 60, E3: 56.6e3,
	B: 0.47, Switch: 0.3,
}

// llsRate is the Lee–Loos–Springer law written out independently of
// package physics (math.Exp, its own clamp), for the RK4 references.
func llsRate(T, a float64) float64 {
	const R = 8.314462618
	m := publishedLLS
	k := func(A, E float64) float64 { return A * math.Exp(-E/(R*T)) }
	var r float64
	if a <= m.Switch {
		r = (k(m.A1, m.E1) + k(m.A2, m.E2)*a) * (1 - a) * (m.B - a)
	} else {
		r = k(m.A3, m.E3) * (1 - a)
	}
	return max(r, 0)
}

// rk4Along integrates dα/dt = f(T(t), α) from (t0, a0) to t1 by classical
// RK4 with steps of about h (an independent reference).
func rk4Along(f func(T, a float64) float64, T func(t float64) float64, t0, a0, t1, h float64) float64 {
	n := int(math.Ceil((t1 - t0) / h))
	if n == 0 {
		return a0
	}
	h = (t1 - t0) / float64(n)
	a := a0
	for k := range n {
		t := t0 + float64(k)*h
		k1 := f(T(t), a)
		k2 := f(T(t+h/2), a+h/2*k1)
		k3 := f(T(t+h/2), a+h/2*k2)
		k4 := f(T(t+h), a+h*k3)
		a += h / 6 * (k1 + 2*k2 + 2*k3 + k4)
	}
	return a
}

func TestLeeLoosSpringerIsothermalAgainstRK4(t *testing.T) {
	const T = 177 + 273.15
	p := isothermal(t, publishedLLS, T, 0, 3600, 1e-6)
	r, err := Run(context.Background(), p)
	if err != nil || r.Status != OK {
		t.Fatalf("run: %v %v", err, r.Err)
	}
	worst, ref, tref := 0.0, 0.0, 0.0
	for _, s := range r.Snapshots[1:] {
		// Source: RK4 in the test on the law written out (llsRate), steps of
		// 0.02 s; across the jump at the switch its error is about h times
		// the jump in the rate, far below the solver's.
		ref = rk4Along(llsRate, func(float64) float64 { return T }, tref, ref, s.Time, 0.02)
		tref = s.Time
		worst = max(worst, math.Abs(s.Cure[0]-ref))
	}
	t.Logf("steps %d (rejected %d), worst |α − α_RK4| = %.3g, final α = %.6f", r.Summary.Steps, r.Summary.RejectedSteps, worst, ref)
	// The step control bounds each step's local error by the tolerance; the
	// law contracts perturbations (∂r/∂α < 0 past the switch), so the global
	// error is at most their sum.
	if limit := float64(r.Summary.Steps) * 1e-6; worst > limit {
		t.Errorf("worst cure error %.3g > steps × tolerance = %.3g", worst, limit)
	}
}

// rampProblem returns a thin, highly conducting slab whose faces follow
// the program prog, so that its temperature is the program's to well under
// a millikelvin; the cure releases no heat.
func rampProblem(t *testing.T, c *physics.Cure, prog physics.Schedule, end float64) *Problem {
	mat := inert(1500, 1000, 200)
	mat.Cure = c
	var outs []float64
	for k := 1; k <= 50; k++ {
		outs = append(outs, end*float64(k)/50)
	}
	return &Problem{
		Mesh:                 slab(t, 1e-3, 4),
		Materials:            []*physics.Material{mat},
		Top:                  physics.Face{Kind: physics.Fixed, Set: prog},
		Bottom:               physics.Face{Kind: physics.Fixed, Set: prog},
		InitialTemperature:   prog.At(0),
		End:                  end,
		OutputTimes:          outs,
		CureTolerance:        1e-6,
		TemperatureTolerance: 1e-4,
		Probes:               []float64{0, 5e-4},
	}
}

func TestLeeLoosSpringerDynamicAgainstRK4(t *testing.T) {
	// 2.5 K/min from 20 °C to 177 °C, then held: the cure passes the switch
	// during the ramp.
	prog, err := physics.FromSegments(293.15, []physics.Segment{{Rate: 2.5 / 60, To: 450.15}, {Hold: 3600}})
	if err != nil {
		t.Fatal(err)
	}
	c := &physics.Cure{Model: publishedLLS, ResinFraction: 1, GelPoint: 0.5}
	r, err := Run(context.Background(), rampProblem(t, c, prog, 7000))
	if err != nil || r.Status != OK {
		t.Fatalf("run: %v %v", err, r.Err)
	}
	worst, ref, tref := 0.0, 0.0, 0.0
	for _, s := range r.Snapshots[1:] {
		// Source: RK4 in the test along the same program (llsRate), steps of
		// 0.05 s.
		ref = rk4Along(llsRate, prog.At, tref, ref, s.Time, 0.05)
		tref = s.Time
		worst = max(worst, math.Abs(s.Cure[0]-ref))
	}
	t.Logf("steps %d (rejected %d), worst |α − α_RK4| = %.3g, final α = %.6f", r.Summary.Steps, r.Summary.RejectedSteps, worst, ref)
	if limit := float64(r.Summary.Steps) * 1e-6; worst > limit {
		t.Errorf("worst cure error %.3g > steps × tolerance = %.3g", worst, limit)
	}
}

func TestIsoconversionalHeldAtTableEnd(t *testing.T) {
	m, err := physics.NewIsoconversional(
		[]float64{0.05, 0.3, 0.6, 0.9},
		[]float64{60e3, 62e3, 66e3, 70e3},
		[]float64{12, 13.5, 14.5, 14.2},
	)
	if err != nil {
		t.Fatal(err)
	}
	const T = 420.0
	c := &physics.Cure{Model: m, ResinFraction: 1, GelPoint: 0.5}
	tEnd := c.IsothermalTime(T, 0, 0.9)
	p := isothermal(t, m, T, 0, 3*tEnd, 1e-6)
	r, err := Run(context.Background(), p)
	if err != nil || r.Status != OK {
		t.Fatalf("run: %v %v", err, r.Err)
	}
	for _, s := range r.Snapshots[1:] {
		// Source: the law's isothermal integral (physics.IsothermalCure,
		// checked against RK4 in package physics) before the end; the table's
		// last α after it (the rate is zero past it).
		want := c.IsothermalCure(T, 0, s.Time)
		if math.Abs(s.Cure[0]-want) > float64(r.Summary.Steps)*1e-6 {
			t.Errorf("t = %.0f s: α = %.7f, want %.7f", s.Time, s.Cure[0], want)
		}
		if s.Time > tEnd && (s.Cure[0] != 0.9 || s.Rate[0] != 0) {
			t.Errorf("t = %.0f s past the end (%.0f s): α = %v, rate %v; want 0.9 and 0", s.Time, tEnd, s.Cure[0], s.Rate[0])
		}
	}
	// Reaching the end and holding there costs (almost) no rejected steps:
	// compare with the same run stopped just before it (the kinks of the
	// table at its rows cost the others).
	before, err := Run(context.Background(), isothermal(t, m, T, 0, 0.95*tEnd, 1e-6))
	if err != nil || before.Status != OK {
		t.Fatalf("run: %v %v", err, before.Err)
	}
	t.Logf("end of table reached at %.0f s; %d steps, %d rejected (%d before the end)", tEnd, r.Summary.Steps, r.Summary.RejectedSteps, before.Summary.RejectedSteps)
	if extra := r.Summary.RejectedSteps - before.Summary.RejectedSteps; extra > 2 {
		t.Errorf("the end of the table cost %d rejected steps, want at most 2", extra)
	}
}

// viscousResin is an invented n-th order resin with a Castro–Macosko
// viscosity.
func viscousResin() (*physics.Cure, *physics.CastroMacosko) {
	return &physics.Cure{Model: physics.NthOrder{A: 3e5, E: 65e3, N: 1.4}, ResinFraction: 1, GelPoint: 0.55},
		&physics.CastroMacosko{Eta0: 3e-7, E: 50e3, A: 1.2, B: 2.5}
}

func TestViscosityRampAgainstFineIntegration(t *testing.T) {
	cure, visc := viscousResin()
	prog, err := physics.FromSegments(293.15, []physics.Segment{{Rate: 2.0 / 60, To: 433.15}, {Hold: 3600}})
	if err != nil {
		t.Fatal(err)
	}
	const end = 5000.0
	p := rampProblem(t, cure, prog, end)
	p.Materials[0].Viscosity = visc
	p.FlowViscosity = 50
	r, err := Run(context.Background(), p)
	if err != nil || r.Status != OK {
		t.Fatalf("run: %v %v", err, r.Err)
	}
	// Independent reference: RK4 along the program at 0.01 s, ln η on that
	// fine grid, its minimum refined by the parabola through the three
	// smallest samples, and the time below 50 Pa·s before gel by linear
	// interpolation of the crossings.
	const h = 0.01
	f := func(T, a float64) float64 { rr, _, _ := cure.Rate(T, a); return rr }
	lnEta := func(t, a float64) float64 {
		const R = 8.314462618
		T := prog.At(t)
		if a >= 0.55 {
			return math.Inf(1)
		}
		return math.Log(3e-7) + 50e3/(R*T) + (1.2+2.5*a)*math.Log(0.55/(0.55-a))
	}
	a, tPrev := 0.0, 0.0
	lnPrev := lnEta(0, 0)
	minLn, minT := lnPrev, 0.0
	var below float64
	lnFlow := math.Log(50)
	var l2, l1 float64 = math.NaN(), lnPrev
	for k := 1; float64(k)*h <= end; k++ {
		tt := float64(k) * h
		a = rk4Along(f, prog.At, tPrev, a, tt, h)
		L := lnEta(tt, a)
		if L < minLn {
			minLn, minT = L, tt
		}
		if l1 < l2 && l1 < L && !math.IsInf(L, 0) { // refine the minimum by the parabola
			c := (L - 2*l1 + l2) / (2 * h * h)
			tv := tPrev - (L-l2)/(4*c*h)
			if yv := l1 - (L-l2)*(L-l2)/(16*c*h*h); yv < minLn {
				minLn, minT = yv, tv
			}
		}
		switch {
		case lnPrev < lnFlow && L < lnFlow:
			below += h
		case lnPrev < lnFlow && !math.IsInf(L, 0):
			below += h * (lnFlow - lnPrev) / (L - lnPrev)
		case lnPrev < lnFlow: // gelled within this tiny step
			below += h / 2
		case L < lnFlow:
			below += h * (lnFlow - L) / (lnPrev - L)
		}
		l2, l1, lnPrev, tPrev = l1, L, L, tt
	}
	s := r.Summary
	t.Logf("solver: min η %.6g Pa·s at %.1f s, flow window %.1f s; reference %.6g Pa·s at %.1f s, %.1f s; %d steps",
		s.MinViscosity, s.MinViscosityTime, s.FlowWindow, math.Exp(minLn), minT, below, s.Steps)
	// Tolerances: the solver's cure error (steps × 1e-6 in α, times
	// ∂ln η/∂α ≈ 5) and the parabola through steps of about a minute.
	if d := math.Abs(math.Log(s.MinViscosity) - minLn); d > 2e-3 {
		t.Errorf("min viscosity %.6g Pa·s, reference %.6g (ln differs by %.2g)", s.MinViscosity, math.Exp(minLn), d)
	}
	if math.Abs(s.MinViscosityTime-minT) > 20 {
		t.Errorf("min viscosity at %.1f s, reference %.1f s", s.MinViscosityTime, minT)
	}
	if math.Abs(s.FlowWindow-below) > 2 {
		t.Errorf("flow window %.2f s, reference %.2f s", s.FlowWindow, below)
	}
	if !(below > 300) {
		t.Fatalf("the reference stays below the threshold %.0f s only: the test case is off", below)
	}
	// Fields: viscosity per cell and at the probes, NaN past gel.
	for _, sn := range r.Snapshots {
		for i, v := range sn.Viscosity {
			gelled := sn.Cure[i] >= 0.55
			if gelled != math.IsNaN(v) || (!gelled && !(v > 0)) {
				t.Errorf("t = %.0f s cell %d: α = %v, η = %v", sn.Time, i, sn.Cure[i], v)
			}
		}
		if len(sn.ProbeViscosity) != 2 {
			t.Fatalf("probe viscosity %v", sn.ProbeViscosity)
		}
		if a := sn.ProbeCure[1]; a < 0.55 {
			if want := visc.At(sn.ProbeT[1], a, 0.55); math.Abs(sn.ProbeViscosity[1]/want-1) > 1e-12 {
				t.Errorf("probe viscosity %v, want %v", sn.ProbeViscosity[1], want)
			}
		}
	}
}

func TestNoViscosityFields(t *testing.T) {
	p := isothermal(t, physics.NthOrder{A: 1e5, E: 60e3, N: 1}, 400, 0, 600, 1e-4)
	r, err := Run(context.Background(), p)
	if err != nil {
		t.Fatal(err)
	}
	s := r.Summary
	if !math.IsNaN(s.MinViscosity) || !math.IsNaN(s.FlowWindow) || !math.IsNaN(s.MinViscosityTime) || r.Snapshots[0].Viscosity != nil {
		t.Errorf("no viscosity law: min %v at %v, window %v, field %v", s.MinViscosity, s.MinViscosityTime, s.FlowWindow, r.Snapshots[0].Viscosity)
	}
	p.FlowViscosity = -1
	if _, err := Run(context.Background(), p); err == nil {
		t.Errorf("negative flow viscosity accepted")
	}
}

func TestAdiabaticRisePly(t *testing.T) {
	// A carbon/epoxy ply (physics.Mix) with insulated faces: the cure heat
	// per kg of ply is the resin's mass fraction times the resin's total
	// heat. Source: energy balance (analytic), ΔT = wr·H·Δα/cp of the ply.
	resin := inert(1200, 1200, 0.2)
	resin.Cure = &physics.Cure{Model: publishedLLS, TotalHeat: 470e3, ResinFraction: 1, GelPoint: 0.5}
	f, _ := physics.BuiltinFibre("carbon-fibre")
	ply, err := physics.Mix("ply", f, resin, 0.6, physics.DefaultConductivityModel)
	if err != nil {
		t.Fatal(err)
	}
	p := &Problem{
		Mesh: slab(t, 0.005, 6), Materials: []*physics.Material{ply},
		Top: physics.Face{Kind: physics.Insulated}, Bottom: physics.Face{Kind: physics.Insulated},
		InitialTemperature: 420, End: 1800,
	}
	r, err := Run(context.Background(), p)
	if err != nil || r.Status != OK {
		t.Fatalf("run: %v %v", err, r.Err)
	}
	_, wr := physics.MassFractions(f.Density, 1200, 0.6)
	cp, _, _ := ply.SpecificHeat.At(420, 0)
	last := r.Snapshots[len(r.Snapshots)-1]
	for i := range last.T {
		if got, want := last.T[i]-420, wr*470e3*last.Cure[i]/cp; math.Abs(got-want) > 1e-6 {
			t.Errorf("cell %d: rise %.9f K, want %.9f K", i, got, want)
		}
	}
	t.Logf("rise %.3f K at α = %.4f (wr = %.4f, cp = %.1f)", last.T[0]-420, last.Cure[0], wr, cp)
}

func TestThickLaminateCentreOvershoot(t *testing.T) {
	// A 25.4 mm carbon/epoxy laminate of the published Lee–Loos–Springer
	// resin (ply ρ 1578 kg/m³, cp 862 J/(kg·K), k 0.4135 W/(m·K), resin mass
	// fraction 0.387, H = 473.6 J/g), both faces held on the two-hold cycle
	// 2.5 K/min → 116 °C, 60 min, 2.5 K/min → 177 °C, 120 min, from 20 °C.
	prog, err := physics.FromSegments(293.15, []physics.Segment{
		{Rate: 2.5 / 60, To: 116 + 273.15}, {Hold: 3600}, {Rate: 2.5 / 60, To: 177 + 273.15}, {Hold: 7200},
	})
	if err != nil {
		t.Fatal(err)
	}
	var peaks [2]float64
	for k, cells := range []int{41, 81} {
		ply := inert(1578, 862, 0.4135)
		ply.Cure = &physics.Cure{Model: publishedLLS, TotalHeat: 473.6e3, ResinFraction: 0.387, GelPoint: 0.5}
		p := &Problem{
			Mesh: slab(t, 0.0254, cells), Materials: []*physics.Material{ply},
			Top: physics.Face{Kind: physics.Fixed, Set: prog}, Bottom: physics.Face{Kind: physics.Fixed, Set: prog},
			InitialTemperature: 293.15, End: prog.End(),
			TemperatureTolerance: 0.005, CureTolerance: 1e-4,
		}
		r, err := Run(context.Background(), p)
		if err != nil || r.Status != OK {
			t.Fatalf("run: %v %v", err, r.Err)
		}
		s := r.Summary
		peaks[k] = s.PeakTemperature
		t.Logf("%d cells: centre peak %.3f °C at %.1f min, depth %.2f mm, overshoot %.3f K, %d steps",
			cells, s.PeakTemperature-273.15, s.PeakTime/60, s.PeakDepth*1e3, s.Overshoot, s.Steps)
		// The hottest point is the mid-plane (symmetry).
		if math.Abs(s.PeakDepth-0.0127) > 1e-9 {
			t.Errorf("%d cells: peak at depth %.4g mm, want the mid-plane 12.7 mm", cells, s.PeakDepth*1e3)
		}
		// Source: an independent grid-converged solution of this case peaks
		// at ≈ 200 °C, ≈ 23 K over the 177 °C hold (a derived value, computed
		// outside this project, quoted to the kelvin); the literature on
		// such cycles reports centre overshoots of about 20–25 K (from
		// memory: Loos & Springer, J. Composite Materials 17:135, 1983;
		// Bogetti & Gillespie, J. Composite Materials 26:626, 1992 — no
		// published number could be checked here).
		if math.Abs(s.PeakTemperature-273.15-200) > 1 || math.Abs(s.Overshoot-23) > 1 {
			t.Errorf("%d cells: centre peak %.2f °C, overshoot %.2f K; want ≈ 200 °C, ≈ 23 K", cells, s.PeakTemperature-273.15, s.Overshoot)
		}
		if !(s.Overshoot > 20 && s.Overshoot < 25) {
			t.Errorf("%d cells: overshoot %.2f K outside the 20–25 K reported for such cycles", cells, s.Overshoot)
		}
	}
	// Grid convergence: halving the cells moves the peak by far less than
	// the comparison's tolerance.
	if d := math.Abs(peaks[1] - peaks[0]); d > 0.05 {
		t.Errorf("peak moved by %.3f K from 41 to 81 cells", d)
	}
}
