package check

import (
	"cureslab/cases"
	"cureslab/cases/internal/num"
	"cureslab/cases/internal/textout"
	"cureslab/mesh"
	"cureslab/physics"
	"cureslab/solver"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"
)

// CautionScope says what a printout or a page is about, so that it carries
// the cautions that apply to it and no others. The zero value is a page
// about heat conduction alone.
type CautionScope struct {
	Curing     bool // a reacting resin: self-heating, smoke and fire
	Volumetric bool // microwave or dielectric heating equipment
}

// The cautions, one sentence each, in plain text; which apply is decided
// by Cautions.
const (
	cautionTrial       = "A simulation does not replace a qualified trial on the real part: confirm what it predicts with measurements before relying on it."
	cautionData        = "Take resin data from the supplier's technical and safety data sheets and from your own measurements (DSC, thermal properties); the built-in values are generic handbook figures."
	cautionSelfHeating = "A large mass of reacting resin can heat itself until it smokes or catches fire: keep batch sizes, oven loads and casting thicknesses within the supplier's limits."
	cautionMicrowave   = "Microwave and dielectric heating equipment must meet the leakage limits and interlock rules that apply where it is used."
	cautionCodes       = "Local codes and your site's licensed practice come first wherever they differ from anything this tool suggests."
)

// Cautions returns the cautions that cureslab shows with its results for
// the given scope: always that a simulation is no substitute for a trial,
// where resin and material data must come from, and that local codes and
// licensed practice come first; the self-heating caution when a resin
// cures; the leakage and interlock caution under volumetric heating. check
// prints them for its case, and each report page for what it shows.
func Cautions(sc CautionScope) []string {
	out := []string{cautionTrial, cautionData}
	if sc.Curing {
		out = append(out, cautionSelfHeating)
	}
	if sc.Volumetric {
		out = append(out, cautionMicrowave)
	}
	return append(out, cautionCodes)
}

// AllCautions returns every caution (the README lists them all).
func AllCautions() []string { return Cautions(CautionScope{Curing: true, Volumetric: true}) }

// ScopeOf returns the caution scope of the case c: whether a layer cures and
// whether it has volumetric heating.
func ScopeOf(c *cases.Case) CautionScope {
	var sc CautionScope
	if c == nil || c.Problem == nil {
		return sc
	}
	for _, m := range c.Problem.Materials {
		if m != nil && m.Cure != nil {
			sc.Curing = true
		}
	}
	sc.Volumetric = c.Problem.Volumetric != nil
	return sc
}

// GelPointDefaultWords is how check and the materials list show a gel point
// that the case did not give.
const GelPointDefaultWords = "0.577 (default: Flory–Stockmayer, difunctional epoxy + tetrafunctional amine; set gel_point for other chemistries)"

// MaxNeighbourRatio is the size ratio of neighbouring cells above which
// Check suggests grading the mesh with [mesh] growth.
const MaxNeighbourRatio = 5

// Check writes a plain-text account of c for a reader checking a case before
// a run: the resolved stack (materials and where they come from, cells and
// cell sizes, contact resistances), the materials, faces, volumetric heating
// (chkVolumetric), schedules, time and output settings and criteria, then
// pre-trial estimates (Biot numbers
// of the faces, and for each curing layer the adiabatic temperature rise
// and conduction time against reaction half-life, see Estimate), warnings,
// and the cautions (check.Cautions).
//
// The only error it returns is a write error of w.
func Check(w io.Writer, c *cases.Case) error {
	p := &textout.Printer{W: w}
	chkHeader(p, c)
	chkStack(p, c)
	chkMaterials(p, c)
	chkFaces(p, c)
	volWarnings := chkVolumetric(p, c)
	chkSchedules(p, c)
	chkTime(p, c)
	warnings := chkEstimates(p, c)
	warnings = append(warnings, volWarnings...)
	warnings = append(warnings, meshWarnings(c)...)
	warnings = append(warnings, compositeWarnings(c)...)
	warnings = append(warnings, looseWarnings(c)...)
	p.Printf("\nWarnings\n")
	if len(warnings) == 0 {
		p.Printf("  none\n")
	}
	for _, s := range warnings {
		p.Printf("  - %s\n", s)
	}
	p.Printf("\nCautions\n")
	for _, s := range Cautions(ScopeOf(c)) {
		p.Printf("  - %s\n", s)
	}
	return p.Err
}

func chkHeader(p *textout.Printer, c *cases.Case) {
	title := c.Title
	if title == "" {
		title = "(no title)"
	}
	p.Printf("Case: %s\n", title)
	if c.File != "" {
		p.Printf("File: %s\n", c.File)
	}
}

func chkStack(p *textout.Printer, c *cases.Case) {
	m := c.Problem.Mesh
	p.Printf("\nStack, top to bottom (depth 0 is the top face): %s mm in %d cells\n", num.FormatDepth(m.Thickness()), m.Cells())
	tw := p.Table()
	fmt.Fprintf(tw, "  layer\tmaterial\tfrom\tthickness\tdepth\tcells\tcell size\tcontact resistance\n")
	for j, l := range m.Layers {
		info := chkLayerInfo(c, j)
		from := "case file"
		if info.Builtin {
			from = "built-in"
		} else if chkContains(c.Replaced, info.Material) {
			from = "case file, replaces built-in"
		}
		if mat := chkMaterial(c, j); mat != nil && mat.Cure != nil {
			from += ", cures"
		}
		lo, hi := math.Inf(1), 0.0
		for i := m.First[j]; i < m.First[j+1]; i++ {
			lo, hi = min(lo, m.Widths[i]), max(hi, m.Widths[i])
		}
		size := chkG4(lo*1e3) + " mm"
		if hi > lo*(1+1e-9) {
			size = chkG4(lo*1e3) + " to " + chkG4(hi*1e3) + " mm"
		}
		rc := "-"
		if l.ContactResistance > 0 {
			rc = num.G(l.ContactResistance) + " m^2*K/W"
		}
		fmt.Fprintf(tw, "  %s\t%s\t%s\t%s mm\t%s to %s mm\t%d\t%s\t%s\n", l.Name, info.Material, from,
			num.FormatDepth(l.Thickness), num.FormatDepth(m.Faces[m.First[j]]), num.FormatDepth(m.Faces[m.First[j+1]]),
			m.First[j+1]-m.First[j], size, rc)
	}
	p.Flush(tw)
}

// chkLayerInfo returns the LayerInfo of layer j, or one built from the mesh
// and the problem when the case carries none.
func chkLayerInfo(c *cases.Case, j int) cases.LayerInfo {
	if j < len(c.Layers) {
		return c.Layers[j]
	}
	info := cases.LayerInfo{Name: c.Problem.Mesh.Layers[j].Name}
	if mat := chkMaterial(c, j); mat != nil {
		info.Material = mat.Name
	}
	return info
}

func chkMaterial(c *cases.Case, j int) *physics.Material {
	if j >= 0 && j < len(c.Problem.Materials) {
		return c.Problem.Materials[j]
	}
	return nil
}

func chkContains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

func chkMaterials(p *textout.Printer, c *cases.Case) {
	p.Printf("\nMaterials\n")
	seen := map[*physics.Material]bool{}
	for j := range c.Problem.Mesh.Layers {
		mat := chkMaterial(c, j)
		if mat == nil || seen[mat] {
			continue
		}
		seen[mat] = true
		name := mat.Name
		if name == "" {
			name = chkLayerInfo(c, j).Material
		}
		p.Printf("  %s\n", name)
		for _, line := range DescribeMaterial(mat) {
			p.Printf("    %s\n", line)
		}
	}
}

// DescribeMaterial returns a few plain-text lines describing m: density,
// specific heat, conductivity (with their cured values and tables), the cure
// model and its parameters, the dielectric properties, and the source. Used
// by check and by the materials command.
func DescribeMaterial(m *physics.Material) []string {
	var lines []string
	if c := m.Composition; c != nil {
		lines = append(lines,
			fmt.Sprintf("composite: %s fibre in %s resin, fibre volume fraction %s (mass fraction %s); no voids",
				c.Fibre, c.Resin, chkG(c.FibreVolumeFraction), chkF(c.FibreMassFraction, 4)),
			fmt.Sprintf("mixed: density by volume, specific heat by mass, through-thickness conductivity by the %s model; cure heat per kg of ply = resin mass fraction %s x the resin's",
				c.Model, chkF(1-c.FibreMassFraction, 4)))
	}
	lines = append(lines,
		"density "+chkG(m.Density)+" kg/m^3",
		"specific heat "+chkBlend(&m.SpecificHeat, "J/kg/K"),
		"conductivity "+chkBlend(&m.Conductivity, "W/m/K"),
	)
	if cu := m.Cure; cu != nil {
		lines = append(lines, "cures: "+chkKinetics(cu.Model))
		gel := chkG(cu.GelPoint)
		if cu.GelPoint == 0 || cu.GelPointDefaulted {
			gel = GelPointDefaultWords
		}
		lines = append(lines, fmt.Sprintf("total heat %s J/g, resin fraction %s, gel point %s",
			chkG(cu.TotalHeat/1e3), chkG(cu.ResinFraction), gel))
		if d := cu.Diffusion; d != nil {
			lines = append(lines, fmt.Sprintf("diffusion: C %s, alpha_c = %s + %s 1/K * T (%s at 23 C, %s at 100 C)",
				num.G(d.C), num.G(d.Alpha0), num.G(d.AlphaT),
				chkF(d.Alpha0+d.AlphaT*296.15, 3), chkF(d.Alpha0+d.AlphaT*373.15, 3)))
		}
		if g := cu.Glass; g != nil {
			lines = append(lines, fmt.Sprintf("glass transition: Tg0 %s C, Tg_full %s C, lambda %s",
				num.G(g.Tg0-273.15), num.G(g.TgFull-273.15), num.G(g.Lambda)))
		}
	}
	if v := m.Viscosity; v != nil && m.Cure != nil {
		gel := m.Cure.GelPoint
		lines = append(lines, fmt.Sprintf("viscosity: castro-macosko, eta0 %s Pa*s, E %s kJ/mol, a %s, b %s (uncured: %s Pa*s at 23 C, %s Pa*s at 120 C; no flow from gel at %s)",
			chkG(v.Eta0), chkG(v.E/1e3), chkG(v.A), chkG(v.B), chkG(v.At(296.15, 0, gel)), chkG(v.At(393.15, 0, gel)), chkG(gel)))
	}
	if d := m.Dielectric; d != nil {
		if d.Shield {
			lines = append(lines, "microwaves: reflects (metal): absorbs nothing, and no field passes it")
		} else {
			lines = append(lines, fmt.Sprintf("dielectric: permittivity %s, loss factor %s uncured, %s cured",
				num.G(d.Permittivity), num.G(d.LossFactor), num.G(d.LossFactorCured)))
		}
	}
	if m.Source != "" {
		lines = append(lines, "source: "+m.Source)
	}
	return lines
}

// chkBlend describes a property that may depend on temperature and cure.
func chkBlend(b *physics.Blend, unit string) string {
	s := chkProperty(b.Uncured, unit)
	if b.HasCured {
		return s + " uncured, " + chkProperty(b.Cured, unit) + " cured (linear in cure)"
	}
	return s
}

func chkProperty(p physics.Property, unit string) string {
	t, v := p.Points()
	if p.IsConstant() {
		if len(v) == 0 {
			return "0 " + unit
		}
		return num.G(v[0]) + " " + unit
	}
	lo, hi := v[0], v[0]
	for _, x := range v {
		lo, hi = min(lo, x), max(hi, x)
	}
	return fmt.Sprintf("%s to %s %s (table of %d points, %s to %s C)", num.G(lo), num.G(hi), unit,
		len(t), num.G(t[0]-273.15), num.G(t[len(t)-1]-273.15))
}

func chkKinetics(k physics.Kinetics) string {
	switch m := k.(type) {
	case physics.NthOrder:
		return fmt.Sprintf("nth-order, A %s 1/s, E %s kJ/mol, n %s", num.G(m.A), num.G(m.E/1e3), num.G(m.N))
	case *physics.NthOrder:
		return chkKinetics(*m)
	case physics.Autocatalytic:
		return fmt.Sprintf("autocatalytic, A1 %s 1/s, E1 %s kJ/mol, A2 %s 1/s, E2 %s kJ/mol, m %s, n %s",
			num.G(m.A1), num.G(m.E1/1e3), num.G(m.A2), num.G(m.E2/1e3), num.G(m.M), num.G(m.N))
	case *physics.Autocatalytic:
		return chkKinetics(*m)
	case physics.LeeLoosSpringer:
		return fmt.Sprintf("lee-loos-springer, A1 %s 1/s, E1 %s kJ/mol, A2 %s 1/s, E2 %s kJ/mol, A3 %s 1/s, E3 %s kJ/mol, B %s, switch %s",
			chkG(m.A1), chkG(m.E1/1e3), chkG(m.A2), chkG(m.E2/1e3), chkG(m.A3), chkG(m.E3/1e3), chkG(m.B), chkG(m.Switch))
	case *physics.Isoconversional:
		a, E, _ := m.Table()
		lo, hi := E[0], E[0]
		for _, e := range E {
			lo, hi = min(lo, e), max(hi, e)
		}
		return fmt.Sprintf("isoconversional table, %d rows from alpha %s to %s (the cure stops there), E %s to %s kJ/mol",
			len(a), chkG(a[0]), chkG(a[len(a)-1]), chkG(lo/1e3), chkG(hi/1e3))
	case nil:
		return "no kinetic model"
	}
	return k.Name()
}

func chkFaces(p *textout.Printer, c *cases.Case) {
	p.Printf("\nFaces\n")
	tw := p.Table()
	for _, f := range []struct {
		name   string
		face   *physics.Face
		driver string
	}{{"top", &c.Problem.Top, c.TopAir}, {"bottom", &c.Problem.Bottom, c.BottomAir}} {
		fmt.Fprintf(tw, "  %s\t%s\t%s\n", f.name, f.face.Kind, chkFace(f.face, f.driver))
	}
	p.Flush(tw)
}

func chkFace(f *physics.Face, driver string) string {
	q := func(s string) string {
		if s == "" {
			return "(as loaded)"
		}
		return strconv.Quote(s)
	}
	switch f.Kind {
	case physics.Convection:
		s := "h " + num.G(f.H) + " W/m^2/K, air " + q(driver)
		if f.Emissivity > 0 {
			s += ", emissivity " + num.G(f.Emissivity)
		}
		return s
	case physics.Fixed:
		return "temperature " + q(driver)
	case physics.Flux:
		t, v := f.Flux.Points()
		var s string
		if len(v) == 1 {
			s = "flux " + chkG(v[0]) + " W/m^2 into the part"
		} else {
			lo, hi := v[0], v[0]
			for _, x := range v {
				lo, hi = min(lo, x), max(hi, x)
			}
			s = fmt.Sprintf("flux %s to %s W/m^2 into the part, %d points over %s", chkG(lo), chkG(hi), len(v), num.HumanTime(t[len(t)-1]))
		}
		if f.HasAir() {
			s += "; also exchanges heat with air " + q(driver) + ": h " + chkG(f.H) + " W/m^2/K"
			if f.Emissivity > 0 {
				s += ", emissivity " + chkG(f.Emissivity)
			}
		}
		return s
	}
	return "no heat through this face"
}

func chkSchedules(p *textout.Printer, c *cases.Case) {
	if len(c.Schedules) == 0 {
		return
	}
	names := make([]string, 0, len(c.Schedules))
	for n := range c.Schedules {
		names = append(names, n)
	}
	sort.Strings(names)
	p.Printf("\nSchedules (temperatures held before the first and after the last point)\n")
	for _, n := range names {
		s := c.Schedules[n]
		t, v := s.Points()
		p.Printf("  %s: %d points, starts at %s C, highest %s C, ends at %s with %s C\n", n, len(t),
			chkC(v[0]), chkC(s.Max()), num.HumanTime(s.End()), chkC(v[len(v)-1]))
		pts := make([]string, 0, len(t))
		for i := range t {
			if len(t) > 12 && i == 5 {
				pts = append(pts, fmt.Sprintf("... (%d more)", len(t)-10))
			}
			if len(t) > 12 && i >= 5 && i < len(t)-5 {
				continue
			}
			pts = append(pts, num.HumanTime(t[i])+" "+chkC(v[i])+" C")
		}
		p.Printf("    %s\n", strings.Join(pts, ", "))
	}
}

func chkTime(p *textout.Printer, c *cases.Case) {
	pr := c.Problem
	p.Printf("\nTime and output\n")
	tw := p.Table()
	init := chkC(pr.InitialTemperature) + " C"
	if chkCuring(c) {
		init += ", cure " + num.G(pr.InitialCure) + " in curing layers"
	}
	fmt.Fprintf(tw, "  initial\t%s\n", init)
	fmt.Fprintf(tw, "  end\t%s (%s s)\n", num.HumanTime(pr.End), num.G(pr.End))
	every := c.OutputEvery
	if every == 0 {
		every = pr.End / 100
	}
	n := len(pr.OutputTimes)
	if n == 0 {
		n = 100
	}
	fmt.Fprintf(tw, "  output every\t%s (%d snapshots after t = 0)\n", num.HumanTime(every), n)
	step := "none (up to the whole run)"
	if pr.MaxStep > 0 {
		step = num.HumanTime(pr.MaxStep)
	}
	fmt.Fprintf(tw, "  max step\t%s\n", step)
	tt, ct, at := pr.TemperatureTolerance, pr.CureTolerance, pr.AbortTemperature
	dt, dc, da := "", "", ""
	if tt == 0 {
		tt, dt = solver.DefaultTemperatureTolerance, " (default)"
	}
	if ct == 0 {
		ct, dc = solver.DefaultCureTolerance, " (default)"
	}
	if at == 0 {
		at, da = solver.DefaultAbortTemperature, " (default)"
	}
	fmt.Fprintf(tw, "  tolerances\ttemperature %s K%s, cure %s%s per step\n", num.G(tt), dt, num.G(ct), dc)
	fmt.Fprintf(tw, "  runaway limit\t%s C%s\n", num.G(at-273.15), da)
	probes := make([]string, len(pr.Probes))
	for i, d := range pr.Probes {
		probes[i] = num.FormatDepth(d) + " mm"
		if j := chkLayerAt(pr, d); j >= 0 {
			probes[i] += " (" + pr.Mesh.Layers[j].Name + ")"
		}
	}
	if len(probes) == 0 {
		probes = []string{"none"}
	}
	fmt.Fprintf(tw, "  probes\t%s\n", strings.Join(probes, ", "))
	var cr []string
	if v := c.Criteria.MinCure; !math.IsNaN(v) {
		cr = append(cr, "min_cure "+num.G(v))
	}
	if v := c.Criteria.MaxTemperature; !math.IsNaN(v) {
		cr = append(cr, "max_temperature "+num.G(num.Celsius(v))+" C")
	}
	if v := c.Criteria.MaxSpread; !math.IsNaN(v) {
		cr = append(cr, "max_spread "+num.G(num.Round6(v))+" K")
	}
	if v := c.Criteria.MinFlowWindow; v > 0 {
		cr = append(cr, "min_flow_window "+num.HumanTime(v))
	}
	if len(cr) == 0 {
		cr = []string{"none"}
	}
	fmt.Fprintf(tw, "  criteria\t%s\n", strings.Join(cr, ", "))
	if cases.Viscous(c.Problem) {
		flow := c.Criteria.FlowViscosity
		if flow == 0 {
			flow = solver.DefaultFlowViscosity
		}
		fmt.Fprintf(tw, "  flow window\ttime below %s Pa*s before gel (criteria.flow_viscosity%s), the shortest over the cells with a viscosity law\n",
			chkG(flow), map[bool]string{true: "", false: ", default"}[c.Criteria.FlowViscosity > 0])
	}
	p.Flush(tw)
}

// chkLayerAt returns the layer a probe at depth z reads (the upper layer on
// a layer face), or −1 outside the stack.
func chkLayerAt(pr *solver.Problem, z float64) int {
	m := pr.Mesh
	for j := range m.Layers {
		if z <= m.Faces[m.First[j+1]] {
			if z < 0 {
				return -1
			}
			return j
		}
	}
	return -1
}

func chkCuring(c *cases.Case) bool {
	for _, m := range c.Problem.Materials {
		if m != nil && m.Cure != nil {
			return true
		}
	}
	return false
}

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
		mat := chkMaterial(c, j)
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
			Material:      chkLayerInfo(c, j).Material,
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

// chkEstimates prints the Biot numbers and the curing-layer estimates and
// returns the warnings they raise.
func chkEstimates(p *textout.Printer, c *cases.Case) []string {
	pr := c.Problem
	var warn []string
	p.Printf("\nPre-trial estimates (rough guides, not results)\n")

	// Biot numbers of the whole stack.
	m := pr.Mesh
	T0 := pr.InitialTemperature
	L, R := m.Thickness(), 0.0
	for j, l := range m.Layers {
		a := 0.0
		mat := chkMaterial(c, j)
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
	p.Printf("  plus contact resistances) = %s W/m/K at the initial %s C:\n", chkG3(keff), chkF(T0-273.15, 1))
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
				note += fmt.Sprintf(" + radiation %s W/m^2/K (linearised at %s C)", chkG3(hr), chkF(ta-273.15, 0))
			}
			bi := h * R
			fmt.Fprintf(tw, "    %s\tBi = %s\t%s: %s\n", f.name, chkG3(bi), note, biotWords(bi))
		case f.face.Kind == physics.Fixed:
			fmt.Fprintf(tw, "    %s\tBi infinite\tthe face follows its set temperature; the stack lags it by conduction alone\n", f.name)
		default:
			fmt.Fprintf(tw, "    %s\tno Biot number\t%s face\n", f.name, f.face.Kind)
		}
	}
	p.Flush(tw)

	est := Estimates(c)
	if len(est) == 0 {
		p.Printf("  No layer cures: the case is pure heat conduction.\n")
		return warn
	}
	abort := pr.AbortTemperature
	if abort == 0 {
		abort = solver.DefaultAbortTemperature
	}
	for _, e := range est {
		p.Printf("  Layer %s (%s), at the highest driving temperature %s C:\n", e.Layer, e.Material, chkF(e.T-273.15, 1))
		tw := p.Table()
		peak := e.T + e.AdiabaticRise
		fmt.Fprintf(tw, "    adiabatic temperature rise\t%s K\tif no reaction heat left the layer; an adiabatic core would reach %s C\n",
			chkF(e.AdiabaticRise, 1), chkF(peak-273.15, 0))
		rs := e.Runaway
		scale := "the layer (heat leaves through one face)"
		if rs.Half {
			scale = "half the layer (heat leaves through both faces)"
		}
		fmt.Fprintf(tw, "    conduction time l^2/a\t%s\tl = %s mm, %s; a = k/(rho*c_p) = %s m^2/s\n",
			num.HumanTime(e.ConductionTime), num.FormatDepth(rs.Length), scale, chkG3(e.Diffusivity))
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
				chkG(mc), ttm, chkF(e.T-273.15, 1), chkG(pr.InitialCure), num.HumanTime(pr.End))
		}
		if e.PeakRate > 0 {
			fmt.Fprintf(tw, "    peak reaction rate\t%s 1/s\tisothermal, at cure %s; apparent activation energy %s kJ/mol\n",
				chkG3(e.PeakRate), chkF(e.PeakCure, 2), chkF(e.ApparentE/1e3, 1))
		}
		p.Flush(tw)
		warn = append(warn, chkRunaway(p, c, e)...)
		if mc := c.Criteria.MinCure; e.TimeToMinCure > pr.End {
			warn = append(warn, fmt.Sprintf("layer %s: even held at %s C from the start, the resin needs %s (isothermal) to reach min_cure %s, longer than the case's %s: it gets there only with help from its own exotherm, if at all.",
				e.Layer, chkF(e.T-273.15, 1), chkTimeOrNever(e.TimeToMinCure), chkG(mc), num.HumanTime(pr.End)))
		}
		if e.HalfLife > 0 && e.ConductionTime > e.HalfLife {
			warn = append(warn, fmt.Sprintf("layer %s: the conduction time (%s) is longer than the reaction half-life at %s C (%s): the exotherm can run ahead of conduction: expect the core to overshoot the program.",
				e.Layer, num.HumanTime(e.ConductionTime), chkF(e.T-273.15, 0), num.HumanTime(e.HalfLife)))
		}
		if v := c.Criteria.MaxTemperature; !math.IsNaN(v) && peak > v {
			warn = append(warn, fmt.Sprintf("layer %s: an adiabatic core would reach %s C, above max_temperature %s C: the criterion holds only if enough heat leaves.",
				e.Layer, chkF(peak-273.15, 0), num.G(num.Celsius(v))))
		}
		if peak > abort {
			warn = append(warn, fmt.Sprintf("layer %s: an adiabatic core would reach %s C, above the runaway limit %s C.",
				e.Layer, chkF(peak-273.15, 0), num.G(abort-273.15)))
		}
	}
	return warn
}

func chkTimeOrNever(t float64) string {
	if math.IsInf(t, 1) {
		return "forever"
	}
	return num.HumanTime(t)
}

// chkLayerIndex returns the index of the layer named name, −1 if none.
func chkLayerIndex(c *cases.Case, name string) int {
	for j, l := range c.Problem.Mesh.Layers {
		if l.Name == name {
			return j
		}
	}
	return -1
}

// chkRunaway prints the Frank-Kamenetskii screen of one curing layer and
// returns its warning, if any.
func chkRunaway(p *textout.Printer, c *cases.Case, e Estimate) []string {
	rs := e.Runaway
	p.Printf("    Runaway screen (Frank-Kamenetskii, steady slab; a guide, not a prediction):\n")
	tw := p.Table()
	hold := "from the start"
	cure := chkF(rs.Cure, 3) + " (the initial cure: the hold begins at the start)"
	if !math.IsInf(rs.HoldFrom, -1) {
		hold = "from " + num.HumanTime(rs.HoldFrom)
		cure = chkF(rs.Cure, 3) + " (estimated: the initial cure followed along the program with isothermal kinetics, no lag, no exotherm)"
	}
	fmt.Fprintf(tw, "      hottest hold\t%s C %s\n", chkF(rs.T-273.15, 1), hold)
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
			caveat = fmt.Sprintf("; the screen overstates the risk here: it takes the faces' surroundings at the hold, while the air or platen stays at %s C", chkF(cool-273.15, 0))
			fmt.Fprintf(tw, "      note\tthe screen takes the faces' surroundings at the hold temperature; here one reaches only %s C, which takes more heat away than the screen assumes\n", chkF(cool-273.15, 1))
		}
	}
	fmt.Fprintf(tw, "      cure when it begins\t%s\n", cure)
	if !(rs.Rate > 0) {
		fmt.Fprintf(tw, "      reaction\tnone at the hold from that cure: nothing to run away\n")
		p.Flush(tw)
		return nil
	}
	fmt.Fprintf(tw, "      fastest rate in the hold\t%s 1/s\tat cure %s (isothermal, from the cure it begins with); apparent activation energy %s kJ/mol\n",
		chkG3(rs.Rate), chkF(rs.RateCure, 2), chkF(rs.ApparentE/1e3, 1))
	biot := func(b float64) string {
		switch {
		case math.IsInf(b, 1):
			return "infinite (held)"
		case b == 0:
			return "0 (no heat leaves)"
		}
		return chkG3(b)
	}
	fmt.Fprintf(tw, "      Biot numbers h*l/k\ttop %s, bottom %s\tl = %s mm; each face's path to the air or platen through the layers beyond it, at %s C\n",
		biot(rs.BiTop), biot(rs.BiBottom), num.FormatDepth(rs.Length), chkF(rs.T-273.15, 0))
	fmt.Fprintf(tw, "      delta\t%s\tE/(R T^2) * heat release at the fastest rate * l^2 / k\n", chkG3(rs.Delta))
	fmt.Fprintf(tw, "      critical delta\t%s\tfor these Biot numbers: the largest delta with a steady state of theta'' + delta*exp(theta) = 0, from its closed-form solutions (Frank-Kamenetskii, Diffusion and Heat Transfer in Chemical Kinetics, 1969): 0.8785 for held faces, Semenov's Bi/e for small Bi\n",
		chkG3(rs.Critical))
	p.Flush(tw)
	ratio := rs.Delta / rs.Critical
	// What is left to release from the cure the hold begins with.
	mat := chkMaterial(c, chkLayerIndex(c, e.Layer))
	left := ""
	if mat != nil && mat.Cure != nil {
		cu, _ := mat.SpecificHeat.Uncured.At(rs.T)
		cc := cu
		if mat.SpecificHeat.HasCured {
			cc, _ = mat.SpecificHeat.Cured.At(rs.T)
		}
		left = fmt.Sprintf(" (what is left to react from cure %s can heat it by at most %s K, adiabatic)",
			chkF(rs.Cure, 2), chkF(AdiabaticRise(mat.Cure.HeatPerMass(), cu, cc, rs.Cure), 0))
	}
	switch {
	case rs.Critical == 0:
		return []string{fmt.Sprintf("layer %s: no heat leaves it through either face: any reaction heat accumulates (adiabatic): expect its full adiabatic rise.", e.Layer)}
	case ratio >= 1:
		return []string{fmt.Sprintf("layer %s: the Frank-Kamenetskii delta %s at the %s C hold exceeds its critical %s for these faces (%.0f %%): no steady state exists while the resin reacts at that rate: expect a runaway exotherm unless the resin runs out first%s%s. Lower the hold, cure thinner, or cool the faces better, and keep within the supplier's limits.",
			e.Layer, chkG3(rs.Delta), chkF(rs.T-273.15, 0), chkG3(rs.Critical), 100*ratio, left, caveat)}
	case ratio >= RunawayCaution:
		return []string{fmt.Sprintf("layer %s: the Frank-Kamenetskii delta %s at the %s C hold is %.0f %% of its critical %s for these faces (caution from %.0f %%): close to thermal runaway%s%s; a thicker layer, a hotter hold or weaker cooling would tip it over.",
			e.Layer, chkG3(rs.Delta), chkF(rs.T-273.15, 0), 100*ratio, chkG3(rs.Critical), 100*RunawayCaution, left, caveat)}
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

// Far looser than the defaults: step tolerances LooseTolerance times the
// defaults or more, cells LooseCell times DefaultMaxCell or wider in a layer
// that conducts poorly (below LooseConductivity; heat crosses a metal layer
// so fast that coarse cells there cost little). The scheme's spatial error
// grows as the square of the cell size, so LooseCell is a sixteenfold error.
const (
	LooseTolerance    = 10
	LooseCell         = 4
	LooseConductivity = 5.0 // W/(m·K)
)

// looseWarnings warns of step tolerances and cells far looser than the
// defaults.
func looseWarnings(c *cases.Case) []string {
	pr := c.Problem
	var warn []string
	if tt := pr.TemperatureTolerance; tt >= LooseTolerance*solver.DefaultTemperatureTolerance {
		warn = append(warn, fmt.Sprintf("[time] temperature_tolerance %s K is %s times the default %s K: each step may be that far off; run with --verify to see what it costs the results.",
			chkG(tt), chkG3(tt/solver.DefaultTemperatureTolerance), chkG(solver.DefaultTemperatureTolerance)))
	}
	if ct := pr.CureTolerance; ct >= LooseTolerance*solver.DefaultCureTolerance {
		warn = append(warn, fmt.Sprintf("[time] cure_tolerance %s is %s times the default %s: each step may be that far off; run with --verify to see what it costs the results.",
			chkG(ct), chkG3(ct/solver.DefaultCureTolerance), chkG(solver.DefaultCureTolerance)))
	}
	m := pr.Mesh
	for j, l := range m.Layers {
		mat := chkMaterial(c, j)
		if mat == nil {
			continue
		}
		k, _, _ := mat.Conductivity.At(pr.InitialTemperature, 0)
		wide := 0.0
		for i := m.First[j]; i < m.First[j+1]; i++ {
			wide = max(wide, m.Widths[i])
		}
		if k < LooseConductivity && wide >= LooseCell*mesh.DefaultMaxCell*(1-1e-9) {
			warn = append(warn, fmt.Sprintf("layer %s: cells up to %s mm, %s times the default %s mm: peaks and cure fronts in it are under-resolved (the spatial error grows with the square of the cell size, and --verify does not refine the mesh); use the default [mesh] max_cell or more cells.",
				l.Name, chkG3(wide*1e3), chkG3(wide/mesh.DefaultMaxCell), chkG(mesh.DefaultMaxCell*1e3)))
		}
	}
	return warn
}

// meshWarnings returns a warning when neighbouring cells differ in size by
// more than MaxNeighbourRatio.
func meshWarnings(c *cases.Case) []string {
	m := c.Problem.Mesh
	worst, at, count := 0.0, 0, 0
	for i := 0; i+1 < m.Cells(); i++ {
		a, b := m.Widths[i], m.Widths[i+1]
		r := max(a, b) / min(a, b)
		if r > MaxNeighbourRatio {
			count++
			if r > worst {
				worst, at = r, i
			}
		}
	}
	if count == 0 {
		return nil
	}
	return []string{fmt.Sprintf("neighbouring cells at %s mm differ in size by %sx (%s mm and %s mm; %d such place(s)): set [mesh] growth = 1.2 to grade the cells.",
		num.FormatDepth(m.Faces[at+1]), chkG3(worst), chkG3(m.Widths[at]*1e3), chkG3(m.Widths[at+1]*1e3), count)}
}

// chkC formats an absolute temperature T (K) in °C with up to 6
// significant digits.
func chkC(T float64) string { return num.G(num.Celsius(T)) }

// chkG4 formats v with 4 significant digits.
func chkG4(v float64) string { return strconv.FormatFloat(v, 'g', 4, 64) }

// chkG3 formats v with 3 significant digits.
func chkG3(v float64) string { return strconv.FormatFloat(v, 'g', 3, 64) }

// chkF formats v with the given decimals (no "-0").
func chkF(v float64, decimals int) string {
	s := strconv.FormatFloat(v, 'f', decimals, 64)
	if strings.Trim(s, "-0.") == "" {
		s = strings.TrimPrefix(s, "-")
	}
	return s
}

// chkVolumetric prints the volumetric heating of c, if any: frequency or
// band, the field (or the standing wave's incidence and power) and the
// attenuation; for every absorbing layer ε′, ε″ uncured and cured, the
// wavelength in the material (physics.Wavelength), the power density
// (exponential modes: P = 2π f ε0 ε″ E² at the full field; standing wave:
// the layer's mean and its cells' range from the plane-wave solution at
// full incident power, chkStanding), the heating rate P/(ρ c_p) it would
// give with no heat lost (c_p at the initial temperature, uncured), and the
// penetration depth D_p (physics.PenetrationDepth); the plane wave's
// reflected, transmitted and absorbed shares; the layers that absorb
// nothing (a shield "reflects (metal)"); and the controller's settings with
// their defaults marked. It returns the warnings: a frequency outside the
// ISM bands, a field that control does not use, an absorbing layer thicker
// than λ/8 under an exponential model (which ignores standing waves), a
// sensor near a node of the standing wave, and a program ramp faster than
// the full power heats any absorbing layer.
func chkVolumetric(p *textout.Printer, c *cases.Case) []string {
	v := c.Problem.Volumetric
	if v == nil {
		return nil
	}
	var warn []string
	info := c.Volumetric
	if info == nil {
		info = &cases.VolumetricInfo{}
	}
	pr := c.Problem
	standing := v.Attenuation == physics.StandingWave
	p.Printf("\nVolumetric heating\n")
	tw := p.Table()
	f0 := v.Frequency // the frequency of the estimates: the band's centre
	if standing && v.Band.Points > 0 {
		def := ""
		if info.BandPointsDefault {
			def = " (default)"
		}
		ism := "inside an ISM band"
		for _, f := range []float64{v.Band.Lo, v.Band.Hi} {
			if note := cases.FrequencyNote(f); note != "" {
				ism = "not inside one ISM band"
				warn = append(warn, note)
			}
		}
		fmt.Fprintf(tw, "  band\t%s to %s (%s), %d equally spaced frequencies%s, both ends included: the absorbed power is their mean\n",
			cases.FormatFrequency(v.Band.Lo), cases.FormatFrequency(v.Band.Hi), ism, v.Band.Points, def)
	} else {
		band := "an ISM band"
		if note := cases.FrequencyNote(v.Frequency); note != "" {
			band = "not an ISM band"
			warn = append(warn, note)
		}
		fmt.Fprintf(tw, "  frequency\t%s (%s)\n", cases.FormatFrequency(v.Frequency), band)
	}
	switch {
	case standing:
		from := map[physics.Incidence]string{
			physics.IncidentTop:    "top: a plane wave enters from the air above the top face",
			physics.IncidentBottom: "bottom: a plane wave enters from the air below the bottom face",
			physics.IncidentBoth:   "both: one plane wave from each side, each with the full incident power, their heating added",
		}[v.Incident]
		fmt.Fprintf(tw, "  incident\t%s\n", from)
		if v.Control != nil {
			fmt.Fprintf(tw, "  incident power\t%s kW/m^2 at full power; the controller scales it by the power fraction\n", num.G(v.IncidentPower/1e3))
		} else {
			fmt.Fprintf(tw, "  incident power\t%s kW/m^2, on from start to end\n", num.G(v.IncidentPower/1e3))
		}
	case v.Control != nil:
		fmt.Fprintf(tw, "  field\t%s kV/m rms at full power (max_field); the controller sets max_field * sqrt(power fraction)\n", num.G(v.Field/1e3))
		if info.FieldUnused {
			warn = append(warn, "[volumetric] field is not used: under [volumetric.control] the field at full power is max_field.")
		}
	default:
		fmt.Fprintf(tw, "  field\t%s kV/m rms, on from start to end\n", num.G(v.Field/1e3))
	}
	att := map[physics.Attenuation]string{
		physics.Uniform:      "none: the same field in every layer",
		physics.FromTop:      "top: the field enters through the top face and decays with the penetration depth",
		physics.FromBottom:   "bottom: the field enters through the bottom face and decays with the penetration depth",
		physics.FromBoth:     "both: the mean of the field entering through the top and through the bottom",
		physics.StandingWave: "standing-wave: plane wave at normal incidence, reflected and transmitted at every face; metals reflect it all",
	}[v.Attenuation]
	fmt.Fprintf(tw, "  attenuation\t%s\n", att)
	p.Flush(tw)

	var sw *chkWave
	if standing {
		sw = chkStanding(pr, v, v.Frequencies(), v.Incident)
		p.Printf("  Plane wave at full power, uncured -> cured: reflected %s -> %s, transmitted %s -> %s, absorbed %s -> %s\n",
			chkPct(sw.uncured.Reflected), chkPct(sw.cured.Reflected), chkPct(sw.uncured.Transmitted), chkPct(sw.cured.Transmitted),
			chkPct(sw.uncured.Absorbed), chkPct(sw.cured.Absorbed))
		p.Printf("  Absorbing layers at full power (uncured -> cured; power density: the layer's mean, and its cells' range;\n  heating rate at the mean with no heat lost):\n")
	} else {
		p.Printf("  Absorbing layers, at the full field (uncured -> cured; heating rate with no heat lost):\n")
	}
	tw = p.Table()
	if standing {
		fmt.Fprintf(tw, "    layer\tmaterial\teps'\teps''\twavelength\tabsorbed share\tpower density\theating rate\tpenetration depth\n")
	} else {
		fmt.Fprintf(tw, "    layer\tmaterial\teps'\teps''\twavelength\tpower density\theating rate\tpenetration depth\n")
	}
	fastest := 0.0 // fastest full-power heating rate of an absorbing layer, K/s
	var others []string
	for j, l := range pr.Mesh.Layers {
		mat := chkMaterial(c, j)
		info := chkLayerInfo(c, j)
		if mat == nil {
			continue
		}
		d := mat.Dielectric
		switch {
		case d == nil && standing:
			others = append(others, l.Name+" ("+info.Material+"): no dielectric section: to the wave it is air (eps' = 1), absorbs nothing")
			continue
		case d == nil:
			others = append(others, l.Name+" ("+info.Material+"): transparent, absorbs nothing")
			continue
		case d.Shield:
			others = append(others, l.Name+" ("+info.Material+"): reflects (metal): absorbs nothing, and no field passes it")
			continue
		}
		a := 0.0
		if mat.Cure != nil {
			a = pr.InitialCure
		}
		cp, _, _ := mat.SpecificHeat.At(pr.InitialTemperature, a)
		lambda := physics.Wavelength(f0, d.Permittivity, d.LossFactor)
		var pu, pc float64
		var power, share string
		if standing {
			mu, lo, hi, su := sw.layer(pr.Mesh, j, sw.pUncured)
			mc, loC, hiC, sc := sw.layer(pr.Mesh, j, sw.pCured)
			pu, pc = mu, mc
			scale, unit := chkPowerUnit(max(hi, hiC))
			power = fmt.Sprintf("%s (%s to %s) -> %s (%s to %s) %s", chkG3(mu/scale), chkG3(lo/scale), chkG3(hi/scale),
				chkG3(mc/scale), chkG3(loC/scale), chkG3(hiC/scale), unit)
			share = chkPct(su) + " -> " + chkPct(sc)
		} else {
			pu = physics.PowerDensity(v.Frequency, d.LossFactor, v.Field)
			pc = physics.PowerDensity(v.Frequency, d.LossFactorCured, v.Field)
			scale, unit := chkPowerUnit(max(pu, pc))
			power = fmt.Sprintf("%s -> %s %s", chkG3(pu/scale), chkG3(pc/scale), unit)
			if v.Attenuation != physics.Uniform && l.Thickness > lambda/8 {
				warn = append(warn, fmt.Sprintf("layer %q is %s mm thick, more than an eighth of the wavelength in it (%s mm at %s): "+
					"the field forms standing waves there, which attenuation %q ignores; attenuation = \"standing-wave\" computes them.",
					l.Name, num.FormatDepth(l.Thickness), chkG3(lambda*1e3), cases.FormatFrequency(f0), v.Attenuation.String()))
			}
		}
		rate := pu / (mat.Density * cp)
		fastest = max(fastest, rate)
		cols := []string{l.Name, info.Material, num.G(d.Permittivity), num.G(d.LossFactor) + " -> " + num.G(d.LossFactorCured),
			chkG3(lambda*1e3) + " mm"}
		if standing {
			cols = append(cols, share)
		}
		cols = append(cols, power, chkG3(rate*60)+" K/min",
			chkDepth(physics.PenetrationDepth(f0, d.Permittivity, d.LossFactor))+" -> "+
				chkDepth(physics.PenetrationDepth(f0, d.Permittivity, d.LossFactorCured))+" mm")
		fmt.Fprintf(tw, "    %s\n", strings.Join(cols, "\t"))
	}
	p.Flush(tw)
	for _, o := range others {
		p.Printf("    %s\n", o)
	}
	if !standing && v.Attenuation != physics.Uniform {
		inc := map[physics.Attenuation]physics.Incidence{physics.FromTop: physics.IncidentTop,
			physics.FromBottom: physics.IncidentBottom, physics.FromBoth: physics.IncidentBoth}[v.Attenuation]
		w := chkStanding(pr, v, physics.Band{Lo: f0, Hi: f0, Points: 1}, inc)
		p.Printf("  For comparison, a plane wave from the same face(s) (attenuation = \"standing-wave\"), uncured -> cured:\n"+
			"    reflected %s -> %s, transmitted %s -> %s, absorbed %s -> %s\n",
			chkPct(w.uncured.Reflected), chkPct(w.cured.Reflected), chkPct(w.uncured.Transmitted), chkPct(w.cured.Transmitted),
			chkPct(w.uncured.Absorbed), chkPct(w.cured.Absorbed))
	}
	if standing && v.Control != nil {
		if i := pr.Mesh.Locate(v.Control.Sensor); i >= 0 {
			j := pr.Mesh.Owner[i]
			if mean, _, _, _ := sw.layer(pr.Mesh, j, sw.pUncured); mean > 0 && sw.pUncured[i] < 0.2*mean {
				warn = append(warn, fmt.Sprintf("the sensor at %s mm sits near a node of the standing wave: the power there is %s of its layer's mean (uncured). "+
					"The controller will heat the rest of %q until this cell follows the program, so the layer runs hotter than the sensor; "+
					"consider the sensor at the hottest depth, or a band.",
					num.FormatDepth(v.Control.Sensor), chkPct(sw.pUncured[i]/mean), pr.Mesh.Layers[j].Name))
			}
		}
	}

	ctl := v.Control
	if ctl == nil {
		return warn
	}
	def := func(key string) string {
		if chkContains(info.Defaults, key) {
			return " (default)"
		}
		return ""
	}
	p.Printf("  Control (PI, sampled; the power fraction stays in [0, 1])\n")
	tw = p.Table()
	where := ""
	if j := chkLayerAt(pr, ctl.Sensor); j >= 0 {
		where = " (" + pr.Mesh.Layers[j].Name + ")"
	}
	fmt.Fprintf(tw, "    sensor\t%s mm%s\n", num.FormatDepth(ctl.Sensor), where)
	prog := strconv.Quote(info.Program)
	if info.Program == "" {
		prog = "(as loaded)"
	}
	fmt.Fprintf(tw, "    program\t%s, highest %s C\n", prog, chkC(ctl.Program.Max()))
	fmt.Fprintf(tw, "    period\t%s s%s\n", num.G(ctl.Period), def("period"))
	fmt.Fprintf(tw, "    gain\t%s 1/K%s\n", num.G(ctl.Gain), def("gain"))
	fmt.Fprintf(tw, "    integral time\t%s s%s\n", num.G(ctl.IntegralTime), def("integral_time"))
	p.Flush(tw)
	if ramp := chkFastestRamp(ctl.Program); ramp > fastest {
		raise := "max_field"
		if standing {
			raise = "incident_power"
		}
		warn = append(warn, fmt.Sprintf("the control program ramps at up to %s K/min, faster than the full power heats any absorbing layer (%s K/min with no heat lost): the sensor will lag the program; raise %s or slow the ramp.",
			chkG3(ramp*60), chkG3(fastest*60), raise))
	}
	return warn
}

// chkWave is the standing-wave solution of a case's stack at the start
// (every cell at the initial temperature and cure) and fully cured (at the
// initial temperature): absorbed power per cell at full incident power,
// W/m³, and the shares of the incident power.
type chkWave struct {
	pUncured, pCured []float64
	uncured, cured   physics.WaveShares
	S                float64 // incident power density of each source, W/m²; 1 for an exponential mode
	sources          float64 // 2 under IncidentBoth, else 1
}

// chkStanding solves the plane wave of the stack of pr over band from inc
// (stackWave) at the start and fully cured, scaled by v's incident power
// (per W/m² when there is none).
func chkStanding(pr *solver.Problem, v *physics.Volumetric, band physics.Band, inc physics.Incidence) *chkWave {
	w := &chkWave{S: v.IncidentPower, sources: 1}
	if !(w.S > 0) {
		w.S = 1
	}
	if inc == physics.IncidentBoth {
		w.sources = 2
	}
	w.pUncured, w.uncured = cases.StackWave(pr, band, inc, pr.InitialTemperature, pr.InitialCure)
	w.pCured, w.cured = cases.StackWave(pr, band, inc, pr.InitialTemperature, 1)
	for i := range w.pUncured {
		w.pUncured[i] *= w.S
		w.pCured[i] *= w.S
	}
	return w
}

// layer returns the thickness-weighted mean, least and largest of P (per
// cell) over layer j, and the layer's share of the incident power (of both
// sources together under IncidentBoth).
func (w *chkWave) layer(m *mesh.Mesh, j int, P []float64) (mean, lo, hi, share float64) {
	lo = math.Inf(1)
	sum := 0.0
	for i := m.First[j]; i < m.First[j+1]; i++ {
		sum += P[i] * m.Widths[i]
		lo, hi = min(lo, P[i]), max(hi, P[i])
	}
	th := m.Faces[m.First[j+1]] - m.Faces[m.First[j]]
	return sum / th, lo, hi, sum / (w.S * w.sources)
}

// chkPowerUnit returns the scale and unit for power densities up to m W/m³.
func chkPowerUnit(m float64) (float64, string) {
	switch {
	case m >= 1e6:
		return 1e6, "MW/m^3"
	case m >= 1e3:
		return 1e3, "kW/m^3"
	}
	return 1, "W/m^3"
}

// chkPct formats a share (0..1) as a percentage with 3 significant digits.
func chkPct(x float64) string {
	if x < 5e-4 {
		return "0 %"
	}
	return chkG3(100*x) + " %"
}

// chkFastestRamp returns the steepest rise of s between its points, K/s
// (0 when it never rises).
func chkFastestRamp(s physics.Schedule) float64 {
	t, v := s.Points()
	r := 0.0
	for i := 1; i < len(t); i++ {
		r = max(r, (v[i]-v[i-1])/(t[i]-t[i-1]))
	}
	return r
}

// chkDepth formats a penetration depth (m) in mm, "infinite" for a lossless
// material.
func chkDepth(d float64) string {
	if math.IsInf(d, 1) {
		return "infinite"
	}
	return chkG3(d * 1e3)
}

// compositeWarnings warns where a composite ply absorbs volumetric heating:
// its dielectric is only the resin's scaled by the resin's volume fraction.
func compositeWarnings(c *cases.Case) []string {
	if c.Problem.Volumetric == nil {
		return nil
	}
	var out []string
	seen := map[*physics.Material]bool{}
	for j, m := range c.Problem.Materials {
		if m == nil || m.Composition == nil || m.Dielectric == nil || m.Dielectric.Shield || seen[m] {
			continue
		}
		seen[m] = true
		out = append(out, fmt.Sprintf("layer %s: the composite %s absorbs with its resin's loss factor scaled by the resin's volume fraction, the fibre taken as lossless: an estimate for glass fibre and wrong for carbon fibre, which conducts; give measured dielectric data of the ply",
			c.Problem.Mesh.Layers[j].Name, m.Name))
	}
	return out
}

// chkG formats v with up to 6 significant digits (num.G).
var chkG = num.G
