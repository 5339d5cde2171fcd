package main

import (
	"cureslab/cases/simulate"
	"errors"
	"fmt"
	"os"
	"path/filepath"

	"github.com/spf13/pflag"

	"cureslab/cases"
	"cureslab/cases/report"
	"cureslab/cases/results"
)

var compareCmd = &Command{
	Name:  "compare",
	Args:  "CASE.toml CASE.toml... [-o DIR]",
	Short: "run several cases and set their results side by side",
	Long: `Run several cases (say the same part in an oven and under volumetric
heating) one after the other, each into DIR/NAME/ with the same outputs as
'cureslab run' (NAME is the case file's name without .toml), then write
DIR/compare.csv with one row per case and print the cases side by side: peak
temperature and where, overshoot, through-thickness spread, least final cure
and where, time to min_cure, gel times and gel front spread, and how closely
a controlled case's sensor followed its program.

Every case is checked first: if any has errors, they are all reported and
nothing is run or written.

Exit status: the worst of the runs (0 ok, 1 a criterion failed, 3 runaway or
numerical failure), 2 bad input or usage, 130 interrupted by Ctrl-C or
SIGTERM.`,
	Example: `cureslab example thick-potting-oven > oven.toml
cureslab example thick-potting-microwave > microwave.toml
cureslab compare oven.toml microwave.toml -o compare-out`,
	Setup: func(fs *pflag.FlagSet) func(*env, []string) int {
		out := fs.StringP("out", "o", "./compare-out", "write the outputs under `DIR`")
		return func(e *env, args []string) int {
			if len(args) < 2 {
				return e.usageError("expects at least two case files, got %d", len(args))
			}
			var cs []*cases.Case
			bad := false
			for _, path := range args {
				c, err := cases.LoadContext(e.ctx, path)
				if err != nil {
					if e.loadError(err) == exitInterrupted {
						return exitInterrupted
					}
					bad = true
					continue
				}
				cs = append(cs, c)
			}
			if bad {
				fmt.Fprintf(e.stderr, "cureslab compare: nothing was run\n")
				return exitUsage
			}
			if msg := checkOutDir(*out); msg != "" {
				return e.usageError("%s", msg)
			}
			_, statErr := os.Stat(*out)
			existed := statErr == nil
			rows, worst, err := compareRun(e, cs, *out)
			if errors.Is(err, simulate.ErrNoneFinished) {
				if existed {
					fmt.Fprintf(e.stderr, "cureslab compare: interrupted before any case had finished: nothing was written, and %s holds what it held before (an earlier comparison there is left as it was)\n", *out)
				} else {
					fmt.Fprintf(e.stderr, "cureslab compare: interrupted before any case had finished: nothing was written (%s was not created)\n", *out)
				}
				return exitInterrupted
			}
			pageCut := errors.Is(err, simulate.ErrPageNotDrawn)
			if err != nil && !pageCut {
				fmt.Fprintf(e.stderr, "cureslab compare: %v\n", err)
				return max(worst, exitUsage)
			}
			fmt.Fprintf(e.stdout, "Comparison of %d cases (outputs in %s)\n", len(rows), *out)
			results.PrintComparison(e.stdout, rows)
			if pageCut {
				if worst != exitInterrupted { // else said with the runs
					fmt.Fprintf(e.stderr, "cureslab compare: interrupted while drawing the comparison page: every case had finished, and %s and the cases' folders are complete; %s was not drawn\n",
						filepath.Join(*out, results.CompareFile), filepath.Join(*out, report.CompareReportFile))
				}
				return exitInterrupted
			}
			return worst
		}
	},
}

func init() { register(compareCmd) }

// errOutputs stands for a failure to write a run's outputs, which simulate
// has already reported.
var errOutputs = errors.New("its outputs could not be written")

// compareRun runs cs into dir through simulate (the path of 'cureslab run')
// and writes compare.csv. It returns the comparison and the worst exit
// status of the runs.
// compareRun runs the cases into dir (simulate.Compare, with the
// comparison page) and returns the rows and the worst exit status. Each
// failed case is reported on stderr; its row then says only that it could
// not start or that its outputs could not be written.
func compareRun(e *env, cs []*cases.Case, dir string) ([]results.Compared, int, error) {
	rows, err := simulate.Compare(e.ctx, cs, dir, simulate.Options{Report: true})
	worst := exitOK
	for i := range rows {
		r := &rows[i]
		switch {
		case errors.Is(r.Err, simulate.ErrNotRun):
			worst = max(worst, exitInterrupted)
		case !r.Ran:
			fmt.Fprintf(e.stderr, "cureslab compare: %s: %v\n", r.Case.File, r.Err)
			r.Err = errors.New("the run could not start")
			worst = max(worst, exitFailure)
		case r.Err != nil:
			fmt.Fprintf(e.stderr, "cureslab compare: %v\n", r.Err)
			r.Err = errOutputs
			worst = max(worst, exitUsage)
		default:
			worst = max(worst, exitCode(r.Summary.Status))
			if r.ReportNotDrawn {
				worst = max(worst, exitInterrupted)
			}
			if exitCode(r.Summary.Status) == exitFailure {
				fmt.Fprintf(e.stderr, "cureslab compare: %s: %s: %s\n", r.Case.File, r.Summary.Status, r.Summary.Message)
			}
		}
	}
	if worst == exitInterrupted && !errors.Is(err, simulate.ErrNoneFinished) {
		fmt.Fprintf(e.stderr, "cureslab compare: interrupted: the cases that had finished keep their outputs and pages; the case cut short keeps its outputs up to then, marked interrupted (criteria not judged), without a page; the cases after it were not run (status not-run in %s); no comparison page was drawn\n", results.CompareFile)
	}
	return rows, worst, err
}
