package check

import (
	"context"
	"fmt"
	"math"
	"testing"

	"cureslab/cases"
	"cureslab/mesh"
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
func runawayCase(t *testing.T, frac float64) (*cases.Case, Runaway) {
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
	c, err := cases.Parse("runaway.toml", []byte(text), ".")
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

// TestRunawayScreenPaths: each face's Biot number counts the layers beyond
// the curing layer as series resistances (exact at steady state for inert
// layers of constant conductivity), plus the contact resistance and the
// face's 1/h; with heat leaving through both faces the length is half the
// layer and the Biot numbers and δ scale with it (δ ∝ ℓ², Bi ∝ ℓ).
// Source: analytic (thermal resistance network, Incropera et al., ch. 3).
func TestRunawayScreenPaths(t *testing.T) {
	resin := &physics.Material{Name: "r", Density: 1100,
		SpecificHeat: physics.Inert(physics.Constant(1500)), Conductivity: physics.Inert(physics.Constant(0.2)),
		Cure: &physics.Cure{Model: physics.NthOrder{A: 1e5, E: 60e3, N: 1}, TotalHeat: 400e3, ResinFraction: 1, GelPoint: 0.6}}
	board := inertMaterial("board", 1850, 1100, 0.35)
	const h, L, L2, rc, k2 = 10.0, 8e-3, 1.6e-3, 2e-4, 0.35
	c := slabCase(t, []mesh.Layer{{Name: "resin", Thickness: L}, {Name: "board", Thickness: L2, ContactResistance: rc}},
		[]*physics.Material{resin, board}, h, 353.15)
	s := screenRunaway(c, 0, 353.15, hottestProgram(c.Problem))
	biTopL := h * L / 0.2
	biBotL := (L / 0.2) / (1/h + L2/k2 + rc)
	crit := physics.CriticalFK(biTopL, biBotL).Delta / 4
	if !s.Half || s.Length != L/2 || math.Abs(s.BiTop-biTopL/2) > 1e-12 || math.Abs(s.BiBottom-biBotL/2) > 1e-12 || math.Abs(s.Critical-crit) > 1e-12 {
		t.Errorf("half %v, ℓ %g, Bi %.12g/%.12g, δ_c %.12g; want true, %g, %.12g/%.12g, %.12g",
			s.Half, s.Length, s.BiTop, s.BiBottom, s.Critical, L/2, biTopL/2, biBotL/2, crit)
	}
	// δ on ℓ = L/2 from the first-order rate at cure 0 (steady air: the
	// hold is the whole run).
	k := 1e5 * math.Exp(-60e3/(physics.GasConstant*353.15))
	want := 60e3 / (physics.GasConstant * 353.15 * 353.15) * 1100 * 400e3 * k * (L / 2) * (L / 2) / 0.2
	if math.Abs(s.Delta-want) > 1e-9*want || s.Cure != 0 || !math.IsInf(s.HoldFrom, -1) {
		t.Errorf("δ = %.12g from cure %g at %g s, want %.12g from 0 at the start", s.Delta, s.Cure, s.HoldFrom, want)
	}
	// The same slab with a held bottom face (a platen): Bi = ∞ there.
	c.Problem.Bottom = physics.Face{Kind: physics.Fixed, Set: physics.Steady(353.15)}
	s = screenRunaway(c, 0, 353.15, hottestProgram(c.Problem))
	biBotL = (L / 0.2) / (L2/k2 + rc)
	if want := physics.CriticalFK(biTopL, biBotL).Delta / 4; math.Abs(s.Critical-want) > 1e-12 {
		t.Errorf("platen below the board: δ_c %.12g, want %.12g", s.Critical, want)
	}
}
