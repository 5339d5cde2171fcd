package solver

import (
	"testing"

	"cureslab/physics"
)

// TestStepAllocatesNothing checks that, after start-up, a coupled step
// (Newton, tridiagonal solve, error estimate, ledger, tracking) allocates
// nothing, with volumetric heating under control as well as without (an
// exponential field and a standing wave over a band, whose field is
// computed again at nearly every step as the cure changes the loss
// factor), and that a step of a linear problem (solveLinear) allocates
// nothing either.
// Source: STYLE.md habit 9 (deterministic allocation count, not a timing).
func TestStepAllocatesNothing(t *testing.T) {
	for _, name := range []string{"oven", "controlled volumetric", "controlled standing wave", "linear conduction", "viscous"} {
		t.Run(name, func(t *testing.T) {
			p := thickPotting(t, 60)
			if name == "linear conduction" {
				p.Materials[0] = inert(2000, 900, 1.2)
				p.Top.Emissivity = 0
			}
			if name == "viscous" {
				p.Materials[0].Viscosity = &physics.CastroMacosko{Eta0: 3e-7, E: 50e3, A: 1.2, B: 2.5}
			}
			if name == "controlled volumetric" || name == "controlled standing wave" {
				p.Materials[0].Dielectric = &physics.Dielectric{Permittivity: 4, LossFactor: 0.4, LossFactorCured: 0.05}
				prog, err := physics.FromSegments(296.15, []physics.Segment{{Rate: 2.0 / 60, To: 343.15}, {Hold: 3600}})
				if err != nil {
					t.Fatal(err)
				}
				p.Volumetric = &physics.Volumetric{Frequency: 2.45e9, Field: 3000, Attenuation: physics.FromTop,
					Control: &physics.Control{Sensor: 0.01, Program: prog, Period: 1, Gain: 0.2, IntegralTime: 60}}
				if name == "controlled standing wave" {
					p.Volumetric.Attenuation = physics.StandingWave
					p.Volumetric.IncidentPower, p.Volumetric.Incident = 20000, physics.IncidentBoth
					p.Volumetric.Band = physics.Band{Lo: 2.4e9, Hi: 2.5e9, Points: 101}
				}
			}
			q, err := normalise(p)
			if err != nil {
				t.Fatal(err)
			}
			s := newStepper(q, nil)
			if s.linear != (name == "linear conduction") {
				t.Fatalf("linear = %v", s.linear)
			}
			for i := range s.n {
				s.T[i] = q.InitialTemperature
				if s.cure[i] != nil {
					s.A[i] = q.InitialCure
				}
			}
			s.eval(s.old, 0, s.T, s.A)
			s.pushHistory()
			s.tr = s.newTracker()
			s.h, s.startup = 1, 2
			if s.vol != nil {
				s.controlUpdate(s.vol.Control)
			}
			target := 1e9
			step := func() {
				if _, err := s.advance(target); err != nil {
					t.Fatal(err)
				}
				if s.vol != nil {
					s.controlUpdate(s.vol.Control)
				}
			}
			for range 10 { // past the start-up steps
				step()
			}
			if a := testing.AllocsPerRun(200, step); a != 0 {
				t.Errorf("%g allocations per step, want 0", a)
			}
			t.Logf("t = %.0f s after %d steps, %d field computations", s.t, s.tr.sum.Steps, s.fieldRuns)
			if s.wave != nil && s.fieldRuns < 100 {
				t.Errorf("the field was computed %d times in %d steps: the allocation count did not cover it", s.fieldRuns, s.tr.sum.Steps)
			}
		})
	}
}
