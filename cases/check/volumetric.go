package check

import (
	"cureslab/cases"
	"cureslab/cases/internal/num"
	"cureslab/cases/internal/textout"
	"cureslab/mesh"
	"cureslab/physics"
	"cureslab/solver"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
)

// printVolumetric prints the volumetric heating of c, if any: frequency or
// band, the field (or the standing wave's incidence and power) and the
// attenuation (printSource); for every absorbing layer ε′, ε″ uncured and
// cured, the wavelength in the material, the power density, the heating
// rate and the penetration depth (printAbsorbers); the plane wave's
// reflected, transmitted and absorbed shares; the layers that absorb
// nothing (a shield "reflects (metal)"); and the controller's settings with
// their defaults marked (printControl). It returns the warnings: a frequency
// outside the ISM bands, a field that control does not use, an absorbing
// layer thicker than λ/8 under an exponential model (which ignores standing
// waves), a sensor near a node of the standing wave, and a program ramp
// faster than the full power heats any absorbing layer.
func printVolumetric(p *textout.Printer, c *cases.Case) []string {
	v := c.Problem.Volumetric
	if v == nil {
		return nil
	}
	info := c.Volumetric
	if info == nil {
		info = &cases.VolumetricInfo{}
	}
	pr := c.Problem
	standing := v.Attenuation == physics.StandingWave
	p.Printf("\nVolumetric heating\n")
	warn := printSource(p, v, info)

	var sw *waveSolution
	if standing {
		sw = standingWave(pr, v, v.Frequencies(), v.Incident)
		p.Printf("  Plane wave at full power, uncured -> cured: reflected %s -> %s, transmitted %s -> %s, absorbed %s -> %s\n",
			pct(sw.uncured.Reflected), pct(sw.cured.Reflected), pct(sw.uncured.Transmitted), pct(sw.cured.Transmitted),
			pct(sw.uncured.Absorbed), pct(sw.cured.Absorbed))
		p.Printf("  Absorbing layers at full power (uncured -> cured; power density: the layer's mean, and its cells' range;\n  heating rate at the mean with no heat lost):\n")
	} else {
		p.Printf("  Absorbing layers, at the full field (uncured -> cured; heating rate with no heat lost):\n")
	}
	fastest, w := printAbsorbers(p, c, sw)
	warn = append(warn, w...)
	if !standing && v.Attenuation != physics.Uniform {
		inc := map[physics.Attenuation]physics.Incidence{physics.FromTop: physics.IncidentTop,
			physics.FromBottom: physics.IncidentBottom, physics.FromBoth: physics.IncidentBoth}[v.Attenuation]
		w := standingWave(pr, v, physics.Band{Lo: v.Frequency, Hi: v.Frequency, Points: 1}, inc)
		p.Printf("  For comparison, a plane wave from the same face(s) (attenuation = \"standing-wave\"), uncured -> cured:\n"+
			"    reflected %s -> %s, transmitted %s -> %s, absorbed %s -> %s\n",
			pct(w.uncured.Reflected), pct(w.cured.Reflected), pct(w.uncured.Transmitted), pct(w.cured.Transmitted),
			pct(w.uncured.Absorbed), pct(w.cured.Absorbed))
	}
	if standing && v.Control != nil {
		if i := pr.Mesh.Locate(v.Control.Sensor); i >= 0 {
			j := pr.Mesh.Owner[i]
			if mean, _, _, _ := sw.layer(pr.Mesh, j, sw.pUncured); mean > 0 && sw.pUncured[i] < 0.2*mean {
				warn = append(warn, fmt.Sprintf("the sensor at %s mm sits near a node of the standing wave: the power there is %s of its layer's mean (uncured). "+
					"The controller will heat the rest of %q until this cell follows the program, so the layer runs hotter than the sensor; "+
					"consider the sensor at the hottest depth, or a band.",
					num.FormatDepth(v.Control.Sensor), pct(sw.pUncured[i]/mean), pr.Mesh.Layers[j].Name))
			}
		}
	}
	if v.Control == nil {
		return warn
	}
	return append(warn, printControl(p, pr, v, info, fastest)...)
}

// printSource prints the table of the source of volumetric heating v: the
// frequency (or the band of a swept standing wave), the field or the
// incident wave and its power, and the attenuation. It returns the warnings
// of a frequency outside the ISM bands and of a field that control does not
// use.
func printSource(p *textout.Printer, v *physics.Volumetric, info *cases.VolumetricInfo) []string {
	var warn []string
	standing := v.Attenuation == physics.StandingWave
	tw := p.Table()
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
	return warn
}

// printAbsorbers prints the table of the layers of c that absorb, then one
// line for each layer that absorbs nothing. Per absorbing layer: ε′, ε″
// uncured and cured, the wavelength in the material (physics.Wavelength),
// the power density (exponential modes: P = 2π f ε0 ε″ E² at the full
// field; standing wave, where sw is the solution of standingWave: the
// layer's mean and its cells' range at full incident power, and its share
// of the incident power), the heating rate P/(ρ c_p) it would give with no
// heat lost (c_p at the initial temperature, uncured) and the penetration
// depth (physics.PenetrationDepth). It returns the fastest such heating
// rate, K/s, and the warnings of layers thicker than λ/8 under an
// exponential model.
func printAbsorbers(p *textout.Printer, c *cases.Case, sw *waveSolution) (fastest float64, warn []string) {
	pr := c.Problem
	v := pr.Volumetric
	standing := sw != nil
	f0 := v.Frequency // the frequency of the estimates: the band's centre
	tw := p.Table()
	if standing {
		fmt.Fprintf(tw, "    layer\tmaterial\teps'\teps''\twavelength\tabsorbed share\tpower density\theating rate\tpenetration depth\n")
	} else {
		fmt.Fprintf(tw, "    layer\tmaterial\teps'\teps''\twavelength\tpower density\theating rate\tpenetration depth\n")
	}
	var others []string
	for j, l := range pr.Mesh.Layers {
		mat := materialOf(c, j)
		info := layerInfo(c, j)
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
			scale, unit := powerUnit(max(hi, hiC))
			power = fmt.Sprintf("%s (%s to %s) -> %s (%s to %s) %s", g3(mu/scale), g3(lo/scale), g3(hi/scale),
				g3(mc/scale), g3(loC/scale), g3(hiC/scale), unit)
			share = pct(su) + " -> " + pct(sc)
		} else {
			pu = physics.PowerDensity(v.Frequency, d.LossFactor, v.Field)
			pc = physics.PowerDensity(v.Frequency, d.LossFactorCured, v.Field)
			scale, unit := powerUnit(max(pu, pc))
			power = fmt.Sprintf("%s -> %s %s", g3(pu/scale), g3(pc/scale), unit)
			if v.Attenuation != physics.Uniform && l.Thickness > lambda/8 {
				warn = append(warn, fmt.Sprintf("layer %q is %s mm thick, more than an eighth of the wavelength in it (%s mm at %s): "+
					"the field forms standing waves there, which attenuation %q ignores; attenuation = \"standing-wave\" computes them.",
					l.Name, num.FormatDepth(l.Thickness), g3(lambda*1e3), cases.FormatFrequency(f0), v.Attenuation.String()))
			}
		}
		rate := pu / (mat.Density * cp)
		fastest = max(fastest, rate)
		cols := []string{l.Name, info.Material, num.G(d.Permittivity), num.G(d.LossFactor) + " -> " + num.G(d.LossFactorCured),
			g3(lambda*1e3) + " mm"}
		if standing {
			cols = append(cols, share)
		}
		cols = append(cols, power, g3(rate*60)+" K/min",
			depthMM(physics.PenetrationDepth(f0, d.Permittivity, d.LossFactor))+" -> "+
				depthMM(physics.PenetrationDepth(f0, d.Permittivity, d.LossFactorCured))+" mm")
		fmt.Fprintf(tw, "    %s\n", strings.Join(cols, "\t"))
	}
	p.Flush(tw)
	for _, o := range others {
		p.Printf("    %s\n", o)
	}
	return fastest, warn
}

// printControl prints the settings of the controller of v (sensor, program,
// period, gain, integral time), the defaults marked, and returns the
// warning of a program that ramps faster than fastest, the quickest
// full-power heating rate of an absorbing layer (K/s).
func printControl(p *textout.Printer, pr *solver.Problem, v *physics.Volumetric, info *cases.VolumetricInfo, fastest float64) []string {
	ctl := v.Control
	def := func(key string) string {
		if slices.Contains(info.Defaults, key) {
			return " (default)"
		}
		return ""
	}
	p.Printf("  Control (PI, sampled; the power fraction stays in [0, 1])\n")
	tw := p.Table()
	where := ""
	if j := layerAt(pr, ctl.Sensor); j >= 0 {
		where = " (" + pr.Mesh.Layers[j].Name + ")"
	}
	fmt.Fprintf(tw, "    sensor\t%s mm%s\n", num.FormatDepth(ctl.Sensor), where)
	prog := strconv.Quote(info.Program)
	if info.Program == "" {
		prog = "(as loaded)"
	}
	fmt.Fprintf(tw, "    program\t%s, highest %s C\n", prog, celsius(ctl.Program.Max()))
	fmt.Fprintf(tw, "    period\t%s s%s\n", num.G(ctl.Period), def("period"))
	fmt.Fprintf(tw, "    gain\t%s 1/K%s\n", num.G(ctl.Gain), def("gain"))
	fmt.Fprintf(tw, "    integral time\t%s s%s\n", num.G(ctl.IntegralTime), def("integral_time"))
	p.Flush(tw)
	if ramp := fastestRamp(ctl.Program); ramp > fastest {
		raise := "max_field"
		if v.Attenuation == physics.StandingWave {
			raise = "incident_power"
		}
		return []string{fmt.Sprintf("the control program ramps at up to %s K/min, faster than the full power heats any absorbing layer (%s K/min with no heat lost): the sensor will lag the program; raise %s or slow the ramp.",
			g3(ramp*60), g3(fastest*60), raise)}
	}
	return nil
}

// waveSolution is the standing-wave solution of a case's stack at the start
// (every cell at the initial temperature and cure) and fully cured (at the
// initial temperature): absorbed power per cell at full incident power,
// W/m³, and the shares of the incident power.
type waveSolution struct {
	pUncured, pCured []float64
	uncured, cured   physics.WaveShares
	S                float64 // incident power density of each source, W/m²; 1 for an exponential mode
	sources          float64 // 2 under IncidentBoth, else 1
}

// standingWave solves the plane wave of the stack of pr over band from inc
// (stackWave) at the start and fully cured, scaled by v's incident power
// (per W/m² when there is none).
func standingWave(pr *solver.Problem, v *physics.Volumetric, band physics.Band, inc physics.Incidence) *waveSolution {
	w := &waveSolution{S: v.IncidentPower, sources: 1}
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
func (w *waveSolution) layer(m *mesh.Mesh, j int, P []float64) (mean, lo, hi, share float64) {
	lo = math.Inf(1)
	sum := 0.0
	for i := m.First[j]; i < m.First[j+1]; i++ {
		sum += P[i] * m.Widths[i]
		lo, hi = min(lo, P[i]), max(hi, P[i])
	}
	th := m.Faces[m.First[j+1]] - m.Faces[m.First[j]]
	return sum / th, lo, hi, sum / (w.S * w.sources)
}

// powerUnit returns the scale and unit for power densities up to m W/m³.
func powerUnit(m float64) (float64, string) {
	switch {
	case m >= 1e6:
		return 1e6, "MW/m^3"
	case m >= 1e3:
		return 1e3, "kW/m^3"
	}
	return 1, "W/m^3"
}

// pct formats a share (0..1) as a percentage with 3 significant digits.
func pct(x float64) string {
	if x < 5e-4 {
		return "0 %"
	}
	return g3(100*x) + " %"
}

// fastestRamp returns the steepest rise of s between its points, K/s
// (0 when it never rises).
func fastestRamp(s physics.Schedule) float64 {
	t, v := s.Points()
	r := 0.0
	for i := 1; i < len(t); i++ {
		r = max(r, (v[i]-v[i-1])/(t[i]-t[i-1]))
	}
	return r
}

// depthMM formats a penetration depth (m) in mm, "infinite" for a lossless
// material.
func depthMM(d float64) string {
	if math.IsInf(d, 1) {
		return "infinite"
	}
	return g3(d * 1e3)
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
