package physics

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// squareCellStrips is the Springer–Tsai unit cell integrated numerically: a
// square cell of side 1 holding one round fibre of radius a = √(v/π), heat
// carried along strips parallel to the flow with no exchange between
// strips; each strip at height y crosses a chord L = 2√(a² − y²) of fibre
// in series with 1 − L of resin:
//
//	k = km·(1 − 2a) + ∫_{−a}^{a} dy / ((1 − L)/km + L/kf).
//
// Independent of the closed form (gonum's Gauss–Legendre rule, with
// y = a·sin θ to remove the square-root ends).
func squareCellStrips(kf, km, v float64) float64 {
	a := math.Sqrt(v / math.Pi)
	f := func(th float64) float64 {
		L := 2 * a * math.Cos(th)
		return a * math.Cos(th) / ((1-L)/km + L/kf)
	}
	return km*(1-2*a) + quad.Fixed(f, -math.Pi/2, math.Pi/2, 400, quad.Legendre{}, 0)
}

func TestTransverseConductivityFormulas(t *testing.T) {
	// Source: hand calculation of each published formula for kf = 0.84,
	// km = 0.2 W/(m·K), v = 0.6 (evaluated independently in Python):
	// Maxwell/Rayleigh 0.2·1.424/0.656; series 1/(0.6/0.84 + 0.4/0.2);
	// Springer & Tsai (1967) closed form.
	for _, tc := range []struct {
		m    ConductivityModel
		want float64
	}{
		{Maxwell, 0.4341463414634145},
		{Series, 0.3684210526315789},
		{SpringerTsai, 0.42200205332653973},
	} {
		if got := TransverseConductivity(tc.m, 0.84, 0.2, 0.6); relErr(got, tc.want) > 1e-14 {
			t.Errorf("%s: k = %.17g, want %.17g", tc.m, got, tc.want)
		}
	}
	// Springer–Tsai against the numerical unit cell, over both branches of
	// the closed form (arctan for fibres better than the resin, artanh for
	// poorer ones), its series near kf = km and the touching limit v = π/4.
	for _, tc := range []struct{ kf, km, v float64 }{
		{0.84, 0.2, 0.6}, {7, 0.2, 0.6}, {1.3, 0.2, 0.3}, {50, 0.2, 0.7},
		{0.05, 0.2, 0.5},   // β = 6, β²q² = 5.7 > 1: artanh branch
		{0.15, 0.2, 0.6},   // β = 0.67, βq < 1: arctan branch, kf < km
		{0.2002, 0.2, 0.6}, // |β| < 1e-3: series
		{0.2, 0.2, 0.6},    // β = 0
		{1, 0.2, math.Pi / 4},
	} {
		got := TransverseConductivity(SpringerTsai, tc.kf, tc.km, tc.v)
		// Source: quadrature of the Springer–Tsai unit cell (squareCellStrips).
		want := squareCellStrips(tc.kf, tc.km, tc.v)
		if relErr(got, want) > 1e-9 {
			t.Errorf("springer-tsai kf=%g km=%g v=%g: %.12g, unit cell %.12g", tc.kf, tc.km, tc.v, got, want)
		}
	}
	// Limits and bounds (analytic): no fibre gives the resin; equal
	// conductivities give that value; every model lies between the series
	// (Wiener lower) and parallel (upper) bounds; Springer–Tsai, a lower
	// bound of the square array, lies below Maxwell, which lies below
	// Rayleigh's square-array series k/km = 1 + 2v/(C − v − 0.3058 v⁴/C),
	// C = (kf + km)/(kf − km) (Rayleigh, Phil. Mag. 34:481, 1892; the
	// coefficient 0.3058 from memory), within 1.5 % of it at v = 0.6.
	for _, m := range []ConductivityModel{Maxwell, SpringerTsai, Series} {
		if got := TransverseConductivity(m, 0.84, 0.2, 0); relErr(got, 0.2) > 1e-15 {
			t.Errorf("%s at v = 0: %v, want 0.2", m, got)
		}
		if got := TransverseConductivity(m, 0.3, 0.3, 0.5); relErr(got, 0.3) > 1e-15 {
			t.Errorf("%s with kf = km: %v, want 0.3", m, got)
		}
		for _, v := range []float64{0.2, 0.5, 0.6, 0.7} {
			k := TransverseConductivity(m, 0.84, 0.2, v)
			lo, hi := 1/(v/0.84+(1-v)/0.2), v*0.84+(1-v)*0.2
			if !(k >= lo*(1-1e-15) && k <= hi) {
				t.Errorf("%s at v = %g: %v outside the bounds [%v, %v]", m, v, k, lo, hi)
			}
		}
	}
	kf, km, v := 0.84, 0.2, 0.6
	C := (kf + km) / (kf - km)
	ray := km * (1 + 2*v/(C-v-0.3058*math.Pow(v, 4)/C))
	st, mx := TransverseConductivity(SpringerTsai, kf, km, v), TransverseConductivity(Maxwell, kf, km, v)
	if !(st < mx && mx < ray && ray/mx-1 < 0.015) {
		t.Errorf("springer-tsai %v < maxwell %v < Rayleigh %v within 1.5 %%: not so", st, mx, ray)
	}
	if got := TransverseConductivity(SpringerTsai, 1, 0.2, 0.8); !math.IsNaN(got) {
		t.Errorf("springer-tsai past touching fibres: %v, want NaN", got)
	}
	for _, name := range ConductivityModels() {
		if m, ok := ParseConductivityModel(name); !ok || m.String() != name {
			t.Errorf("ParseConductivityModel(%q) = %v, %v", name, m, ok)
		}
	}
	if DefaultConductivityModel.String() != "maxwell" {
		t.Errorf("default model %v", DefaultConductivityModel)
	}
}

func testResin() *Material {
	return &Material{
		Name: "resin-x", Density: 1200,
		SpecificHeat: Inert(Constant(1200)),
		Conductivity: Inert(Constant(0.2)),
		Cure:         &Cure{Model: publishedLLS, TotalHeat: 470e3, ResinFraction: 1, GelPoint: 0.5},
		Viscosity:    &CastroMacosko{Eta0: 2e-6, E: 45e3, A: 1.5, B: 2},
		Dielectric:   &Dielectric{Permittivity: 4, LossFactor: 0.5, LossFactorCured: 0.1},
	}
}

func TestMixHandCalculation(t *testing.T) {
	f, ok := BuiltinFibre("carbon-fibre")
	if !ok {
		t.Fatal("no carbon-fibre")
	}
	resin := testResin()
	ply, err := Mix("ply", f, resin, 0.6, Maxwell)
	if err != nil {
		t.Fatal(err)
	}
	// Source: hand calculation (Python) for carbon fibre ρ 1780, cp 710,
	// k⊥ 0.84 in a resin ρ 1200, cp 1200, k 0.2 at v = 0.6:
	// ρ = 0.6·1780 + 0.4·1200 = 1548; wf = 1068/1548; cp = wf·710 + wr·1200.
	const rho, wr, cp, k = 1548.0, 0.31007751937984496, 861.937984496124, 0.4341463414634145
	gotCp, _, _ := ply.SpecificHeat.At(300, 0.5)
	gotK, _, _ := ply.Conductivity.At(300, 0.5)
	if relErr(ply.Density, rho) > 1e-15 || relErr(gotCp, cp) > 1e-14 || relErr(gotK, k) > 1e-14 {
		t.Errorf("ply ρ, cp, k = %v, %v, %v; want %v, %v, %v", ply.Density, gotCp, gotK, rho, cp, k)
	}
	// Heat of reaction per kg of ply = resin mass fraction × resin total heat.
	if relErr(ply.Cure.ResinFraction, wr) > 1e-15 || relErr(ply.Cure.HeatPerMass(), wr*470e3) > 1e-15 {
		t.Errorf("ply resin fraction %v, heat %v J/kg; want %v, %v", ply.Cure.ResinFraction, ply.Cure.HeatPerMass(), wr, wr*470e3)
	}
	if _, wr2 := MassFractions(1780, 1200, 0.6); relErr(wr2, wr) > 1e-15 {
		t.Errorf("MassFractions resin %v, want %v", wr2, wr)
	}
	// Energy identity (analytic): ρ·cp of the ply is the volume-weighted
	// sum of the constituents' ρ·cp.
	if want := 0.6*1780*710 + 0.4*1200*1200; relErr(ply.Density*gotCp, want) > 1e-14 {
		t.Errorf("ρ cp of the ply %v, want %v", ply.Density*gotCp, want)
	}
	// Dielectric by the resin's volume fraction; viscosity the resin's;
	// the resin itself untouched.
	if relErr(ply.Dielectric.LossFactor, 0.5*0.4) > 1e-15 || relErr(ply.Dielectric.LossFactorCured, 0.1*0.4) > 1e-15 || ply.Dielectric.Permittivity != 4 {
		t.Errorf("ply dielectric %+v", *ply.Dielectric)
	}
	if *ply.Viscosity != *resin.Viscosity || ply.Viscosity == resin.Viscosity {
		t.Errorf("ply viscosity %+v must be a copy of the resin's", ply.Viscosity)
	}
	if resin.Cure.ResinFraction != 1 || resin.Dielectric.LossFactor != 0.5 {
		t.Errorf("Mix modified the resin")
	}
	if ply.Cure.Model != resin.Cure.Model || ply.Cure.GelPoint != 0.5 {
		t.Errorf("ply cure law differs from the resin's")
	}
}

func TestMixTablesAndCure(t *testing.T) {
	f := &Fibre{Name: "glass", Density: 2580, SpecificHeat: Constant(810), TransverseConductivity: Constant(1.3), AxialConductivity: Constant(1.3)}
	cpU, _ := NewTable([]float64{300, 450}, []float64{1300, 1800})
	kC, _ := NewTable([]float64{280, 400, 500}, []float64{0.22, 0.24, 0.21})
	resin := &Material{
		Name: "r", Density: 1150,
		SpecificHeat: Blend{Uncured: cpU, Cured: Constant(1400), HasCured: true},
		Conductivity: Blend{Uncured: Constant(0.19), Cured: kC, HasCured: true},
	}
	ply, err := Mix("p", f, resin, 0.5, SpringerTsai)
	if err != nil {
		t.Fatal(err)
	}
	wf, wr := MassFractions(2580, 1150, 0.5)
	// Source: the mixture rules, exact at the tables' temperatures
	// (analytic); cp is affine in the resin's, so exact everywhere.
	for _, T := range []float64{250, 300, 350, 450, 600} {
		for _, a := range []float64{0, 0.4, 1} {
			cr, _, _ := resin.SpecificHeat.At(T, a)
			if cp, _, _ := ply.SpecificHeat.At(T, a); relErr(cp, wf*810+wr*cr) > 1e-14 {
				t.Errorf("T=%g α=%g: cp %v, want %v", T, a, cp, wf*810+wr*cr)
			}
		}
	}
	for _, T := range []float64{280, 400, 500} {
		for _, a := range []float64{0, 1} {
			kr, _, _ := resin.Conductivity.At(T, a)
			want := TransverseConductivity(SpringerTsai, 1.3, kr, 0.5)
			if k, _, _ := ply.Conductivity.At(T, a); relErr(k, want) > 1e-14 {
				t.Errorf("T=%g α=%g: k %v, want %v", T, a, k, want)
			}
		}
	}
	// No cure section in the resin: none in the ply.
	if ply.Cure != nil || ply.Viscosity != nil || ply.Dielectric != nil {
		t.Errorf("ply of an inert resin cures or absorbs")
	}
	// The ply's k is linear in cure between its values with uncured and
	// cured resin; the exact mixture of the resin's k at α = 0.5 differs by
	// far less than the data's uncertainty (measured here: 0.23 % for a
	// resin whose k changes by a quarter, 0.19 → 0.24, with glass at v = 0.5).
	k0, k1 := TransverseConductivity(SpringerTsai, 1.3, 0.19, 0.5), TransverseConductivity(SpringerTsai, 1.3, 0.24, 0.5)
	exact := TransverseConductivity(SpringerTsai, 1.3, 0.215, 0.5)
	if d := math.Abs((k0+k1)/2/exact - 1); d > 3e-3 {
		t.Errorf("linear-in-cure ply k off by %.3g at α = 0.5", d)
	}
}

func TestMixErrors(t *testing.T) {
	f, _ := BuiltinFibre("e-glass-fibre")
	r := testResin()
	for _, tc := range []struct {
		name string
		f    *Fibre
		r    *Material
		v    float64
		m    ConductivityModel
	}{
		{"no resin", f, nil, 0.5, Maxwell},
		{"no fibre", nil, r, 0.5, Maxwell},
		{"zero fraction", f, r, 0, Maxwell},
		{"all fibre", f, r, 1, Series},
		{"past touching", f, r, 0.79, SpringerTsai},
		{"NaN", f, r, math.NaN(), Maxwell},
		{"bad fibre", &Fibre{Name: "x", Density: 1, SpecificHeat: Constant(1)}, r, 0.5, Maxwell},
	} {
		if _, err := Mix("p", tc.f, tc.r, tc.v, tc.m); !errors.Is(err, ErrMix) {
			t.Errorf("%s: error %v, want ErrMix", tc.name, err)
		}
	}
}

func TestFibreLibrary(t *testing.T) {
	fs := Fibres()
	if len(fs) < 2 {
		t.Fatalf("%d fibres", len(fs))
	}
	for i, f := range fs {
		if i > 0 && !(fs[i-1].Name < f.Name) {
			t.Errorf("fibres not sorted")
		}
		ka, _ := f.AxialConductivity.At(300)
		kt, _ := f.TransverseConductivity.At(300)
		if !(f.Density > 0 && ka >= kt && kt > 0) || f.Source == "" {
			t.Errorf("%s: ρ %v, k axial %v, transverse %v, source %q", f.Name, f.Density, ka, kt, f.Source)
		}
	}
	// Source: typical ranges, from memory: carbon fibre axial 7–10, transverse
	// 0.8–1 W/(m·K), ρ 1760–1800; E-glass 1.0–1.3, ρ 2540–2600.
	c, _ := BuiltinFibre("carbon-fibre")
	g, _ := BuiltinFibre("e-glass-fibre")
	ka, _ := c.AxialConductivity.At(300)
	kt, _ := c.TransverseConductivity.At(300)
	kg, _ := g.TransverseConductivity.At(300)
	if ka < 7 || ka > 10 || kt < 0.8 || kt > 1 || c.Density < 1760 || c.Density > 1800 || kg < 1 || kg > 1.3 || g.Density < 2540 || g.Density > 2600 {
		t.Errorf("fibre values outside their published ranges")
	}
	if _, ok := BuiltinFibre("kevlar"); ok {
		t.Errorf("unknown fibre found")
	}
}

func TestCastroMacosko(t *testing.T) {
	v := &CastroMacosko{Eta0: 2e-6, E: 45e3, A: 1.5, B: 2}
	// Source: Castro & Macosko, AIChE J. 28:250 (1982), closed form
	// η0 e^{E/RT} (αg/(αg − α))^{A + Bα} evaluated by hand (Python) at
	// T = 400 K, α = 0.3, αg = 0.58.
	if got := v.At(400, 0.3, 0.58); relErr(got, 6.9419132150717555) > 1e-13 {
		t.Errorf("η(400 K, 0.3) = %.17g, want 6.9419132150717555", got)
	}
	// At α = 0 the gel factor is 1: η = η0 e^{E/RT} (analytic).
	if got, want := v.At(350, 0, 0.58), 2e-6*math.Exp(45e3/(GasConstant*350)); relErr(got, want) > 1e-14 {
		t.Errorf("η(350 K, 0) = %v, want %v", got, want)
	}
	// Gel and past it: no flow.
	for _, a := range []float64{0.58, 0.7, 1} {
		if got := v.At(400, a, 0.58); !math.IsInf(got, 1) {
			t.Errorf("η at α = %g ≥ gel = %v, want +Inf", a, got)
		}
	}
	// ln η is the logarithm of η (identity), and η rises toward gel.
	if d := v.LnAt(420, 0.5, 0.58) - math.Log(v.At(420, 0.5, 0.58)); math.Abs(d) > 1e-13 {
		t.Errorf("LnAt and At disagree by %v", d)
	}
	if !(v.At(420, 0.5, 0.58) > v.At(420, 0.4, 0.58)) {
		t.Errorf("η must rise with cure")
	}
}
