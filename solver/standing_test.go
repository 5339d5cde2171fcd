package solver

import (
	"context"
	"math"
	"math/cmplx"
	"testing"

	"cureslab/mesh"
	"cureslab/physics"
)

// airySlab returns the absorbed share 1 − |Γ|² − |T|² of a single uniform
// slab of permittivity ε′ − jε″ and thickness d in air at frequency f:
// Γ = ρ(1 − z²)/(1 − ρ²z²), T = (1 − ρ²) z/(1 − ρ²z²), ρ = (1 − n)/(1 + n),
// z = e^{−j k0 n d} (Orfanidis, Electromagnetic Waves and Antennas,
// multilayer chapter, single slab; from memory).
func airySlab(f, eps1, eps2, d float64) float64 {
	n := cmplx.Sqrt(complex(eps1, -eps2))
	rho := (1 - n) / (1 + n)
	z := cmplx.Exp(complex(0, -2*math.Pi*f/physics.SpeedOfLight*d) * n)
	den := 1 - rho*rho*z*z
	g := rho * (1 - z*z) / den
	tr := (1 - rho*rho) * z / den
	return 1 - real(g*cmplx.Conj(g)) - real(tr*cmplx.Conj(tr))
}

func TestStandingWaveAdiabaticSlab(t *testing.T) {
	// An inert lossy slab in air, insulated faces, conduction switched
	// off: each cell heats at P_i/(ρ c_p) and the whole slab stores
	// S (1 − |Γ|² − |T|²) t per unit area (Poynting's theorem; closed form
	// of the slab, airySlab). The loss factor never changes, so the field
	// is computed once.
	const f, S, eps1, eps2, rho, cp, d = 2.45e9, 4000.0, 4.0, 0.4, 1150.0, 1500.0, 0.012
	for _, inc := range []physics.Incidence{physics.IncidentTop, physics.IncidentBottom, physics.IncidentBoth} {
		p := &Problem{
			Mesh:               slab(t, d, 48),
			Materials:          []*physics.Material{absorbing(rho, cp, 1e-15, eps1, eps2)}, // conduction off
			Top:                physics.Face{Kind: physics.Insulated},
			Bottom:             physics.Face{Kind: physics.Insulated},
			InitialTemperature: 300,
			End:                60,
			Volumetric: &physics.Volumetric{Frequency: f, Attenuation: physics.StandingWave,
				IncidentPower: S, Incident: inc},
		}
		r, err := Run(context.Background(), p)
		if err != nil || r.Status != OK {
			t.Fatalf("run: %v %v", err, r.Err)
		}
		sources := 1.0
		if inc == physics.IncidentBoth {
			sources = 2
		}
		want := sources * S * airySlab(f, eps1, eps2, d) * p.End
		if got := r.Ledger.Volumetric; math.Abs(got-want) > 1e-9*want {
			t.Errorf("%v: absorbed %.12g J/m², closed form %.12g", inc, got, want)
		}
		if r.Summary.FieldSolutions != 1 {
			t.Errorf("%v: %d field computations for a constant loss factor, want 1", inc, r.Summary.FieldSolutions)
		}
		last := r.Snapshots[len(r.Snapshots)-1]
		stored := 0.0
		for i, T := range last.T {
			stored += rho * cp * p.Mesh.Widths[i] * (T - 300)
			// Each cell's rise is its snapshot power over the run.
			if rise := last.Power[i] * p.End / (rho * cp); math.Abs(T-300-rise) > 1e-9*rise {
				t.Fatalf("%v, cell %d: rise %.9g K, power × time %.9g K", inc, i, T-300, rise)
			}
		}
		if math.Abs(stored-want) > 1e-9*want {
			t.Errorf("%v: stored %.12g J/m², want %.12g", inc, stored, want)
		}
	}
}

// metalCup is a curing potting over a metal cup heated by a standing wave
// over a band, under control when ctl is given.
func metalCup(t testing.TB, cells int, band physics.Band, ctl *physics.Control) *Problem {
	p := thickPotting(t, cells)
	resin := p.Materials[0]
	resin.Dielectric = &physics.Dielectric{Permittivity: 4, LossFactor: 0.4, LossFactorCured: 0.05}
	cup := inert(2702, 903, 237)
	cup.Dielectric = &physics.Dielectric{Shield: true}
	m, err := mesh.Build([]mesh.Layer{
		{Name: "potting", Thickness: 0.012, Cells: cells},
		{Name: "cup", Thickness: 0.002, Cells: 4},
	}, mesh.Options{})
	if err != nil {
		t.Fatal(err)
	}
	p.Mesh, p.Materials = m, []*physics.Material{resin, cup}
	p.Probes = []float64{0.006, 0.012}
	p.Volumetric = &physics.Volumetric{Frequency: band.Lo, Band: band, Attenuation: physics.StandingWave,
		IncidentPower: 3000, Incident: physics.IncidentTop, Control: ctl}
	return p
}

func TestStandingWaveMetalCupLedger(t *testing.T) {
	// The energy ledger balances to round-off (identity), the metal absorbs
	// nothing, the field follows the cure (computed again as the loss
	// factor falls), and a single frequency puts the top of the resin,
	// λ/4 ≈ 15 mm from the metal, far hotter in power than the bottom on
	// the metal (|E|² ∝ sin²(k(d − z)), analytic for the lossless limit).
	for _, band := range []physics.Band{{Lo: 2.45e9, Hi: 2.45e9, Points: 1}, {Lo: 2.4e9, Hi: 2.5e9, Points: 101}} {
		p := metalCup(t, 48, band, nil)
		r, err := Run(context.Background(), p)
		if err != nil || r.Status != OK {
			t.Fatalf("run: %v %v", err, r.Err)
		}
		if e := r.Summary.ConservationResidual; e > 1e-10 {
			t.Errorf("%d points: balance error %.3g", band.Points, e)
		}
		if fs := r.Summary.FieldSolutions; fs < 10 || fs > r.Summary.Steps+1 {
			t.Errorf("%d points: %d field computations in %d steps", band.Points, fs, r.Summary.Steps)
		}
		first := r.Snapshots[1]
		for i := 48; i < 52; i++ {
			if first.Power[i] != 0 {
				t.Errorf("the cup absorbs %g W/m³ in cell %d", first.Power[i], i)
			}
		}
		if ratio := first.Power[0] / first.Power[47]; ratio < 20 {
			t.Errorf("%d points: top/bottom power %.3g; a node sits on the metal", band.Points, ratio)
		}
		t.Logf("%d points: %d steps, %d field computations, top/bottom power %.3g, peak %.2f °C",
			band.Points, r.Summary.Steps, r.Summary.FieldSolutions, first.Power[0]/first.Power[47], r.Summary.PeakTemperature-273.15)
	}
}

func TestStandingWaveControlHoldsSensor(t *testing.T) {
	// Under control the power fraction scales the incident power; the
	// sensor at mid-depth follows a ramp-and-hold program within ±1 K
	// while the controller is not saturated (closed-loop microwave cure
	// systems hold about ±1 °C: common practice).
	prog, err := physics.FromSegments(296.15, []physics.Segment{{Rate: 2.0 / 60, To: 343.15}, {Hold: 3600}})
	if err != nil {
		t.Fatal(err)
	}
	ctl := &physics.Control{Sensor: 0.006, Program: prog, Period: 1, Gain: physics.DefaultControlGain, IntegralTime: physics.DefaultIntegralTime}
	p := metalCup(t, 48, physics.Band{Lo: 2.4e9, Hi: 2.5e9, Points: 21}, ctl)
	p.Volumetric.IncidentPower = 20000
	p.End = prog.End()
	p.OutputTimes = nil
	for k := 1; k < 400; k++ {
		p.OutputTimes = append(p.OutputTimes, p.End*float64(k)/400)
	}
	r, err := Run(context.Background(), p)
	if err != nil || r.Status != OK {
		t.Fatalf("run: %v %v", err, r.Err)
	}
	worst := 0.0
	for _, s := range r.Snapshots {
		if s.Time < 600 || s.PowerFraction <= 0 || s.PowerFraction >= 1 {
			continue
		}
		worst = max(worst, math.Abs(s.ProbeT[0]-prog.At(s.Time)))
	}
	t.Logf("worst sensor deviation %.3f K; %d steps, %d field computations", worst, r.Summary.Steps, r.Summary.FieldSolutions)
	if worst > 1 {
		t.Errorf("sensor strays %.3f K from the program", worst)
	}
	if e := r.Summary.ConservationResidual; e > 1e-10 {
		t.Errorf("balance error %.3g", e)
	}
}
