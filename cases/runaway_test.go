package cases

import (
	"context"
	"fmt"
	"math"
	"testing"

	"cureslab/physics"
	"cureslab/solver"
)

// runawayCase returns a 20 mm slab of an invented zero-order resin held at
// T0 = 400 K from the start: top face in air at h = 10 W/(m²·K), so that
// Bi = hL/k = 1 on the slab's thickness L, bottom face insulated. Its
// pre-exponential factor is chosen so that δ = frac·δ_c as the screen
// computes it.
//
// Zero order keeps the rate at its initial value until full cure, and the
// adiabatic rise (500 J/g / 1.5 J/g/K = 333 K) is 38 times R T0²/E, so the
// reactant lasts long enough for the Frank-Kamenetskii picture (no
// consumption) to hold over the run (Frank-Kamenetskii 1969, the
// high-activation-energy, negligible-consumption limit; the Arrhenius law
// raises the true δ_c by a relative order R T0/E = 0.022 over the
// exponential approximation, from memory).
func runawayCase(t *testing.T, frac float64) (*Case, Runaway) {
	t.Helper()
	const (
		T0, E, L, k, rho, H = 400.0, 150e3, 0.02, 0.2, 1200.0, 500e3
	)
	crit := physics.CriticalFKSymmetric(1).Delta // one face at Bi = 1, the other insulated
	// δ = E/(R T0²) · ρ H A e^{−E/(R T0)} · L²/k
	A := frac * crit / (E / (physics.GasConstant * T0 * T0) * rho * H * math.Exp(-E/(physics.GasConstant*T0)) * L * L / k)
	text := fmt.Sprintf(`title = "zero-order slab at %.2f of critical"
[initial]
temperature = "%g K"
[time]
end = "48 h"
[[layer]]
name = "resin"
material = "hot-resin"
thickness = "20 mm"
[materials.hot-resin]
density = "1200 kg/m^3"
specific_heat = "1500 J/kg/K"
conductivity = "0.2 W/m/K"
[materials.hot-resin.cure]
model = "nth-order"
total_heat = "500 J/g"
A1 = "%.10g 1/s"
E1 = "150 kJ/mol"
n = 0
[top]
kind = "convection"
h = "10 W/m^2/K"
air = "%g K"
[bottom]
kind = "insulated"
`, frac, T0, A, T0)
	c, err := Parse("runaway.toml", []byte(text), ".")
	if err != nil {
		t.Fatal(err)
	}
	return c, screenRunaway(c, 0, T0, hottestProgram(c.Problem))
}

// TestRunawayScreenBothWays: a case just under and just over the critical δ
// of its actual faces runs as the screen says. Under: the slab settles on
// its steady state, whose hottest excess cannot pass the critical one
// (θm,c = 1.105 for Bi = 1, physics.CriticalFKSymmetric; bound 1.5 for the
// Arrhenius correction and the transient). Over: no steady state, the
// temperature runs away (many R T0²/E above the hold, or the abort limit).
func TestRunawayScreenBothWays(t *testing.T) {
	for _, tc := range []struct {
		frac float64
		runs bool
	}{{0.9, false}, {1.1, true}} {
		t.Run(fmt.Sprintf("%.1f of critical", tc.frac), func(t *testing.T) {
			c, s := runawayCase(t, tc.frac)
			// The screen sees one face at Bi = 1 and one blocked: length
			// scale the whole slab, δ_c = 0.2707 (from the closed form,
			// checked against shooting in package physics).
			if s.Half || math.Abs(s.BiTop-1) > 1e-12 || s.BiBottom != 0 || math.Abs(s.Critical-0.27067) > 1e-5 {
				t.Fatalf("screen: half %v, Bi %g/%g, δ_c %g", s.Half, s.BiTop, s.BiBottom, s.Critical)
			}
			if math.Abs(s.Delta/s.Critical-tc.frac) > 1e-9 || s.Cure != 0 || !math.IsInf(s.HoldFrom, -1) {
				t.Fatalf("screen: δ = %g = %g δ_c from cure %g at %g s; want %g δ_c", s.Delta, s.Delta/s.Critical, s.Cure, s.HoldFrom, tc.frac)
			}
			r, err := solver.Run(context.Background(), c.Problem)
			if err != nil {
				t.Fatal(err)
			}
			theta := (r.Summary.PeakTemperature - 400) * 150e3 / (physics.GasConstant * 400 * 400)
			ranAway := r.Status == solver.Runaway || theta > 5
			t.Logf("δ/δ_c = %.2f: status %v, peak excess θ = %.3g at %.3g h", s.Delta/s.Critical, r.Status, theta, r.Summary.PeakTime/3600)
			if ranAway != tc.runs || (!tc.runs && theta > 1.5) {
				t.Errorf("δ/δ_c = %.2f: status %v, peak excess θ = %.3g; the screen says runaway %v", tc.frac, r.Status, theta, tc.runs)
			}
		})
	}
}
