package check

import (
	"cureslab/cases"
	"cureslab/cases/internal/num"
	"cureslab/cases/internal/textout"
	"cureslab/physics"
	"cureslab/solver"
	"fmt"
	"math"
)

// Estimate holds the pre-trial estimates of one curing layer at the
// reference temperature T (the highest temperature that drives the case).
type Estimate struct {
	Layer, Material string
	Thickness       float64 // m
	T               float64 // reference temperature, K
	// AdiabaticRise is the temperature rise of the layer if none of its
	// reaction heat left it, K.
	AdiabaticRise float64
	// Diffusivity is k/(ρ c_p) of the layer at T and the initial cure, m²/s.
	Diffusivity float64
	// ConductionTime is ℓ²/a with ℓ the length of the runaway screen: half
	// the layer when heat leaves through both its faces, the whole layer
	// when through one (Runaway.Length), s.
	ConductionTime float64
	// HalfLife is the isothermal time at T from the initial cure to 0.5, s;
	// +Inf when the resin does not react from its initial cure, 0 when it
	// starts past 0.5.
	HalfLife float64
	// PeakRate is the largest isothermal cure rate at T over cure from the
	// initial cure to 1, 1/s, reached at PeakCure.
	PeakRate, PeakCure float64
	// ApparentE is R T² ∂ln r/∂T at the peak rate, J/mol.
	ApparentE float64
	// Runaway is the Frank-Kamenetskii screen of the layer at the hottest
	// hold, with its actual faces (see Runaway).
	Runaway Runaway
	// TimeToMinCure is the isothermal time at T from the initial cure to
	// criteria.min_cure, s; NaN without that criterion, +Inf when the
	// resin never gets there at T.
	TimeToMinCure float64
}

// Estimates returns the pre-trial estimates of every curing layer of c at
// the highest temperature that drives the case (the hottest point of the
// schedules and constants of convective and fixed faces and of a control
// program; the initial temperature when nothing drives one).
//
// The adiabatic rise is AdiabaticRise with c_p uncured and cured at T; for a
// cure-independent c_p it is the familiar w·H·(1 − α0)/c_p (energy balance).
// The conduction time is ℓ²/a with a = k/(ρ c_p) uncured at T; the
// half-life and the time to min_cure are physics.Cure's IsothermalTime from
// α0 at T. The runaway screen follows screenRunaway.
//
// Cost: a few isothermal quadratures per curing layer, and one per 0.25 K of
// the program's rise to its hottest hold (physics.Cure.CureAlong).
func Estimates(c *cases.Case) []Estimate {
	pr := c.Problem
	T, _ := DrivingMax(pr)
	prog := hottestProgram(pr)
	var out []Estimate
	for j, l := range pr.Mesh.Layers {
		mat := materialOf(c, j)
		if mat == nil || mat.Cure == nil {
			continue
		}
		a0 := pr.InitialCure
		cu, _ := mat.SpecificHeat.Uncured.At(T)
		cc := cu
		if mat.SpecificHeat.HasCured {
			cc, _ = mat.SpecificHeat.Cured.At(T)
		}
		cp, _, _ := mat.SpecificHeat.At(T, a0)
		k, _, _ := mat.Conductivity.At(T, a0)
		diff := k / (mat.Density * cp)
		e := Estimate{
			Layer:         l.Name,
			Material:      layerInfo(c, j).Material,
			Thickness:     l.Thickness,
			T:             T,
			AdiabaticRise: AdiabaticRise(mat.Cure.HeatPerMass(), cu, cc, a0),
			Diffusivity:   diff,
			HalfLife:      mat.Cure.IsothermalTime(T, a0, 0.5),
			Runaway:       screenRunaway(c, j, T, prog),
			TimeToMinCure: math.NaN(),
		}
		e.ConductionTime = e.Runaway.Length * e.Runaway.Length / diff
		if mc := c.Criteria.MinCure; !math.IsNaN(mc) {
			e.TimeToMinCure = mat.Cure.IsothermalTime(T, a0, mc)
		}
		// The peak isothermal rate, on a grid of 400 cures from α0 to 1.
		for i := range 400 {
			a := a0 + (1-a0)*float64(i)/400
			if r, _, _ := mat.Cure.Rate(T, a); r > e.PeakRate {
				e.PeakRate, e.PeakCure = r, a
			}
		}
		if e.PeakRate > 0 {
			r, rT, _ := mat.Cure.Rate(T, e.PeakCure)
			e.ApparentE = physics.GasConstant * T * T * rT / r
		}
		out = append(out, e)
	}
	return out
}

// AdiabaticRise returns the temperature rise, in K, of a material that
// releases heat q (J/kg, resin fraction × total heat) as its cure goes from
// a0 to 1 with no heat leaving, when its specific heat is linear in cure
// from cu (uncured) to cc (cured), both in J/(kg·K):
//
//	ΔT = q / (cc − cu) · ln(cc / (cu + (cc − cu)·a0)),
//
// which is q·(1 − a0)/cu when cc = cu (energy balance; analytic). Preconditions: cu,
// cc > 0 and a0 in [0, 1].
func AdiabaticRise(q, cu, cc, a0 float64) float64 {
	c0 := cu + (cc-cu)*a0
	d := cc - cu
	if math.Abs(d) <= 1e-12*cu {
		return q * (1 - a0) / c0
	}
	return q / d * math.Log1p(d*(1-a0)/c0)
}

// DrivingMax returns the highest temperature that drives the problem (K):
// the largest value of the air schedule of a convective face, the set
// schedule of a fixed face and the program of controlled volumetric
// heating, and false with the initial temperature when none drives it.
func DrivingMax(pr *solver.Problem) (float64, bool) {
	T, found := math.Inf(-1), false
	for _, f := range []*physics.Face{&pr.Top, &pr.Bottom} {
		if s, ok := f.Driver(); ok {
			T, found = max(T, s.Max()), true
		}
	}
	if cases.Controlled(pr) {
		T, found = max(T, pr.Volumetric.Control.Program.Max()), true
	}
	if !found {
		return pr.InitialTemperature, false
	}
	return T, true
}

// printEstimates prints the Biot numbers (printBiot) and the curing-layer
// estimates (printLayerEstimate) and returns the warnings they raise.
func printEstimates(p *textout.Printer, c *cases.Case) []string {
	p.Printf("\nPre-trial estimates (rough guides, not results)\n")
	printBiot(p, c)
	est := Estimates(c)
	if len(est) == 0 {
		p.Printf("  No layer cures: the case is pure heat conduction.\n")
		return nil
	}
	abort := c.Problem.AbortTemperature
	if abort == 0 {
		abort = solver.DefaultAbortTemperature
	}
	var warn []string
	for _, e := range est {
		warn = append(warn, printLayerEstimate(p, c, e, abort)...)
	}
	return warn
}

// printBiot prints the Biot number of each face of c over the whole stack:
//
//	Bi = h L / k_eff,  k_eff = L / Σ (l_j / k_j + R_j)
//
// with L the stack's thickness, l_j, k_j the layers' thicknesses and
// conductivities at the initial temperature and cure, R_j their contact
// resistances, and h the face's coefficient plus, with an emissivity ε, the
// radiation linearised at the highest air temperature T_a: 4 ε σ T_a³.
func printBiot(p *textout.Printer, c *cases.Case) {
	pr := c.Problem
	m := pr.Mesh
	T0 := pr.InitialTemperature
	L, R := m.Thickness(), 0.0
	for j, l := range m.Layers {
		a := 0.0
		mat := materialOf(c, j)
		if mat == nil {
			continue
		}
		if mat.Cure != nil {
			a = pr.InitialCure
		}
		k, _, _ := mat.Conductivity.At(T0, a)
		R += l.Thickness/k + l.ContactResistance
	}
	keff := L / R
	p.Printf("  Biot numbers Bi = h*L/k_eff, L = the whole stack (%s mm), k_eff = L / (sum of layer thickness/k\n", num.FormatDepth(L))
	p.Printf("  plus contact resistances) = %s W/m/K at the initial %s C:\n", g3(keff), fixedText(T0-273.15, 1))
	tw := p.Table()
	for _, f := range []struct {
		name string
		face *physics.Face
	}{{"top", &pr.Top}, {"bottom", &pr.Bottom}} {
		switch {
		case f.face.HasAir():
			h := f.face.H
			note := "h " + num.G(h) + " W/m^2/K"
			if f.face.Emissivity > 0 {
				ta := f.face.Air.Max()
				hr := 4 * f.face.Emissivity * physics.StefanBoltzmann * ta * ta * ta
				h += hr
				note += fmt.Sprintf(" + radiation %s W/m^2/K (linearised at %s C)", g3(hr), fixedText(ta-273.15, 0))
			}
			bi := h * R
			fmt.Fprintf(tw, "    %s\tBi = %s\t%s: %s\n", f.name, g3(bi), note, biotWords(bi))
		case f.face.Kind == physics.Fixed:
			fmt.Fprintf(tw, "    %s\tBi infinite\tthe face follows its set temperature; the stack lags it by conduction alone\n", f.name)
		default:
			fmt.Fprintf(tw, "    %s\tno Biot number\t%s face\n", f.name, f.face.Kind)
		}
	}
	p.Flush(tw)
}

// printLayerEstimate prints the estimates of one curing layer (adiabatic
// rise, conduction time, reaction half-life, time to min_cure, peak
// reaction rate) and its runaway screen (printRunaway), and returns the
// warnings: min_cure out of reach in the case's time, conduction slower than
// the reaction, and an adiabatic core above max_temperature or above abort,
// the runaway limit (K).
func printLayerEstimate(p *textout.Printer, c *cases.Case, e Estimate, abort float64) []string {
	pr := c.Problem
	var warn []string
	p.Printf("  Layer %s (%s), at the highest driving temperature %s C:\n", e.Layer, e.Material, fixedText(e.T-273.15, 1))
	tw := p.Table()
	peak := e.T + e.AdiabaticRise
	fmt.Fprintf(tw, "    adiabatic temperature rise\t%s K\tif no reaction heat left the layer; an adiabatic core would reach %s C\n",
		fixedText(e.AdiabaticRise, 1), fixedText(peak-273.15, 0))
	rs := e.Runaway
	scale := "the layer (heat leaves through one face)"
	if rs.Half {
		scale = "half the layer (heat leaves through both faces)"
	}
	fmt.Fprintf(tw, "    conduction time l^2/a\t%s\tl = %s mm, %s; a = k/(rho*c_p) = %s m^2/s\n",
		num.HumanTime(e.ConductionTime), num.FormatDepth(rs.Length), scale, g3(e.Diffusivity))
	var half string
	switch {
	case e.HalfLife == 0:
		half = "already past half cure at the start"
	case math.IsInf(e.HalfLife, 1):
		half = "never: the resin does not react from its initial cure at this temperature"
	case math.IsNaN(e.HalfLife):
		half = "unknown"
	default:
		half = num.HumanTime(e.HalfLife) + "\tisothermal, cure " + num.G(pr.InitialCure) + " to 0.5"
	}
	fmt.Fprintf(tw, "    reaction half-life\t%s\n", half)
	if mc := c.Criteria.MinCure; !math.IsNaN(mc) {
		ttm := "never at this temperature"
		if !math.IsInf(e.TimeToMinCure, 1) {
			ttm = num.HumanTime(e.TimeToMinCure)
		}
		fmt.Fprintf(tw, "    time to min_cure %s\t%s\tisothermal at %s C from cure %s; the case runs %s\n",
			num.G(mc), ttm, fixedText(e.T-273.15, 1), num.G(pr.InitialCure), num.HumanTime(pr.End))
	}
	if e.PeakRate > 0 {
		fmt.Fprintf(tw, "    peak reaction rate\t%s 1/s\tisothermal, at cure %s; apparent activation energy %s kJ/mol\n",
			g3(e.PeakRate), fixedText(e.PeakCure, 2), fixedText(e.ApparentE/1e3, 1))
	}
	p.Flush(tw)
	warn = append(warn, printRunaway(p, c, e)...)
	if mc := c.Criteria.MinCure; e.TimeToMinCure > pr.End {
		warn = append(warn, fmt.Sprintf("layer %s: even held at %s C from the start, the resin needs %s (isothermal) to reach min_cure %s, longer than the case's %s: it gets there only with help from its own exotherm, if at all.",
			e.Layer, fixedText(e.T-273.15, 1), timeOrNever(e.TimeToMinCure), num.G(mc), num.HumanTime(pr.End)))
	}
	if e.HalfLife > 0 && e.ConductionTime > e.HalfLife {
		warn = append(warn, fmt.Sprintf("layer %s: the conduction time (%s) is longer than the reaction half-life at %s C (%s): the exotherm can run ahead of conduction: expect the core to overshoot the program.",
			e.Layer, num.HumanTime(e.ConductionTime), fixedText(e.T-273.15, 0), num.HumanTime(e.HalfLife)))
	}
	if v := c.Criteria.MaxTemperature; !math.IsNaN(v) && peak > v {
		warn = append(warn, fmt.Sprintf("layer %s: an adiabatic core would reach %s C, above max_temperature %s C: the criterion holds only if enough heat leaves.",
			e.Layer, fixedText(peak-273.15, 0), num.G(num.Celsius(v))))
	}
	if peak > abort {
		warn = append(warn, fmt.Sprintf("layer %s: an adiabatic core would reach %s C, above the runaway limit %s C.",
			e.Layer, fixedText(peak-273.15, 0), num.G(abort-273.15)))
	}
	return warn
}

func timeOrNever(t float64) string {
	if math.IsInf(t, 1) {
		return "forever"
	}
	return num.HumanTime(t)
}

// layerIndex returns the index of the layer named name, −1 if none.
func layerIndex(c *cases.Case, name string) int {
	for j, l := range c.Problem.Mesh.Layers {
		if l.Name == name {
			return j
		}
	}
	return -1
}

// printRunaway prints the Frank-Kamenetskii screen of one curing layer and
// returns its warning, if any.
func printRunaway(p *textout.Printer, c *cases.Case, e Estimate) []string {
	rs := e.Runaway
	p.Printf("    Runaway screen (Frank-Kamenetskii, steady slab; a guide, not a prediction):\n")
	tw := p.Table()
	hold := "from the start"
	cure := fixedText(rs.Cure, 3) + " (the initial cure: the hold begins at the start)"
	if !math.IsInf(rs.HoldFrom, -1) {
		hold = "from " + num.HumanTime(rs.HoldFrom)
		cure = fixedText(rs.Cure, 3) + " (estimated: the initial cure followed along the program with isothermal kinetics, no lag, no exotherm)"
	}
	fmt.Fprintf(tw, "      hottest hold\t%s C %s\n", fixedText(rs.T-273.15, 1), hold)
	pr := c.Problem
	caveat := "" // how the screen's assumptions differ from the case
	if _, driven := DrivingMax(pr); !driven {
		caveat = "; no program drives the case, so it was screened at the initial temperature and understates the risk"
		fmt.Fprintf(tw, "      note\tno program drives the case: screened at the initial temperature, which understates the risk when a lamp or an uncontrolled field heats the part; judge by a run\n")
	} else {
		cool := math.Inf(1) // the hottest the faces' surroundings get, K
		for _, f := range []*physics.Face{&pr.Top, &pr.Bottom} {
			switch {
			case f.Kind == physics.Fixed:
				cool = min(cool, f.Set.Max())
			case f.HasAir():
				cool = min(cool, f.Air.Max())
			}
		}
		if cool < rs.T-1 {
			caveat = fmt.Sprintf("; the screen overstates the risk here: it takes the faces' surroundings at the hold, while the air or platen stays at %s C", fixedText(cool-273.15, 0))
			fmt.Fprintf(tw, "      note\tthe screen takes the faces' surroundings at the hold temperature; here one reaches only %s C, which takes more heat away than the screen assumes\n", fixedText(cool-273.15, 1))
		}
	}
	fmt.Fprintf(tw, "      cure when it begins\t%s\n", cure)
	if !(rs.Rate > 0) {
		fmt.Fprintf(tw, "      reaction\tnone at the hold from that cure: nothing to run away\n")
		p.Flush(tw)
		return nil
	}
	fmt.Fprintf(tw, "      fastest rate in the hold\t%s 1/s\tat cure %s (isothermal, from the cure it begins with); apparent activation energy %s kJ/mol\n",
		g3(rs.Rate), fixedText(rs.RateCure, 2), fixedText(rs.ApparentE/1e3, 1))
	biot := func(b float64) string {
		switch {
		case math.IsInf(b, 1):
			return "infinite (held)"
		case b == 0:
			return "0 (no heat leaves)"
		}
		return g3(b)
	}
	fmt.Fprintf(tw, "      Biot numbers h*l/k\ttop %s, bottom %s\tl = %s mm; each face's path to the air or platen through the layers beyond it, at %s C\n",
		biot(rs.BiTop), biot(rs.BiBottom), num.FormatDepth(rs.Length), fixedText(rs.T-273.15, 0))
	fmt.Fprintf(tw, "      delta\t%s\tE/(R T^2) * heat release at the fastest rate * l^2 / k\n", g3(rs.Delta))
	fmt.Fprintf(tw, "      critical delta\t%s\tfor these Biot numbers: the largest delta with a steady state of theta'' + delta*exp(theta) = 0, from its closed-form solutions (Frank-Kamenetskii, Diffusion and Heat Transfer in Chemical Kinetics, 1969): 0.8785 for held faces, Semenov's Bi/e for small Bi\n",
		g3(rs.Critical))
	p.Flush(tw)
	ratio := rs.Delta / rs.Critical
	// What is left to release from the cure the hold begins with.
	mat := materialOf(c, layerIndex(c, e.Layer))
	left := ""
	if mat != nil && mat.Cure != nil {
		cu, _ := mat.SpecificHeat.Uncured.At(rs.T)
		cc := cu
		if mat.SpecificHeat.HasCured {
			cc, _ = mat.SpecificHeat.Cured.At(rs.T)
		}
		left = fmt.Sprintf(" (what is left to react from cure %s can heat it by at most %s K, adiabatic)",
			fixedText(rs.Cure, 2), fixedText(AdiabaticRise(mat.Cure.HeatPerMass(), cu, cc, rs.Cure), 0))
	}
	switch {
	case rs.Critical == 0:
		return []string{fmt.Sprintf("layer %s: no heat leaves it through either face: any reaction heat accumulates (adiabatic): expect its full adiabatic rise.", e.Layer)}
	case ratio >= 1:
		return []string{fmt.Sprintf("layer %s: the Frank-Kamenetskii delta %s at the %s C hold exceeds its critical %s for these faces (%.0f %%): no steady state exists while the resin reacts at that rate: expect a runaway exotherm unless the resin runs out first%s%s. Lower the hold, cure thinner, or cool the faces better, and keep within the supplier's limits.",
			e.Layer, g3(rs.Delta), fixedText(rs.T-273.15, 0), g3(rs.Critical), 100*ratio, left, caveat)}
	case ratio >= runawayCaution:
		return []string{fmt.Sprintf("layer %s: the Frank-Kamenetskii delta %s at the %s C hold is %.0f %% of its critical %s for these faces (caution from %.0f %%): close to thermal runaway%s%s; a thicker layer, a hotter hold or weaker cooling would tip it over.",
			e.Layer, g3(rs.Delta), fixedText(rs.T-273.15, 0), 100*ratio, g3(rs.Critical), 100*runawayCaution, left, caveat)}
	}
	return nil
}

// biotWords says what a Biot number means for the through-thickness
// gradient (the 0.1 threshold of the lumped-capacitance approximation,
// Incropera §5.1, from memory).
func biotWords(bi float64) string {
	switch {
	case bi < 0.1:
		return "the stack heats nearly uniformly through its thickness"
	case bi <= 1:
		return "a moderate through-thickness gradient"
	}
	return "conduction-limited: a large through-thickness gradient"
}
