package main

import (
	casecheck "cureslab/cases/check"
	"cureslab/cases/limits"
	"cureslab/cases/outdir"
	"cureslab/cases/simulate"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/spf13/pflag"

	"cureslab/cases"
	"cureslab/cases/calibrate"
	"cureslab/cases/report"
	"cureslab/cases/results"
	"cureslab/cases/uncertain"
	"cureslab/physics"
)

var runCmd = &Command{
	Name:  "run",
	Args:  "CASE.toml [-o DIR] [--verify] [--uncertain N [--seed S]]",
	Short: "simulate one case, write its output files and print a summary",
	Long: `Simulate one case and write fields.csv, probes.csv, summary.json and
report.html (the plots; skip it with --no-report) to DIR (default
./CASE-out, named after the case file), then print a short summary with the
acceptance criteria. A case with errors is refused before anything
is written. Ctrl-C stops the run and keeps the outputs up to that moment
(without report.html: draw it with 'cureslab report DIR').

With --verify, run the case a second time at temperature and cure
tolerances ten times tighter (same mesh) and report, in the terminal and as
estimated_error in summary.json, how far the peak temperature, the least
final cure and the time to min_cure moved: an estimate of the time-stepping
error. A warning follows when the peak moved more than 0.5 K or the least
cure more than 0.005. The conservation residual, by contrast, only proves the
bookkeeping. sweep, tune and --uncertain samples are not verified.

With --uncertain N, also run N Latin-hypercube samples of the spreads declared
in [uncertainty] and write uncertainty.csv (one row per sample) and, in
summary.json, the 5, 50 and 95 % values of every summary field and the share
of samples that meet each criterion; a share below [uncertainty] share counts
as a failed criterion.

Exit status: 0 every criterion met (or none given), 1 a criterion failed,
2 bad input or usage, 3 runaway or numerical failure (outputs kept),
130 interrupted by Ctrl-C or SIGTERM (outputs up to that moment kept, status
"interrupted", criteria not judged; or, when the run had finished and its
page was being drawn, its outputs complete and no page).`,
	Example: `cureslab example thick-potting-oven > potting.toml
cureslab run potting.toml -o potting-out`,
	Setup: func(fs *pflag.FlagSet) func(*env, []string) int {
		out := fs.StringP("out", "o", "", "write the outputs to `DIR` (default ./CASE-out)")
		samples := fs.Int("uncertain", 0, "also run `N` Latin-hypercube samples of [uncertainty] (uncertainty.csv)")
		seed := fs.Uint64("seed", 1, "seed `S` of the --uncertain samples")
		jobs := fs.IntP("jobs", "j", 0, "with --uncertain, `N` runs at a time (default: all cores)")
		noReport := fs.Bool("no-report", false, "do not write "+report.ReportFile)
		verify := fs.Bool("verify", false, "run again at tolerances ten times tighter and report the estimated error")
		fieldsLimit := fs.String("fields-limit", "2GB", "refuse a run whose fields.csv would pass `SIZE` (kB, MB, GB; 0: no limit)")
		return func(e *env, args []string) int {
			if len(args) != 1 {
				return e.usageError("expects one case file, got %d arguments", len(args))
			}
			limit, ok := parseSize(*fieldsLimit)
			if !ok {
				return e.usageError("--fields-limit %q: give a size such as 2GB, 500MB or 0 (no limit)", *fieldsLimit)
			}
			if *samples < 0 || *jobs < 0 {
				return e.usageError("--uncertain and --jobs take a positive count")
			}
			if *samples > maxSamples {
				return e.usageError("--uncertain %d: at most %d samples (each is a whole run); a few hundred give the 5 and 95 %% values to a few per cent", *samples, maxSamples)
			}
			c, err := cases.LoadContext(e.ctx, args[0])
			if err != nil {
				return e.loadError(err)
			}
			var text []byte
			if *samples > 0 {
				if text, err = limits.ReadFile(e.ctx, args[0], limits.MaxFileSize); err == nil {
					err = uncertain.Check(c, text)
				}
				if err != nil {
					fmt.Fprintf(e.stderr, "cureslab run: --uncertain: %v\n", err)
					return exitUsage
				}
			}
			if size, rows := results.FieldsSize(c); limit > 0 && size > limit {
				fmt.Fprintf(e.stderr, "cureslab run: %s: fields.csv would hold %d rows (%d cells × %d output times), about %s, above the limit of %s: "+
					"write fewer output times (time.output_every), use coarser cells (mesh.max_cell), or raise the limit with --fields-limit SIZE; nothing was written\n",
					args[0], rows, c.Problem.Mesh.Cells(), rows/int64(c.Problem.Mesh.Cells()), limits.Size(size), limits.Size(limit))
				return exitUsage
			}
			dir := *out
			if dir == "" {
				dir = defaultOutDir(args[0])
			}
			if msg := checkOutDir(dir); msg != "" {
				return e.usageError("%s", msg)
			}
			if *samples == 0 {
				o, code := runCase(e, "run", c, dir, simulate.Options{Report: !*noReport, Verify: *verify})
				if code == exitUsage {
					return code
				}
				results.PrintSummary(e.stdout, o.Summary)
				fmt.Fprintf(e.stdout, "outputs in %s\n", dir)
				return code
			}
			// With --uncertain the samples take part in the verdict
			// (uncertain.Judge): the summary, summary.json and
			// the report are written once they are in, so that all three
			// and the exit status agree.
			o, code := runCase(e, "run", c, dir, simulate.Options{Report: false, Verify: *verify})
			if code == exitUsage {
				return code
			}
			s := o.Summary
			if code == exitInterrupted { // the nominal run was cut short
				results.PrintSummary(e.stdout, s)
				fmt.Fprintf(e.stdout, "outputs in %s\n", dir)
				fmt.Fprintf(e.stderr, "cureslab run: --uncertain: no sample was run\n")
				return code
			}
			opt := uncertain.Options{Samples: *samples, Seed: *seed, Jobs: *jobs}
			if isTerminal(e.stderr) {
				opt.Progress = e.stderr
			}
			rep, err := uncertain.Propagate(e.ctx, c, text, opt)
			if e.interrupted(err) {
				results.PrintSummary(e.stdout, s)
				fmt.Fprintf(e.stdout, "outputs in %s\n", dir)
				fmt.Fprintf(e.stderr, "cureslab run: interrupted during the --uncertain samples: the outputs in %s are the nominal run's, complete, "+
					"its criteria judged without the samples; the samples run so far are not written (no uncertainty.csv), and %s was not drawn (draw it with 'cureslab report %s')\n",
					dir, report.ReportFile, dir)
				return exitInterrupted
			}
			if err == nil {
				s = uncertain.Judge(s, rep)
				err = uncertain.Write(dir, s, rep)
			}
			if err != nil {
				fmt.Fprintf(e.stderr, "cureslab run: --uncertain: %v\n", err)
				return exitUsage
			}
			pageCut := false
			if !*noReport {
				if err := report.RedrawReport(e.ctx, dir); e.interrupted(err) {
					pageCut = true
				} else if err != nil {
					fmt.Fprintf(e.stderr, "cureslab run: %v\n", err)
					return exitUsage
				}
			}
			results.PrintSummary(e.stdout, s)
			fmt.Fprintln(e.stdout)
			uncertain.Print(e.stdout, rep)
			if !rep.Pass() {
				code = max(code, exitCriteria)
			}
			fmt.Fprintf(e.stdout, "outputs in %s\n", dir)
			if pageCut {
				pageNotDrawn(e, "run", dir, s.Status)
				return exitInterrupted
			}
			return code
		}
	},
}

// parseSize reads a size such as 2GB, 500MB, 64kB or 0 (binary multiples,
// as limits.Size writes them).
func parseSize(s string) (int64, bool) {
	s = strings.TrimSpace(s)
	mult := int64(1)
	for _, u := range []struct {
		suffix string
		m      int64
	}{{"GB", 1 << 30}, {"MB", 1 << 20}, {"kB", 1 << 10}, {"B", 1}} {
		if strings.HasSuffix(s, u.suffix) {
			s, mult = strings.TrimSpace(strings.TrimSuffix(s, u.suffix)), u.m
			break
		}
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || v < 0 || v*float64(mult) > 1e18 {
		return 0, false
	}
	return int64(v * float64(mult)), true
}

// maxSamples is the most samples --uncertain takes: each is a whole run.
const maxSamples = 100000

// defaultOutDir is ./NAME-out for the case file path/NAME.toml.
func defaultOutDir(path string) string { return besideCase(path, "-out") }

// besideCase is ./NAME+suffix for the case file path/NAME.toml.
func besideCase(path, suffix string) string {
	base := filepath.Base(path)
	return "./" + strings.TrimSuffix(base, filepath.Ext(base)) + suffix
}

// checkOutDir returns why dir cannot be an output directory, or "".
func checkOutDir(dir string) string {
	if fi, err := os.Stat(dir); err == nil && !fi.IsDir() {
		return fmt.Sprintf("the output directory %s exists and is not a directory", dir)
	}
	return ""
}

// runCase runs c into dir through the one run path (simulate.Case) and
// returns its outcome and the exit status. Errors go to stderr under the
// command name cmd.
func runCase(e *env, cmd string, c *cases.Case, dir string, opt simulate.Options) (results.Compared, int) {
	o := simulate.Case(e.ctx, c, dir, opt)
	return o, runOutcome(e, cmd, c, dir, o)
}

// runOutcome says on stderr what went wrong with the run o of c whose
// outputs are (or go in place) in dir, nothing when it met its criteria,
// and returns its exit status. The demo calls it for an example written
// into a staged folder of its set, dir naming the folder's final place.
func runOutcome(e *env, cmd string, c *cases.Case, dir string, o results.Compared) int {
	var ke *outdir.KindError
	var be *outdir.BusyError
	switch {
	case errors.As(o.Err, &ke) || errors.As(o.Err, &be):
		fmt.Fprintf(e.stderr, "cureslab %s: %v\n", cmd, o.Err)
		return exitUsage
	case !o.Ran:
		fmt.Fprintf(e.stderr, "cureslab %s: %s: %v\n", cmd, c.File, o.Err)
		return exitFailure
	case o.Err != nil:
		fmt.Fprintf(e.stderr, "cureslab %s: %v\n", cmd, o.Err)
		return exitUsage
	}
	code := exitCode(o.Summary.Status)
	switch code {
	case exitFailure:
		fmt.Fprintf(e.stderr, "cureslab %s: %s: %s: %s\n", cmd, c.File, o.Summary.Status, o.Summary.Message)
	case exitInterrupted:
		notDrawn := ""
		if o.ReportNotDrawn {
			notDrawn = fmt.Sprintf("; %s was not drawn (draw it from these files with 'cureslab report %s')", report.ReportFile, dir)
		}
		fmt.Fprintf(e.stderr, "cureslab %s: %s: interrupted at t = %g s: the outputs in %s hold the state up to then, marked \"interrupted\"; the criteria are not judged%s\n",
			cmd, c.File, float64(o.Summary.EndTimeS), dir, notDrawn)
		return code
	}
	if o.ReportNotDrawn {
		// The run had finished: Ctrl-C came while its page was drawn.
		pageNotDrawn(e, cmd, dir, o.Summary.Status)
		return exitInterrupted
	}
	return code
}

// pageNotDrawn says that Ctrl-C or SIGTERM stopped the drawing of a run's
// report.html after the run had finished: its other files are complete.
func pageNotDrawn(e *env, cmd, dir, status string) {
	fmt.Fprintf(e.stderr, "cureslab %s: interrupted while drawing %s: the run had finished, and fields.csv, probes.csv and summary.json in %s are complete (status %q); %s was not drawn (draw it with 'cureslab report %s')\n",
		cmd, report.ReportFile, dir, status, report.ReportFile, dir)
}

var checkCmd = &Command{
	Name:  "check",
	Args:  "CASE.toml",
	Short: "validate a case and print the resolved stack and pre-trial estimates",
	Long: `Validate a case file without running it. Print the resolved stack (layers,
materials and where they come from, cells, contact resistances), the faces,
schedules and settings, and pre-trial estimates: Biot numbers, the adiabatic
temperature rise of each curing layer, and its conduction time against the
reaction half-life at the highest program temperature. Ends with warnings and
the cautions that go with every result.

Exit status: 0 the case is valid, 2 it is not (the errors go to stderr),
130 interrupted by Ctrl-C or SIGTERM.`,
	Example: "cureslab check potting.toml",
	Setup: func(fs *pflag.FlagSet) func(*env, []string) int {
		return func(e *env, args []string) int {
			if len(args) != 1 {
				return e.usageError("expects one case file, got %d arguments", len(args))
			}
			c, err := cases.LoadContext(e.ctx, args[0])
			if err != nil {
				return e.loadError(err)
			}
			if err := casecheck.CheckContext(e.ctx, e.stdout, c); e.interrupted(err) {
				fmt.Fprintf(e.stderr, "cureslab check: interrupted; the account above is incomplete\n")
				return exitInterrupted
			} else if err != nil {
				fmt.Fprintf(e.stderr, "cureslab check: %v\n", err)
				return exitUsage
			}
			return exitOK
		}
	},
}

var exampleCmd = &Command{
	Name:  "example",
	Args:  "[NAME]",
	Short: "list the embedded example cases, or print one",
	Long: `Without NAME, list the embedded example cases and the example trial log.
With NAME, print that case file (or the log) to stdout as a starting point for
your own. The examples use invented resins: replace them with your supplier's
data before relying on a result. The trial log is invented too: cureslab made
it from the thick-potting-oven example with other values and noise, to try
'cureslab calibrate' on.`,
	Example: `cureslab example
cureslab example thick-potting-oven > potting.toml
cureslab example thick-potting-oven-trial.csv > trial.csv`,
	Setup: func(fs *pflag.FlagSet) func(*env, []string) int {
		return func(e *env, args []string) int {
			switch len(args) {
			case 0:
				tw := tabwriter.NewWriter(e.stdout, 0, 0, 2, ' ', 0)
				for _, ex := range cases.Examples() {
					fmt.Fprintf(tw, "%s\t%s\n", ex.Name, ex.Summary)
				}
				fmt.Fprintf(tw, "%s\t%s\n", calibrate.ExampleLogName, "an invented trial log of thick-potting-oven (made by cureslab, not measured), for calibrate")
				tw.Flush()
				return exitOK
			case 1:
				if args[0] == calibrate.ExampleLogName {
					e.stdout.Write(calibrate.ExampleLog())
					return exitOK
				}
				ex, ok := cases.ExampleByName(args[0])
				if !ok {
					names := append(cases.ExampleNames(), calibrate.ExampleLogName)
					return e.usageError("no example named %q%s (available: %s)", args[0],
						didYouMean(args[0], names), strings.Join(names, ", "))
				}
				e.stdout.Write(ex.Text)
				return exitOK
			}
			return e.usageError("expects at most one example name, got %d arguments", len(args))
		}
	},
}

var materialsCmd = &Command{
	Name:  "materials",
	Args:  "[NAME]",
	Short: "list the built-in materials with the source of each value, or show one",
	Long: `Without NAME, list the built-in material library: density, specific heat
and conductivity at room temperature, and the published source of each
value; then the built-in fibres for composite plies, with their axial and
transverse conductivity. With NAME, show one material or fibre in detail. A
case file uses a built-in by its name; a [materials.NAME] section of the
case replaces it.`,
	Example: `cureslab materials
cureslab materials fr4`,
	Setup: func(fs *pflag.FlagSet) func(*env, []string) int {
		return func(e *env, args []string) int {
			switch len(args) {
			case 0:
				tw := tabwriter.NewWriter(e.stdout, 0, 0, 2, ' ', 0)
				fmt.Fprintf(tw, "name\tdensity kg/m^3\tspecific heat J/kg/K\tconductivity W/m/K\tsource\n")
				for _, m := range physics.Library() {
					cp, _, _ := m.SpecificHeat.At(296.15, 0)
					k, _, _ := m.Conductivity.At(296.15, 0)
					fmt.Fprintf(tw, "%s\t%g\t%g\t%g\t%s\n", m.Name, m.Density, cp, k, m.Source)
				}
				tw.Flush()
				fmt.Fprintf(e.stdout, "\nFibres, for fibre = NAME in a composite [materials.X] (the through-thickness conductivity of a ply uses the transverse one)\n")
				tw = tabwriter.NewWriter(e.stdout, 0, 0, 2, ' ', 0)
				fmt.Fprintf(tw, "name\tdensity kg/m^3\tspecific heat J/kg/K\tconductivity axial W/m/K\ttransverse W/m/K\tsource\n")
				for _, f := range physics.Fibres() {
					cp, _ := f.SpecificHeat.At(296.15)
					ka, _ := f.AxialConductivity.At(296.15)
					kt, _ := f.TransverseConductivity.At(296.15)
					fmt.Fprintf(tw, "%s\t%g\t%g\t%g\t%g\t%s\n", f.Name, f.Density, cp, ka, kt, f.Source)
				}
				tw.Flush()
				return exitOK
			case 1:
				if f, ok := physics.BuiltinFibre(args[0]); ok {
					cp, _ := f.SpecificHeat.At(296.15)
					ka, _ := f.AxialConductivity.At(296.15)
					kt, _ := f.TransverseConductivity.At(296.15)
					fmt.Fprintf(e.stdout, "%s (fibre)\n  density %g kg/m^3\n  specific heat %g J/kg/K\n  conductivity %g W/m/K along the fibre, %g W/m/K across it\n  source: %s\n",
						f.Name, f.Density, cp, ka, kt, f.Source)
					return exitOK
				}
				m, ok := physics.Builtin(args[0])
				if !ok {
					var names []string
					for _, f := range physics.Fibres() {
						names = append(names, f.Name)
					}
					return e.usageError("no built-in material or fibre named %q%s", args[0], didYouMean(args[0], append(physics.BuiltinNames(), names...)))
				}
				fmt.Fprintf(e.stdout, "%s\n", m.Name)
				for _, line := range casecheck.DescribeMaterial(m) {
					fmt.Fprintf(e.stdout, "  %s\n", line)
				}
				return exitOK
			}
			return e.usageError("expects at most one material name, got %d arguments", len(args))
		}
	},
}
