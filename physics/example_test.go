package physics_test

import (
	"fmt"
	"math"
	"os"
	"text/tabwriter"

	"cureslab/physics"
)

// An invented two-part epoxy: autocatalytic kinetics with a diffusion factor.
// The rate at 120 °C and 30 % cure, and the isothermal times to gel and to
// 90 % cure at that temperature. (The printed values agree with an
// independent RK4 integration of dα/dt = r at a 0.01 s step.)
func ExampleCure_IsothermalTime() {
	c := &physics.Cure{
		Model: physics.Autocatalytic{
			A1: 2.0e4, E1: 62e3, // 1/s, J/mol
			A2: 6.0e5, E2: 58e3,
			M: 0.45, N: 1.6,
		},
		Diffusion: &physics.Diffusion{C: 30, Alpha0: -1.1, AlphaT: 0.0052},
		GelPoint:  physics.DefaultGelPoint,
	}
	T := 120 + 273.15 // K
	r, _, _ := c.Rate(T, 0.3)
	fmt.Printf("rate at 30 %% cure: %.3g 1/s\n", r)
	fmt.Printf("gel (α = %.3f) after %.1f min\n", c.GelPoint, c.IsothermalTime(T, 0, c.GelPoint)/60)
	fmt.Printf("α = 0.90 after %.1f min\n", c.IsothermalTime(T, 0, 0.9)/60)
	fmt.Printf("α after 60 min: %.4f\n", c.IsothermalCure(T, 0, 3600))
	// Output:
	// rate at 30 % cure: 0.00395 1/s
	// gel (α = 0.577) after 3.0 min
	// α = 0.90 after 9.3 min
	// α after 60 min: 0.9829
}

// The n-th order law has a closed form; IsothermalCure follows it.
func ExampleNthOrder() {
	c := &physics.Cure{Model: physics.NthOrder{A: 1e5, E: 60e3, N: 1}}
	T := 400.0
	k, _ := physics.Arrhenius(1e5, 60e3, T)
	for _, kt := range []float64{0.5, 1, 2} {
		fmt.Printf("kt = %.1f: α = %.6f\n", kt, c.IsothermalCure(T, 0, kt/k))
	}
	// Output:
	// kt = 0.5: α = 0.393469
	// kt = 1.0: α = 0.632121
	// kt = 2.0: α = 0.864665
}

// The oven program of the case-file example: times at which each segment ends.
func ExampleFromSegments() {
	const C = 273.15 // K at 0 °C
	const perMin = 1.0 / 60
	s, err := physics.FromSegments(23+C, []physics.Segment{
		{Rate: 2 * perMin, To: 70 + C},
		{Hold: 90 * 60},
		{Rate: 2 * perMin, To: 120 + C},
		{Hold: 60 * 60},
		{Rate: -3 * perMin, To: 40 + C},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	times, values := s.Points()
	for i := range times {
		fmt.Printf("%6.1f min  %5.1f °C\n", times[i]/60, values[i]-C)
	}
	fmt.Printf("at 60 min: %.1f °C\n", s.At(3600)-C)

	// A ramp that points away from its target is refused.
	_, err = physics.FromSegments(23+C, []physics.Segment{{Rate: -2 * perMin, To: 70 + C}})
	fmt.Println(err)
	// Output:
	//    0.0 min   23.0 °C
	//   23.5 min   70.0 °C
	//  113.5 min   70.0 °C
	//  138.5 min  120.0 °C
	//  198.5 min  120.0 °C
	//  225.2 min   40.0 °C
	// at 60 min: 70.0 °C
	// segment 0: invalid schedule: the ramp never reaches its target: rate -2 K/min points away from 343.15 K (starting at 296.15 K)
}

// The built-in material library, as `cureslab materials` lists it.
func ExampleLibrary() {
	w := tabwriter.NewWriter(os.Stdout, 0, 0, 2, ' ', 0)
	fmt.Fprintln(w, "name\tρ kg/m³\tcp J/(kg·K)\tk W/(m·K)")
	for _, m := range physics.Library() {
		cp, _, _ := m.SpecificHeat.At(293.15, 0)
		k, _, _ := m.Conductivity.At(293.15, 0)
		fmt.Fprintf(w, "%s\t%g\t%g\t%g\n", m.Name, m.Density, cp, k)
	}
	w.Flush()
	// Output:
	// name                ρ kg/m³  cp J/(kg·K)  k W/(m·K)
	// alumina             3970     765          36
	// alumina-96          3720     880          24.7
	// aluminium           2702     903          237
	// aluminium-2024      2770     875          177
	// aluminium-6061      2700     896          167
	// borosilicate-glass  2225     835          1.4
	// carbon-steel        7854     434          60.5
	// copper              8933     385          401
	// epoxy-cured         1200     1050         0.2
	// fep-release-film    2150     1170         0.2
	// fr4                 1850     1150         0.343
	// invar-36            8050     515          10.2
	// nylon-bagging-film  1140     1670         0.24
	// polyester-breather  250      1250         0.06
	// ptfe                2200     1050         0.35
	// silicon             2330     712          148
	// silicone-rubber     1200     1300         0.22
	// soda-lime-glass     2500     750          1.4
	// stainless-304       7900     477          14.9
}

// Where one value comes from.
func ExampleBuiltin() {
	m, ok := physics.Builtin("fr4")
	fmt.Println(ok, m.Name)
	fmt.Println(m.Source)
	// Output:
	// true fr4
	// FR-4 glass-epoxy laminate, through-plane: k Sarvar, Poole & Witting, J. Electron. Mater. 19:1345 (1990) (confirmed); rho 1850 (confirmed); cp 1100-1200 typical (from memory)
}

// The critical Frank-Kamenetskii parameter of a slab for a few kinds of
// faces: held at the surroundings, cooled by air at Bi = 1, and one held
// face against one insulated face.
func ExampleCriticalFK() {
	held := physics.CriticalFKSymmetric(math.Inf(1))
	air := physics.CriticalFKSymmetric(1)
	fmt.Printf("held faces, half-width a: delta_c = %.4f, theta_max = %.4f\n", held.Delta, held.Theta)
	fmt.Printf("air at Bi = h a/k = 1:     delta_c = %.4f\n", air.Delta)
	// Full thickness L as the length scale: a held platen under a face
	// cooled by air at Bi = h L/k = 1; the hottest point lies nearer the air.
	c := physics.CriticalFK(math.Inf(1), 1)
	fmt.Printf("platen + air, thickness L: delta_c = %.4f, hottest at %.3f L\n", c.Delta, c.Hottest)
	// Output:
	// held faces, half-width a: delta_c = 0.8785, theta_max = 1.1868
	// air at Bi = h a/k = 1:     delta_c = 0.2707
	// platen + air, thickness L: delta_c = 1.4789, hottest at 0.770 L
}

// A carbon/epoxy ply at 60 % fibre by volume, seen through its thickness:
// the mixed density, specific heat and conductivity by each model, and the
// heat of reaction per kg of ply.
func ExampleMix() {
	resin := &physics.Material{
		Name: "resin-x", Density: 1200, // an invented epoxy
		SpecificHeat: physics.Inert(physics.Constant(1200)),
		Conductivity: physics.Inert(physics.Constant(0.2)),
		Cure:         &physics.Cure{Model: physics.NthOrder{A: 1e5, E: 60e3, N: 1.5}, TotalHeat: 470e3, ResinFraction: 1},
	}
	f, _ := physics.BuiltinFibre("carbon-fibre")
	for _, name := range physics.ConductivityModels() {
		m, _ := physics.ParseConductivityModel(name)
		ply, err := physics.Mix("ply", f, resin, 0.6, m)
		if err != nil {
			fmt.Println(err)
			return
		}
		cp, _, _ := ply.SpecificHeat.At(300, 0)
		k, _, _ := ply.Conductivity.At(300, 0)
		fmt.Printf("%-13s rho %.0f kg/m^3, cp %.1f J/kg/K, k %.4f W/m/K, heat %.1f J/g of ply\n",
			name, ply.Density, cp, k, ply.Cure.HeatPerMass()/1e3)
	}
	// Output:
	// maxwell       rho 1548 kg/m^3, cp 861.9 J/kg/K, k 0.4341 W/m/K, heat 145.7 J/g of ply
	// springer-tsai rho 1548 kg/m^3, cp 861.9 J/kg/K, k 0.4220 W/m/K, heat 145.7 J/g of ply
	// series        rho 1548 kg/m^3, cp 861.9 J/kg/K, k 0.3684 W/m/K, heat 145.7 J/g of ply
}

// The published two-regime epoxy of Lee, Loos & Springer (1982): the time
// to 90 % cure and the cure after an hour at two temperatures, with the
// Castro–Macosko viscosity of an invented resin at the start of a hold.
// (The cures agree with an RK4 integration of the law; the viscosities
// with the formula by hand: 3e-7·e^{15.296} and that times 5^{2.2}.)
func ExampleLeeLoosSpringer() {
	c := &physics.Cure{Model: physics.LeeLoosSpringer{
		A1: 2.101e9 / 60, E1: 80.7e3, // 1/s, J/mol
		A2: -2.014e9 / 60, E2: 77.8e3,
		A3: 1.960e5 / 60, E3: 56.6e3,
		B: 0.47, Switch: physics.DefaultSwitch,
	}, GelPoint: 0.5}
	for _, C := range []float64{150, 177} {
		T := C + 273.15
		fmt.Printf("%.0f C: α = 0.9 after %.1f min, α(60 min) = %.3f\n", C, c.IsothermalTime(T, 0, 0.9)/60, c.IsothermalCure(T, 0, 3600))
	}
	v := physics.CastroMacosko{Eta0: 3e-7, E: 50e3, A: 1.2, B: 2.5}
	fmt.Printf("viscosity at 120 C: %.3g Pa·s uncured, %.3g Pa·s at α = 0.4\n", v.At(393.15, 0, 0.5), v.At(393.15, 0.4, 0.5))
	// Output:
	// 150 C: α = 0.9 after 106.2 min, α(60 min) = 0.745
	// 177 C: α = 0.9 after 39.1 min, α(60 min) = 0.967
	// viscosity at 120 C: 1.32 Pa·s uncured, 45.5 Pa·s at α = 0.4
}

// 12 mm of an uncured resin (ε′ = 4, ε″ = 0.4) in a metal cup, a plane
// wave at 2.45 GHz from above, then swept over 2.40–2.50 GHz: the share of
// the incident power reflected and absorbed, and the absorbed power at the
// top, middle and bottom of the resin for 1 kW/m² incident. The metal holds
// a node of the field on its face: the bottom of the resin barely heats,
// whatever the frequency within this narrow band. (The single-frequency
// values agree with an independent midpoint quadrature, 20000 points per
// cell, of the metal-backed slab's closed form E = E_s sin(k(d − z)).)
func ExampleWave_Absorb() {
	const cells = 12
	stack := make([]physics.Slab, cells+1)
	for i := range cells {
		stack[i] = physics.Slab{Width: 0.001, Permittivity: 4, Loss: 0.4}
	}
	stack[cells] = physics.Slab{Width: 0.002, Conductor: true}
	K := make([]float64, len(stack))
	const S = 1000.0 // W/m²
	for _, b := range []physics.Band{
		{Lo: 2.45e9, Hi: 2.45e9, Points: 1},
		{Lo: 2.40e9, Hi: 2.50e9, Points: 101},
	} {
		sh := physics.NewWave(len(stack), b).Absorb(K, stack, physics.IncidentTop)
		fmt.Printf("%d point(s): reflected %.3f, absorbed %.3f; P top %.0f, middle %.0f, bottom %.0f W/m³\n",
			b.Points, sh.Reflected, sh.Absorbed, S*0.4*K[0], S*0.4*K[6], S*0.4*K[11])
	}
	fmt.Printf("wavelength in the resin: %.1f mm\n", physics.Wavelength(2.45e9, 4, 0.4)*1e3)
	// Output:
	// 1 point(s): reflected 0.759, absorbed 0.241; P top 46038, middle 15444, bottom 189 W/m³
	// 101 point(s): reflected 0.759, absorbed 0.241; P top 46045, middle 15454, bottom 189 W/m³
	// wavelength in the resin: 61.1 mm
}
