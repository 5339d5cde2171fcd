package check

import (
	"bytes"
	"cureslab/cases"
	"cureslab/mesh"
	"cureslab/physics"
	"cureslab/solver"
	"math"
	"strings"
	"testing"
)

func TestAdiabaticRise(t *testing.T) {
	for _, tc := range []struct {
		name           string
		q, cu, cc, a0  float64
		want, relative float64
	}{
		// Source: ΔT_ad = w·H·(1 − α0)/c_p (energy balance;
		// analytic): 0.6 × 400 J/g / 1.5 J/g/K = 160 K.
		{"constant cp", 0.6 * 400e3, 1500, 1500, 0, 160, 1e-15},
		// Same balance from α0 = 0.25: 160 × 0.75 = 120 K.
		{"initial cure", 0.6 * 400e3, 1500, 1500, 0.25, 120, 1e-15},
		// c_p equal to within 1e-14 takes the constant branch, continuously.
		{"nearly constant", 0.6 * 400e3, 1500, 1500 * (1 + 1e-14), 0, 160, 1e-12},
	} {
		got := AdiabaticRise(tc.q, tc.cu, tc.cc, tc.a0)
		if math.Abs(got-tc.want) > tc.relative*tc.want {
			t.Errorf("%s: AdiabaticRise(%g, %g, %g, %g) = %.15g, want %.15g", tc.name, tc.q, tc.cu, tc.cc, tc.a0, got, tc.want)
		}
	}
	// c_p linear in cure: compare with the quadrature of the balance
	// c_p(α) dT = q dα (analytic; composite Simpson, 2000 intervals, whose
	// error here is below 1e-12 relative).
	q, cu, cc, a0 := 400e3, 1500.0, 1300.0, 0.1
	n := 2000
	h := (1 - a0) / float64(n)
	f := func(a float64) float64 { return q / (cu + (cc-cu)*a) }
	sum := f(a0) + f(1)
	for i := 1; i < n; i++ {
		w := 2.0
		if i%2 == 1 {
			w = 4
		}
		sum += w * f(a0+float64(i)*h)
	}
	want := sum * h / 3
	if got := AdiabaticRise(q, cu, cc, a0); math.Abs(got-want) > 1e-10*want {
		t.Errorf("blended c_p: AdiabaticRise = %.12g, quadrature %.12g", got, want)
	}
}

// slabCase builds a case of the given layers (materials per layer) with both
// faces convective at h to a constant air temperature Tair.
func slabCase(t *testing.T, layers []mesh.Layer, mats []*physics.Material, h, Tair float64) *cases.Case {
	t.Helper()
	m, err := mesh.Build(layers, mesh.Options{})
	if err != nil {
		t.Fatal(err)
	}
	face := physics.Face{Kind: physics.Convection, H: h, Air: physics.Steady(Tair)}
	c := &cases.Case{
		File:  "slab.toml",
		Title: "slab",
		Problem: &solver.Problem{
			Mesh: m, Materials: mats, Top: face, Bottom: face,
			InitialTemperature: 293.15, End: 3600,
		},
		Criteria: cases.Criteria{MinCure: math.NaN(), MaxTemperature: math.NaN(), MaxSpread: math.NaN()},
		TopAir:   "20 C", BottomAir: "20 C",
	}
	for i, l := range layers {
		c.Layers = append(c.Layers, cases.LayerInfo{Name: l.Name, Material: mats[i].Name})
	}
	return c
}

func inertMaterial(name string, rho, cp, k float64) *physics.Material {
	return &physics.Material{Name: name, Density: rho,
		SpecificHeat: physics.Inert(physics.Constant(cp)), Conductivity: physics.Inert(physics.Constant(k))}
}

func checkText(t *testing.T, c *cases.Case) string {
	t.Helper()
	var b bytes.Buffer
	if err := Check(&b, c); err != nil {
		t.Fatal(err)
	}
	return b.String()
}

func TestCheckBiot(t *testing.T) {
	// Source: definition Bi = h·L/k (Incropera §5.1, from memory);
	// 10 W/m²K × 0.01 m / 0.2 W/m/K = 0.5 (analytic).
	one := slabCase(t, []mesh.Layer{{Name: "a", Thickness: 0.01}}, []*physics.Material{inertMaterial("m", 1000, 1000, 0.2)}, 10, 300)
	if out := checkText(t, one); !strings.Contains(out, "top     Bi = 0.5 ") || !strings.Contains(out, "bottom  Bi = 0.5 ") {
		t.Errorf("single layer: want Bi = 0.5 on both faces in\n%s", out)
	}
	// Series resistance (analytic): 0.01/0.2 + 0.002/0.4 + 0.005 = 0.06
	// m²K/W, so Bi = 10 × 0.06 = 0.6.
	two := slabCase(t, []mesh.Layer{{Name: "a", Thickness: 0.01}, {Name: "b", Thickness: 0.002, ContactResistance: 0.005}},
		[]*physics.Material{inertMaterial("m", 1000, 1000, 0.2), inertMaterial("n", 1000, 1000, 0.4)}, 10, 300)
	if out := checkText(t, two); !strings.Contains(out, "top     Bi = 0.6 ") {
		t.Errorf("two layers: want Bi = 0.6 in\n%s", out)
	}
}

func TestDrivingMax(t *testing.T) {
	pr := &solver.Problem{InitialTemperature: 290, Top: physics.Face{Kind: physics.Insulated}, Bottom: physics.Face{Kind: physics.Flux, Flux: physics.Steady(1000)}}
	if T, ok := DrivingMax(pr); T != 290 || ok {
		t.Errorf("nothing drives: got %g, %v; want the initial 290 K, false", T, ok)
	}
	oven, _ := physics.FromSegments(296.15, []physics.Segment{{Rate: 1, To: 350}, {Rate: -1, To: 300}})
	pr.Top = physics.Face{Kind: physics.Convection, H: 10, Air: oven}
	pr.Bottom = physics.Face{Kind: physics.Fixed, Set: physics.Steady(340)}
	if T, ok := DrivingMax(pr); T != 350 || !ok {
		t.Errorf("got %g, %v; want 350 K (the oven's peak), true", T, ok)
	}
}

func TestCheckWarnings(t *testing.T) {
	// A fast first-order resin 20 mm thick: conduction time
	// 0.02² × 1100 × 1500 / 0.2 = 3300 s, half-life ln2/k ≈ 69 s at 100 C.
	fast := &physics.Material{Name: "fast", Density: 1100,
		SpecificHeat: physics.Inert(physics.Constant(1500)), Conductivity: physics.Inert(physics.Constant(0.2)),
		Cure: &physics.Cure{Model: physics.NthOrder{A: 0.01 / math.Exp(-60e3/(physics.GasConstant*373.15)), E: 60e3, N: 1},
			TotalHeat: 400e3, ResinFraction: 1, GelPoint: 0.6}}
	c := slabCase(t, []mesh.Layer{{Name: "thick", Thickness: 0.02}}, []*physics.Material{fast}, 10, 373.15)
	c.Criteria.MaxTemperature = 413.15
	out := checkText(t, c)
	for _, want := range []string{
		"the exotherm can run ahead of conduction: expect the core to overshoot the program",
		"above max_temperature 140 C",
		// 100 C + 400/1.5 K = 366.7 C stays below the 400 C runaway limit.
		"an adiabatic core would reach 367 C",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("check output lacks %q:\n%s", want, out)
		}
	}
	if strings.Contains(out, "runaway limit 400 C.") {
		t.Errorf("warned about the runaway limit below it:\n%s", out)
	}

	// Neighbouring cells of 1 mm and 0.05 mm (ratio 20 > 5).
	inert := inertMaterial("m", 1000, 1000, 1)
	c = slabCase(t, []mesh.Layer{{Name: "a", Thickness: 5e-3, Cells: 5}, {Name: "b", Thickness: 0.1e-3, Cells: 2}},
		[]*physics.Material{inert, inert}, 10, 300)
	out = checkText(t, c)
	if !strings.Contains(out, "differ in size by 20x") || !strings.Contains(out, "[mesh] growth") {
		t.Errorf("no mesh-grading warning in\n%s", out)
	}

	// A benign case has none.
	c = slabCase(t, []mesh.Layer{{Name: "a", Thickness: 5e-3}}, []*physics.Material{inert}, 10, 300)
	if out = checkText(t, c); !strings.Contains(out, "Warnings\n  none\n") {
		t.Errorf("unexpected warnings in\n%s", out)
	}
}

// A composite ply under volumetric heating draws the warning that its
// dielectric is only an estimate.
func TestCheckCompositeDielectricWarning(t *testing.T) {
	ex, _ := cases.ExampleByName("thick-laminate")
	text := string(ex.Text) + `
[materials.resin-LS1.dielectric]
permittivity = 4
loss_factor = 0.4

[volumetric]
frequency = "2.45 GHz"
field = "1 kV/m"
`
	c, err := cases.Parse("laminate-mw.toml", []byte(text), "")
	if err != nil {
		t.Fatal(err)
	}
	var b strings.Builder
	if err := Check(&b, c); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), "the composite ply-LS1 absorbs with its resin's loss factor scaled") {
		t.Errorf("check lacks the composite dielectric warning:\n%s", b.String())
	}
	if got := c.Materials["ply-LS1"].Dielectric.LossFactor; math.Abs(got-0.4*0.4) > 1e-15 {
		t.Errorf("ply loss factor %v, want 0.4 x (1 - 0.6)", got)
	}
}
