package main

import (
	"fmt"
	"path/filepath"
	"strings"

	"github.com/spf13/pflag"

	"cureslab/cases"
	"cureslab/cases/report"
	"cureslab/cases/ttt"
	"cureslab/cases/units"
)

var tttCmd = &Command{
	Name:  "ttt",
	Args:  "CASE.toml --material NAME [--from T --to T --step DT] [--cure X] [-o FILE] [--plot FILE.html]",
	Short: "isothermal time-temperature-transformation table",
	Long: `For each isothermal cure temperature, the time from the case's initial cure
to gelation (gel_point), to vitrification (the glass transition Tg(alpha) of
the DiBenedetto relation reaching the cure temperature; needs a
[materials.NAME.cure.glass_transition]) and to a target cure (--cure,
default criteria.min_cure of the case, else 0.95), with the material's
diffusion factor. Prints the table and writes it as CSV with the columns
temperature_C,gel_time_s,vitrification_time_s,time_to_<cure>_s to FILE
(default ./CASE-ttt.csv); a state never reached is an empty field. With
--plot FILE.html, also a self-contained page with the TTT diagram: cure
temperature against time on a log axis, a curve for each state, the states
never reached left out.

The default temperatures run from max(Tg0, 20 C) to Tg_full + 20 K, or
around the hottest temperature of the case's programs without a glass
transition.

Exit status: 0 written, 2 bad input, 130 interrupted by Ctrl-C or SIGTERM
(the table is written only when complete, the page only when drawn whole).`,
	Example: `cureslab ttt potting.toml --material potting-resin-A
cureslab ttt potting.toml --material potting-resin-A --from 40C --to 160C --step 10K --cure 0.9 -o ttt.csv
cureslab ttt potting.toml --material potting-resin-A --plot ttt.html`,
	Setup: func(fs *pflag.FlagSet) func(*env, []string) int {
		material := fs.String("material", "", "the curing material `NAME` (required)")
		from := fs.String("from", "", "lowest cure temperature `T`, such as \"60 C\"")
		to := fs.String("to", "", "highest cure temperature `T`")
		step := fs.String("step", "", "temperature step `DT`, such as \"5 K\"")
		target := fs.Float64("cure", 0, "target degree of cure `X` in (0, 1] (default criteria.min_cure, else 0.95)")
		out := fs.StringP("out", "o", "", "write the CSV table to `FILE` (default ./CASE-ttt.csv)")
		plotFile := fs.String("plot", "", "also write a page with the TTT diagram to `FILE.html`")
		return func(e *env, args []string) int {
			if len(args) != 1 {
				return e.usageError("expects one case file, got %d arguments", len(args))
			}
			if *material == "" {
				return e.usageError("--material NAME is required")
			}
			var opt ttt.Options
			var err error
			if opt.From, err = flagTemperature("from", *from); err != nil {
				return e.usageError("%v", err)
			}
			if opt.To, err = flagTemperature("to", *to); err != nil {
				return e.usageError("%v", err)
			}
			if *step != "" {
				if opt.Step, err = units.Parse(*step, units.TemperatureDifference); err != nil {
					return e.usageError("--step: %v", err)
				}
				if !(opt.Step > 0) {
					return e.usageError("--step must be positive")
				}
			}
			if fs.Changed("cure") && !(*target > 0 && *target <= 1) {
				return e.usageError("--cure must be in (0, 1], got %g", *target)
			}
			opt.Target = *target
			path := *out
			if path == "" {
				base := filepath.Base(args[0])
				path = "./" + strings.TrimSuffix(base, filepath.Ext(base)) + "-ttt.csv"
			}
			if msg := checkOutFile(path); msg != "" {
				return e.usageError("%s", msg)
			}
			if *plotFile != "" {
				if msg := checkOutFile(*plotFile); msg != "" {
					return e.usageError("%s", msg)
				}
			}
			c, err := cases.LoadContext(e.ctx, args[0])
			if err != nil {
				return e.loadError(err)
			}
			t, err := ttt.Tabulate(e.ctx, c, *material, opt)
			if e.interrupted(err) {
				fmt.Fprintf(e.stderr, "cureslab ttt: interrupted while computing the table; nothing was written\n")
				return exitInterrupted
			}
			if err != nil {
				fmt.Fprintln(e.stderr, err)
				return exitUsage
			}
			if err := ttt.WriteFile(path, t); err != nil {
				fmt.Fprintf(e.stderr, "cureslab ttt: %v\n", err)
				return exitUsage
			}
			if err := ttt.Print(e.stdout, t); err != nil {
				fmt.Fprintf(e.stderr, "cureslab ttt: %v\n", err)
				return exitUsage
			}
			fmt.Fprintf(e.stdout, "table written to %s\n", path)
			if *plotFile != "" {
				if err := report.WriteTTTPlot(e.ctx, *plotFile, t); e.interrupted(err) {
					fmt.Fprintf(e.stderr, "cureslab ttt: interrupted while drawing %s: not written; the table in %s is complete\n", *plotFile, path)
					return exitInterrupted
				} else if err != nil {
					fmt.Fprintf(e.stderr, "cureslab ttt: %v\n", err)
					return exitUsage
				}
				fmt.Fprintf(e.stdout, "plot written to %s\n", *plotFile)
			}
			return exitOK
		}
	},
}

func init() { register(tttCmd) }
