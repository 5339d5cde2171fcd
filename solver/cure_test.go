package solver

import (
	"context"
	"fmt"
	"math"
	"testing"

	"cureslab/physics"
)

// isothermal returns a problem in which one thin curing layer is held at
// temperature T by fixed faces and releases no heat, so that its cure
// follows the kinetics alone.
func isothermal(t *testing.T, model physics.Kinetics, T, a0, end, tolA float64) *Problem {
	mat := inert(1150, 1500, 0.2)
	mat.Cure = &physics.Cure{Model: model, TotalHeat: 0, ResinFraction: 1, GelPoint: physics.DefaultGelPoint}
	var outs []float64
	for k := 1; k <= 20; k++ {
		outs = append(outs, end*float64(k)/20)
	}
	return &Problem{
		Mesh:               slab(t, 1e-3, 4),
		Materials:          []*physics.Material{mat},
		Top:                physics.Face{Kind: physics.Fixed, Set: physics.Steady(T)},
		Bottom:             physics.Face{Kind: physics.Fixed, Set: physics.Steady(T)},
		InitialTemperature: T,
		InitialCure:        a0,
		End:                end,
		OutputTimes:        outs,
		CureTolerance:      tolA,
	}
}

func TestIsothermalCureClosedForms(t *testing.T) {
	const T = 360.0
	k := func(A, E float64) float64 { v, _ := physics.Arrhenius(A, E, T); return v }
	cases := []struct {
		name  string
		model physics.Kinetics
		a0    float64
		want  func(t float64) float64
		// amplify bounds how much the exact solution magnifies an early
		// perturbation: 1 for the contracting n-th order law; for the
		// logistic, max over t of ∂α/∂α0 = 1/(4α0(1−α0)) (analytic).
		amplify float64
	}{
		// Source: analytic, n-th order closed form α = 1 − [1 − (1−n)kt]^{1/(1−n)}
		//.
		{"nth-order n=1.5", physics.NthOrder{A: 1e5, E: 60e3, N: 1.5}, 0, func(t float64) float64 {
			kk := k(1e5, 60e3)
			return 1 - math.Pow(1-(1-1.5)*kk*t, 1/(1-1.5))
		}, 1},
		// Source: analytic, first order α = 1 − exp(−kt).
		{"nth-order n=1", physics.NthOrder{A: 1e5, E: 60e3, N: 1}, 0, func(t float64) float64 {
			return 1 - math.Exp(-k(1e5, 60e3)*t)
		}, 1},
		// Source: analytic, Kamal–Sourour with k1 = 0, m = n = 1 is the logistic
		// α = α0 e^{kt}/(1 − α0 + α0 e^{kt}).
		{"logistic", physics.Autocatalytic{A1: 0, E1: 50e3, A2: 1e5, E2: 60e3, M: 1, N: 1}, 0.01, func(t float64) float64 {
			e := math.Exp(k(1e5, 60e3) * t)
			return 0.01 * e / (1 - 0.01 + 0.01*e)
		}, 1 / (4 * 0.01 * 0.99)},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			// The step control bounds the local error per step; the global
			// error of a second-order method then falls as tol^(2/3). Check
			// both the level at a tight tolerance and the rate of convergence.
			end := 3 / k(1e5, 60e3)
			var errs [2]float64
			for j, tol := range []float64{1e-6, 1e-8} {
				r, err := Run(context.Background(), isothermal(t, c.model, T, c.a0, end, tol))
				if err != nil || r.Status != OK {
					t.Fatalf("run: %v %v", err, r.Err)
				}
				for _, s := range r.Snapshots {
					errs[j] = max(errs[j], math.Abs(s.Cure[0]-c.want(s.Time)))
				}
				t.Logf("cure_tolerance %g: %d steps, worst |α − α_exact| = %.3g", tol, r.Summary.Steps, errs[j])
			}
			if limit := 1e-6 * c.amplify; errs[1] > limit {
				t.Errorf("worst cure error %.3g > %.3g at cure_tolerance 1e-8", errs[1], limit)
			}
			if errs[0]/errs[1] < 10 {
				t.Errorf("error fell by only %.3g when the tolerance fell 100-fold (expect about 100^(2/3) ≈ 21.5)", errs[0]/errs[1])
			}
		})
	}
}

// rk4 integrates dα/dt = r(T, α) at fixed T with n classical Runge–Kutta
// steps, as an independent reference.
func rk4(c *physics.Cure, T, a0, end float64, n int) float64 {
	h := end / float64(n)
	a := a0
	f := func(a float64) float64 { r, _, _ := c.Rate(T, a); return r }
	for range n {
		k1 := f(a)
		k2 := f(a + h/2*k1)
		k3 := f(a + h/2*k2)
		k4 := f(a + h*k3)
		a += h / 6 * (k1 + 2*k2 + 2*k3 + k4)
	}
	return a
}

func TestIsothermalKamalSourourAgainstRK4(t *testing.T) {
	// Kamal–Sourour (Kamal & Sourour, Polym. Eng. Sci. 13:59, 1973) with the
	// Chern–Poehlein diffusion factor, against a fine RK4 integration of the
	// ODE alone. Parameters invented for the test.
	model := physics.Autocatalytic{A1: 2e4, E1: 62e3, A2: 6e5, E2: 58e3, M: 0.45, N: 1.6}
	diff := &physics.Diffusion{C: 30, Alpha0: -1.1, AlphaT: 0.0052}
	const T = 350.0
	p := isothermal(t, model, T, 0, 4*3600, 1e-6)
	p.Materials[0].Cure.Diffusion = diff
	r, err := Run(context.Background(), p)
	if err != nil || r.Status != OK {
		t.Fatalf("run: %v %v", err, r.Err)
	}
	c := p.Materials[0].Cure
	worst, ref, tref := 0.0, 0.0, 0.0
	for _, s := range r.Snapshots[1:] {
		// RK4 at steps of 0.05 s: its error (∝ h⁴) is far below the solver's.
		ref = rk4(c, T, ref, s.Time-tref, int(math.Ceil((s.Time-tref)/0.05)))
		tref = s.Time
		worst = max(worst, math.Abs(s.Cure[0]-ref))
	}
	t.Logf("steps %d, worst |α − α_RK4| = %.3g, final α = %.6f", r.Summary.Steps, worst, r.Snapshots[len(r.Snapshots)-1].Cure[0])
	// The step control bounds the local error of each step by the cure
	// tolerance; for a problem that does not magnify perturbations the global
	// error is at most their sum.
	if limit := float64(r.Summary.Steps) * 1e-6; worst > limit {
		t.Errorf("worst cure error %.3g > steps × tolerance = %.3g", worst, limit)
	}
}

func TestAdiabaticRise(t *testing.T) {
	// Source: energy balance (analytic): with insulated faces and constant c_p,
	// ΔT = resin_fraction · total_heat · Δα / c_p.
	for _, w := range []float64{1, 0.6} {
		t.Run(fmt.Sprintf("resin_fraction=%g", w), func(t *testing.T) {
			mat := inert(1150, 1500, 0.2)
			mat.Cure = &physics.Cure{
				Model:     physics.Autocatalytic{A1: 2e4, E1: 62e3, A2: 6e5, E2: 58e3, M: 0.45, N: 1.6},
				TotalHeat: 420e3, ResinFraction: w, GelPoint: physics.DefaultGelPoint,
			}
			p := &Problem{
				Mesh:               slab(t, 0.01, 10),
				Materials:          []*physics.Material{mat},
				Top:                physics.Face{Kind: physics.Insulated},
				Bottom:             physics.Face{Kind: physics.Insulated},
				InitialTemperature: 320,
				InitialCure:        0.05,
				End:                2 * 3600,
			}
			r, err := Run(context.Background(), p)
			if err != nil || r.Status != OK {
				t.Fatalf("run: %v %v", err, r.Err)
			}
			last := r.Snapshots[len(r.Snapshots)-1]
			for i := range last.T {
				got := last.T[i] - 320
				want := w * 420e3 * (last.Cure[i] - 0.05) / 1500
				if math.Abs(got-want) > 1e-6 {
					t.Errorf("cell %d: rise %.9f K, want %.9f K", i, got, want)
				}
			}
			if e := r.Summary.ConservationResidual; e > 1e-10 {
				t.Errorf("conservation residual %.3g", e)
			}
			t.Logf("rise %.4f K at cure %.5f, %d steps", last.T[0]-320, last.Cure[0], r.Summary.Steps)
		})
	}
}
