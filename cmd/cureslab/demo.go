package main

import (
	"cureslab/cases/report"
	"cureslab/cases/simulate"
	"errors"
	"fmt"
	"path/filepath"
	"strings"

	"github.com/spf13/pflag"

	"cureslab/cases"
	"cureslab/cases/results"
)

var demoCmd = &Command{
	Name:  "demo",
	Args:  "[-o DIR]",
	Short: "run the embedded examples end to end",
	Long: `Run every embedded example case (see 'cureslab example') into DIR/NAME/
(default ./cureslab-demo) and print the summary of each, then set examples
side by side as 'cureslab compare' does: the same potting cured in an oven and
by controlled microwave heating (DIR/compare/), and the microwave potting at
one frequency and swept over a band (DIR/compare-6ghz/). The examples use
invented resins: they show the tool, not any real product.

The first comparison shows what volumetric heating buys: the same cure with a
few kelvin of overshoot instead of the oven's tens, and how long each takes.

Exit status, as for 'cureslab run' over all the examples: 0 every example
met its criteria, 1 one failed a criterion, 2 an output could not be
written, 3 an example ran away or failed numerically, 130 interrupted by
Ctrl-C or SIGTERM (the example running keeps its outputs up to that moment,
marked interrupted; the ones after it are not run).`,
	Example: "cureslab demo -o demo-out",
	Setup: func(fs *pflag.FlagSet) func(*env, []string) int {
		out := fs.StringP("out", "o", "./cureslab-demo", "write the outputs under `DIR`")
		noReport := fs.Bool("no-report", false, "do not write "+report.ReportFile)
		return func(e *env, args []string) int {
			if len(args) != 0 {
				return e.usageError("takes no arguments, got %d", len(args))
			}
			if msg := checkOutDir(*out); msg != "" {
				return e.usageError("%s", msg)
			}
			opt := simulate.Options{Report: !*noReport}
			worst := exitOK
			ran := map[string]results.Compared{}
			for i, ex := range cases.Examples() {
				if e.ctx.Err() != nil {
					fmt.Fprintf(e.stderr, "cureslab demo: interrupted; %s and the examples after it were not run\n", ex.Name)
					return exitInterrupted
				}
				if i > 0 {
					fmt.Fprintln(e.stdout)
				}
				fmt.Fprintf(e.stdout, "== %s: %s\n", ex.Name, ex.Summary)
				c, err := cases.Parse(ex.Name+".toml", ex.Text, "")
				if err != nil {
					fmt.Fprintf(e.stderr, "cureslab demo: embedded example %s: %v\n", ex.Name, err)
					worst = max(worst, exitUsage)
					continue
				}
				dir := filepath.Join(*out, ex.Name)
				o, code := runCase(e, "demo", c, dir, opt)
				s, r := o.Summary, o.Result
				worst = max(worst, code)
				if code == exitUsage {
					continue
				}
				results.PrintSummary(e.stdout, s)
				fmt.Fprintf(e.stdout, "outputs in %s\n", dir)
				if code == exitInterrupted {
					fmt.Fprintf(e.stderr, "cureslab demo: the examples after %s were not run\n", ex.Name)
					return exitInterrupted
				}
				// A failed status without a message: the run never started.
				started := s.Status != results.StatusFailed || s.Message != ""
				ran[ex.Name] = results.Compared{Name: ex.Name, Case: c, Ran: started, Summary: s, Result: r, Dir: dir}
			}
			for _, dc := range demoComparisons {
				worst = max(worst, demoCompare(e, ran, dc.names, filepath.Join(*out, dc.dir), opt))
			}
			return worst
		}
	},
}

// demoComparisons are the examples the demo sets side by side, each into
// its own directory: the same potting cured in an oven and by controlled
// volumetric heating; the microwave potting at one frequency and swept over
// a band.
var demoComparisons = []struct {
	dir   string
	names []string
}{
	{"compare", []string{"thick-potting-oven", "thick-potting-microwave"}},
	{"compare-6ghz", []string{"thick-potting-6ghz", "thick-potting-6ghz-swept"}},
}

// demoCompare prints the comparison of the named examples that ran and
// writes dir/compare.csv. It returns the exit status of a write error.
func demoCompare(e *env, ran map[string]results.Compared, names []string, dir string, opt simulate.Options) int {
	var rows []results.Compared
	for _, name := range names {
		if r, ok := ran[name]; ok {
			rows = append(rows, r)
		}
	}
	if len(rows) < 2 {
		return exitOK
	}
	fmt.Fprintf(e.stdout, "\n== comparison: %s\n", strings.Join(names, " vs "))
	err := simulate.WriteComparison(e.ctx, dir, rows, opt.Report)
	cut := errors.Is(err, simulate.ErrPageNotDrawn)
	if err != nil && !cut {
		fmt.Fprintf(e.stderr, "cureslab demo: %s: %v\n", dir, err)
		return exitUsage
	}
	results.PrintComparison(e.stdout, rows)
	if len(rows) == 2 && rows[0].Name == "thick-potting-oven" {
		fmt.Fprintln(e.stdout, demoTakeaway(rows[1].Summary, rows[0].Summary))
	}
	fmt.Fprintf(e.stdout, "table in %s\n", filepath.Join(dir, results.CompareFile))
	if cut {
		fmt.Fprintf(e.stderr, "cureslab demo: interrupted while drawing the comparison page: %s is complete; %s was not drawn\n",
			filepath.Join(dir, results.CompareFile), filepath.Join(dir, report.CompareReportFile))
		return exitInterrupted
	}
	return exitOK
}

// demoTakeaway says in one sentence what volumetric heating (v) buys
// against the oven (o): the overshoot for the cure reached, and what it
// costs in time.
func demoTakeaway(v, o results.Summary) string {
	f := func(key string, s results.Summary) string { q := results.Term(key); return q.Format(q.Value(&s)) }
	return fmt.Sprintf("volumetric heating against the oven: overshoot %+.1f K against %+.1f K, least final cure %s against %s; "+
		"min_cure reached after %s against %s, program end %s against %s",
		float64(v.OvershootK), float64(o.OvershootK), f("min_final_cure", v), f("min_final_cure", o),
		f("time_to_min_cure_s", v), f("time_to_min_cure_s", o), f("end_time_s", v), f("end_time_s", o))
}
