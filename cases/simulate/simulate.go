// Package simulate is the one path of a simulation from a validated case to its
// output files: solve (solver.RunStream), handing each snapshot as it comes
// to the rows of fields.csv and probes.csv in the run's output set and to
// the report's collector (results.StreamRun, report.Collector) → summarise
// once at the end → summary.json → report.html, drawn from the bounded set
// of output times the collector kept. The commands run, demo and compare go
// through it; sweeps, tuning and uncertainty runs use the same steps without
// the report.
package simulate

import (
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"

	"cureslab/cases"
	"cureslab/cases/outdir"
	"cureslab/cases/report"
	"cureslab/cases/results"
	"cureslab/solver"
)

// ErrNotRun is the error of a case that Compare did not start because the
// context was cancelled before its turn.
var ErrNotRun = errors.New("not run: interrupted before its turn")

// Options say what a run writes besides fields.csv, probes.csv and
// summary.json. The zero value writes no report.
type Options struct {
	// Report also writes report.html into the run's directory (and, for
	// Compare, the comparison page).
	Report bool
	// Verify runs the case a second time at tolerances
	// solver.VerifyFactor times tighter (solver.Tightened) and records the
	// difference as the summary's estimated_error (results.EstimatedError).
	// Only for a run that ended normally; the mesh is not refined.
	Verify bool
	// Set, when not nil, is the run's output set, opened by the caller,
	// who adds files to it and commits it; Case then only stages into it.
	// When nil, Case opens dir as a run's set (refusing a directory of
	// another kind before it computes anything) and commits it.
	Set *outdir.Set
}

// Case runs c until it ends or ctx is cancelled and writes its outputs into
// dir (created if missing). The outcome has Ran false and Err set when the
// solver refused to start; Ran true and Err set when an output could not be
// written. A run that ends early (runaway, failure, cancellation) still ran:
// its outputs are written and its summary says why it stopped.
//
// Preconditions: c validated (cases.Load or cases.Parse). Cost: one solve
// (two with opt.Verify, the second some √10 times as many steps for a
// second-order scheme), one summary, the writes (and the report, about
// 0.05 s on the examples).
func Case(ctx context.Context, c *cases.Case, dir string, opt Options) results.Compared {
	set := opt.Set
	if set == nil {
		var err error
		if set, err = outdir.Open(dir, results.RunKind); err != nil {
			return results.Compared{Case: c, Summary: results.Summary{Title: c.Title, Status: results.StatusFailed}, Err: err}
		}
	}
	finish := func(out results.Compared) results.Compared {
		switch {
		case opt.Set != nil:
		case out.Err != nil:
			set.Abort()
		default:
			out.Err = set.Commit()
		}
		return out
	}
	// The snapshots go to the files (and the report's collector) as they
	// come.
	var also solver.Sink
	var col *report.Collector
	if opt.Report {
		col = report.NewCollector(c)
		also = col.Add
	}
	run := func(sink solver.Sink) (*solver.Result, error) { return solver.RunStream(ctx, c.Problem, sink) }
	r, sum, err := results.StreamRun(set, c, run, also)
	if r == nil {
		return finish(results.Compared{Case: c, Summary: results.Summary{Title: c.Title, Status: results.StatusFailed}, Err: err})
	}
	out := results.Compared{Case: c, Ran: true, Summary: sum, Result: r, Dir: dir, Err: err}
	if err != nil {
		return finish(out)
	}
	if opt.Verify && r.Status == solver.OK {
		out.Summary.EstimatedError = verify(ctx, c, r)
	}
	if err := results.StageSummary(set, out.Summary); err != nil {
		out.Err = err
		return finish(out)
	}
	if col != nil {
		out.Err = col.Stage(ctx, set, out.Summary)
		if ctx.Err() != nil && errors.Is(out.Err, ctx.Err()) {
			// Interrupted (during the run, or while drawing): the run's
			// files go in place without the page.
			out.Err, out.ReportNotDrawn = nil, true
		}
	}
	return finish(out)
}

// verify returns the estimated error of run r of c from a second run at
// tighter tolerances (summary only: no per-cell fields are kept).
func verify(ctx context.Context, c *cases.Case, r *solver.Result) *results.EstimatedError {
	q := solver.Tightened(c.Problem)
	q.NoFields = true
	t, err := solver.Run(ctx, q)
	if err == nil && t.Status == solver.OK {
		return results.NewEstimatedError(c, r.Summary, t.Summary)
	}
	why := "it could not start"
	switch {
	case err != nil:
		why += ": " + err.Error()
	case t.Err != nil:
		why = fmt.Sprintf("it ended %s: %v", t.Status, t.Err)
	}
	return results.NoEstimate(c, why)
}

// ErrNoneFinished is the error of Compare when ctx was cancelled before
// any case had run to its end: nothing was written, and dir holds what it
// held before (an earlier comparison as it was, or nothing).
var ErrNoneFinished = errors.New("interrupted before any case had finished: nothing was written")

// Compare runs every case of cs with Case, one after the other, into
// dir/NAME/ (results.CompareNames), writes dir/compare.csv and, with
// opt.Report, the comparison page of the cases that ran; it returns one row
// per case in the order of cs.
//
// The cases must be validated beforehand: Compare is the first thing that
// touches dir, which it creates if needed. A case that fails to run does
// not stop the others. The error is about dir, compare.csv or the
// comparison page only.
//
// dir holds one comparison (package outdir, CompareKind): each case runs
// into a staged folder of the comparison's set, and the folders go in
// place with compare.csv and the page at the end. The case folders of an
// earlier comparison into dir that this one does not write again (other
// cases, or a case that did not run this time) are removed then, so a
// folder never describes a case that compare.csv does not list as run.
//
// When ctx is cancelled, the cases not yet started are not run and are
// recorded with the status results.StatusNotRun; the page is not drawn.
// If at least one case had run to its end (whatever its status), the set
// goes in place without the page (the error wraps ErrPageNotDrawn);
// otherwise nothing is written, dir is left as it was, and the error is
// ErrNoneFinished.
//
// Cost: the sum of the runs.
func Compare(ctx context.Context, cs []*cases.Case, dir string, opt Options) ([]results.Compared, error) {
	names := results.CompareNames(cs)
	kind := results.CompareKind
	kind.Names = append(slices.Clone(kind.Names), names...)
	_, statErr := os.Lstat(dir)
	set, err := outdir.Open(dir, kind)
	if err != nil {
		return nil, err
	}
	defer set.Abort() // after Commit it does nothing
	set.Previous(earlierCaseFolders(dir)...)
	rows := make([]results.Compared, len(cs))
	finished := false
	for i, c := range cs {
		if ctx.Err() != nil {
			rows[i] = results.Compared{Case: c, Summary: results.Summary{Title: c.Title, Status: results.StatusNotRun}, Err: ErrNotRun}
		} else {
			staged, err := set.StageDir(names[i])
			if err != nil {
				return nil, err
			}
			rows[i] = Case(ctx, c, staged, opt)
			if !rows[i].Ran || rows[i].Err != nil {
				// Nothing of it is in place: no folder for it.
				set.Unstage(names[i])
				rows[i].Dir = ""
			}
			finished = finished || (rows[i].Ran && rows[i].Summary.Status != results.StatusInterrupted)
		}
		rows[i].Name = names[i]
	}
	if ctx.Err() != nil && !finished {
		set.Abort()
		if statErr != nil {
			os.Remove(dir) // created by Open; removed only if empty
		}
		return rows, ErrNoneFinished
	}
	// The page is drawn from the cases' staged folders; they go in place
	// with it.
	err = commitComparison(ctx, set, rows, opt.Report, ".")
	for i := range rows {
		if rows[i].Dir != "" {
			rows[i].Dir = filepath.Join(dir, names[i])
		}
	}
	return rows, err
}

// earlierCaseFolders returns the case folders named in the first column of
// dir/compare.csv that hold a run's outputs (summary.json): those of an
// earlier comparison, even one written before the record of the
// comparison's set listed its folders.
func earlierCaseFolders(dir string) []string {
	f, err := os.Open(filepath.Join(dir, results.CompareFile))
	if err != nil {
		return nil
	}
	defer f.Close()
	recs, err := csv.NewReader(io.LimitReader(f, 1<<20)).ReadAll()
	if err != nil {
		return nil
	}
	var out []string
	for _, rec := range recs[min(1, len(recs)):] {
		if len(rec) == 0 {
			continue
		}
		if fi, err := os.Stat(filepath.Join(dir, rec[0], results.SummaryFile)); err == nil && fi.Mode().IsRegular() {
			out = append(out, rec[0])
		}
	}
	return out
}

// ErrPageNotDrawn is wrapped by the error of Compare and WriteComparison
// when the comparison page was not drawn because the context was
// cancelled; everything else was written.
var ErrPageNotDrawn = errors.New("the comparison page was not drawn: interrupted")

// WriteComparison writes compare.csv and, with page, the comparison page of
// the rows that ran into dir as one output set of a comparison (package
// outdir): both in place together, or the previous set left as it was.
// When ctx is done before the page is drawn, compare.csv goes in place
// alone and the error wraps ErrPageNotDrawn. cases is the folder holding
// the rows' case folders, relative to dir: the page names each case's own
// report.html from there (report.CompareReport).
func WriteComparison(ctx context.Context, dir string, rows []results.Compared, page bool, cases string) error {
	set, err := outdir.Open(dir, results.CompareKind)
	if err != nil {
		return err
	}
	defer set.Abort()
	return commitComparison(ctx, set, rows, page, cases)
}

// commitComparison stages compare.csv and the comparison page into set and
// commits it (see WriteComparison).
func commitComparison(ctx context.Context, set *outdir.Set, rows []results.Compared, page bool, cases string) error {
	if err := results.StageComparison(set, rows); err != nil {
		return fmt.Errorf("writing %s: %w", results.CompareFile, err)
	}
	// The page draws the cases that ran and whose files are in place: a
	// streamed run keeps no snapshots, and its page is read back from its
	// files, which a run that could not write them does not have.
	var ran []results.Compared
	for _, r := range rows {
		if r.Result != nil && (r.Err == nil || len(r.Result.Snapshots) > 0) {
			ran = append(ran, r)
		}
	}
	var perr error
	if page && len(ran) > 0 {
		perr = set.Stage(report.CompareReportFile, func(w io.Writer) error { return report.CompareReport(ctx, w, ran, cases) })
		if ctx.Err() != nil && errors.Is(perr, ctx.Err()) {
			perr = fmt.Errorf("%w (%w)", ErrPageNotDrawn, perr)
		}
	}
	if err := set.Commit(); err != nil {
		return err
	}
	return perr
}
