package main

import (
	"fmt"
	"path/filepath"

	"github.com/spf13/pflag"

	"cureslab/cases"
)

var demoCmd = &Command{
	Name:  "demo",
	Args:  "[-o DIR]",
	Short: "run the embedded examples end to end",
	Long: `Run every embedded example case (see 'cureslab example') into DIR/NAME/
(default ./cureslab-demo) and print the summary of each. The examples use
invented resins: they show the tool, not any real product.

Exit status: the worst of the runs (0 ok, 1 a criterion failed, 3 runaway or
numerical failure).`,
	Example: "cureslab demo -o demo-out",
	Setup: func(fs *pflag.FlagSet) func(*env, []string) int {
		out := fs.StringP("out", "o", "./cureslab-demo", "write the outputs under `DIR`")
		return func(e *env, args []string) int {
			if len(args) != 0 {
				return e.usageError("takes no arguments, got %d", len(args))
			}
			if msg := checkOutDir(*out); msg != "" {
				return e.usageError("%s", msg)
			}
			worst := exitOK
			for i, ex := range cases.Examples() {
				if e.ctx.Err() != nil {
					fmt.Fprintf(e.stderr, "cureslab demo: interrupted; %s and the examples after it were not run\n", ex.Name)
					return max(worst, exitFailure)
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
				s, code := simulate(e, "demo", c, dir)
				worst = max(worst, code)
				if code == exitUsage {
					continue
				}
				cases.PrintSummary(e.stdout, s)
				fmt.Fprintf(e.stdout, "outputs in %s\n", dir)
			}
			return worst
		}
	},
}
