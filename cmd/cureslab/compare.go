package main

import (
	"context"
	"errors"
	"fmt"

	"github.com/spf13/pflag"

	"cureslab/cases"
	"cureslab/cases/report"
	"cureslab/cases/results"
	"cureslab/solver"
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
numerical failure), 2 bad input or usage.`,
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
				c, err := cases.Load(path)
				if err != nil {
					fmt.Fprintln(e.stderr, err)
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
			rows, worst, err := compareRun(e, cs, *out)
			if err != nil {
				fmt.Fprintf(e.stderr, "cureslab compare: %v\n", err)
				return max(worst, exitUsage)
			}
			fmt.Fprintf(e.stdout, "Comparison of %d cases (outputs in %s)\n", len(rows), *out)
			results.PrintComparison(e.stdout, rows)
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
func compareRun(e *env, cs []*cases.Case, dir string) ([]results.Compared, int, error) {
	worst := exitOK
	run := func(ctx context.Context, c *cases.Case, sub string) results.Compared {
		s, r, code := simulateResult(e, "compare", c, sub)
		worst = max(worst, code)
		switch {
		case code == exitUsage:
			return results.Compared{Ran: true, Summary: s, Result: r, Err: errOutputs}
		case r == nil:
			// The solver refused to start (simulate reported why).
			return results.Compared{Summary: s, Err: errors.New("the run could not start")}
		}
		return results.Compared{Ran: true, Summary: s, Result: r}
	}
	rows, err := results.Compare(e.ctx, cs, dir, run)
	for _, r := range rows {
		if !r.Ran {
			worst = max(worst, exitFailure)
		}
	}
	if err == nil {
		err = compareReport(e, rows, dir)
	}
	return rows, worst, err
}

// compareReport writes dir/compare.html of the rows that ran, unless the
// report is off.
func compareReport(e *env, rows []results.Compared, dir string) error {
	if reportOff(e) {
		return nil
	}
	var names []string
	var cs []*cases.Case
	var rs []*solver.Result
	for _, r := range rows {
		if r.Result != nil {
			names, cs, rs = append(names, r.Name), append(cs, r.Case), append(rs, r.Result)
		}
	}
	if len(rs) == 0 {
		return nil
	}
	return report.WriteCompareReport(dir, names, cs, rs)
}
