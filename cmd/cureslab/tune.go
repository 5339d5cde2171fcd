package main

import (
	"cureslab/cases/limits"
	"errors"
	"fmt"
	"path/filepath"
	"strings"

	"github.com/spf13/pflag"

	"cureslab/cases"
	"cureslab/cases/tune"
	"cureslab/cases/uncertain"
)

func init() { register(tuneCmd) }

var tuneCmd = &Command{
	Name:  "tune",
	Args:  "CASE.toml --program NAME [--free KEY=LO:HI]... [--robust N] [--seed S] [-j N] [-o DIR]",
	Short: "the shortest program that meets the criteria, optionally robust to declared uncertainties",
	Long: `Search the values of the temperature program [schedules.NAME] for the
shortest program (the program's end) that meets every [criteria] limit of the
case: min_cure, max_temperature, max_spread. By default every ramp rate, hold
time and hold temperature (the to of a ramp followed by a hold) is free within
±50 % (a hold temperature within ±50 % of the change its ramp makes); --free
KEY=LO:HI, repeated, makes only the given values free, with those ranges
(keys as in sweeps, inside the program: schedules.NAME.segments.I.hold, ...).
time.end follows the program unless the case sets it; then the time from the
program's end to time.end is kept.

Method: Latin-hypercube starting points, Nelder-Mead on the cycle time plus a
smooth penalty on the criterion margins from the best few, then each free
value is bisected toward a shorter cycle as long as the criteria hold. The
same --seed gives the same answer, whatever -j.

--robust N runs every candidate over N Latin-hypercube samples of the case's
[uncertainty] (the same samples for every candidate) and requires the
criteria in its share of them (share, default 0.95).

Writes DIR/tuned.toml (the [schedules.NAME] block ready to paste) and
DIR/tune.csv (every candidate evaluated: free values, cycle time, each
criterion's value and margin, feasible), and prints the cycle time, the margins,
the limiting criterion and the saving against the case's own program.

Exit status: 0 a program meeting the criteria was found, 1 none in the ranges
meets them (tune.csv is written), 2 bad input or usage, 130 interrupted by
Ctrl-C or SIGTERM (the best program so far in tuned.toml, marked INTERRUPTED).`,
	Example: `cureslab example thick-potting-oven > potting.toml
cureslab tune potting.toml --program oven -o potting-tune
cureslab tune potting.toml --program oven --free schedules.oven.segments.1.hold=1h:6h
cureslab tune potting.toml --program oven --robust 20 --seed 7`,
	Setup: func(fs *pflag.FlagSet) func(*env, []string) int {
		program := fs.String("program", "", "tune the schedule `NAME`")
		free := fs.StringArray("free", nil, "free value `KEY=LO:HI` (repeat; default: every rate, hold and hold temperature ±50 %)")
		robust := fs.Int("robust", 0, "require the criteria over `N` samples of [uncertainty]")
		seed := fs.Uint64("seed", 1, "seed `S` of the starting points and the samples")
		jobs := fs.IntP("jobs", "j", 0, "`N` runs at a time (default: all cores)")
		out := fs.StringP("out", "o", "", "write tuned.toml and tune.csv to `DIR` (default ./CASE-tune)")
		return func(e *env, args []string) int {
			if len(args) != 1 {
				return e.usageError("expects one case file, got %d arguments", len(args))
			}
			if *program == "" {
				return e.usageError("give the program to tune: --program NAME")
			}
			if *jobs < 0 || fs.Changed("jobs") && *jobs == 0 {
				return e.usageError("-j wants at least 1, got %d", *jobs)
			}
			if *robust < 0 || fs.Changed("robust") && *robust == 0 {
				return e.usageError("--robust wants at least 1 sample, got %d", *robust)
			}
			if *seed == 0 {
				return e.usageError("--seed wants a number of at least 1")
			}
			opt := tune.Options{Program: *program, Robust: *robust, Seed: *seed, Jobs: *jobs}
			for _, spec := range *free {
				f, err := tune.ParseFree(spec)
				if err != nil {
					return e.usageError("%v", err)
				}
				opt.Free = append(opt.Free, f)
			}
			dir := *out
			if dir == "" {
				base := filepath.Base(args[0])
				dir = "./" + strings.TrimSuffix(base, filepath.Ext(base)) + "-tune"
			}
			if msg := checkOutDir(dir); msg != "" {
				return e.usageError("%s", msg)
			}
			data, err := limits.ReadFile(e.ctx, args[0], limits.MaxFileSize)
			if err != nil {
				fmt.Fprintf(e.stderr, "cureslab tune: cannot read the case file: %v\n", err)
				return exitUsage
			}
			if isTerminal(e.stderr) {
				opt.Progress = e.stderr
			}
			res, err := tune.Tune(e.ctx, args[0], data, filepath.Dir(args[0]), opt)
			if res == nil {
				var list cases.ErrorList
				switch {
				case errors.As(err, &list):
					fmt.Fprintln(e.stderr, err)
					return exitUsage
				case errors.Is(err, tune.ErrTune), errors.Is(err, uncertain.ErrNoUncertainty):
					return e.usageError("%v", err)
				}
				fmt.Fprintf(e.stderr, "cureslab tune: %v\n", err)
				return exitFailure
			}
			res.Interrupted = err != nil
			if werr := tune.Write(dir, res); werr != nil {
				fmt.Fprintf(e.stderr, "cureslab tune: %v\n", werr)
				return exitUsage
			}
			if err != nil { // interrupted
				if res.Best != nil {
					fmt.Fprintf(e.stdout, "interrupted after %d candidates: the best program so far is in %s, marked INTERRUPTED (not the answer); candidates in %s\n",
						len(res.Candidates), filepath.Join(dir, tune.TunedFile), filepath.Join(dir, tune.TuneFile))
				} else {
					fmt.Fprintf(e.stdout, "interrupted after %d candidates, none meeting the criteria yet; candidates in %s\n",
						len(res.Candidates), filepath.Join(dir, tune.TuneFile))
				}
				fmt.Fprintf(e.stderr, "cureslab tune: interrupted\n")
				return exitInterrupted
			}
			tune.Print(e.stdout, res)
			if res.Best == nil {
				fmt.Fprintf(e.stdout, "candidates in %s\n", filepath.Join(dir, tune.TuneFile))
				return exitCriteria
			}
			fmt.Fprintf(e.stdout, "program in %s, candidates in %s\n", filepath.Join(dir, tune.TunedFile), filepath.Join(dir, tune.TuneFile))
			return exitOK
		}
	},
}
