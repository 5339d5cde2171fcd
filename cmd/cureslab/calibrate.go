package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"path/filepath"
	"strings"

	"github.com/spf13/pflag"

	"cureslab/cases"
	"cureslab/cases/calibrate"
	"cureslab/cases/limits"
	"cureslab/cases/outdir"
	"cureslab/cases/report"
	"cureslab/physics/lsq"
)

func init() { register(calibrateCmd) }

var calibrateCmd = &Command{
	Name:  "calibrate",
	Args:  "CASE.toml --measured LOG.csv --free KEY[=LO:HI]... [-j N] [--max-iter N] [-o DIR]",
	Short: "fit uncertain inputs of a case to thermocouple readings of a trial",
	Long: `Fit the free values of the case (keys as in sweeps: top.h, bottom.h,
layer.NAME.contact_resistance, materials.NAME.conductivity,
materials.NAME.cure.total_heat, materials.NAME.cure.A1, ...) so that the
simulated temperatures match the thermocouple readings of LOG.csv at their
depths and times, by nonlinear least squares (Levenberg-Marquardt from the
case's own values). --free KEY=LO:HI bounds a value (units as in the case;
either end may be left out).

LOG.csv has the shape of a run's probes.csv: a time_s column and one
T_<depth>mm_C column per thermocouple, such as T_6mm_C; other columns are
ignored, an empty cell is a missing reading, lines starting with # are
comments. Every reading counts alike. Film coefficients, contact resistances
and rate constants are fitted on a logarithmic scale.

Writes DIR/calibrated.toml (the case with the fitted values written in),
DIR/calibration.csv (key, start, value, standard error, 95 % interval, unit),
DIR/residuals.csv (measured, simulated and residual per depth and time) and
DIR/report.html (measured against fitted traces, residuals, correlations),
and prints the fitted values and the RMS residual per depth. It warns when
two values correlate beyond |r| = 0.95 or a 95 % interval is wider than the
value: the log cannot tell them apart.

Exit status: 0 fitted; 2 bad input (nothing written); 3 the fit did not
converge (the best point's outputs are written and marked); 130 interrupted
(the best point so far is written and marked, without report.html). A
directory holding another kind of output is refused (exit 2) before the fit.`,
	Example: `cureslab example thick-potting-oven > potting.toml
cureslab example thick-potting-oven-trial.csv > trial.csv
cureslab calibrate potting.toml --measured trial.csv --free top.h --free bottom.h \
    --free materials.potting-resin-A.cure.total_heat
cureslab calibrate potting.toml --measured trial.csv --free top.h=5W/m^2/K:40W/m^2/K -o fit`,
	Setup: func(fs *pflag.FlagSet) func(*env, []string) int {
		measured := fs.String("measured", "", "read the thermocouples from `LOG.csv` (shape of probes.csv)")
		free := fs.StringArray("free", nil, "fit `KEY[=LO:HI]`, within LO and HI if given (repeat)")
		jobs := fs.IntP("jobs", "j", 0, "`N` runs at a time (default: all cores)")
		maxIter := fs.Int("max-iter", 100, "stop after `N` iterations (exit 3 if not converged by then)")
		out := fs.StringP("out", "o", "", "write the outputs to `DIR` (default ./CASE-calibrated)")
		return func(e *env, args []string) int {
			if len(args) != 1 {
				return e.usageError("expects one case file, got %d arguments", len(args))
			}
			if *measured == "" {
				return e.usageError("give the thermocouple log: --measured LOG.csv")
			}
			if len(*free) == 0 {
				return e.usageError("give at least one value to fit: --free KEY, such as --free top.h")
			}
			if *jobs < 0 || fs.Changed("jobs") && *jobs == 0 {
				return e.usageError("-j wants at least 1, got %d", *jobs)
			}
			if *maxIter < 1 {
				return e.usageError("--max-iter wants at least 1, got %d", *maxIter)
			}
			var frees []calibrate.Free
			for _, spec := range *free {
				f, err := calibrate.ParseFree(spec)
				if err != nil {
					return e.usageError("%v", err)
				}
				frees = append(frees, f)
			}
			dir := *out
			if dir == "" {
				dir = besideCase(args[0], "-calibrated")
			}
			if msg := checkOutDir(dir); msg != "" {
				return e.usageError("%s", msg)
			}
			// A directory of another kind is refused before the fit, which
			// takes many runs, not after it.
			if err := outdir.Check(dir, calibrate.Kind); err != nil {
				fmt.Fprintf(e.stderr, "cureslab calibrate: %v\n", err)
				return exitUsage
			}
			data, err := limits.ReadFile(e.ctx, args[0], limits.MaxFileSize)
			if e.interrupted(err) {
				return e.loadError(err)
			} else if err != nil {
				fmt.Fprintf(e.stderr, "cureslab calibrate: cannot read the case file: %v\n", err)
				return exitUsage
			}
			logData, err := limits.ReadFile(e.ctx, *measured, limits.MaxFileSize)
			if e.interrupted(err) {
				return e.loadError(err)
			} else if err != nil {
				fmt.Fprintf(e.stderr, "cureslab calibrate: cannot read the log: %v\n", err)
				return exitUsage
			}
			l, err := calibrate.ReadLog(*measured, logData)
			if err != nil {
				fmt.Fprintln(e.stderr, err)
				return exitUsage
			}
			opt := calibrate.Options{Jobs: *jobs, MaxIter: *maxIter}
			if isTerminal(e.stderr) {
				opt.Progress = func(iter int, rms float64, runs int) {
					fmt.Fprintf(e.stderr, "\riteration %d: RMS residual %.3f K (%d runs)  ", iter, rms, runs)
				}
			}
			res, err := calibrate.Calibrate(e.ctx, args[0], data, filepath.Dir(args[0]), l, frees, opt)
			if opt.Progress != nil {
				fmt.Fprint(e.stderr, "\r\033[K")
			}
			if err != nil {
				var list cases.ErrorList
				switch {
				case errors.As(err, &list):
					fmt.Fprintln(e.stderr, err)
					return exitUsage
				case errors.Is(err, calibrate.ErrFree):
					return e.usageError("%v", err)
				case e.ctx.Err() != nil:
					fmt.Fprintln(e.stderr, "cureslab calibrate: interrupted before the first run finished; nothing written")
					return exitInterrupted
				}
				fmt.Fprintf(e.stderr, "cureslab calibrate: %v\n", err)
				return exitUsage
			}
			drawn, err := writeCalibration(e.ctx, dir, res)
			if err != nil {
				fmt.Fprintf(e.stderr, "cureslab calibrate: %v\n", err)
				return exitUsage
			}
			calibrate.Print(e.stdout, res)
			files := []string{calibrate.CalibratedFile, calibrate.CalibrationFile, calibrate.ResidualsFile}
			if drawn {
				files = append(files, calibrate.ReportFile)
			}
			fmt.Fprintf(e.stdout, "\noutputs in %s: %s\n", dir, strings.Join(files, ", "))
			switch {
			case res.Status == lsq.Interrupted:
				fmt.Fprintf(e.stderr, "cureslab calibrate: interrupted; the outputs hold the best point so far, marked as such; %s was not drawn\n", calibrate.ReportFile)
				return exitInterrupted
			case !drawn:
				fmt.Fprintf(e.stderr, "cureslab calibrate: interrupted while drawing %s: the fit had ended and the other outputs are complete; the page was not drawn\n", calibrate.ReportFile)
				return exitInterrupted
			case res.Status == lsq.IterationLimit:
				fmt.Fprintln(e.stderr, "cureslab calibrate: the fit did not converge; the outputs hold the best point reached, marked as such")
				return exitFailure
			}
			return exitOK
		}
	},
}

// writeCalibration writes the outputs of a calibration into dir as one set
// (package outdir): all of them in place together, or the previous set left
// as it was. The page is drawn unless ctx is done (Ctrl-C or SIGTERM, during
// the fit or while drawing): then the other files go in place without it
// (an older page is removed with the previous set) and drawn is false.
func writeCalibration(ctx context.Context, dir string, r *calibrate.Result) (drawn bool, err error) {
	set, err := outdir.Open(dir, calibrate.Kind)
	if err != nil {
		return false, err
	}
	defer set.Abort() // after Commit it does nothing
	if err := calibrate.StageFiles(set, r); err != nil {
		return false, err
	}
	err = set.Stage(calibrate.ReportFile, func(w io.Writer) error { return report.CalibrationReport(ctx, w, r) })
	drawn = err == nil
	if err != nil && !(ctx.Err() != nil && errors.Is(err, ctx.Err())) {
		return false, err
	}
	return drawn, set.Commit()
}
