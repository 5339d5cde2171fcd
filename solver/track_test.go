package solver_test

// Overshoot, heating and cooling lag, layer spread, and flux faces that also
// exchange heat with air, against closed forms.

import (
	"math"
	"testing"

	"cureslab/mesh"
	"cureslab/physics"
	"cureslab/solver"
)

// TestTrackLumpedRampLag: a thin, highly conducting plate in air that ramps,
// holds and cools follows it as a first-order system, τ T′ = D(t) − T with
// τ = ρ c_p L/(2h) (two faces). Behind a ramp of rate r that starts at the
// part's temperature the lag is
//
//	D − T = r τ (1 − e^{−t/τ}),
//
// the largest at the end of the ramp (lumped capacitance: Incropera et al.,
// Fundamentals of Heat and Mass Transfer, §5.1–5.3; the ramp response is
// the analytic solution of the linear first-order equation).
//
// Plate: 1 mm of k = 200 W/(m·K), ρ c_p = 2700·900, h = 20 W/(m²·K) both
// faces: τ = 60.75 s, Bi = h(L/2)/k = 5e-5, so the lumped model holds to a
// relative 1e-4 (the interior differs from the mean by about Bi × the lag).
// Program: 2 K/min from 23 °C to 123 °C (3000 s), hold 3600 s, 1 K/min back
// to 23 °C (6000 s). Heating lag 2.025 K at t = 3000 s; cooling lag
// 1.0125 K at t = 12600 s; overshoot 0 (the part never passes the hottest
// the air has been), where the former definition (excess over the air at
// the same time) read +1.01 K in the cooling.
func TestTrackLumpedRampLag(t *testing.T) {
	const (
		L, k, rho, cp, h = 1e-3, 200.0, 2700.0, 900.0, 20.0
		r1, r2           = 2.0 / 60, 1.0 / 60
	)
	air, err := physics.FromSegments(296.15, []physics.Segment{{Rate: r1, To: 396.15}, {Hold: 3600}, {Rate: -r2, To: 296.15}})
	if err != nil {
		t.Fatal(err)
	}
	p := &solver.Problem{
		Mesh:                 buildMesh(t, mesh.Layer{Name: "plate", Thickness: L, Cells: 8}),
		Materials:            []*physics.Material{inertMaterial("plate", rho, cp, k)},
		Top:                  physics.Face{Kind: physics.Convection, H: h, Air: air},
		Bottom:               physics.Face{Kind: physics.Convection, H: h, Air: air},
		InitialTemperature:   296.15,
		End:                  14000,
		TemperatureTolerance: 1e-4,
	}
	r := run(t, p)
	s := r.Summary
	tau := rho * cp * L / (2 * h)
	heat := r1 * tau * (1 - math.Exp(-3000/tau))
	cool := r2 * tau * (1 - math.Exp(-6000/tau))
	// Tolerance: the lumped model's relative 1e-4 plus 1e-3 K for the time
	// integration at a per-step tolerance of 1e-4 K. The lag saturates
	// after a few τ, so the largest is reached inside the ramp, not only
	// at its end.
	for _, c := range []struct {
		name           string
		got, want      float64
		when, from, to float64
	}{
		{"heating lag", s.HeatingLag, heat, s.HeatingLagTime, 5 * tau, 3000},
		{"cooling lag", s.CoolingLag, cool, s.CoolingLagTime, 6600 + 5*tau, 12600},
	} {
		if tol := 1e-4*c.want + 1e-3; math.Abs(c.got-c.want) > tol || c.when < c.from || c.when > c.to {
			t.Errorf("%s %.6f K at t = %g s; want %.6f K (±%.2g) between %g and %g s", c.name, c.got, c.when, c.want, tol, c.from, c.to)
		}
	}
	// The part approaches the hold from below; Crank–Nicolson (not
	// monotone for steps much longer than τ) may cross it by up to its
	// per-step error target.
	if !(math.Abs(s.Overshoot) <= p.TemperatureTolerance) {
		t.Errorf("overshoot %.3g K, want 0 within the step tolerance %g K (the part never passes the air's running maximum)", s.Overshoot, p.TemperatureTolerance)
	}
	if d := s.HeatingLagDepth; !(d > 0 && d < L) {
		t.Errorf("heating lag depth %g m outside the plate", d)
	}
	// Source: analytic — a 1 mm plate at Bi = 5e-5 is uniform to ~1e-4 K.
	if len(s.LayerSpread) != 1 || !(s.LayerSpread[0] >= 0 && s.LayerSpread[0] < 1e-3) {
		t.Errorf("layer spread %v, want one entry below 1e-3 K", s.LayerSpread)
	}
	t.Logf("heating lag %.6f K (lumped %.6f), cooling lag %.6f K (lumped %.6f), %d steps", s.HeatingLag, heat, s.CoolingLag, cool, s.Steps)
}

// TestTrackInertNeverOvershoots: without heat sources, the temperature of a
// conducting body never exceeds the largest of its initial and boundary
// temperatures so far (maximum principle for the heat equation; Protter &
// Weinberger, Maximum Principles in Differential Equations, 1967, ch. 3;
// from memory), so the overshoot over the drivers' running maximum is ≤ 0,
// and < 0 for a part that starts colder than its drivers and never reaches
// them. Programs: the oven air climbs, holds, falls and climbs again to a
// lower level; a platen under the stack follows its own program.
func TestTrackInertNeverOvershoots(t *testing.T) {
	air, err := physics.FromSegments(296.15, []physics.Segment{{Rate: 5.0 / 60, To: 453.15}, {Hold: 1200}, {Rate: -3.0 / 60, To: 323.15}, {Rate: 2.0 / 60, To: 393.15}, {Hold: 1800}})
	if err != nil {
		t.Fatal(err)
	}
	platen, err := physics.FromSegments(296.15, []physics.Segment{{Rate: 1.0 / 60, To: 373.15}, {Hold: 3000}, {Rate: -1.0 / 60, To: 333.15}})
	if err != nil {
		t.Fatal(err)
	}
	m := buildMesh(t,
		mesh.Layer{Name: "tile", Thickness: 2e-3, Cells: 10},
		mesh.Layer{Name: "bond", Thickness: 0.2e-3, Cells: 4, ContactResistance: 2e-4},
		mesh.Layer{Name: "spreader", Thickness: 8e-3, Cells: 16})
	mats := []*physics.Material{inertMaterial("alumina", 3970, 765, 36), inertMaterial("epoxy", 1200, 1050, 0.2), inertMaterial("aluminium", 2702, 903, 237)}
	for _, tc := range []struct {
		name   string
		top    physics.Face
		bottom physics.Face
		T0     float64
	}{
		{"oven air on both faces", physics.Face{Kind: physics.Convection, H: 25, Air: air, Emissivity: 0.8}, physics.Face{Kind: physics.Convection, H: 10, Air: air}, 296.15},
		{"air over a platen", physics.Face{Kind: physics.Convection, H: 25, Air: air}, physics.Face{Kind: physics.Fixed, Set: platen}, 296.15},
		{"cold part into a hot oven", physics.Face{Kind: physics.Convection, H: 15, Air: physics.Steady(393.15)}, physics.Face{Kind: physics.Insulated}, 253.15},
	} {
		t.Run(tc.name, func(t *testing.T) {
			p := &solver.Problem{Mesh: m, Materials: mats, Top: tc.top, Bottom: tc.bottom,
				InitialTemperature: tc.T0, End: 4 * 3600}
			s := run(t, p).Summary
			// Round-off allowance only: the maximum principle is exact for
			// the implicit start-up and holds for Crank–Nicolson on these
			// continuous programs (no jump in a driver after t = 0).
			if !(s.Overshoot <= 1e-9) {
				t.Errorf("overshoot %+.3g K, want ≤ 0", s.Overshoot)
			}
			// With one steady driver D* is constant, so the overshoot is
			// exactly the peak minus the oven: negative for a part that
			// starts colder and only approaches it.
			if tc.T0 < 296 && !(s.Overshoot < 0 && math.Abs(s.Overshoot-(s.PeakTemperature-393.15)) < 1e-9) {
				t.Errorf("cold start: overshoot %+.6g K, peak − oven %+.6g K; want equal and negative", s.Overshoot, s.PeakTemperature-393.15)
			}
			if len(s.LayerSpread) != 3 {
				t.Fatalf("layer spread %v, want 3 entries", s.LayerSpread)
			}
			t.Logf("overshoot %+.3g K, heating lag %.3g K, cooling lag %.3g K, layer spreads %.3g K", s.Overshoot, s.HeatingLag, s.CoolingLag, s.LayerSpread)
		})
	}
}

// TestTrackVolumetricDrivers: under volumetric heating without control no
// program sets the part's temperature, so overshoot and lags are undefined
// (NaN); under control the program is a driver.
func TestTrackVolumetricDrivers(t *testing.T) {
	mat := inertMaterial("wet", 1000, 4000, 0.6)
	mat.Dielectric = &physics.Dielectric{Permittivity: 10, LossFactor: 2, LossFactorCured: 2}
	prog, err := physics.FromSegments(296.15, []physics.Segment{{Rate: 2.0 / 60, To: 333.15}, {Hold: 600}})
	if err != nil {
		t.Fatal(err)
	}
	for _, ctl := range []bool{false, true} {
		p := &solver.Problem{
			Mesh:               buildMesh(t, mesh.Layer{Name: "load", Thickness: 5e-3, Cells: 10}),
			Materials:          []*physics.Material{mat},
			Top:                physics.Face{Kind: physics.Convection, H: 10, Air: physics.Steady(296.15)},
			Bottom:             physics.Face{Kind: physics.Insulated},
			InitialTemperature: 296.15, End: 1500,
			Volumetric: &physics.Volumetric{Frequency: 2.45e9, Field: 500},
		}
		if ctl {
			p.Volumetric.Control = &physics.Control{Sensor: 2.5e-3, Program: prog, Period: 1, Gain: 0.2, IntegralTime: 60}
			p.Volumetric.Field = 3000
		}
		s := run(t, p).Summary
		nanAll := math.IsNaN(s.Overshoot) && math.IsNaN(s.HeatingLag) && math.IsNaN(s.CoolingLag)
		if nanAll == ctl {
			t.Errorf("control %v: overshoot %v, heating lag %v, cooling lag %v", ctl, s.Overshoot, s.HeatingLag, s.CoolingLag)
		}
		if got := len(solver.Drivers(p)); got != map[bool]int{false: 0, true: 2}[ctl] {
			t.Errorf("control %v: %d drivers", ctl, got)
		}
	}
}

// TestTrackFluxWithAir: a slab under a lamp (imposed flux q0 into the top
// face) that also loses heat from that face by convection and radiation,
// its bottom face held at T∞. At steady state the flux through the slab is
// uniform, k(Tf − T∞)/L, and the top face balance is
//
//	q0 + h(T∞ − Tf) + εσ(T∞⁴ − Tf⁴) = k (Tf − T∞)/L,
//
// whose root is found here by bisection (analytic; with ε = 0,
// Tf − T∞ = q0 (L/k)/(1 + hL/k)). The profile is linear, which the finite
// volumes reproduce exactly, so only the time integration's remainder is
// left after 60 time constants.
func TestTrackFluxWithAir(t *testing.T) {
	const (
		L, k, Tinf, q0, h = 0.02, 0.5, 296.15, 1500.0, 10.0
	)
	for _, eps := range []float64{0, 0.9} {
		p := &solver.Problem{
			Mesh:               buildMesh(t, mesh.Layer{Name: "slab", Thickness: L, Cells: 20}),
			Materials:          []*physics.Material{inertMaterial("slab", 1000, 1000, k)},
			Top:                physics.Face{Kind: physics.Flux, Flux: physics.Steady(q0), H: h, Emissivity: eps, Air: physics.Steady(Tinf)},
			Bottom:             physics.Face{Kind: physics.Fixed, Set: physics.Steady(Tinf)},
			InitialTemperature: Tinf, End: 20000,
			Probes: []float64{0, L / 2},
		}
		r := run(t, p)
		es := eps * physics.StefanBoltzmann
		bal := func(Tf float64) float64 {
			return q0 + h*(Tinf-Tf) + es*(math.Pow(Tinf, 4)-math.Pow(Tf, 4)) - k*(Tf-Tinf)/L
		}
		lo, hi := Tinf, Tinf+q0*L/k
		for range 200 {
			if mid := 0.5 * (lo + hi); bal(mid) > 0 {
				lo = mid
			} else {
				hi = mid
			}
		}
		Tf := 0.5 * (lo + hi)
		if eps == 0 {
			if want := Tinf + q0*(L/k)/(1+h*L/k); math.Abs(Tf-want) > 1e-9 {
				t.Fatalf("bisection %v, closed form %v", Tf, want)
			}
		}
		last := r.Snapshots[len(r.Snapshots)-1]
		for i, want := range []float64{Tf, 0.5 * (Tf + Tinf)} {
			if got := last.ProbeT[i]; math.Abs(got-want) > 1e-6 {
				t.Errorf("ε = %g, probe %g mm: %.9f K, want %.9f K", eps, p.Probes[i]*1e3, got, want)
			}
		}
		if e := r.Summary.ConservationResidual; !(e < 1e-9) {
			t.Errorf("ε = %g: conservation residual %.3g", eps, e)
		}
		if math.IsNaN(last.AirTop) || !math.IsNaN(last.AirBottom) {
			t.Errorf("ε = %g: air top %v, bottom %v; want the lamp face's air only", eps, last.AirTop, last.AirBottom)
		}
		// A flux face drives nothing; the held bottom face does.
		if got := len(solver.Drivers(p)); got != 1 {
			t.Errorf("%d drivers, want 1 (the held face)", got)
		}
	}
}
