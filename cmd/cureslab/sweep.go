package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/spf13/pflag"

	"cureslab/cases"
	"cureslab/cases/report"
	"cureslab/cases/results"
	"cureslab/cases/sweep"
)

func init() {
	register(sweepCmd)
	register(mergeCmd)
}

var sweepCmd = &Command{
	Name:  "sweep",
	Args:  "CASE.toml [--vary KEY=VALUES]... [-j N] [--shard I/N] [-o DIR]",
	Short: "batch runs over varied inputs, resumable and shardable",
	Long: `Run the case many times with some of its values changed, and write one row
per run to DIR/summary.csv (default ./CASE-sweep): the run index, the varied
values as written, the summary fields of summary.json, <criterion>_pass for
each criterion, status and error.

What varies comes from [sweep] in the case or from --vary, which replaces the
case's whole [[sweep.vary]] list. A key is a path into the case:
layer.NAME.thickness, materials.NAME.cure.E1, schedules.NAME.segments.I.to
(I from 0), top.h, initial.temperature, time.end ... VALUES is a list
(4mm,8mm,12mm) or a range FROM:TO:COUNT (1C/min:5C/min:5, both ends
included; FROM:TO for latin-hypercube); values keep their units and may
omit the space. A grid runs every combination, the last key varying
fastest; --mode latin-hypercube draws --samples runs, reproducibly from
--seed. A run whose value is invalid (a negative thickness) or that runs
away gets that status and its error, and the sweep goes on.

Resume: every finished run is committed to DIR/journal.csv at once, so
running the same command again after Ctrl-C, a crash or a time limit skips
the finished runs; the final summary.csv is byte-identical to that of an
uninterrupted sweep. DIR/sweep.json records the sweep; a different sweep into
the same DIR is refused. Wall times and hosts go to DIR/sweep.log only.

Report: DIR/report.html (unless --no-report) shows, for two keys of a grid,
process-window maps of min_final_cure and peak_temperature_C with the runs
that did not pass crossed; for one key, both against it; otherwise a table
of the runs, the smallest criterion margin first. A shard's report shows
its own runs.

Clusters: --shard I/N runs the runs whose index is I mod N (I from 0), one
shard per array task, each into its own DIR; --shard slurm reads
SLURM_ARRAY_TASK_ID and SLURM_ARRAY_TASK_COUNT, --shard k8s reads
JOB_COMPLETION_INDEX with --shards N. 'cureslab merge' joins the shard
directories.

Exit status: 0 every run ok, 1 some run failed a criterion (none worse),
2 bad input or usage (nothing run), 3 some run failed or ran away,
130 interrupted by Ctrl-C or SIGTERM (finished runs kept; run the same
command again to finish; while the page was drawn after the last run, the
summary is complete and the page not written). In a job script, 0, 1 and 3
mean "done".`,
	Example: `cureslab sweep potting.toml --vary layer.potting.thickness=4mm,8mm,12mm -o sweep-out
cureslab sweep potting.toml --vary schedules.oven.segments.0.ramp=1C/min:5C/min:5 \
    --vary top.h=10W/m^2/K,20W/m^2/K -j 8
cureslab sweep potting.toml --mode latin-hypercube --samples 200 --seed 7 \
    --vary materials.potting-resin-A.cure.E1=66kJ/mol:74kJ/mol
cureslab sweep potting.toml --shard slurm -o sweep-out/shard-$SLURM_ARRAY_TASK_ID`,
	Setup: func(fs *pflag.FlagSet) func(*env, []string) int {
		vary := fs.StringArray("vary", nil, "vary `KEY=V1,V2,...` or KEY=FROM:TO:COUNT (repeat for more keys)")
		mode := fs.String("mode", "", "`MODE`: grid (every combination, the default) or latin-hypercube")
		samples := fs.Int("samples", 0, "`N` runs of a latin-hypercube sweep")
		seed := fs.Uint64("seed", 0, "seed `S` of a latin-hypercube sweep (default 1, or [sweep] seed)")
		jobs := fs.IntP("jobs", "j", 0, "`N` runs at a time (default: all cores)")
		shard := fs.String("shard", "", "run one shard: `I/N` (0-based), slurm, or k8s (with --shards)")
		shards := fs.Int("shards", 0, "`N` shards, with --shard k8s")
		keep := fs.Bool("keep-fields", false, "also write each run's output files to DIR/runs/NNNNN/")
		noReport := fs.Bool("no-report", false, "do not write DIR/report.html")
		out := fs.StringP("out", "o", "", "write the sweep to `DIR` (default ./CASE-sweep)")
		return func(e *env, args []string) int {
			if len(args) != 1 {
				return e.usageError("expects one case file, got %d arguments", len(args))
			}
			set := sweep.Settings{Mode: *mode, Samples: *samples}
			if fs.Changed("seed") {
				set.Seed, set.SeedSet = *seed, true
			}
			for _, spec := range *vary {
				v, err := sweep.ParseVary(spec)
				if err != nil {
					return e.usageError("%v", err)
				}
				set.Vary = append(set.Vary, v)
			}
			opt := sweep.Options{Jobs: *jobs, KeepFields: *keep}
			if *jobs < 0 || fs.Changed("jobs") && *jobs == 0 {
				return e.usageError("-j wants at least 1, got %d", *jobs)
			}
			var err error
			opt.Shard, opt.Shards, err = parseShard(*shard, *shards, fs.Changed("shards"), os.Getenv)
			if err != nil {
				return e.usageError("%v", err)
			}
			s, err := sweep.Load(args[0], set)
			if err != nil {
				var list cases.ErrorList
				if errors.As(err, &list) {
					fmt.Fprintln(e.stderr, err)
					return exitUsage
				}
				return e.usageError("%v", err)
			}
			dir := *out
			if dir == "" {
				base := filepath.Base(args[0])
				dir = "./" + strings.TrimSuffix(base, filepath.Ext(base)) + "-sweep"
			}
			if isTerminal(e.stderr) {
				opt.Progress = e.stderr
			}
			rep, err := s.Run(e.ctx, dir, opt)
			if err != nil {
				fmt.Fprintf(e.stderr, "cureslab sweep: %v\n", err)
				return exitUsage
			}
			shardNote := ""
			if opt.Shards > 1 {
				shardNote = fmt.Sprintf(" (shard %d/%d of %d runs)", opt.Shard, opt.Shards, s.Runs)
			}
			fmt.Fprintf(e.stdout, "%d of %d runs done%s", rep.Done, rep.Runs, shardNote)
			if rep.Resumed > 0 {
				fmt.Fprintf(e.stdout, ", %d from before", rep.Resumed)
			}
			fmt.Fprintf(e.stdout, ": %d ok, %d criteria-failed, %d runaway, %d failed\n",
				rep.OK, rep.CriteriaFailed, rep.Runaway, rep.Failed)
			if rep.Upgraded > 0 {
				fmt.Fprintf(e.stdout, "note: %s was written by an earlier version of cureslab, without the columns %s: "+
					"its %s kept, with those columns empty (no run of this case has a viscosity law or min_flow_window)\n",
					filepath.Join(dir, results.SweepJournalFile), strings.Join(results.SweepColumnsAdded, ", "),
					plural(rep.Upgraded, "run is", "runs are"))
			}
			if n := len(rep.Noted); n > 0 {
				fmt.Fprintf(e.stdout, "note: %s %s: %s (the note column of %s says so for each)\n",
					plural(n, "run", "runs"), runList(rep.Noted), rep.Note, results.SweepSummaryFile)
			}
			fmt.Fprintf(e.stdout, "summary in %s\n", filepath.Join(dir, results.SweepSummaryFile))
			pageCut := false
			if !*noReport && !rep.Interrupted {
				if err := report.WriteSweepReport(e.ctx, dir, "Sweep of "+s.Name, sweepCase(s)); e.interrupted(err) {
					pageCut = true
				} else if err != nil {
					fmt.Fprintf(e.stderr, "cureslab sweep: report: %v\n", err)
				} else {
					fmt.Fprintf(e.stdout, "report in %s\n", filepath.Join(dir, report.SweepReportFile))
				}
			}
			if rep.Repaired {
				jpath := filepath.Join(dir, results.SweepJournalFile)
				for _, d := range rep.Damaged {
					fmt.Fprintf(e.stderr, "cureslab sweep: %s: %s\n", jpath, d)
				}
				fmt.Fprintf(e.stderr, "cureslab sweep: %s: %s done again (%s); every other record was kept\n",
					jpath, plural(len(rep.Redone), "run", "runs"), runList(rep.Redone))
			}
			if rep.Interrupted {
				fmt.Fprintf(e.stderr, "cureslab sweep: interrupted after %d of %d runs; run the same command again to finish\n", rep.Done, rep.Runs)
			}
			if rep.Interrupted {
				return exitInterrupted
			}
			if pageCut {
				sweepPageNotDrawn(e, "sweep", dir)
				return exitInterrupted
			}
			return sweepExit(rep.Done < rep.Runs, rep.CriteriaFailed, rep.Runaway+rep.Failed)
		}
	},
}

// sweepPageNotDrawn says that Ctrl-C or SIGTERM stopped the drawing of a
// sweep's page after its summary was complete.
func sweepPageNotDrawn(e *env, cmd, dir string) {
	fmt.Fprintf(e.stderr, "cureslab %s: interrupted while drawing %s: %s is complete; the page was not drawn (draw it with 'cureslab report %s')\n",
		cmd, report.SweepReportFile, results.SweepSummaryFile, dir)
}

// plural writes n with the singular or the plural noun.
func plural(n int, one, many string) string {
	if n == 1 {
		return "1 " + one
	}
	return fmt.Sprintf("%d %s", n, many)
}

// runList writes run indices for a message: all of them up to eight, else
// the first six and how many more.
func runList(runs []int) string {
	var parts []string
	for i, r := range runs {
		if i == 6 && len(runs) > 8 {
			parts = append(parts, fmt.Sprintf("and %d more", len(runs)-6))
			break
		}
		parts = append(parts, strconv.Itoa(r))
	}
	return "(" + strings.Join(parts, ", ") + ")"
}

// sweepCase returns the case of the first run that is valid, for the
// report (the order of its tables by the criteria, its cautions); nil when
// no run's case is.
func sweepCase(s *sweep.Sweep) *cases.Case {
	for r := range s.Runs {
		if c, err := s.Case(r); err == nil {
			return c
		}
	}
	return nil
}

// sweepExit is the exit status of a finished sweep or a merge: 3 when it is
// incomplete or a run failed or ran away, else 1 when a run failed a
// criterion, else 0.
func sweepExit(incomplete bool, criteria, bad int) int {
	switch {
	case incomplete || bad > 0:
		return exitFailure
	case criteria > 0:
		return exitCriteria
	}
	return exitOK
}

// parseShard reads --shard (and --shards) into shard I of N: "" is the whole
// sweep (0 of 1); "I/N"; "slurm" from SLURM_ARRAY_TASK_ID minus
// SLURM_ARRAY_TASK_MIN (0 when unset) of SLURM_ARRAY_TASK_COUNT, with a step
// of 1; "k8s" from JOB_COMPLETION_INDEX of --shards N.
func parseShard(spec string, shards int, shardsSet bool, getenv func(string) string) (int, int, error) {
	envInt := func(name string, need bool) (int, bool, error) {
		v := strings.TrimSpace(getenv(name))
		if v == "" {
			if need {
				return 0, false, fmt.Errorf("--shard %s: %s is not set (is this running as an array task?)", spec, name)
			}
			return 0, false, nil
		}
		n, err := strconv.Atoi(v)
		if err != nil {
			return 0, false, fmt.Errorf("--shard %s: %s=%q is not a whole number", spec, name, v)
		}
		return n, true, nil
	}
	if shardsSet && spec != "k8s" {
		return 0, 0, fmt.Errorf("--shards goes with --shard k8s (with --shard I/N, N is the number of shards)")
	}
	var i, n int
	switch spec {
	case "":
		return 0, 1, nil
	case "slurm":
		id, _, err := envInt("SLURM_ARRAY_TASK_ID", true)
		if err != nil {
			return 0, 0, err
		}
		count, _, err := envInt("SLURM_ARRAY_TASK_COUNT", true)
		if err != nil {
			return 0, 0, err
		}
		lo, _, err := envInt("SLURM_ARRAY_TASK_MIN", false)
		if err != nil {
			return 0, 0, err
		}
		if step, ok, err := envInt("SLURM_ARRAY_TASK_STEP", false); err != nil {
			return 0, 0, err
		} else if ok && step != 1 {
			return 0, 0, fmt.Errorf("--shard slurm: the array has a step of %d; use --array=0-%d (step 1)", step, count-1)
		}
		i, n = id-lo, count
	case "k8s":
		if !shardsSet {
			return 0, 0, fmt.Errorf("--shard k8s needs --shards N (the Job's completions)")
		}
		id, _, err := envInt("JOB_COMPLETION_INDEX", true)
		if err != nil {
			return 0, 0, err
		}
		i, n = id, shards
	default:
		a, b, ok := strings.Cut(spec, "/")
		var err1, err2 error
		i, err1 = strconv.Atoi(strings.TrimSpace(a))
		n, err2 = strconv.Atoi(strings.TrimSpace(b))
		if !ok || err1 != nil || err2 != nil {
			return 0, 0, fmt.Errorf("--shard %q: want I/N such as 0/4, slurm, or k8s", spec)
		}
	}
	if n < 1 || i < 0 || i >= n {
		return 0, 0, fmt.Errorf("--shard %s: shard %d of %d is not in 0 to N-1", spec, i, n)
	}
	return i, n, nil
}

// isTerminal reports whether w is a terminal (a character device).
func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	fi, err := f.Stat()
	return err == nil && fi.Mode()&os.ModeCharDevice != 0
}

var mergeCmd = &Command{
	Name:  "merge",
	Args:  "DIR... [-o OUT]",
	Short: "merge the shard directories of one sweep into one summary",
	Long: `Join the directories written by the shards of one sweep (--shard) into OUT
(default ./merged): OUT/summary.csv is byte-identical to the one the whole
sweep run in one directory writes, and OUT is itself a sweep directory
(sweep.json, journal.csv) that 'cureslab sweep' can resume into.

The directories must hold the same sweep (same case file, keys, values, mode
and seed); otherwise nothing is written. When runs are missing (a shard that
did not finish), merge lists them and writes nothing, unless --allow-missing:
then it writes the rows it has, and running the sweep into OUT does the rest.
Per-run output files (--keep-fields) stay in the shard directories.
OUT/report.html is drawn from the merged summary; with --case FILE (the
sweep's case file, checked against sweep.json) its tables are ordered by the
margin over the case's criteria, else by status, then least cure;
--no-report leaves it out (a page of an earlier merge into OUT is removed
all the same: it shows another summary).

Exit status: 0 every run ok, 1 some run failed a criterion (none worse),
2 bad input, different sweeps, or runs missing without --allow-missing
(nothing written), 3 some run failed or ran away, or runs are missing with
--allow-missing, 130 interrupted by Ctrl-C or SIGTERM (nothing written if
it came before the merge was written; while its page was drawn, the merge
is complete and the page not written).`,
	Example: `cureslab merge sweep-out/shard-0 sweep-out/shard-1 sweep-out/shard-2 -o sweep-merged
cureslab merge sweep-out/shard-* -o sweep-merged --allow-missing`,
	Setup: func(fs *pflag.FlagSet) func(*env, []string) int {
		out := fs.StringP("out", "o", "./merged", "write the merged sweep to `OUT`")
		allow := fs.Bool("allow-missing", false, "write the rows found even when runs are missing")
		noReport := fs.Bool("no-report", false, "do not write OUT/report.html")
		casePath := fs.String("case", "", "the sweep's case `FILE`, for the report's criteria")
		return func(e *env, args []string) int {
			if len(args) == 0 {
				return e.usageError("expects at least one sweep directory")
			}
			var sc *cases.Case
			if *casePath != "" {
				// Checked before anything is written.
				c, err := sweep.CaseOf(args[0], *casePath)
				if err != nil {
					fmt.Fprintf(e.stderr, "cureslab merge: --case: %v\n", err)
					return exitUsage
				}
				sc = c
			}
			rep, err := sweep.Merge(e.ctx, *out, args, *allow)
			if e.interrupted(err) {
				fmt.Fprintf(e.stderr, "cureslab merge: interrupted while reading the shards; nothing was written\n")
				return exitInterrupted
			}
			if err != nil {
				fmt.Fprintf(e.stderr, "cureslab merge: %v\n", err)
				if errors.Is(err, sweep.ErrIncomplete) {
					fmt.Fprintf(e.stderr, "Finish the shards that own them (run the same sweep command into their directories), or pass --allow-missing.\n")
				}
				return exitUsage
			}
			fmt.Fprintf(e.stdout, "%d of %d runs merged from %d directories: %d ok, %d criteria-failed, %d runaway, %d failed\n",
				rep.Rows, rep.Runs, len(args), rep.OK, rep.CriteriaFailed, rep.Runaway, rep.Failed)
			fmt.Fprintf(e.stdout, "summary in %s\n", filepath.Join(*out, results.SweepSummaryFile))
			pageCut := false
			if !*noReport {
				if err := report.WriteSweepReport(e.ctx, *out, "", sc); e.interrupted(err) {
					pageCut = true
				} else if err != nil {
					fmt.Fprintf(e.stderr, "cureslab merge: report: %v\n", err)
				} else {
					fmt.Fprintf(e.stdout, "report in %s\n", filepath.Join(*out, report.SweepReportFile))
				}
			}
			if rep.Conflicts > 0 {
				fmt.Fprintf(e.stderr, "cureslab merge: %d runs have different rows in different directories (kept the first); did the shards run different versions?\n", rep.Conflicts)
			}
			if len(rep.Missing) > 0 {
				fmt.Fprintf(e.stderr, "cureslab merge: %d runs missing: %s\n", len(rep.Missing), sweep.FormatRuns(rep.Missing, 20))
			}
			if pageCut {
				sweepPageNotDrawn(e, "merge", *out)
				return exitInterrupted
			}
			return sweepExit(len(rep.Missing) > 0, rep.CriteriaFailed, rep.Runaway+rep.Failed)
		}
	},
}
