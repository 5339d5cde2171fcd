package main

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/pflag"

	"cureslab/cases"
	"cureslab/cases/report"
	"cureslab/cases/results"
	"cureslab/cases/sweep"
)

var reportCmd = &Command{
	Name:  "report",
	Args:  "DIR",
	Short: "(re)draw the HTML report from the output files of a run, a sweep or a comparison",
	Long: `Read fields.csv, probes.csv and summary.json in DIR, the output directory
of 'cureslab run', and write DIR/report.html from them: the page that run
writes at the end (depth–time maps of temperature and cure, profiles, probe
histories, the summary and the criteria, the cautions). No case file is
needed. Use it after a run with --no-report, or to redraw the report of an
older run.

A sweep directory (one with sweep.json, from 'cureslab sweep' or 'cureslab
merge') gets its sweep page redrawn from summary.csv and sweep.json. With
--case FILE (the sweep's case file, checked against sweep.json) its tables
are ordered by the margin over the case's criteria, else by status, then
least cure.

A comparison's directory (one with compare.csv, from 'cureslab compare', or
a comparison folder of 'cureslab demo') gets its comparison page redrawn
from compare.csv and the files of its cases' folders (for a demo's, the
folders beside it); a case listed as not run is listed so on the page.

Exit status: 0 the report was written, 2 DIR does not hold the outputs of a
run, a sweep or a comparison, or one of them is malformed (the message gives the file and
line; nothing is written), 130 interrupted by Ctrl-C or SIGTERM (nothing
written).`,
	Example: "cureslab report potting-out\ncureslab report sweep-merged --case potting.toml",
	Setup: func(fs *pflag.FlagSet) func(*env, []string) int {
		casePath := fs.String("case", "", "for a sweep directory: the sweep's case `FILE`, for the criteria")
		return func(e *env, args []string) int {
			if len(args) != 1 {
				return e.usageError("expects one output directory, got %d arguments", len(args))
			}
			dir := args[0]
			if fi, err := os.Stat(dir); err != nil || !fi.IsDir() {
				return e.usageError("%s is not a directory (give the output directory of 'cureslab run')", dir)
			}
			if _, err := os.Stat(filepath.Join(dir, results.SweepDefinitionFile)); err == nil {
				var sc *cases.Case
				if *casePath != "" {
					c, err := sweep.CaseOf(dir, *casePath)
					if err != nil {
						fmt.Fprintf(e.stderr, "cureslab report: --case: %v\n", err)
						return exitUsage
					}
					sc = c
				}
				return redrawn(e, dir, report.SweepReportFile, "", report.WriteSweepReport(e.ctx, dir, "", sc))
			}
			if *casePath != "" {
				return e.usageError("--case is for sweep directories; %s holds no %s", dir, results.SweepDefinitionFile)
			}
			if report.IsComparison(dir) {
				return redrawn(e, dir, report.CompareReportFile, " (the comparison page)", report.RedrawCompareReport(e.ctx, dir))
			}
			if subs := outputFolders(dir); len(subs) > 0 {
				return e.usageError("%s holds no run of its own, only the output folders %s: give one of them, e.g. cureslab report %s",
					dir, strings.Join(subs, ", "), filepath.Join(dir, subs[0]))
			}
			return redrawn(e, dir, report.ReportFile, "", report.RedrawReport(e.ctx, dir))
		}
	},
}

func init() { register(reportCmd) }

// redrawn reports the outcome err of redrawing dir/page: the page written
// (what it is, in what), interrupted, or an error; it returns the exit
// status.
func redrawn(e *env, dir, page, what string, err error) int {
	switch {
	case e.interrupted(err):
		return redrawInterrupted(e, dir, page)
	case err != nil:
		fmt.Fprintf(e.stderr, "cureslab report: %v\n", err)
		return exitUsage
	}
	fmt.Fprintf(e.stdout, "wrote %s%s\n", filepath.Join(dir, page), what)
	return exitOK
}

// redrawInterrupted says that Ctrl-C or SIGTERM stopped the drawing of
// dir/page, and returns exitInterrupted.
func redrawInterrupted(e *env, dir, page string) int {
	fmt.Fprintf(e.stderr, "cureslab report: interrupted while drawing %s: nothing was written (a page drawn before, if any, is left as it was)\n",
		filepath.Join(dir, page))
	return exitInterrupted
}

// outputFolders lists, in name order, the folders in dir that hold a run's
// or a comparison's outputs (summary.json or compare.csv) when dir itself
// holds no summary.json; nil otherwise.
func outputFolders(dir string) []string {
	if _, err := os.Stat(filepath.Join(dir, results.SummaryFile)); err == nil {
		return nil
	}
	ents, err := os.ReadDir(dir)
	if err != nil {
		return nil
	}
	var out []string
	for _, en := range ents {
		if !en.IsDir() {
			continue
		}
		for _, f := range []string{results.SummaryFile, results.CompareFile} {
			if _, err := os.Stat(filepath.Join(dir, en.Name(), f)); err == nil {
				out = append(out, en.Name())
				break
			}
		}
	}
	return out
}
