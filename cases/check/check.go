package check

import (
	"context"
	"cureslab/cases"
	"cureslab/cases/internal/num"
	"cureslab/cases/internal/textout"
	"cureslab/mesh"
	"cureslab/physics"
	"cureslab/solver"
	"fmt"
	"io"
	"math"
	"slices"
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

// gelPointDefaultWords is how check and the materials list show a gel point
// that the case did not give.
const gelPointDefaultWords = "0.577 (default: Flory–Stockmayer, difunctional epoxy + tetrafunctional amine; set gel_point for other chemistries)"

// maxNeighbourRatio is the size ratio of neighbouring cells above which
// Check suggests grading the mesh with [mesh] growth.
const maxNeighbourRatio = 5

// Check writes a plain-text account of c for a reader checking a case before
// a run: the resolved stack (materials and where they come from, cells and
// cell sizes, contact resistances), the materials, faces, volumetric heating
// (printVolumetric), schedules, time and output settings and criteria, then
// pre-trial estimates (Biot numbers
// of the faces, and for each curing layer the adiabatic temperature rise
// and conduction time against reaction half-life, see Estimate), warnings,
// and the cautions (check.Cautions).
//
// The only error it returns is a write error of w.
func Check(w io.Writer, c *cases.Case) error { return CheckContext(context.Background(), w, c) }

// CheckContext is Check stopped by ctx: checked before the parts that
// compute (the dielectric field, the estimates and screens, the warnings),
// it returns ctx.Err() once ctx is done, the account written so far left
// incomplete.
func CheckContext(ctx context.Context, w io.Writer, c *cases.Case) error {
	p := textout.NewPrinter(w)
	printHeader(p, c)
	printStack(p, c)
	printMaterials(p, c)
	printFaces(p, c)
	if err := ctx.Err(); err != nil {
		return err
	}
	volWarnings := printVolumetric(p, c)
	printSchedules(p, c)
	printTime(p, c)
	if err := ctx.Err(); err != nil {
		return err
	}
	warnings := printEstimates(p, c)
	if err := ctx.Err(); err != nil {
		return err
	}
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
	return p.Err()
}

func printHeader(p *textout.Printer, c *cases.Case) {
	title := c.Title
	if title == "" {
		title = "(no title)"
	}
	p.Printf("Case: %s\n", title)
	if c.File != "" {
		p.Printf("File: %s\n", c.File)
	}
}

func printStack(p *textout.Printer, c *cases.Case) {
	m := c.Problem.Mesh
	p.Printf("\nStack, top to bottom (depth 0 is the top face): %s mm in %d cells\n", num.FormatDepth(m.Thickness()), m.Cells())
	tw := p.Table()
	fmt.Fprintf(tw, "  layer\tmaterial\tfrom\tthickness\tdepth\tcells\tcell size\tcontact resistance\n")
	for j, l := range m.Layers {
		info := layerInfo(c, j)
		from := "case file"
		if info.Builtin {
			from = "built-in"
		} else if slices.Contains(c.Replaced, info.Material) {
			from = "case file, replaces built-in"
		}
		if mat := materialOf(c, j); mat != nil && mat.Cure != nil {
			from += ", cures"
		}
		lo, hi := math.Inf(1), 0.0
		for i := m.First[j]; i < m.First[j+1]; i++ {
			lo, hi = min(lo, m.Widths[i]), max(hi, m.Widths[i])
		}
		size := g4(lo*1e3) + " mm"
		if hi > lo*(1+1e-9) {
			size = g4(lo*1e3) + " to " + g4(hi*1e3) + " mm"
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

// layerInfo returns the LayerInfo of layer j, or one built from the mesh
// and the problem when the case carries none.
func layerInfo(c *cases.Case, j int) cases.LayerInfo {
	if j < len(c.Layers) {
		return c.Layers[j]
	}
	info := cases.LayerInfo{Name: c.Problem.Mesh.Layers[j].Name}
	if mat := materialOf(c, j); mat != nil {
		info.Material = mat.Name
	}
	return info
}

func materialOf(c *cases.Case, j int) *physics.Material {
	if j >= 0 && j < len(c.Problem.Materials) {
		return c.Problem.Materials[j]
	}
	return nil
}

func printMaterials(p *textout.Printer, c *cases.Case) {
	p.Printf("\nMaterials\n")
	seen := map[*physics.Material]bool{}
	for j := range c.Problem.Mesh.Layers {
		mat := materialOf(c, j)
		if mat == nil || seen[mat] {
			continue
		}
		seen[mat] = true
		name := mat.Name
		if name == "" {
			name = layerInfo(c, j).Material
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
				c.Fibre, c.Resin, num.G(c.FibreVolumeFraction), fixedText(c.FibreMassFraction, 4)),
			fmt.Sprintf("mixed: density by volume, specific heat by mass, through-thickness conductivity by the %s model; cure heat per kg of ply = resin mass fraction %s x the resin's",
				c.Model, fixedText(1-c.FibreMassFraction, 4)))
	}
	lines = append(lines,
		"density "+num.G(m.Density)+" kg/m^3",
		"specific heat "+blendText(&m.SpecificHeat, "J/kg/K"),
		"conductivity "+blendText(&m.Conductivity, "W/m/K"),
	)
	if cu := m.Cure; cu != nil {
		lines = append(lines, "cures: "+kineticsText(cu.Model))
		gel := num.G(cu.GelPoint)
		if cu.GelPoint == 0 || cu.GelPointDefaulted {
			gel = gelPointDefaultWords
		}
		lines = append(lines, fmt.Sprintf("total heat %s J/g, resin fraction %s, gel point %s",
			num.G(cu.TotalHeat/1e3), num.G(cu.ResinFraction), gel))
		if d := cu.Diffusion; d != nil {
			lines = append(lines, fmt.Sprintf("diffusion: C %s, alpha_c = %s + %s 1/K * T (%s at 23 C, %s at 100 C)",
				num.G(d.C), num.G(d.Alpha0), num.G(d.AlphaT),
				fixedText(d.Alpha0+d.AlphaT*296.15, 3), fixedText(d.Alpha0+d.AlphaT*373.15, 3)))
		}
		if g := cu.Glass; g != nil {
			lines = append(lines, fmt.Sprintf("glass transition: Tg0 %s C, Tg_full %s C, lambda %s",
				num.G(g.Tg0-273.15), num.G(g.TgFull-273.15), num.G(g.Lambda)))
		}
	}
	if v := m.Viscosity; v != nil && m.Cure != nil {
		gel := m.Cure.GelPoint
		lines = append(lines, fmt.Sprintf("viscosity: castro-macosko, eta0 %s Pa*s, E %s kJ/mol, a %s, b %s (uncured: %s Pa*s at 23 C, %s Pa*s at 120 C; no flow from gel at %s)",
			num.G(v.Eta0), num.G(v.E/1e3), num.G(v.A), num.G(v.B), num.G(v.At(296.15, 0, gel)), num.G(v.At(393.15, 0, gel)), num.G(gel)))
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

// blendText describes a property that may depend on temperature and cure.
func blendText(b *physics.Blend, unit string) string {
	s := propertyText(b.Uncured, unit)
	if b.HasCured {
		return s + " uncured, " + propertyText(b.Cured, unit) + " cured (linear in cure)"
	}
	return s
}

func propertyText(p physics.Property, unit string) string {
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

func kineticsText(k physics.Kinetics) string {
	switch m := k.(type) {
	case physics.NthOrder:
		return fmt.Sprintf("nth-order, A %s 1/s, E %s kJ/mol, n %s", num.G(m.A), num.G(m.E/1e3), num.G(m.N))
	case *physics.NthOrder:
		return kineticsText(*m)
	case physics.Autocatalytic:
		return fmt.Sprintf("autocatalytic, A1 %s 1/s, E1 %s kJ/mol, A2 %s 1/s, E2 %s kJ/mol, m %s, n %s",
			num.G(m.A1), num.G(m.E1/1e3), num.G(m.A2), num.G(m.E2/1e3), num.G(m.M), num.G(m.N))
	case *physics.Autocatalytic:
		return kineticsText(*m)
	case physics.LeeLoosSpringer:
		return fmt.Sprintf("lee-loos-springer, A1 %s 1/s, E1 %s kJ/mol, A2 %s 1/s, E2 %s kJ/mol, A3 %s 1/s, E3 %s kJ/mol, B %s, switch %s",
			num.G(m.A1), num.G(m.E1/1e3), num.G(m.A2), num.G(m.E2/1e3), num.G(m.A3), num.G(m.E3/1e3), num.G(m.B), num.G(m.Switch))
	case *physics.Isoconversional:
		a, E, _ := m.Table()
		lo, hi := E[0], E[0]
		for _, e := range E {
			lo, hi = min(lo, e), max(hi, e)
		}
		return fmt.Sprintf("isoconversional table, %d rows from alpha %s to %s (the cure stops there), E %s to %s kJ/mol",
			len(a), num.G(a[0]), num.G(a[len(a)-1]), num.G(lo/1e3), num.G(hi/1e3))
	case nil:
		return "no kinetic model"
	}
	return k.Name()
}

func printFaces(p *textout.Printer, c *cases.Case) {
	p.Printf("\nFaces\n")
	tw := p.Table()
	for _, f := range []struct {
		name   string
		face   *physics.Face
		driver string
	}{{"top", &c.Problem.Top, c.TopAir}, {"bottom", &c.Problem.Bottom, c.BottomAir}} {
		fmt.Fprintf(tw, "  %s\t%s\t%s\n", f.name, f.face.Kind, faceText(f.face, f.driver))
	}
	p.Flush(tw)
}

func faceText(f *physics.Face, driver string) string {
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
			s = "flux " + num.G(v[0]) + " W/m^2 into the part"
		} else {
			lo, hi := v[0], v[0]
			for _, x := range v {
				lo, hi = min(lo, x), max(hi, x)
			}
			s = fmt.Sprintf("flux %s to %s W/m^2 into the part, %d points over %s", num.G(lo), num.G(hi), len(v), num.HumanTime(t[len(t)-1]))
		}
		if f.HasAir() {
			s += "; also exchanges heat with air " + q(driver) + ": h " + num.G(f.H) + " W/m^2/K"
			if f.Emissivity > 0 {
				s += ", emissivity " + num.G(f.Emissivity)
			}
		}
		return s
	}
	return "no heat through this face"
}

func printSchedules(p *textout.Printer, c *cases.Case) {
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
			celsius(v[0]), celsius(s.Max()), num.HumanTime(s.End()), celsius(v[len(v)-1]))
		pts := make([]string, 0, len(t))
		for i := range t {
			if len(t) > 12 && i == 5 {
				pts = append(pts, fmt.Sprintf("... (%d more)", len(t)-10))
			}
			if len(t) > 12 && i >= 5 && i < len(t)-5 {
				continue
			}
			pts = append(pts, num.HumanTime(t[i])+" "+celsius(v[i])+" C")
		}
		p.Printf("    %s\n", strings.Join(pts, ", "))
	}
}

func printTime(p *textout.Printer, c *cases.Case) {
	pr := c.Problem
	p.Printf("\nTime and output\n")
	tw := p.Table()
	init := celsius(pr.InitialTemperature) + " C"
	if hasCuring(c) {
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
		if j := layerAt(pr, d); j >= 0 {
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
			num.G(flow), map[bool]string{true: "", false: ", default"}[c.Criteria.FlowViscosity > 0])
	}
	p.Flush(tw)
}

// layerAt returns the layer a probe at depth z reads (the upper layer on
// a layer face), or −1 outside the stack.
func layerAt(pr *solver.Problem, z float64) int {
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

func hasCuring(c *cases.Case) bool {
	for _, m := range c.Problem.Materials {
		if m != nil && m.Cure != nil {
			return true
		}
	}
	return false
}

// Far looser than the defaults: step tolerances looseTolerance times the
// defaults or more, cells looseCell times DefaultMaxCell or wider in a layer
// that conducts poorly (below looseConductivity; heat crosses a metal layer
// so fast that coarse cells there cost little). The scheme's spatial error
// grows as the square of the cell size, so looseCell is a sixteenfold error.
const (
	looseTolerance    = 10
	looseCell         = 4
	looseConductivity = 5.0 // W/(m·K)
)

// looseWarnings warns of step tolerances and cells far looser than the
// defaults.
func looseWarnings(c *cases.Case) []string {
	pr := c.Problem
	var warn []string
	if tt := pr.TemperatureTolerance; tt >= looseTolerance*solver.DefaultTemperatureTolerance {
		warn = append(warn, fmt.Sprintf("[time] temperature_tolerance %s K is %s times the default %s K: each step may be that far off; run with --verify to see what it costs the results.",
			num.G(tt), g3(tt/solver.DefaultTemperatureTolerance), num.G(solver.DefaultTemperatureTolerance)))
	}
	if ct := pr.CureTolerance; ct >= looseTolerance*solver.DefaultCureTolerance {
		warn = append(warn, fmt.Sprintf("[time] cure_tolerance %s is %s times the default %s: each step may be that far off; run with --verify to see what it costs the results.",
			num.G(ct), g3(ct/solver.DefaultCureTolerance), num.G(solver.DefaultCureTolerance)))
	}
	m := pr.Mesh
	for j, l := range m.Layers {
		mat := materialOf(c, j)
		if mat == nil {
			continue
		}
		k, _, _ := mat.Conductivity.At(pr.InitialTemperature, 0)
		wide := 0.0
		for i := m.First[j]; i < m.First[j+1]; i++ {
			wide = max(wide, m.Widths[i])
		}
		if k < looseConductivity && wide >= looseCell*mesh.DefaultMaxCell*(1-1e-9) {
			warn = append(warn, fmt.Sprintf("layer %s: cells up to %s mm, %s times the default %s mm: peaks and cure fronts in it are under-resolved (the spatial error grows with the square of the cell size, and --verify does not refine the mesh); use the default [mesh] max_cell or more cells.",
				l.Name, g3(wide*1e3), g3(wide/mesh.DefaultMaxCell), num.G(mesh.DefaultMaxCell*1e3)))
		}
	}
	return warn
}

// meshWarnings returns a warning when neighbouring cells differ in size by
// more than maxNeighbourRatio.
func meshWarnings(c *cases.Case) []string {
	m := c.Problem.Mesh
	worst, at, count := 0.0, 0, 0
	for i := 0; i+1 < m.Cells(); i++ {
		a, b := m.Widths[i], m.Widths[i+1]
		r := max(a, b) / min(a, b)
		if r > maxNeighbourRatio {
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
		num.FormatDepth(m.Faces[at+1]), g3(worst), g3(m.Widths[at]*1e3), g3(m.Widths[at+1]*1e3), count)}
}

// celsius formats an absolute temperature T (K) in °C with up to 6
// significant digits.
func celsius(T float64) string { return num.G(num.Celsius(T)) }

// g4 formats v with 4 significant digits.
func g4(v float64) string { return strconv.FormatFloat(v, 'g', 4, 64) }

// g3 formats v with 3 significant digits.
func g3(v float64) string { return strconv.FormatFloat(v, 'g', 3, 64) }

// fixedText formats v with the given decimals (no "-0").
func fixedText(v float64, decimals int) string {
	s := strconv.FormatFloat(v, 'f', decimals, 64)
	if strings.Trim(s, "-0.") == "" {
		s = strings.TrimPrefix(s, "-")
	}
	return s
}
