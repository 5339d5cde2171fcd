package solver

import (
	"context"
	"math"
	"testing"

	"cureslab/mesh"
	"cureslab/physics"
)

func absorbing(rho, cp, k, eps1, eps2 float64) *physics.Material {
	m := inert(rho, cp, k)
	m.Dielectric = &physics.Dielectric{Permittivity: eps1, LossFactor: eps2, LossFactorCured: eps2}
	return m
}

func TestVolumetricAdiabaticSlab(t *testing.T) {
	// Source: P = 2π f ε0 ε″ E² (Metaxas & Meredith, Industrial Microwave
	// Heating, 1983, ch. 2; from memory; the same equation in Komarov, Wang &
	// Tang, Wiley Encyclopedia of RF and Microwave Engineering, 2005, eq. 3,
	// confirmed). With insulated faces and no reaction, dT/dt = P/(ρ c_p)
	// exactly (energy balance, analytic).
	const f, E, eps2, rho, cp = 2.45e9, 1500.0, 0.6, 1150.0, 1500.0
	p := &Problem{
		Mesh:               slab(t, 0.01, 20),
		Materials:          []*physics.Material{absorbing(rho, cp, 0.2, 4.2, eps2)},
		Top:                physics.Face{Kind: physics.Insulated},
		Bottom:             physics.Face{Kind: physics.Insulated},
		InitialTemperature: 300,
		End:                600,
		Volumetric:         &physics.Volumetric{Frequency: f, Field: E},
	}
	r, err := Run(context.Background(), p)
	if err != nil || r.Status != OK {
		t.Fatalf("run: %v %v", err, r.Err)
	}
	rate := 2 * math.Pi * f * physics.VacuumPermittivity * eps2 * E * E / (rho * cp)
	for _, s := range r.Snapshots {
		for i, T := range s.T {
			if want := 300 + rate*s.Time; math.Abs(T-want) > 1e-9*want {
				t.Fatalf("t = %g s, cell %d: T = %.12g K, want %.12g K", s.Time, i, T, want)
			}
		}
	}
	if e := r.Summary.ConservationResidual; e > 1e-12 {
		t.Errorf("conservation residual %.3g", e)
	}
	t.Logf("heating rate %.6g K/s, ledger volumetric %.6g J/m²", rate, r.Ledger.Volumetric)
}

func TestPenetrationDepthWater(t *testing.T) {
	// Source: derived from the Metaxas & Meredith formula (Industrial Microwave Heating, 1983, ch. 2):
	// water ε′ = 78, ε″ = 10 at 2.45 GHz → D_p = 1.72 cm; P(1 kV/m, ε″ = 10) = 1.36 MW/m³.
	if d := physics.PenetrationDepth(2.45e9, 78, 10); math.Abs(d-0.0172) > 0.00005 {
		t.Errorf("D_p = %.5g m, want 0.0172 m", d)
	}
	if pw := physics.PowerDensity(2.45e9, 10, 1000); math.Abs(pw-1.36e6) > 0.005e6 {
		t.Errorf("P = %.5g W/m³, want 1.36e6", pw)
	}
}

func TestVolumetricAttenuationProfile(t *testing.T) {
	// A thick, lossy, non-curing slab heated from the top for a short time
	// with insulated faces: the absorbed power, read from the temperature
	// rise of each cell (ΔT ρ c_p / t), must follow P(0) exp(−z/D_p)
	// (README Case file reference, [volumetric]; Metaxas & Meredith 1983, from memory). The time is short
	// enough that conduction moves little heat.
	const f, E, eps1, eps2, rho, cp = 2.45e9, 1000.0, 4.0, 1.2, 1150.0, 1500.0
	dp := physics.PenetrationDepth(f, eps1, eps2)
	L := 3 * dp
	p := &Problem{
		Mesh:               slab(t, L, 300),
		Materials:          []*physics.Material{absorbing(rho, cp, 1e-9, eps1, eps2)}, // conduction switched off
		Top:                physics.Face{Kind: physics.Insulated},
		Bottom:             physics.Face{Kind: physics.Insulated},
		InitialTemperature: 300,
		End:                10,
		Volumetric:         &physics.Volumetric{Frequency: f, Field: E, Attenuation: physics.FromTop},
	}
	r, err := Run(context.Background(), p)
	if err != nil || r.Status != OK {
		t.Fatalf("run: %v %v", err, r.Err)
	}
	last := r.Snapshots[len(r.Snapshots)-1]
	p0 := physics.PowerDensity(f, eps2, E)
	worst := 0.0
	for i, T := range last.T {
		got := (T - 300) * rho * cp / last.Time
		// The cell absorbs the exact share of the exponential over its width:
		// the cell average of P0 e^{−z/Dp}.
		z0, z1 := p.Mesh.Faces[i], p.Mesh.Faces[i+1]
		want := p0 * dp * (math.Exp(-z0/dp) - math.Exp(-z1/dp)) / (z1 - z0)
		worst = max(worst, math.Abs(got-want)/p0)
	}
	t.Logf("D_p = %.4g mm, worst relative deviation from P0 exp(−z/Dp) %.3g", dp*1e3, worst)
	if worst > 1e-6 {
		t.Errorf("absorbed power deviates from the exponential profile by %.3g of P0", worst)
	}
	// Power absorbed by the whole slab = P0 Dp (1 − e^{−L/Dp}) (analytic).
	if want := p0 * dp * (1 - math.Exp(-L/dp)) * last.Time; math.Abs(r.Ledger.Volumetric-want) > 1e-9*want {
		t.Errorf("volumetric energy %.9g J/m², want %.9g", r.Ledger.Volumetric, want)
	}
}

func TestVolumetricSelectivity(t *testing.T) {
	// Source: README Case file reference, [volumetric]: a material without a dielectric section absorbs
	// nothing. A glass layer between two absorbing layers, insulated outside.
	// With conduction switched off (k → 1e-9 W/m/K everywhere) the glass must
	// stay exactly at its initial temperature while the absorbing layers rise
	// at P/(ρ c_p); with conduction on, the total heat stored equals the
	// volumetric input P·(absorbing thickness)·t (energy balance, analytic).
	for _, k := range []float64{1e-9, 1} {
		glass := inert(2225, 835, 1.4*k)
		resin := absorbing(1150, 1500, 0.2*k, 4.2, 0.6)
		m, err := mesh.Build([]mesh.Layer{
			{Name: "a", Thickness: 0.004, Cells: 16},
			{Name: "glass", Thickness: 0.002, Cells: 8},
			{Name: "b", Thickness: 0.004, Cells: 16},
		}, mesh.Options{})
		if err != nil {
			t.Fatal(err)
		}
		p := &Problem{
			Mesh: m, Materials: []*physics.Material{resin, glass, resin},
			Top:                physics.Face{Kind: physics.Insulated},
			Bottom:             physics.Face{Kind: physics.Insulated},
			InitialTemperature: 300, End: 120,
			Volumetric: &physics.Volumetric{Frequency: 2.45e9, Field: 2000},
		}
		r, err := Run(context.Background(), p)
		if err != nil || r.Status != OK {
			t.Fatalf("run: %v %v", err, r.Err)
		}
		pw := physics.PowerDensity(2.45e9, 0.6, 2000)
		if want := pw * 0.008 * 120; math.Abs(r.Ledger.Volumetric-want) > 1e-9*want || math.Abs(r.Ledger.Stored-want) > 1e-9*want {
			t.Errorf("k×%g: volumetric %.9g, stored %.9g J/m², want %.9g", k, r.Ledger.Volumetric, r.Ledger.Stored, want)
		}
		if k > 1e-6 {
			continue
		}
		// With k = 1e-9 scale the residual conduction moves at most
		// k ΔT/w · t ≈ 1.4e-9·23/1.25e-4·120 ≈ 0.03 J/m², 7e-5 K in a glass cell.
		last := r.Snapshots[len(r.Snapshots)-1]
		rise := pw * 120 / (1150 * 1500)
		for i, T := range last.T {
			want := 300 + rise
			if m.Owner[i] == 1 {
				want = 300
			}
			if math.Abs(T-want) > 1e-4 {
				t.Errorf("conduction off: cell %d (layer %d) at %.9g K, want %.9g K", i, m.Owner[i], T, want)
			}
		}
	}
}

func TestVolumetricControlTracksProgram(t *testing.T) {
	// A 12 mm absorbing, curing potting with insulated-ish faces and the
	// sensor at the bottom of the resin follows a ramp-and-hold program.
	// Closed-loop microwave cure systems hold about ±1 °C (common practice).
	mat := absorbing(1150, 1500, 0.2, 4.2, 0.6)
	mat.Dielectric.LossFactorCured = 0.06
	mat.Cure = &physics.Cure{
		Model:     physics.Autocatalytic{A1: 2e4, E1: 62e3, A2: 6e5, E2: 58e3, M: 0.45, N: 1.6},
		TotalHeat: 420e3, ResinFraction: 0.3, GelPoint: 0.58,
	}
	prog, err := physics.FromSegments(296.15, []physics.Segment{{Rate: 2.0 / 60, To: 343.15}, {Hold: 2 * 3600}})
	if err != nil {
		t.Fatal(err)
	}
	ctl := &physics.Control{Sensor: 0.012, Program: prog, Period: 1, Gain: physics.DefaultControlGain, IntegralTime: physics.DefaultIntegralTime}
	var outs []float64
	for k := 1; k < 600; k++ {
		outs = append(outs, float64(k)*15)
	}
	p := &Problem{
		Mesh:               slab(t, 0.012, 48),
		Materials:          []*physics.Material{mat},
		Top:                physics.Face{Kind: physics.Convection, H: 10, Air: physics.Steady(296.15)},
		Bottom:             physics.Face{Kind: physics.Convection, H: 5, Air: physics.Steady(296.15)},
		InitialTemperature: 296.15,
		End:                prog.End(),
		OutputTimes:        outs,
		Probes:             []float64{0.012},
		Volumetric:         &physics.Volumetric{Frequency: 2.45e9, Field: 4000, Control: ctl},
	}
	r, err := Run(context.Background(), p)
	if err != nil || r.Status != OK {
		t.Fatalf("run: %v %v", err, r.Err)
	}
	worst, settle := 0.0, 600.0 // judged after the first 10 minutes
	for _, s := range r.Snapshots {
		if s.PowerFraction < 0 || s.PowerFraction > 1 || math.IsNaN(s.PowerFraction) {
			t.Fatalf("t = %g s: power fraction %g outside [0, 1]", s.Time, s.PowerFraction)
		}
		if s.Time >= settle {
			worst = max(worst, math.Abs(s.ProbeT[0]-prog.At(s.Time)))
		}
	}
	t.Logf("worst sensor deviation after %g s: %.3f K; %d steps; balance %.2g", settle, worst, r.Summary.Steps, r.Summary.ConservationResidual)
	if worst > 1 {
		t.Errorf("sensor strays %.3f K from the program (±1 K expected)", worst)
	}
}

func TestControlAntiWindup(t *testing.T) {
	// While the output is saturated in the direction of the error, the
	// integral must not grow (README Case file reference, [volumetric.control]).
	c := &physics.Control{Period: 1, Gain: 0.2, IntegralTime: 60}
	I, u := 0.0, 0.0
	for range 1000 {
		I, u = c.Update(50, I, u) // 50 K below the program: saturates at u = 1
	}
	if u != 1 {
		t.Fatalf("u = %g, want 1", u)
	}
	if I > 50 {
		t.Errorf("integral wound up to %g K·s while saturated", I)
	}
	// Once the error reverses, the output leaves saturation at once.
	_, u = c.Update(-1, I, u)
	if u >= 1 {
		t.Errorf("u = %g one sample after the error reversed; the integral wound up", u)
	}
}

func TestVolumetricLossTable(t *testing.T) {
	// ε″ linear in temperature, ε″ = a + b T, in an insulated, non-curing
	// slab under a uniform field: dT/dt = K (a + b T) with K = 2π f ε0 E²/(ρ c_p),
	// so T(t) = (T0 + a/b) e^{K b t} − a/b (analytic).
	const f, E, rho, cp = 2.45e9, 1500.0, 1150.0, 1500.0
	const a, b = -0.3, 0.003 // ε″ = 0.6 at 300 K, rising 0.003 per kelvin
	table, err := physics.NewTable([]float64{200, 600}, []float64{a + b*200, a + b*600})
	if err != nil {
		t.Fatal(err)
	}
	K := 2 * math.Pi * f * physics.VacuumPermittivity * E * E / (rho * cp)
	var errs [2]float64
	// Tolerances tight enough that the step size, not the output spacing
	// (End/100), limits the steps.
	for j, tol := range []float64{1e-7, 1e-9} {
		m := absorbing(rho, cp, 0.2, 4.2, 0)
		m.Dielectric.LossTable, m.Dielectric.LossTableCured = &table, &table
		p := &Problem{
			Mesh:                 slab(t, 0.01, 10),
			Materials:            []*physics.Material{m},
			Top:                  physics.Face{Kind: physics.Insulated},
			Bottom:               physics.Face{Kind: physics.Insulated},
			InitialTemperature:   300,
			End:                  600,
			TemperatureTolerance: tol,
			Volumetric:           &physics.Volumetric{Frequency: f, Field: E},
		}
		r, err := Run(context.Background(), p)
		if err != nil || r.Status != OK {
			t.Fatalf("run: %v %v", err, r.Err)
		}
		for _, s := range r.Snapshots {
			want := (300+a/b)*math.Exp(K*b*s.Time) - a/b
			errs[j] = max(errs[j], math.Abs(s.T[0]-want))
		}
		t.Logf("tolerance %g K: rise %.3f K, worst deviation %.2e K, %d steps", tol, r.Snapshots[len(r.Snapshots)-1].T[0]-300, errs[j], r.Summary.Steps)
	}
	// Second order with local error control: the global error falls as
	// tol^(2/3), about 21.5-fold for a 100-fold tighter tolerance.
	if errs[1] > 1e-5 || errs[0]/errs[1] < 10 {
		t.Errorf("deviation %.3g K at 1e-7 K and %.3g K at 1e-9 K: not converging to the closed form", errs[0], errs[1])
	}
}
