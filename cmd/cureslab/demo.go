package main

import (
	"cureslab/cases/outdir"
	"cureslab/cases/report"
	"cureslab/cases/simulate"
	"errors"
	"fmt"
	"os"
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
written or DIR holds another kind of output, 3 an example ran away or failed numerically, 130 interrupted by
Ctrl-C or SIGTERM (the example running keeps its outputs up to that moment,
marked interrupted; the ones after it are not run and no comparison is
made).

DIR holds one demo: its folders are written under staging names and put in
place together at the end, and the folders of an earlier demo into DIR are
removed then, so that DIR never mixes two demos. An interrupted demo goes in
place too, once at least one example has run to its end; interrupted before
that, it writes nothing and leaves DIR as it was (an earlier demo whole).`,
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
			if e.ctx.Err() != nil {
				fmt.Fprintf(e.stderr, "cureslab demo: interrupted before the first example: nothing was run or written\n")
				return exitInterrupted
			}
			// The demo's directory is one output set: this demo's
			// folders go in place together at the end, and those of an
			// earlier demo are removed then, whether this one ran to its
			// end or was interrupted after an example had finished.
			_, statErr := os.Lstat(*out)
			set, err := outdir.Open(*out, demoKind)
			if err != nil {
				fmt.Fprintf(e.stderr, "cureslab demo: %v\n", err)
				return exitUsage
			}
			defer set.Abort() // after Commit it does nothing
			opt := simulate.Options{Report: !*noReport}
			worst := exitOK
			ran := map[string]results.Compared{}
			stopped := ""     // what an interruption left undone
			finished := false // an example ran to its end (whatever its status)
			for i, ex := range cases.Examples() {
				if e.ctx.Err() != nil {
					stopped = ex.Name + " and the examples after it were not run"
					break
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
				at, err := set.StageDir(ex.Name)
				if err != nil {
					fmt.Fprintf(e.stderr, "cureslab demo: %v; nothing was written, the earlier outputs in %s are left as they were\n", err, *out)
					return exitUsage
				}
				dir := filepath.Join(*out, ex.Name)
				o := simulate.Case(e.ctx, c, at, opt)
				if o.Ran && o.Err == nil && o.Summary.Status != results.StatusInterrupted {
					finished = true
				} else if e.ctx.Err() != nil && !finished {
					break // nothing to keep: see below
				}
				code := runOutcome(e, "demo", c, dir, o)
				s, r := o.Summary, o.Result
				worst = max(worst, code)
				if !o.Ran || o.Err != nil {
					set.Unstage(ex.Name) // no outputs of its own: no folder
				}
				if code == exitUsage {
					continue
				}
				results.PrintSummary(e.stdout, s)
				fmt.Fprintf(e.stdout, "outputs in %s\n", dir)
				if code == exitInterrupted {
					stopped = "the examples after " + ex.Name + " were not run"
					break
				}
				ran[ex.Name] = results.Compared{Name: ex.Name, Case: c, Ran: o.Ran, Summary: s, Result: r, Dir: at}
			}
			if e.ctx.Err() != nil && !finished {
				// Like an interrupted comparison: an earlier demo
				// stays whole rather than giving way to one example
				// cut short.
				set.Abort()
				where := *out + " holds what it held before"
				if statErr != nil && os.Remove(*out) == nil {
					where = *out + " was not created"
				}
				fmt.Fprintf(e.stderr, "cureslab demo: interrupted before the first example finished: nothing was written; %s\n", where)
				return exitInterrupted
			}
			if stopped == "" {
				for i, dc := range demoComparisons {
					if e.ctx.Err() != nil {
						stopped = "the comparisons from " + demoComparisons[i].dir + " on were not made"
						break
					}
					code := demoCompare(e, set, ran, dc.names, *out, dc.dir, opt)
					worst = max(worst, code)
					if code == exitInterrupted {
						stopped = "the comparisons after " + dc.dir + " were not made"
						break
					}
				}
			} else {
				stopped += "; no comparison was made"
			}
			if err := set.Commit(); err != nil {
				fmt.Fprintf(e.stderr, "cureslab demo: %s: %v; the earlier outputs there are left as they were\n", *out, err)
				return exitUsage
			}
			if stopped != "" {
				fmt.Fprintf(e.stderr, "cureslab demo: interrupted: %s. %s holds only what this demo computed, the examples listed above (what an earlier demo wrote there was removed)\n", stopped, *out)
				return exitInterrupted
			}
			return worst
		}
	},
}

// demoKind is the demo's output directory (package outdir): one folder per
// example and one per comparison, written as one set, so that the
// directory never mixes two demos.
var demoKind = outdir.Register(outdir.Kind{Name: "demo", Names: demoNames()})

// demoNames returns every folder the demo writes.
func demoNames() []string {
	names := cases.ExampleNames()
	for _, dc := range demoComparisons {
		names = append(names, dc.dir)
	}
	return names
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

// demoCompare prints the comparison of the named examples that ran (their
// files in the staged folders of set, Dir) and stages out/sub/compare.csv
// and the comparison page into set. It returns the exit status of a write
// error, or exitInterrupted when the page was not drawn.
func demoCompare(e *env, set *outdir.Set, ran map[string]results.Compared, names []string, out, sub string, opt simulate.Options) int {
	var rows []results.Compared
	for _, name := range names {
		if r, ok := ran[name]; ok {
			rows = append(rows, r)
		}
	}
	if len(rows) < 2 {
		return exitOK
	}
	dir := filepath.Join(out, sub)
	fmt.Fprintf(e.stdout, "\n== comparison: %s\n", strings.Join(names, " vs "))
	at, err := set.StageDir(sub)
	if err == nil {
		// The examples' folders are beside the comparison's: its page
		// names their pages from its own folder.
		cases, _ := filepath.Rel(dir, out)
		err = simulate.WriteComparison(e.ctx, at, rows, opt.Report, cases)
	}
	cut := errors.Is(err, simulate.ErrPageNotDrawn)
	if err != nil && !cut {
		set.Unstage(sub)
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
