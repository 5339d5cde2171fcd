package main

import (
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"sync"

	"github.com/spf13/pflag"

	"cureslab/cases/dscfile"
	"cureslab/cases/report"
	"cureslab/cases/units"
	"cureslab/physics/dsc"
)

var fitCmd = &Command{
	Name:  "fit",
	Args:  "SCAN.csv... [--model M] [--diffusion] [--name NAME] [-o FILE] [--plot FILE.html]",
	Short: "kinetic parameters from DSC scans",
	Long: `Read DSC scans (CSV with the header time_s,temperature_C,heat_flow_W_per_g,
heat flow exothermic positive), one file per scan: dynamic scans at several
heating rates and/or isothermal scans; each is recognised from its
temperature program. Subtract a baseline (linear between the onset and the
end of the exotherm, detected or given with --onset/--end; or sigmoidal),
integrate to the total heat and the degree of cure, and report:
  - the activation energy by Kissinger (ASTM E698) and Ozawa-Flynn-Wall
    (ASTM E1641, Doyle factor iterated), with standard errors;
  - Friedman's isoconversional activation energy for alpha = 0.05 to 0.95;
  - a least-squares fit of the model to all scans at once, started from the
    isoconversional estimate, with standard errors and the fit quality; or,
    with --model isoconversional, no fit: Friedman's table of E and
    ln[A f(alpha)] at alpha = 0.01 to 0.99, which a case uses as it is (for
    a resin whose activation energy varies with alpha, where no single-step
    law fits), with how well it reproduces the scans;
  - warnings where the scans fall short of the ICTAC Kinetics Committee
    recommendations (at least 3 heating rates spanning about a factor 10;
    an activation energy that varies with alpha);
  - the [materials.NAME.cure] block, ready to paste into a case file;
  - with --plot FILE.html, a page with the measured and fitted rates of
    cure of every scan and Friedman's activation energy against alpha.
With a single temperature program no model is fitted (exit status 2), but
everything else is reported. --diffusion needs isothermal scans at two or
more temperatures that stop short of full cure (vitrification).

Exit status: 0 fitted, 2 bad input, or no model could be fitted, 130
interrupted by Ctrl-C or SIGTERM (no file written; what was computed is
shown).`,
	Example: `cureslab fit scan-2K.csv scan-5K.csv scan-10K.csv scan-20K.csv --model autocatalytic
cureslab fit testdata/dsc/*.csv --diffusion --name resin-B -o resin-B-cure.toml`,
	Setup: func(fs *pflag.FlagSet) func(*env, []string) int {
		model := fs.String("model", dsc.Autocatalytic, "cure law to fit: `M` = nth-order, autocatalytic, or isoconversional (a model-free table)")
		diffusion := fs.Bool("diffusion", false, "also fit the diffusion factor (needs isothermal scans that vitrify)")
		name := fs.String("name", "fitted-resin", "material `NAME` in the printed block")
		baseline := fs.String("baseline", "linear", "baseline `KIND`: linear or sigmoidal")
		onset := fs.String("onset", "", "start of the integration window of dynamic scans, a temperature `T` such as \"40 C\" (default: detected)")
		end := fs.String("end", "", "end of the integration window of dynamic scans, a temperature `T` (default: detected)")
		out := fs.StringP("out", "o", "", "also write the [materials.NAME.cure] block to `FILE`")
		plotFile := fs.String("plot", "", "also write a page of the measured and fitted rates and E(alpha) to `FILE.html`")
		return func(e *env, args []string) int {
			if len(args) == 0 {
				return e.usageError("expects one or more scan files, got none")
			}
			opt := dsc.Options{Model: *model, Diffusion: *diffusion}
			switch *model {
			case dsc.NthOrder, dsc.Autocatalytic:
			case dsc.Isoconversional:
				if *diffusion {
					return e.usageError("--diffusion does not go with --model isoconversional: the table holds whatever slows the cure at high cure")
				}
			default:
				return e.usageError("unknown model %q%s (the models are nth-order, autocatalytic and isoconversional)", *model,
					didYouMean(*model, []string{dsc.NthOrder, dsc.Autocatalytic, dsc.Isoconversional}))
			}
			switch *baseline {
			case "linear":
			case "sigmoidal":
				opt.Baseline = dsc.SigmoidalBaseline
			default:
				return e.usageError("unknown baseline %q%s (linear or sigmoidal)", *baseline, didYouMean(*baseline, []string{"linear", "sigmoidal"}))
			}
			var err error
			if opt.Window.Onset, err = flagTemperature("onset", *onset); err != nil {
				return e.usageError("%v", err)
			}
			if opt.Window.End, err = flagTemperature("end", *end); err != nil {
				return e.usageError("%v", err)
			}
			if opt.Window.Onset != 0 && opt.Window.End != 0 && !(opt.Window.End > opt.Window.Onset) {
				return e.usageError("--end must be above --onset")
			}
			if !materialName().MatchString(*name) {
				return e.usageError("--name %q: a material name is letters, digits, - and _ (it becomes a TOML key)", *name)
			}
			if *out != "" {
				if msg := checkOutFile(*out); msg != "" {
					return e.usageError("%s", msg)
				}
			}
			if *plotFile != "" {
				if msg := checkOutFile(*plotFile); msg != "" {
					return e.usageError("%s", msg)
				}
			}
			var scans []*dsc.Scan
			var bad []string
			for _, path := range args {
				s, err := dscfile.ReadScan(e.ctx, path)
				if e.interrupted(err) {
					fmt.Fprintf(e.stderr, "cureslab fit: interrupted while reading %s; nothing was written\n", path)
					return exitInterrupted
				}
				if err != nil {
					bad = append(bad, err.Error())
					continue
				}
				scans = append(scans, s)
			}
			if len(bad) > 0 {
				fmt.Fprintln(e.stderr, strings.Join(bad, "\n"))
				return exitUsage
			}
			if isTerminal(e.stderr) {
				opt.Progress = func(it int, rms float64) {
					fmt.Fprintf(e.stderr, "\rfit: iteration %d, RMS residual %.3g %% ", it, 100*rms)
				}
			}
			an, err := dsc.AnalyzeContext(e.ctx, scans, opt)
			if opt.Progress != nil {
				fmt.Fprintln(e.stderr)
			}
			if e.ctx.Err() != nil {
				if an != nil {
					dscfile.PrintFit(e.stdout, an, *name)
				}
				fmt.Fprintf(e.stderr, "cureslab fit: interrupted before the fit converged: no block written; what was computed is shown above\n")
				return exitInterrupted
			}
			if err != nil {
				for _, one := range unjoin(err) {
					fmt.Fprintf(e.stderr, "%v\n", one)
				}
				return exitUsage
			}
			if err := dscfile.PrintFit(e.stdout, an, *name); err != nil {
				fmt.Fprintf(e.stderr, "cureslab fit: %v\n", err)
				return exitUsage
			}
			plotCut := false
			if *plotFile != "" {
				if err := report.WriteFitPlot(e.ctx, *plotFile, an, *name); e.interrupted(err) {
					plotCut = true
				} else if err != nil {
					fmt.Fprintf(e.stderr, "cureslab fit: %v\n", err)
					return exitUsage
				} else {
					fmt.Fprintf(e.stdout, "\nplot written to %s\n", *plotFile)
				}
			}
			if plotCut {
				// The fit is complete and shown above; the block is
				// written only when no interruption came before it.
				fmt.Fprintf(e.stderr, "cureslab fit: interrupted while drawing %s: not written, nor any block; the fit shown above is complete\n", *plotFile)
				return exitInterrupted
			}
			if an.FitRefused != "" {
				fmt.Fprintf(e.stderr, "cureslab fit: no model fitted: %s\n", an.FitRefused)
				return exitUsage
			}
			if *out != "" {
				if err := dscfile.WriteCureBlock(*out, an, *name); err != nil {
					fmt.Fprintf(e.stderr, "cureslab fit: %v\n", err)
					return exitUsage
				}
				fmt.Fprintf(e.stdout, "\nblock written to %s\n", *out)
			}
			return exitOK
		}
	},
}

func init() { register(fitCmd) }

// materialName is what --name accepts: a TOML bare key.
var materialName = sync.OnceValue(func() *regexp.Regexp { return regexp.MustCompile(`^[A-Za-z0-9_-]+$`) })

// flagTemperature reads the temperature flag --name; "" gives 0.
func flagTemperature(name, s string) (float64, error) {
	if s == "" {
		return 0, nil
	}
	T, err := units.Parse(s, units.Temperature)
	if err != nil {
		return 0, fmt.Errorf("--%s: %v", name, err)
	}
	return T, nil
}

// checkOutFile returns why path cannot be written as an output file, or "".
func checkOutFile(path string) string {
	if fi, err := os.Stat(path); err == nil && fi.IsDir() {
		return fmt.Sprintf("the output %s is a directory; give a file name", path)
	}
	if fi, err := os.Stat(filepath.Dir(path)); err != nil || !fi.IsDir() {
		return fmt.Sprintf("the directory of the output %s does not exist", path)
	}
	return ""
}

// unjoin returns the errors joined in err (errors.Join), or err alone.
func unjoin(err error) []error {
	if j, ok := err.(interface{ Unwrap() []error }); ok {
		return j.Unwrap()
	}
	return []error{err}
}
