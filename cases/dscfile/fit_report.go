package dscfile

import (
	"cureslab/cases/internal/num"
	"cureslab/cases/internal/textout"
	"cureslab/physics"
	"cureslab/physics/dsc"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strconv"
	"strings"
)

// PrintFit writes the report of a DSC analysis for a reader: each scan
// (program, window, peak, heat), the total heat, the Kissinger and
// Ozawa–Flynn–Wall activation energies with their standard errors, the
// Friedman table (with the Ozawa–Flynn–Wall value at the same α), the fitted
// parameters with standard errors and the fit quality, the warnings, and
// the ready-to-paste [materials.NAME.cure] block (cureBlock). Numbers are
// rounded for reading; the block keeps four significant digits.
func PrintFit(w io.Writer, an *dsc.Analysis, name string) error {
	p := textout.NewPrinter(w)
	p.Printf("DSC scans\n")
	tw := p.Table()
	fmt.Fprintf(tw, "  scan\tprogram\twindow\tpeak\theat\n")
	for _, c := range an.Curves {
		fmt.Fprintf(tw, "  %s\t%s\t%s\t%s\t%s\n", filepath.Base(c.Scan.Name), ProgramLabel(c.Program),
			WindowLabel(c), PeakLabel(c), HeatLabel(c))
	}
	p.Flush(tw)
	dyn := 0
	for _, c := range an.Curves {
		if c.Program.Kind == dsc.Dynamic {
			dyn++
		}
	}
	switch {
	case dyn > 1:
		p.Printf("  total heat (mean of %d dynamic scans): %s ± %s J/g (standard deviation)\n", dyn, fmtSig(an.TotalHeat/1000, 4), fmtSig(an.HeatSD/1000, 2))
	case dyn == 1:
		p.Printf("  total heat (one dynamic scan): %s J/g\n", fmtSig(an.TotalHeat/1000, 4))
	default:
		p.Printf("  total heat (largest isothermal heat, a lower bound): %s J/g\n", fmtSig(an.TotalHeat/1000, 4))
	}

	p.Printf("\nActivation energy\n")
	if an.Kissinger == nil {
		p.Printf("  Kissinger and Ozawa-Flynn-Wall need dynamic scans at two or more heating rates (%d given)\n", len(an.Rates))
	} else {
		k := an.Kissinger
		p.Printf("  Kissinger (ASTM E698; exact for first order), %d heating rates:\n    E = %s kJ/mol%s\n",
			len(an.Rates), fmtEnergy(k.E, k.SE), r2Label(k.R2, k.N))
		if o := an.OFW; o != nil {
			p.Printf("  Ozawa-Flynn-Wall (ASTM E1641) at alpha = 0.5, Doyle factor iterated to b = %.4f:\n    E = %s kJ/mol%s\n",
				o.B, fmtEnergy(o.E, o.SE), r2Label(o.R2, o.N))
		}
	}

	p.Printf("\nIsoconversional (Friedman) activation energy\n")
	if len(an.Friedman) == 0 {
		p.Printf("  needs two or more scans at different temperatures\n")
	} else {
		ofw := map[float64]dsc.Estimate{}
		for _, o := range an.OFWTable {
			ofw[o.Alpha] = o.Estimate
		}
		tw = p.Table()
		fmt.Fprintf(tw, "  alpha\tFriedman E kJ/mol\tln[A f(alpha)] (A in 1/s)\tOFW E kJ/mol\n")
		for _, f := range an.Friedman {
			o := "-"
			if e, ok := ofw[f.Alpha]; ok {
				o = fmtEnergy(e.E, e.SE)
			}
			fmt.Fprintf(tw, "  %.2f\t%s\t%.3f\t%s\n", f.Alpha, fmtEnergy(f.E, f.SE), f.LnA, o)
		}
		p.Flush(tw)
		if !math.IsNaN(an.EaSpread) {
			p.Printf("  spread of Friedman E over alpha = 0.1 to 0.9: %.0f %% of its mean\n", 100*an.EaSpread)
		}
	}

	p.Printf("\nModel fit\n")
	switch {
	case an.FitRefused != "":
		p.Printf("  no model fitted: %s\n", an.FitRefused)
	case an.Fit == nil:
		p.Printf("  no model asked for\n")
	default:
		printFitParams(p, an)
	}

	if len(an.Warnings) > 0 {
		p.Printf("\nWarnings (ICTAC Kinetics Committee recommendations, Vyazovkin et al., Thermochim. Acta 520:1, 2011)\n")
		for _, wn := range an.Warnings {
			p.Printf("  - %s\n", wn)
		}
	}
	if b := cureBlock(an, name); b != "" {
		p.Printf("\nReady to paste into a case file (-o writes it to a file):\n\n%s", b)
	}
	return p.Err()
}

// printFitParams writes the fitted parameters and the fit quality.
func printFitParams(p *textout.Printer, an *dsc.Analysis) {
	f := an.Fit
	if iso, ok := f.Cure.Model.(*physics.Isoconversional); ok {
		printIsoTable(p, an, iso)
		return
	}
	what := "n-th order, k1 (1-a)^n"
	if _, ok := f.Cure.Model.(physics.Autocatalytic); ok {
		what = "autocatalytic (Kamal-Sourour), (k1 + k2 a^m)(1-a)^n"
	}
	if f.Cure.Diffusion != nil {
		what += ", with the diffusion factor 1/(1+exp(C (a - a_c(T))))"
	}
	p.Printf("  %s, fitted to %d scans at once (%d points), started from the isoconversional estimate\n", what, len(f.Curves), f.Points)
	tw := p.Table()
	for _, q := range f.Params {
		switch q.Name {
		case "A1", "A2":
			fmt.Fprintf(tw, "  %s\t%s 1/s\t± %s %%\n", q.Name, fmtSig(q.Value, 4), fmtSig(100*q.SE/q.Value, 2))
		case "ln A1", "ln A2":
			fmt.Fprintf(tw, "  %s\t%.3f\t± %s\n", q.Name, q.Value, fmtSig(q.SE, 2))
		case "E1", "E2":
			fmt.Fprintf(tw, "  %s\t%.2f kJ/mol\t± %s\n", q.Name, q.Value/1000, fmtSig(q.SE/1000, 2))
		case "alpha_cT":
			fmt.Fprintf(tw, "  %s\t%s 1/K\t± %s\n", q.Name, fmtSig(q.Value, 4), fmtSig(q.SE, 2))
		default:
			fmt.Fprintf(tw, "  %s\t%s\t± %s\n", q.Name, fmtSig(q.Value, 4), fmtSig(q.SE, 2))
		}
	}
	p.Flush(tw)
	p.Printf("  standard errors from the residual noise (s²(JᵀJ)⁻¹); they do not include baseline or model errors\n")
	p.Printf("  R² = %.5f, RMS residual %.3g %% of the peak rate (%s)\n", f.R2, 100*f.RMS, perCurveRMS(an))
	conv := "converged"
	if !f.Converged {
		conv = "NOT converged"
	}
	p.Printf("  Levenberg-Marquardt: %d iterations of the best start, %d integrations in all, %s\n", f.Iterations, f.Evals, conv)
}

// printIsoTable writes the isoconversional table and how well it
// reproduces the scans.
func printIsoTable(p *textout.Printer, an *dsc.Analysis, m *physics.Isoconversional) {
	f := an.Fit
	a, E, lnAf := m.Table()
	p.Printf("  model-free (isoconversional) table from Friedman's analysis: rate = Af(a) exp(-E(a)/RT), E and ln Af linear in a\n")
	p.Printf("  between the rows, Af(a) and E(a) of the first row below it, no reaction past the last row (a = %s)\n", fmtSig(a[len(a)-1], 3))
	se := map[string]float64{}
	for _, q := range f.Params {
		se[q.Name] = q.SE
	}
	tw := p.Table()
	fmt.Fprintf(tw, "  alpha\tE kJ/mol\tAf 1/s\tln Af\n")
	for j := range a {
		fmt.Fprintf(tw, "  %s\t%.2f ± %s\t%s\t%.3f ± %s\n", fmtSig(a[j], 3), E[j]/1000, fmtSig(se[fmt.Sprintf("E(%g)", a[j])]/1000, 2),
			fmtExp(math.Exp(lnAf[j])), lnAf[j], fmtSig(se[fmt.Sprintf("lnAf(%g)", a[j])], 2))
	}
	p.Flush(tw)
	p.Printf("  standard errors of each Friedman line (the scatter of its points only)\n")
	p.Printf("  the table integrated along each scan: R² = %.5f, RMS residual %.3g %% of the peak rate (%s)\n", f.R2, 100*f.RMS, perCurveRMS(an))
}

// perCurveRMS lists each scan's RMS residual: "dyn-02Kmin.csv 3.7 %, ...".
func perCurveRMS(an *dsc.Analysis) string {
	var per []string
	for i, c := range an.Fit.Curves {
		per = append(per, fmt.Sprintf("%s %.2g %%", filepath.Base(an.Curves[i].Scan.Name), 100*c.RMS))
	}
	return strings.Join(per, ", ")
}

// cureBlock returns the fitted [materials.NAME.cure] block (with its
// [materials.NAME.cure.diffusion] section when the diffusion factor was
// fitted) in the units a case file accepts, with four significant digits
// and comments that say where it comes from and what DSC does not measure;
// "" when no model was fitted.
func cureBlock(an *dsc.Analysis, name string) string {
	if an.Fit == nil {
		return ""
	}
	f := an.Fit
	var b strings.Builder
	var rates, isos []string
	for _, c := range an.Curves {
		if c.Program.Kind == dsc.Isothermal {
			isos = append(isos, fmtSig(num.Round(c.Program.Temperature-273.15, 1), 4))
		} else {
			rates = append(rates, fmtSig(c.Program.Rate*60, 3))
		}
	}
	var progs []string
	if len(rates) > 0 {
		progs = append(progs, "dynamic at "+strings.Join(rates, ", ")+" K/min")
	}
	if len(isos) > 0 {
		progs = append(progs, "isothermal at "+strings.Join(isos, ", ")+" C")
	}
	fmt.Fprintf(&b, "# Fitted by cureslab fit to %d DSC scans (%s).\n", len(an.Curves), strings.Join(progs, "; "))
	fmt.Fprintf(&b, "# R² = %.4f, RMS residual %.2g %% of the peak rate. DSC heat flow does not give the\n", f.R2, 100*f.RMS)
	fmt.Fprintf(&b, "# gel point or the glass transition: add gel_point and [materials.%s.cure.glass_transition]\n", name)
	fmt.Fprintf(&b, "# from rheology and Tg measurements.\n")
	fmt.Fprintf(&b, "[materials.%s.cure]\n", name)
	se := map[string]float64{}
	for _, q := range f.Params {
		se[q.Name] = q.SE
	}
	kv := func(key, val, note string) {
		line := fmt.Sprintf("%s = %s", key, val)
		if note != "" {
			line = fmt.Sprintf("%-28s # %s", line, note)
		}
		b.WriteString(line + "\n")
	}
	pm := func(v, s float64, unit string) string {
		if math.IsNaN(s) {
			return ""
		}
		return "± " + fmtSig(s, 2) + unit
	}
	rel := func(v, s float64) string {
		if math.IsNaN(s) {
			return ""
		}
		return "± " + fmtSig(100*s/v, 2) + " %"
	}
	switch m := f.Cure.Model.(type) {
	case physics.Autocatalytic:
		kv("model", `"autocatalytic"`, "")
		kv("total_heat", quoted(fmtSig(an.TotalHeat/1000, 4)+" J/g"), "per mass of the scanned sample")
		kv("A1", quoted(fmtExp(m.A1)+" 1/s"), rel(m.A1, se["A1"]))
		kv("E1", quoted(fmtSig(m.E1/1000, 4)+" kJ/mol"), pm(m.E1, se["E1"]/1000, " kJ/mol"))
		kv("A2", quoted(fmtExp(m.A2)+" 1/s"), rel(m.A2, se["A2"]))
		kv("E2", quoted(fmtSig(m.E2/1000, 4)+" kJ/mol"), pm(m.E2, se["E2"]/1000, " kJ/mol"))
		kv("m", fmtSig(m.M, 4), pm(m.M, se["m"], ""))
		kv("n", fmtSig(m.N, 4), pm(m.N, se["n"], ""))
	case *physics.Isoconversional:
		a, E, lnAf := m.Table()
		kv("model", `"isoconversional"`, "")
		kv("total_heat", quoted(fmtSig(an.TotalHeat/1000, 4)+" J/g"), "per mass of the scanned sample")
		b.WriteString("# one row per degree of cure: the rate is Af exp(-E/RT), both linear in alpha (ln Af)\n")
		b.WriteString("# between rows; no reaction past the last alpha\n")
		row := func(key string, f func(j int) string) {
			b.WriteString(key + " = [\n")
			for j := range a {
				fmt.Fprintf(&b, "  %s,", f(j))
				if j%6 == 5 || j == len(a)-1 {
					b.WriteString("\n")
				}
			}
			b.WriteString("]\n")
		}
		row("alpha", func(j int) string { return fmtSig(a[j], 3) })
		row("E", func(j int) string { return quoted(fmtSig(E[j]/1000, 5) + " kJ/mol") })
		row("Af", func(j int) string { return quoted(fmtExpN(math.Exp(lnAf[j]), 5) + " 1/s") })
	case physics.NthOrder:
		kv("model", `"nth-order"`, "")
		kv("total_heat", quoted(fmtSig(an.TotalHeat/1000, 4)+" J/g"), "per mass of the scanned sample")
		kv("A1", quoted(fmtExp(m.A)+" 1/s"), rel(m.A, se["A1"]))
		kv("E1", quoted(fmtSig(m.E/1000, 4)+" kJ/mol"), pm(m.E, se["E1"]/1000, " kJ/mol"))
		kv("n", fmtSig(m.N, 4), pm(m.N, se["n"], ""))
	}
	if d := f.Cure.Diffusion; d != nil {
		fmt.Fprintf(&b, "\n[materials.%s.cure.diffusion]\n", name)
		kv("C", fmtSig(d.C, 4), pm(d.C, se["C"], ""))
		kv("alpha_c0", fmtSig(d.Alpha0, 4), pm(d.Alpha0, se["alpha_c0"], ""))
		kv("alpha_cT", quoted(fmtSig(d.AlphaT, 4)+" 1/K"), pm(d.AlphaT, se["alpha_cT"], " 1/K"))
	}
	return b.String()
}

func quoted(s string) string { return `"` + s + `"` }

// fmtSig formats v with sig significant digits, without exponent for
// ordinary magnitudes ("412.3", "0.5512"); NaN is "n/a".
func fmtSig(v float64, sig int) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "n/a"
	}
	s := strconv.FormatFloat(v, 'g', sig, 64)
	if strings.Contains(s, "e") {
		return fmtExpN(v, sig)
	}
	return s
}

// fmtExp formats v in exponent form with 4 significant digits: "2.534e7".
func fmtExp(v float64) string { return fmtExpN(v, 4) }

func fmtExpN(v float64, sig int) string {
	s := strconv.FormatFloat(v, 'e', sig-1, 64) // 2.534e+07
	mant, exp, _ := strings.Cut(s, "e")
	if strings.Contains(mant, ".") {
		mant = strings.TrimRight(strings.TrimRight(mant, "0"), ".")
	}
	e, _ := strconv.Atoi(exp)
	if e == 0 {
		return mant
	}
	return mant + "e" + strconv.Itoa(e)
}

// fmtEnergy formats an activation energy and its standard error in kJ/mol.
func fmtEnergy(E, se float64) string {
	if math.IsNaN(se) {
		return fmt.Sprintf("%.1f (no standard error from 2 points)", E/1000)
	}
	return fmt.Sprintf("%.1f ± %.1f", E/1000, se/1000)
}

func r2Label(r2 float64, n int) string {
	if n < 3 || math.IsNaN(r2) {
		return ""
	}
	return fmt.Sprintf(" (R² %.4f)", r2)
}

// ProgramLabel is "10 K/min" or "isothermal 110 C".
func ProgramLabel(p dsc.Program) string {
	if p.Kind == dsc.Isothermal {
		return "isothermal " + fmtSig(num.Round(p.Temperature-273.15, 1), 4) + " C"
	}
	return fmtSig(p.Rate*60, 3) + " K/min"
}

func WindowLabel(c *dsc.Curve) string {
	if c.Program.Kind == dsc.Isothermal {
		return fmt.Sprintf("%s to %s", num.HumanTime(c.Time[0]), num.HumanTime(c.Time[len(c.Time)-1]))
	}
	return fmt.Sprintf("%.1f to %.1f C", c.Temp[0]-273.15, c.Temp[len(c.Temp)-1]-273.15)
}

func PeakLabel(c *dsc.Curve) string {
	if c.Program.Kind == dsc.Isothermal {
		return "at " + num.HumanTime(c.Peak.Time-c.Time[0])
	}
	return fmt.Sprintf("%.2f C", c.Peak.Temp-273.15)
}

func HeatLabel(c *dsc.Curve) string {
	s := fmtSig(c.Heat/1000, 4) + " J/g"
	if c.Program.Kind == dsc.Isothermal {
		s += fmt.Sprintf(" (final alpha %.3f)", c.Alpha[len(c.Alpha)-1])
	}
	return s
}

// WriteCureBlock writes cureBlock(an, name) to the file path, atomically
// (a temporary file renamed into place).
func WriteCureBlock(path string, an *dsc.Analysis, name string) error {
	block := cureBlock(an, name)
	return textout.WriteFileAtomic(filepath.Dir(path), filepath.Base(path), func(w io.Writer) error {
		_, err := io.WriteString(w, block)
		return err
	})
}
