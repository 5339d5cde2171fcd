package solver

import (
	"context"
	"math"
	"testing"

	"cureslab/mesh"
	"cureslab/physics"
)

// TestLinearStepOneUpdate checks solveLinear, the path for linear
// problems: with fixed properties, no cure, no volumetric heating and no
// radiation the heat residual is affine in T, so one Newton update with the
// exact Jacobian must solve a step. Run through the general Newton loop
// instead, every step must then converge on its second residual evaluation
// (MaxNewtonIterations 2: the residual after one update is already below
// the 1e-12 K threshold), and both paths must take the same steps and agree
// to round-off (the linear path solves for the whole increment from the
// accepted state, the general one for a correction to the predictor).
// Source: Newton's method on an affine map converges in one step (e.g.
// Kelley, Iterative Methods for Linear and Nonlinear Equations, SIAM 1995,
// §5.1); round-off of a backward-stable tridiagonal solve, Golub & Van
// Loan, Matrix Computations, 4th ed., §4.3.
func TestLinearStepOneUpdate(t *testing.T) {
	ramp, err := physics.FromSegments(293.15, []physics.Segment{{Rate: 3.0 / 60, To: 423.15}, {Hold: 1800}})
	if err != nil {
		t.Fatal(err)
	}
	flux, err := physics.NewSchedule([]float64{0, 600, 1200}, []float64{0, 2000, 500})
	if err != nil {
		t.Fatal(err)
	}
	conv := physics.Face{Kind: physics.Convection, H: 25, Air: ramp}
	faces := map[string][2]physics.Face{
		"convection/fixed": {conv, {Kind: physics.Fixed, Set: ramp}},
		"flux/insulated":   {{Kind: physics.Flux, Flux: flux}, {Kind: physics.Insulated}},
		"fixed/convection": {{Kind: physics.Fixed, Set: ramp}, conv},
	}
	m, err := mesh.Build([]mesh.Layer{
		{Name: "steel", Thickness: 0.004, Cells: 20},
		{Name: "block", Thickness: 0.015, Cells: 60, ContactResistance: 2e-4},
	}, mesh.Options{})
	if err != nil {
		t.Fatal(err)
	}
	for name, fc := range faces {
		t.Run(name, func(t *testing.T) {
			p := &Problem{
				Mesh: m,
				// Steel and a filled block, values of the order of
				// Incropera 6th ed. Table A.1 (AISI 1010) and of filled
				// epoxies (from memory); only linearity matters here.
				Materials:          []*physics.Material{inert(7832, 434, 63.9), inert(2000, 900, 1.2)},
				Top:                fc[0],
				Bottom:             fc[1],
				InitialTemperature: 293.15,
				End:                7200,
			}
			q, err := normalise(p)
			if err != nil {
				t.Fatal(err)
			}
			s := newStepper(q, nil)
			if !s.linear {
				t.Fatal("problem not classified as linear")
			}
			fast := s.run(context.Background(), nil)
			s = newStepper(q, nil)
			s.linear = false
			full := s.run(context.Background(), nil)
			if full.Status != OK || fast.Status != OK {
				t.Fatalf("status %v / %v", full.Status, fast.Status)
			}
			if got := full.Summary.MaxNewtonIterations; got != 2 {
				t.Errorf("without the shortcut a step needed %d residual evaluations, want 2 (one update)", got)
			}
			if got := fast.Summary.MaxNewtonIterations; got != 1 {
				t.Errorf("linear path: %d residual evaluations per step, want 1", got)
			}
			worst := 0.0
			for k := range full.Snapshots {
				for i, T := range full.Snapshots[k].T {
					worst = max(worst, math.Abs(T-fast.Snapshots[k].T[i]))
				}
			}
			// Round-off: ~1e-16 of ~400 K per step over ~100 steps, with margin.
			if worst > 1e-9 {
				t.Errorf("linear and general paths differ by %.3g K", worst)
			}
			if e := fast.Summary.ConservationResidual; e > 1e-12 {
				t.Errorf("conservation residual %.3g on the linear path", e)
			}
			t.Logf("%d steps, paths agree to %.2g K, energy balance %.2g", fast.Summary.Steps, worst, fast.Summary.ConservationResidual)
			if full.Summary.Steps != fast.Summary.Steps {
				t.Errorf("steps %d without the shortcut, %d with", full.Summary.Steps, fast.Summary.Steps)
			}
		})
	}
}

// TestLinearClassification: what breaks linearity turns the shortcut off.
func TestLinearClassification(t *testing.T) {
	table, err := physics.NewTable([]float64{273.15, 473.15}, []float64{1.0, 1.4})
	if err != nil {
		t.Fatal(err)
	}
	cases := map[string]func(p *Problem){
		"radiation":           func(p *Problem) { p.Top.Emissivity = 0.9 },
		"conductivity table":  func(p *Problem) { p.Materials[0].Conductivity = physics.Inert(table) },
		"specific heat table": func(p *Problem) { p.Materials[0].SpecificHeat = physics.Inert(table) },
		"cure": func(p *Problem) {
			p.Materials[0].Cure = &physics.Cure{Model: physics.NthOrder{A: 1e5, E: 6e4, N: 1}, TotalHeat: 4e5, ResinFraction: 1, GelPoint: 0.5}
		},
	}
	for name, change := range cases {
		p := &Problem{
			Mesh:               slab(t, 0.01, 10),
			Materials:          []*physics.Material{inert(1200, 1500, 0.2)},
			Top:                physics.Face{Kind: physics.Convection, H: 10, Air: physics.Steady(400)},
			Bottom:             physics.Face{Kind: physics.Insulated},
			InitialTemperature: 300,
			End:                600,
		}
		q, err := normalise(p)
		if err != nil {
			t.Fatal(err)
		}
		if !newStepper(q, nil).linear {
			t.Fatalf("base problem not linear")
		}
		change(p)
		if q, err = normalise(p); err != nil {
			t.Fatal(err)
		}
		if newStepper(q, nil).linear {
			t.Errorf("%s: still classified as linear", name)
		}
	}
}
