package solver_test

// Adversarial problems: extreme but legal inputs that a user can
// write in a case file. Each is either solved correctly — checked against
// an analytic value, a physical bound, and the energy ledger — or ends with
// a clear status; no snapshot ever holds NaN or Inf. Test names start with
// TestAdversarial, so `go test ./solver -run Adversarial` runs exactly these.

import (
	"context"
	"errors"
	"fmt"
	"math"
	"strconv"
	"testing"

	"cureslab/mesh"
	"cureslab/physics"
	"cureslab/solver"
	"cureslab/solver/internal/reference"
)

// advBalance is the largest conservation residual accepted. The ledger
// counts the reaction heat and the stored heat with the scheme's own
// quantities, so it balances to round-off (README Case file reference, summary.json: conservation of energy); 1e-8 leaves room
// for the Newton tolerance (1e-10 K per cell) over many steps.
const advBalance = 1e-8

// advRun runs p, which must meet the solver's contract, and checks every
// snapshot for NaN and Inf (and cure outside [0, 1]).
func advRun(t *testing.T, p *solver.Problem) *solver.Result {
	t.Helper()
	r, err := solver.Run(context.Background(), p)
	if err != nil {
		t.Fatalf("Run: %v", err)
	}
	advFinite(t, p, r)
	return r
}

// advFinite fails the test when a snapshot holds a value no output file may
// hold: a non-finite or non-positive absolute temperature, a cure outside
// [0, 1] in a curing cell, or a non-finite probe or heat value.
func advFinite(t *testing.T, p *solver.Problem, r *solver.Result) {
	t.Helper()
	if len(r.Snapshots) == 0 {
		t.Fatalf("no snapshots (status %v: %v)", r.Status, r.Err)
	}
	bad := func(x float64) bool { return math.IsNaN(x) || math.IsInf(x, 0) }
	for _, s := range r.Snapshots {
		for i, T := range s.T {
			if bad(T) || T <= 0 {
				t.Fatalf("t = %g s, cell %d: T = %g K (status %v: %v)", s.Time, i, T, r.Status, r.Err)
			}
			if p.Materials[p.Mesh.Owner[i]].Cure != nil && !(s.Cure[i] >= 0 && s.Cure[i] <= 1) {
				t.Fatalf("t = %g s, cell %d: cure %g", s.Time, i, s.Cure[i])
			}
		}
		for k, T := range s.ProbeT {
			if bad(T) || T <= 0 {
				t.Fatalf("t = %g s, probe %d: T = %g K (status %v: %v)", s.Time, k, T, r.Status, r.Err)
			}
		}
		if bad(s.HeatIn) {
			t.Fatalf("t = %g s: heat in %g J/m²", s.Time, s.HeatIn)
		}
	}
	if e := r.Summary.ConservationResidual; bad(e) {
		t.Fatalf("conservation residual %g", e)
	}
}

// advOK checks that the run reached its end and balanced its ledger.
func advOK(t *testing.T, p *solver.Problem, r *solver.Result) {
	t.Helper()
	if r.Status != solver.OK || r.EndTime != p.End {
		t.Fatalf("status %v at t = %g s of %g s: %v", r.Status, r.EndTime, p.End, r.Err)
	}
	if e := r.Summary.ConservationResidual; !(e < advBalance) {
		t.Errorf("conservation residual %.3g, want < %g (ledger %+v)", e, advBalance, r.Ledger)
	}
}

// advBounds checks the maximum principle of pure conduction: with no heat
// source, every temperature stays within [lo, hi], the range of the initial
// and boundary temperatures, up to slack.
func advBounds(t *testing.T, r *solver.Result, lo, hi, slack float64) {
	t.Helper()
	worst := 0.0
	for _, s := range r.Snapshots {
		for _, T := range s.T {
			worst = max(worst, lo-T, T-hi)
		}
	}
	if worst > slack {
		t.Errorf("a temperature leaves [%g, %g] K by %.3g K (allowed %g K)", lo, hi, worst, slack)
	}
}

func advMesh(t *testing.T, opt mesh.Options, layers ...mesh.Layer) *mesh.Mesh {
	t.Helper()
	m, err := mesh.Build(layers, opt)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

func advFixed(T float64) physics.Face {
	return physics.Face{Kind: physics.Fixed, Set: physics.Steady(T)}
}

// advSteady returns the steady state of a stack between two fluids at Ttop
// and Tbot behind surface resistances rTop and rBot (1/h; 0 for a fixed
// face): the heat flux q = (Ttop − Tbot)/ΣR through the surface, layer
// (L/k) and contact resistances in series, and the temperature on the upper
// and lower side of every internal layer face (index j: the face above
// layer j+1). Source: analytic (series thermal resistances, Incropera et
// al. §3.1, from memory).
func advSteady(Ttop, Tbot, rTop, rBot float64, L, k, rc []float64) (q float64, upper, lower []float64) {
	sum := rTop + rBot
	for j := range L {
		sum += L[j]/k[j] + rc[j]
	}
	q = (Ttop - Tbot) / sum
	T := Ttop - q*rTop
	for j := range L {
		T -= q * rc[j]
		if j > 0 {
			lower = append(lower, T)
		}
		T -= q * L[j] / k[j]
		if j < len(L)-1 {
			upper = append(upper, T)
		}
	}
	return q, upper, lower
}

// advInterfaces returns the depth of every internal layer face of m.
func advInterfaces(m *mesh.Mesh) []float64 {
	var z []float64
	for j := 1; j < len(m.Layers); j++ {
		z = append(z, m.Faces[m.First[j]])
	}
	return z
}

// advFace is a fixed face (h = +Inf) or a convective one.
func advFace(T, h float64) physics.Face {
	if math.IsInf(h, 1) {
		return advFixed(T)
	}
	return physics.Face{Kind: physics.Convection, H: h, Air: physics.Steady(T)}
}

// advSteadyTol is the temperature tolerance of the steady-stack runs, and
// the accuracy their steady values are held to. The finite-volume solution
// of a steady piecewise-linear profile is exact, so what is left is the
// time integration, which the step control bounds by this tolerance.
const advSteadyTol = 1e-4 // K

// advSteadyStack runs a stack from Tbot between a top fluid at Ttop and a
// bottom fluid at Tbot (coefficients hTop, hBot; +Inf for a fixed face)
// until end, which the caller makes long enough to reach the steady state,
// and checks it: probes on every layer face (which read the upper layer's
// side, README Case file reference, [output]) and just below it (the lower side) against advSteady to
// advSteadyTol, the maximum principle during the transient, and the ledger.
func advSteadyStack(t *testing.T, m *mesh.Mesh, mats []*physics.Material, Ttop, Tbot, hTop, hBot, end float64) {
	t.Helper()
	var L, k, rc []float64
	for j, layer := range m.Layers {
		L = append(L, layer.Thickness)
		k = append(k, mats[j].Conductivity.Uncured.Min())
		rc = append(rc, layer.ContactResistance)
	}
	_, upper, lower := advSteady(Ttop, Tbot, 1/hTop, 1/hBot, L, k, rc)
	var probes []float64
	for _, z := range advInterfaces(m) {
		probes = append(probes, z, math.Nextafter(z, math.Inf(1)))
	}
	p := &solver.Problem{
		Mesh: m, Materials: mats,
		Top: advFace(Ttop, hTop), Bottom: advFace(Tbot, hBot),
		InitialTemperature:   Tbot,
		End:                  end,
		OutputTimes:          []float64{end / 10, end / 2},
		TemperatureTolerance: advSteadyTol,
		Probes:               probes,
	}
	r := advRun(t, p)
	advOK(t, p, r)
	// The transient must not leave [Tbot, Ttop] by more than the step
	// tolerance (Crank–Nicolson can ring on cells much thinner than a step).
	advBounds(t, r, min(Ttop, Tbot), max(Ttop, Tbot), p.TemperatureTolerance)
	last := r.Snapshots[len(r.Snapshots)-1]
	for j := range upper {
		if got := last.ProbeT[2*j]; math.Abs(got-upper[j]) > advSteadyTol {
			t.Errorf("face %d: probe on the face reads %.9g K, upper side is %.9g K (lower side %.9g K)", j+1, got, upper[j], lower[j])
		}
		if got := last.ProbeT[2*j+1]; math.Abs(got-lower[j]) > advSteadyTol {
			t.Errorf("face %d: probe just below the face reads %.9g K, lower side is %.9g K", j+1, got, lower[j])
		}
	}
	t.Logf("%d cells, %d steps (%d rejected), balance %.3g; faces upper %v lower %v; probes %v",
		m.Cells(), r.Summary.Steps, r.Summary.RejectedSteps, r.Summary.ConservationResidual, upper, lower, last.ProbeT)
}

// advKnownFailure names a failure these tests found and that has since been
// fixed; the test runs always and guards against its return.
func advKnownFailure(t *testing.T, what string) {
	t.Helper()
	t.Log("regression test for a fixed failure: " + what)
}

// advStiffStart is the failure of a face that changes the temperature of
// very thin or very conductive cells quickly at the start (a platen that
// jumps, or an oven on a 1 µm film) in a long run.
const advStiffStart = "a run whose first cells react in microseconds (a 1 µm film, or a platen jump on copper cells) " +
	"fails at t = 1 µs (\"the error estimate cannot be met\") when End ≳ 1e4 s: the first step is at least 1 µs and " +
	"has no error estimate, and the smallest step allowed is 1e-9·End, so the first rejection ends the run"

// Source: Incropera et al., Fundamentals of Heat and Mass Transfer,
// Appendix A: copper 8933/385/401 (confirmed),
// borosilicate glass 2225/835/1.4 (from memory). Cured epoxy 1150/1500/0.2
// and the foam 30/1500/0.004 are invented for the tests.
var (
	advCopper = inertMaterial("copper", 8933, 385, 401)
	advGlass  = inertMaterial("glass", 2225, 835, 1.4)
	advEpoxy  = inertMaterial("epoxy", 1150, 1500, 0.2)
	advFoam   = inertMaterial("foam", 30, 1500, 0.004)
)

// TestAdversarialThinLayer: a 1 µm epoxy film on a 50 mm glass layer (a
// thickness ratio of 5e4), with and without mesh grading.
//
// "oven, 5 h": h = 20 W/m²K, air at 400 K above and 300 K below, from
// 300 K. The film is thermally invisible: its resistance L/k = 5e-6 m²K/W
// against 1/h = 0.05 changes face temperatures by at most q·L/k ≤
// h·ΔT·L/k = 0.01 K, and its heat capacity (1.7 J/m²K) is 2e-5 of the
// glass's (analytic). So the probes must match a run without the film,
// depth for depth, within 0.01 K + twice the temperature tolerance; the
// maximum principle and the ledger hold. Run at the default temperature
// tolerance (0.05 K) and at 1e-3 K.
//
// "oven, steady" and "platen, steady": run 20 glass diffusion times L²/α
// (the slowest mode has then decayed by e^{−20·ζ1²}, ζ1 = 0.86 at Bi = 0.7,
// Carslaw & Jaeger 1959, §3.11) and check the steady profile (advSteadyStack).
func TestAdversarialThinLayer(t *testing.T) {
	const film, glass = 1e-6, 0.05
	for _, c := range []struct{ g, tol float64 }{{0, 0.05}, {1.2, 0.05}, {0, 1e-3}, {1.2, 1e-3}} {
		g, tol := c.g, c.tol
		t.Run(fmt.Sprintf("oven, 5 h/growth=%g/tolerance=%g", g, tol), func(t *testing.T) {
			if tol < 0.01 {
				advKnownFailure(t, advStiffStart)
			}
			run := func(layers ...mesh.Layer) *solver.Result {
				m := advMesh(t, mesh.Options{Growth: g}, layers...)
				top := m.Faces[m.First[len(layers)-1]] // top of the glass
				mats := []*physics.Material{advGlass}
				if len(layers) == 2 {
					mats = []*physics.Material{advEpoxy, advGlass}
				}
				p := &solver.Problem{
					Mesh: m, Materials: mats,
					Top: advFace(400, 20), Bottom: advFace(300, 20),
					InitialTemperature: 300, End: 5 * 3600,
					OutputTimes:          []float64{600, 3600, 5 * 3600},
					TemperatureTolerance: tol,
					Probes:               []float64{0, top, top + glass/2, top + glass},
				}
				r := advRun(t, p)
				advOK(t, p, r)
				advBounds(t, r, 300, 400, tol)
				return r
			}
			with := run(mesh.Layer{Name: "film", Thickness: film}, mesh.Layer{Name: "glass", Thickness: glass})
			without := run(mesh.Layer{Name: "glass", Thickness: glass})
			for k := 1; k < len(with.Snapshots); k++ { // at t = 0 the face value is the instantaneous face balance
				a, b := with.Snapshots[k], without.Snapshots[k]
				for j := range a.ProbeT {
					if j == 0 {
						continue // the film's own top face
					}
					if d := math.Abs(a.ProbeT[j] - b.ProbeT[j]); d > 0.01+2*tol {
						t.Errorf("t = %g s, glass depth %g mm: %.5f K with the film, %.5f K without", a.Time, float64(j-1)*25, a.ProbeT[j], b.ProbeT[j])
					}
				}
			}
			last := with.Snapshots[len(with.Snapshots)-1]
			t.Logf("%d steps, probes with film %v, without %v", with.Summary.Steps, last.ProbeT, without.Snapshots[len(without.Snapshots)-1].ProbeT)
		})
	}
	alpha := 1.4 / (2225 * 835)
	end := 20 * glass * glass / alpha
	for _, h := range []float64{20, math.Inf(1)} {
		for _, g := range []float64{0, 1.2} {
			t.Run(fmt.Sprintf("steady h=%g/growth=%g", h, g), func(t *testing.T) {
				advKnownFailure(t, advStiffStart)
				m := advMesh(t, mesh.Options{Growth: g},
					mesh.Layer{Name: "film", Thickness: film},
					mesh.Layer{Name: "glass", Thickness: glass})
				advSteadyStack(t, m, []*physics.Material{advEpoxy, advGlass}, 400, 300, h, h, end)
			})
		}
	}
}

// TestAdversarialConductivityRatio: copper (k = 401 W/m/K) against a foam
// (k = 0.004 W/m/K), a ratio of 1e5, in a copper–foam–copper sandwich in an
// oven (h = 20) and on a platen, 20 foam diffusion times long.
func TestAdversarialConductivityRatio(t *testing.T) {
	alpha := 0.004 / (30 * 1500.0)
	end := 20 * 0.01 * 0.01 / alpha
	for _, h := range []float64{20, math.Inf(1)} {
		t.Run(fmt.Sprintf("h=%g", h), func(t *testing.T) {
			if math.IsInf(h, 1) {
				advKnownFailure(t, advStiffStart)
			}
			m := advMesh(t, mesh.Options{},
				mesh.Layer{Name: "skin", Thickness: 2e-3},
				mesh.Layer{Name: "foam", Thickness: 10e-3},
				mesh.Layer{Name: "base", Thickness: 2e-3})
			advSteadyStack(t, m, []*physics.Material{advCopper, advFoam, advCopper}, 350, 300, h, h, end)
		})
	}
}

// TestAdversarialContactResistance: the two extremes of a contact
// resistance, 0 (perfect contact) and 1 m²K/W (a gap worth 1 m of a
// 1 W/m/K solid), between 2 mm of epoxy and 2 mm of copper on a platen.
// With a resistance the two sides of the face differ by 99 K, so the probe
// exactly on the face must read the upper (epoxy) side (README Case file reference, [output]). The run
// lasts 20 times the longer of the copper's charging time through the gap,
// ρ c L R_c (analytic lumped estimate), and the epoxy's diffusion time.
func TestAdversarialContactResistance(t *testing.T) {
	for _, rc := range []float64{0, 1} {
		t.Run("Rc="+fmtG(rc), func(t *testing.T) {
			m := advMesh(t, mesh.Options{},
				mesh.Layer{Name: "epoxy", Thickness: 2e-3},
				mesh.Layer{Name: "copper", Thickness: 2e-3, ContactResistance: rc})
			tau := max(8933*385*2e-3*rc, 2e-3*2e-3/(0.2/(1150*1500.0)))
			advSteadyStack(t, m, []*physics.Material{advEpoxy, advCopper}, 400, 300, math.Inf(1), math.Inf(1), 20*tau)
		})
	}
}

// TestAdversarialHugeH: a convection coefficient of 1e6 W/m²K, Bi = hL/k =
// 1e4, on both faces of a wall of half-thickness L = 10 mm, against the
// full Fourier series (Carslaw & Jaeger 1959, §3.11, reference.PlaneWall). The face is
// then all but fixed: the first cell sees a jump of the full temperature
// difference at t = 0. Centre and quarter-depth values at Fo = 0.1 … 1.
//
// Tolerance: 2e-4 in θ with 100 cells over 2L, as for Bi = 10 in
// TestAnalyticPlaneWall (twice its semi-discrete error plus 1e-4 for time
// integration); the temperature tolerance of 1e-5 K keeps the time error
// below 1e-7 in θ, so that the error must also fall at second order when
// the mesh is refined to 200 cells (ratio above 3, against 4 in theory).
func TestAdversarialHugeH(t *testing.T) {
	const (
		L, k, rho, cp = 0.01, 1.0, 2000.0, 1000.0
		h             = 1e6
		Ti, Tinf      = 300.0, 400.0
	)
	alpha := k / (rho * cp)
	fos := []float64{0.1, 0.2, 0.5, 1}
	var outs []float64
	for _, fo := range fos {
		outs = append(outs, fo*L*L/alpha)
	}
	worst := map[int]float64{}
	for _, cells := range []int{100, 200} {
		m := advMesh(t, mesh.Options{}, mesh.Layer{Name: "wall", Thickness: 2 * L, Cells: cells})
		face := physics.Face{Kind: physics.Convection, H: h, Air: physics.Steady(Tinf)}
		p := &solver.Problem{
			Mesh: m, Materials: []*physics.Material{inertMaterial("wall", rho, cp, k)},
			Top: face, Bottom: face,
			InitialTemperature:   Ti,
			End:                  outs[len(outs)-1],
			OutputTimes:          outs,
			TemperatureTolerance: 1e-5,
			Probes:               []float64{L, L / 2},
		}
		r := advRun(t, p)
		advOK(t, p, r)
		advBounds(t, r, Ti, Tinf, p.TemperatureTolerance)
		for i, fo := range fos {
			s := snapshotAt(t, r, outs[i])
			for j, xs := range []float64{0, 0.5} {
				// Source: Carslaw & Jaeger (1959) §3.11, full series.
				want := reference.PlaneWall(h*L/k, fo, xs)
				got := (s.ProbeT[j] - Tinf) / (Ti - Tinf)
				worst[cells] = max(worst[cells], math.Abs(got-want))
				if cells == 100 && math.Abs(got-want) > 2e-4 {
					t.Errorf("Fo = %g, x* = %g: θ = %.6f, series %.6f", fo, xs, got, want)
				}
			}
		}
		t.Logf("%d cells: %d steps, worst |θ − series| = %.3g", cells, r.Summary.Steps, worst[cells])
	}
	if ratio := worst[100] / worst[200]; !(ratio > 3) {
		t.Errorf("error ratio 100 → 200 cells is %.3g, want about 4 (second order)", ratio)
	}
}

// i2erfc is the second repeated integral of the complementary error
// function, i²erfc z = ¼[(1 + 2z²) erfc z − (2/√π) z e^{−z²}].
// Source: Carslaw & Jaeger (1959), Appendix II (from memory); checked by
// i²erfc 0 = ¼ and by the ramp solution below meeting its face value.
func i2erfc(z float64) float64 {
	return 0.25 * ((1+2*z*z)*math.Erfc(z) - 2/math.SqrtPi*z*math.Exp(-z*z))
}

// rampSolution is the temperature rise at depth x and time t of a
// semi-infinite solid whose face temperature rises at rate beta from t = 0
// to tr and is then held: β[t·4i²erfc(x/2√(αt)) − (t−tr)·4i²erfc(x/2√(α(t−tr)))].
// Source: Carslaw & Jaeger (1959) §2.5 (face temperature ∝ t), and
// superposition (analytic).
func rampSolution(x, t, alpha, beta, tr float64) float64 {
	u := func(t float64) float64 {
		if t <= 0 {
			return 0
		}
		return t * 4 * i2erfc(x/(2*math.Sqrt(alpha*t)))
	}
	return beta * (u(t) - u(t-tr))
}

// advRampProblem is 12 mm of epoxy on a platen that ramps at 1000 K/min
// (23 → 180 °C in 9.4 s) and then holds, insulated below.
func advRampProblem(t *testing.T, outs []float64, probes []float64) (*solver.Problem, float64) {
	const T0, T1, beta = 296.15, 453.15, 1000.0 / 60
	set, err := physics.FromSegments(T0, []physics.Segment{{Rate: beta, To: T1}, {Hold: 600}})
	if err != nil {
		t.Fatal(err)
	}
	return &solver.Problem{
		Mesh:                 advMesh(t, mesh.Options{}, mesh.Layer{Name: "epoxy", Thickness: 12e-3, Cells: 480}),
		Materials:            []*physics.Material{advEpoxy},
		Top:                  physics.Face{Kind: physics.Fixed, Set: set},
		Bottom:               physics.Face{Kind: physics.Insulated},
		InitialTemperature:   T0,
		End:                  60,
		OutputTimes:          outs,
		TemperatureTolerance: 1e-3,
		Probes:               probes,
	}, (T1 - T0) / beta
}

// TestAdversarialFastRamp: the platen of advRampProblem. The run must
// reach its end, balance its ledger and keep every temperature between the
// initial and the platen's final temperature (maximum principle), up to
// the temperature tolerance.
func TestAdversarialFastRamp(t *testing.T) {
	p, _ := advRampProblem(t, []float64{2, 5, 15, 30}, []float64{0, 1e-3})
	r := advRun(t, p)
	advOK(t, p, r)
	advBounds(t, r, 296.15, 453.15, p.TemperatureTolerance)
}

// TestAdversarialFastRampAnalytic: the platen of advRampProblem against the
// semi-infinite ramp solution at 0.25 … 2 mm, during and after the ramp;
// the 12 mm slab is semi-infinite to 1e-8 K here (the image term at 22 mm
// is below 4i²erfc(4), analytic).
//
// Tolerance 0.01 K on a rise of 157 K: the semi-discrete error of 0.025 mm
// cells against a penetration depth √(αt) ≥ 0.76 mm (t ≥ 5 s) is about
// (Δx/√(αt))²/12 of the rise ≈ 0.014 K at 5 s, falling to 1e-3 K by 60 s;
// at 2 s only depths ≥ 1 mm are checked. A temperature tolerance of
// 1e-3 K bounds the time error.
//
// Known failure: the first step is 2 s long (the face starts at the initial
// temperature, so the initial rates are zero and the first step is the
// first output time), taken by implicit Euler with the platen at its t = 2 s
// value for the whole step and accepted without an error estimate: 2.5 K
// too hot at 1 mm at 2 s, still 0.1 K at 60 s.
func TestAdversarialFastRampAnalytic(t *testing.T) {
	advKnownFailure(t, "the first step is accepted without an error estimate and sized from the rates at t = 0, "+
		"which ignore a ramping face: 2.5 K error after a 1000 K/min platen ramp")
	const T0, beta = 296.15, 1000.0 / 60
	alpha := 0.2 / (1150 * 1500.0)
	depths := []float64{0.25e-3, 0.5e-3, 1e-3, 2e-3}
	tr := (453.15 - T0) / beta // end of the ramp
	p, _ := advRampProblem(t, []float64{2, 5, tr, 15, 30, 60}, depths)
	r := advRun(t, p)
	advOK(t, p, r)
	worst := 0.0
	for _, tm := range p.OutputTimes {
		s := snapshotAt(t, r, tm)
		for j, x := range depths {
			if tm < 5 && x < 1e-3 {
				continue
			}
			want := T0 + rampSolution(x, tm, alpha, beta, tr)
			d := math.Abs(s.ProbeT[j] - want)
			worst = max(worst, d)
			if d > 0.01 {
				t.Errorf("t = %g s, x = %g mm: T = %.5f K, analytic %.5f K", tm, x*1e3, s.ProbeT[j], want)
			}
		}
	}
	t.Logf("%d steps (%d rejected), worst |T − analytic| = %.3g K", r.Summary.Steps, r.Summary.RejectedSteps, worst)
}

// advSecondCure is 1 mm of an insulated resin with first-order kinetics
// (E = 50 kJ/mol, H = 420 J/g, c_p = 1500 J/kg/K) and k(T0) = 5 1/s at
// T0 = 296.15 K; it returns the problem and A.
func advSecondCure(t *testing.T) (*solver.Problem, float64) {
	const T0, E = 296.15, 50e3
	A := 5 * math.Exp(E/(physics.GasConstant*T0))
	mat := inertMaterial("fast", 1150, 1500, 0.2)
	mat.Cure = &physics.Cure{Model: physics.NthOrder{A: A, E: E, N: 1}, TotalHeat: 420e3, ResinFraction: 1, GelPoint: 0.5}
	return &solver.Problem{
		Mesh:      advMesh(t, mesh.Options{}, mesh.Layer{Name: "resin", Thickness: 1e-3, Cells: 4}),
		Materials: []*physics.Material{mat},
		Top:       physics.Face{Kind: physics.Insulated}, Bottom: physics.Face{Kind: physics.Insulated},
		InitialTemperature: T0,
		End:                5,
		CureTolerance:      1e-4,
		Probes:             []float64{0.5e-3},
	}, A
}

// TestAdversarialSecondCurePeak: the summary's peak temperature of the
// resin of advSecondCure must not exceed the adiabatic limit T0 + H/c_p
// (analytic): the slab is insulated, so no cell can get hotter. (It caught
// a peak interpolated between steps above a plateau, 576.150049 K.)
func TestAdversarialSecondCurePeak(t *testing.T) {
	p, _ := advSecondCure(t)
	r := advRun(t, p)
	advOK(t, p, r)
	// Source: adiabatic rise ΔT_ad = H/c_p (analytic).
	limit := p.InitialTemperature + 420e3/1500
	if pk := r.Summary.PeakTemperature; pk > limit+1e-6 {
		t.Errorf("peak %.9f K above the adiabatic limit %.9f K", pk, limit)
	}
}

// TestAdversarialSecondCure: a resin so fast that the whole part cures in
// about a second (k = 5 1/s at the start, 1e5 1/s at the end), in an
// insulated 1 mm slab, so that it heats adiabatically. Checks:
//   - energy: the final temperature is T0 + ΔT_ad·(α − α0) with
//     ΔT_ad = H/c_p (analytic), to 1e-6 K;
//   - bound: no cell in any snapshot exceeds T0 + ΔT_ad;
//   - the part is fully cured;
//   - the gel time against the adiabatic first-order integral
//     t(α) = ∫ dα′ / (k(T0 + ΔT_ad α′)(1 − α′)), evaluated by Simpson's rule
//     with 20000 intervals (derived), to 1 %.
func TestAdversarialSecondCure(t *testing.T) {
	const (
		T0       = 296.15
		H, cp    = 420e3, 1500.0
		E        = 50e3
		gelPoint = 0.5
	)
	p, A := advSecondCure(t)
	dTad := H / cp
	r := advRun(t, p)
	advOK(t, p, r)
	for _, sn := range r.Snapshots {
		for i, T := range sn.T {
			if T > T0+dTad+1e-6 {
				t.Errorf("t = %g s, cell %d: %.9f K above the adiabatic limit %.9f K", sn.Time, i, T, T0+dTad)
			}
		}
	}
	last := r.Snapshots[len(r.Snapshots)-1]
	for i := range last.T {
		if last.Cure[i] < 1-1e-9 {
			t.Errorf("cell %d: final cure %.12f, want full cure", i, last.Cure[i])
		}
		// Source: adiabatic energy balance ΔT = H (α − α0)/c_p (analytic).
		if want := T0 + dTad*last.Cure[i]; math.Abs(last.T[i]-want) > 1e-6 {
			t.Errorf("cell %d: final T = %.9f K, adiabatic balance gives %.9f K", i, last.T[i], want)
		}
	}
	// Source: derived, adiabatic first-order kinetics by quadrature.
	f := func(a float64) float64 {
		k, _ := physics.Arrhenius(A, E, T0+dTad*a)
		return 1 / (k * (1 - a))
	}
	n := 20000
	hq := gelPoint / float64(n)
	sum := f(0) + f(gelPoint)
	for i := 1; i < n; i++ {
		w := 2.0
		if i%2 == 1 {
			w = 4
		}
		sum += w * f(float64(i)*hq)
	}
	want := sum * hq / 3
	if got := r.Summary.GelTimeFirst; math.Abs(got-want) > 0.01*want {
		t.Errorf("gel time %.6g s, adiabatic integral %.6g s", got, want)
	}
	t.Logf("%d steps (%d rejected), gel at %.6g s (integral %.6g s), final T %.4f K, balance %.3g",
		r.Summary.Steps, r.Summary.RejectedSteps, r.Summary.GelTimeFirst, want, last.T[0], r.Summary.ConservationResidual)
}

// TestAdversarialInitialCure: an initial cure of 0.999.
//   - Isothermal, n = 0.5: (1 − α)^½ = (1 − α0)^½ − k t/2, so the cure
//     reaches 1 in finite time 2√(1 − α0)/k and then stays there (analytic,
//     separation of variables with the initial value α0); cure never decreases
//     and never exceeds 1.
//   - Adiabatic: the 0.1 % of cure left releases ΔT_ad·0.001 (analytic).
func TestAdversarialInitialCure(t *testing.T) {
	const (
		a0 = 0.999
		T  = 400.0
		E  = 60e3
	)
	R := physics.GasConstant
	A := 0.01 * math.Exp(E/(R*T)) // k(T) = 0.01 1/s
	k := 0.01
	tFull := 2 * math.Sqrt(1-a0) / k
	exact := func(tm float64) float64 {
		if tm >= tFull {
			return 1
		}
		s := math.Sqrt(1-a0) - k*tm/2
		return 1 - s*s
	}
	t.Run("isothermal", func(t *testing.T) {
		mat := inertMaterial("resin", 1150, 1500, 0.2)
		mat.Cure = &physics.Cure{Model: physics.NthOrder{A: A, E: E, N: 0.5}, TotalHeat: 0, ResinFraction: 1, GelPoint: 0.5}
		var outs []float64
		for i := 1; i <= 40; i++ {
			outs = append(outs, float64(i)*0.5)
		}
		p := &solver.Problem{
			Mesh: advMesh(t, mesh.Options{}, mesh.Layer{Name: "resin", Thickness: 1e-3, Cells: 4}), Materials: []*physics.Material{mat},
			Top: advFixed(T), Bottom: advFixed(T),
			InitialTemperature: T, InitialCure: a0,
			End: 20, OutputTimes: outs, CureTolerance: 1e-7,
		}
		r := advRun(t, p)
		// No heat flows here, so the relative conservation residual is
		// round-off over round-off (reported to the lead: it reads 1);
		// only the end of the run is checked.
		if r.Status != solver.OK || r.EndTime != p.End {
			t.Fatalf("status %v at %g s: %v", r.Status, r.EndTime, r.Err)
		}
		prev := a0
		worst := 0.0
		for _, s := range r.Snapshots {
			a := s.Cure[0]
			if a < prev || a > 1 {
				t.Errorf("t = %g s: cure %.12f after %.12f", s.Time, a, prev)
			}
			prev = a
			worst = max(worst, math.Abs(a-exact(s.Time)))
		}
		// The cure tolerance bounds the local error per step; 1e-5 is a
		// hundred of them, and a tenth of the cure left to react.
		if worst > 1e-5 {
			t.Errorf("worst |α − α_exact| = %.3g, want ≤ 1e-5", worst)
		}
		if last := r.Snapshots[len(r.Snapshots)-1]; last.Cure[0] != 1 {
			t.Errorf("final cure %.15f, want 1 (full cure at %.4g s)", last.Cure[0], tFull)
		}
		t.Logf("%d steps, worst |α − α_exact| = %.3g", r.Summary.Steps, worst)
	})
	t.Run("adiabatic", func(t *testing.T) {
		mat := inertMaterial("resin", 1150, 1500, 0.2)
		mat.Cure = &physics.Cure{Model: physics.Autocatalytic{A1: A, E1: E, A2: A, E2: E, M: 0.5, N: 1.5}, TotalHeat: 420e3, ResinFraction: 1, GelPoint: 0.5}
		p := &solver.Problem{
			Mesh: advMesh(t, mesh.Options{}, mesh.Layer{Name: "resin", Thickness: 1e-3, Cells: 4}), Materials: []*physics.Material{mat},
			Top: physics.Face{Kind: physics.Insulated}, Bottom: physics.Face{Kind: physics.Insulated},
			InitialTemperature: T, InitialCure: a0, End: 3600,
		}
		r := advRun(t, p)
		advOK(t, p, r)
		last := r.Snapshots[len(r.Snapshots)-1]
		// Source: adiabatic energy balance ΔT = H (α − α0)/c_p (analytic).
		want := T + 420e3*(last.Cure[0]-a0)/1500
		if math.Abs(last.T[0]-want) > 1e-9 || last.Cure[0] < a0 {
			t.Errorf("final T %.12f K, cure %.9f; balance gives %.12f K", last.T[0], last.Cure[0], want)
		}
		// Every cell was already gelled at the start.
		if r.Summary.GelTimeFirst != 0 || r.Summary.GelTimeLast != 0 {
			t.Errorf("gel times %g, %g s, want 0 (gelled from the start)", r.Summary.GelTimeFirst, r.Summary.GelTimeLast)
		}
	})
}

// fkSlab builds the Frank-Kamenetskii slab: half-width
// a, walls held at T0, zero-order kinetics (consumption does not matter
// until full cure) with E = 40 R T0, and A chosen for the given δ:
//
//	δ = (E/(R T0²)) (H ρ A a²/k) exp(−E/(R T0)).
func fkSlab(t *testing.T, delta, end float64) *solver.Problem {
	const (
		T0, a       = 400.0, 5e-3
		rho, cp, kk = 1150.0, 1500.0, 0.2
		H           = 420e3
		eps         = 1.0 / 40 // R T0 / E
	)
	E := physics.GasConstant * T0 / eps
	A := delta * kk * math.Exp(1/eps) / (1 / (eps * T0) * H * rho * a * a)
	mat := inertMaterial("resin", rho, cp, kk)
	mat.Cure = &physics.Cure{Model: physics.NthOrder{A: A, E: E, N: 0}, TotalHeat: H, ResinFraction: 1, GelPoint: 0.5}
	return &solver.Problem{
		Mesh: advMesh(t, mesh.Options{}, mesh.Layer{Name: "resin", Thickness: 2 * a, Cells: 100}), Materials: []*physics.Material{mat},
		Top: advFixed(T0), Bottom: advFixed(T0),
		InitialTemperature: T0, End: end,
		TemperatureTolerance: 1e-3,
		AbortTemperature:     T0 + 50, // θ = 5, far above the critical 1.19
		Probes:               []float64{a},
	}
}

// fkExact returns the centre excess θ(0) of the lower branch of
// θ” + δ exp(θ/(1 + εθ)) = 0, θ'(0) = 0, θ(1) = 0: the steady slab with the
// full Arrhenius exponent (the Frank-Kamenetskii form is ε → 0). Method:
// shooting on θ(0) with RK4 (2000 steps), the first sign change of θ(1)
// on a grid of 200 trial values in (0, 2], then bisection. Derived.
func fkExact(delta, eps float64) float64 {
	end := func(th0 float64) float64 {
		y, v := th0, 0.0
		const n = 2000
		h := 1.0 / n
		acc := func(y float64) float64 { return -delta * math.Exp(y/(1+eps*y)) }
		for range n {
			k1y, k1v := v, acc(y)
			k2y, k2v := v+h/2*k1v, acc(y+h/2*k1y)
			k3y, k3v := v+h/2*k2v, acc(y+h/2*k2y)
			k4y, k4v := v+h*k3v, acc(y+h*k3y)
			y += h / 6 * (k1y + 2*k2y + 2*k3y + k4y)
			v += h / 6 * (k1v + 2*k2v + 2*k3v + k4v)
		}
		return y
	}
	lo, hi := 0.0, 0.0
	for i := 1; i <= 200; i++ {
		x := 2 * float64(i) / 200
		if end(x) >= 0 {
			lo, hi = 2*float64(i-1)/200, x
			break
		}
	}
	for range 100 {
		mid := (lo + hi) / 2
		if end(mid) >= 0 {
			hi = mid
		} else {
			lo = mid
		}
	}
	return (lo + hi) / 2
}

// TestAdversarialFrankKamenetskii: thermal runaway of a slab with its walls
// held at T0. Below the critical δc = 0.8785 the centre
// settles on the lower branch; above it the slab runs away.
//
// Steady checks after 15 diffusion times a²/α (the slowest mode of the
// linearised problem decays at least at rate (π²/4 − δ e^{θ(0)})α/a², so
// by e^{−15·1.8} at δ = 0.5, analytic estimate):
//   - against the Frank-Kamenetskii values θ(0) = 0.052224 (δ = 0.1) and
//     0.328952 (δ = 0.5), within 2 %: the model's exponent θ/(1 + εθ)
//     with ε = RT0/E = 1/40 differs from θ by εθ², 0.8 % of θ at δ = 0.5;
//   - against the same problem with the full exponent (fkExact) within
//     0.1 %: 100 cells put the discretisation error near Δx*²/12 ≈ 3e-5
//     of the curvature.
//
// The centre value at the end must also have stopped moving: |θ(end) −
// θ(end/2)| under 1e-4 of θ.
func TestAdversarialFrankKamenetskii(t *testing.T) {
	const T0, a, eps = 400.0, 5e-3, 1.0 / 40
	alpha := 0.2 / (1150 * 1500.0)
	end := 15 * a * a / alpha
	theta := func(T float64) float64 { return (T - T0) / (eps * T0) }
	for _, c := range []struct {
		delta, want float64
	}{
		// Source: lower-branch slab centre values derived
		// from the exact solution of Frank-Kamenetskii (1969).
		{0.1, 0.052224},
		{0.5, 0.328952},
	} {
		t.Run("delta="+fmtG(c.delta), func(t *testing.T) {
			p := fkSlab(t, c.delta, end)
			p.OutputTimes = []float64{end / 2}
			r := advRun(t, p)
			advOK(t, p, r)
			// The reference value itself, independently of the table.
			if th, ok := reference.FrankKamenetskiiSlab(c.delta); !ok || math.Abs(th-c.want) > 1e-6 {
				t.Fatalf("reference θ(0) = %.6f, table %.6f", th, c.want)
			}
			mid, last := r.Snapshots[1], r.Snapshots[len(r.Snapshots)-1]
			got := theta(last.ProbeT[0])
			exact := fkExact(c.delta, eps)
			if d := math.Abs(got-c.want) / c.want; d > 0.02 {
				t.Errorf("θ(0) = %.6f, Frank-Kamenetskii %.6f (%.2f %% off)", got, c.want, 100*d)
			}
			if d := math.Abs(got-exact) / exact; d > 1e-3 {
				t.Errorf("θ(0) = %.6f, full Arrhenius exponent %.6f (%.3f %% off)", got, exact, 100*d)
			}
			if d := math.Abs(got - theta(mid.ProbeT[0])); d > 1e-4*got {
				t.Errorf("θ(0) still moving: %.6f at %g s, %.6f at %g s", theta(mid.ProbeT[0]), mid.Time, got, last.Time)
			}
			if maxA := last.Cure[50]; !(maxA < 0.5) {
				t.Errorf("centre cure %.3f: consumption is not negligible", maxA)
			}
			t.Logf("θ(0) = %.6f (FK %.6f, full exponent %.6f), %d steps, centre cure %.3g, balance %.3g",
				got, c.want, exact, r.Summary.Steps, last.Cure[50], r.Summary.ConservationResidual)
		})
	}
	t.Run("delta=1.2", func(t *testing.T) {
		// δ > δc: no steady state. Source: δc = 0.8785 (confirmed).
		p := fkSlab(t, 1.2, end)
		r := advRun(t, p)
		var re *solver.RunawayError
		if r.Status != solver.Runaway || !errors.As(r.Err, &re) {
			t.Fatalf("status %v (%v), want runaway", r.Status, r.Err)
		}
		last := r.Snapshots[len(r.Snapshots)-1]
		if !(r.EndTime < p.End) || last.Time != r.EndTime || !(re.Temperature > p.AbortTemperature) {
			t.Errorf("runaway at %g s (last snapshot %g s), %g K against the limit %g K", r.EndTime, last.Time, re.Temperature, p.AbortTemperature)
		}
		if math.Abs(re.Depth-0.005) > 0.5e-3 {
			t.Errorf("runaway at depth %g mm, want the centre (5 mm)", re.Depth*1e3)
		}
		if e := r.Summary.ConservationResidual; !(e < advBalance) {
			t.Errorf("conservation residual %.3g up to the runaway", e)
		}
		t.Logf("runaway at %.4g s: %v", r.EndTime, r.Err)
	})
}

// badKinetics is a rate law that breaks down above Tbad: it returns the
// value bad (NaN or +Inf) there, as a faulty or overflowing model would.
type badKinetics struct{ Tbad, bad float64 }

func (badKinetics) Name() string { return "bad" }
func (b badKinetics) Rate(T, a float64) (r, drdT, drda float64) {
	if a >= 1 {
		return 0, 0, 0
	}
	if T > b.Tbad {
		return b.bad, b.bad, b.bad
	}
	return 1e-4 * (1 - a), 0, -1e-4
}

// TestAdversarialNonFinite: the solver's guards against NaN and Inf. A rate
// law that returns NaN or +Inf once the part warms past 320 K must end the
// run with status Failed, a StepError, and the last good state kept (every
// snapshot finite, the last one at the failure time and at most 320 K).
// A problem with a NaN property must be refused up front.
func TestAdversarialNonFinite(t *testing.T) {
	for _, bad := range []float64{math.NaN(), math.Inf(1)} {
		t.Run("rate="+fmtG(bad), func(t *testing.T) {
			mat := inertMaterial("resin", 1150, 1500, 0.2)
			mat.Cure = &physics.Cure{Model: badKinetics{Tbad: 320, bad: bad}, TotalHeat: 400e3, ResinFraction: 1, GelPoint: 0.5}
			p := &solver.Problem{
				Mesh: advMesh(t, mesh.Options{}, mesh.Layer{Name: "resin", Thickness: 2e-3, Cells: 10}), Materials: []*physics.Material{mat},
				Top: advFixed(350), Bottom: physics.Face{Kind: physics.Insulated},
				InitialTemperature: 300, End: 3600,
				Probes: []float64{0, 1e-3},
			}
			r := advRun(t, p)
			var se *solver.StepError
			if r.Status != solver.Failed || !errors.As(r.Err, &se) {
				t.Fatalf("status %v (%v), want failed with a StepError", r.Status, r.Err)
			}
			last := r.Snapshots[len(r.Snapshots)-1]
			if last.Time != r.EndTime || !(r.EndTime < p.End) {
				t.Errorf("last snapshot at %g s, run ended at %g s", last.Time, r.EndTime)
			}
			// The last good state is one whose rates were finite.
			for i, T := range last.T {
				if T > 320 {
					t.Errorf("last state, cell %d: %g K, beyond where the rate law breaks down", i, T)
				}
			}
			t.Logf("failed at %g s: %v", r.EndTime, r.Err)
		})
	}
	t.Run("NaN conductivity", func(t *testing.T) {
		p := &solver.Problem{
			Mesh:      advMesh(t, mesh.Options{}, mesh.Layer{Name: "x", Thickness: 1e-3, Cells: 4}),
			Materials: []*physics.Material{inertMaterial("x", 1000, 1000, math.NaN())},
			Top:       advFixed(350), Bottom: physics.Face{Kind: physics.Insulated},
			InitialTemperature: 300, End: 60,
		}
		if _, err := solver.Run(context.Background(), p); !errors.Is(err, solver.ErrProblem) {
			t.Errorf("Run with a NaN conductivity: err = %v, want ErrProblem", err)
		}
	})
	t.Run("NaN air", func(t *testing.T) {
		advKnownFailure(t, "Run accepts a face schedule that is NaN and reports NaN probe temperatures (no guard at the solver's boundary)")
		p := &solver.Problem{
			Mesh:               advMesh(t, mesh.Options{}, mesh.Layer{Name: "x", Thickness: 1e-3, Cells: 4}),
			Materials:          []*physics.Material{advEpoxy},
			Top:                physics.Face{Kind: physics.Convection, H: 10, Air: physics.Steady(math.NaN())},
			Bottom:             physics.Face{Kind: physics.Insulated},
			InitialTemperature: 300, End: 60, Probes: []float64{0},
		}
		r, err := solver.Run(context.Background(), p)
		if errors.Is(err, solver.ErrProblem) {
			return // refused up front: fine
		}
		if err != nil {
			t.Fatal(err)
		}
		if r.Status != solver.Failed {
			t.Errorf("status %v with a NaN air temperature", r.Status)
		}
		advFinite(t, p, r)
	})
}

// TestAdversarialCoolingBelowZero: a face that extracts a constant
// 100 kW/m² from 1 mm of insulated epoxy cools it by 58 K/s (analytic:
// q/(ρ c L)); after about 5 s there is no heat left to extract. A flux
// face is a legal input (flux = "-100 kW/m^2"), so the solver must stop
// with status Failed, never report a temperature at or below 0 K, and keep
// the last good state.
func TestAdversarialCoolingBelowZero(t *testing.T) {
	advKnownFailure(t, "a cooling flux drives temperatures below 0 K into the snapshots before the run fails")
	mat := inertMaterial("resin", 1150, 1500, 0.2)
	mat.Cure = &physics.Cure{Model: physics.NthOrder{A: 1e5, E: 60e3, N: 1}, TotalHeat: 400e3, ResinFraction: 1, GelPoint: 0.5}
	p := &solver.Problem{
		Mesh: advMesh(t, mesh.Options{}, mesh.Layer{Name: "resin", Thickness: 1e-3, Cells: 8}), Materials: []*physics.Material{mat},
		Top:                physics.Face{Kind: physics.Flux, Flux: physics.Steady(-1e5)},
		Bottom:             physics.Face{Kind: physics.Insulated},
		InitialTemperature: 300, End: 60,
		Probes: []float64{0, 0.5e-3},
	}
	r, err := solver.Run(context.Background(), p)
	if err != nil {
		t.Fatal(err)
	}
	advFinite(t, p, r)
	if r.Status == solver.OK {
		t.Errorf("status ok after extracting %g J/m² from a part that holds %g J/m² above 0 K", 1e5*60, 1150*1500*1e-3*300.0)
	}
}

func fmtG(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
