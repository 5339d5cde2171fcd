// Package simulate is the one path of a simulation from a validated case to its
// output files: solve (solver.RunStream), handing each snapshot as it comes
// to the rows of fields.csv and probes.csv (results.RunWriter, into the
// run's output set) → summarise once at the end (results.RunWriter.Summarize)
// → summary.json → report.html, drawn from what report.Collector kept of the
// snapshots as they passed (a bounded set of output times). The commands run, demo
// and compare go through it; sweeps, tuning and uncertainty runs use the
// same steps without the report.
package simulate

import (
	"context"
	"errors"
	"fmt"
	"path/filepath"

	"cureslab/cases"
	"cureslab/cases/outdir"
	"cureslab/cases/report"
	"cureslab/cases/results"
	"cureslab/solver"
)

// ErrNotRun is wrapped by the error of a case that Compare did not start
// because the context was cancelled.
var ErrNotRun = errors.New("not run")

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
		out.Err = col.Stage(set, out.Summary)
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

// Compare runs every case of cs with Case, one after the other, into
// dir/NAME/ (results.CompareNames), writes dir/compare.csv and, with
// opt.Report, the comparison page of the cases that ran; it returns one row
// per case in the order of cs.
//
// The cases must be validated beforehand: Compare is the first thing that
// touches dir, which it creates if needed. When ctx is cancelled, the cases
// not yet started are not run and are recorded as such; the table is still
// written. A case that fails to run does not stop the others. The error is
// about dir, compare.csv or the comparison page only.
//
// Cost: the sum of the runs.
func Compare(ctx context.Context, cs []*cases.Case, dir string, opt Options) ([]results.Compared, error) {
	set, err := outdir.Open(dir, results.CompareKind)
	if err != nil {
		return nil, err
	}
	committed := false
	defer func() {
		if !committed {
			set.Abort()
		}
	}()
	names := results.CompareNames(cs)
	rows := make([]results.Compared, len(cs))
	for i, c := range cs {
		if err := ctx.Err(); err != nil {
			rows[i] = results.Compared{Case: c, Summary: results.Summary{Title: c.Title, Status: results.StatusFailed}, Err: fmt.Errorf("%w: %w", ErrNotRun, err)}
		} else {
			rows[i] = Case(ctx, c, filepath.Join(dir, names[i]), opt)
		}
		rows[i].Name = names[i]
	}
	if err := results.WriteComparison(dir, rows); err != nil {
		return rows, fmt.Errorf("writing %s: %w", results.CompareFile, err)
	}
	var rerr error
	if opt.Report {
		rerr = CompareReport(dir, rows)
	}
	set.Keep(results.CompareFile, "report.html")
	committed = true
	if err := set.Commit(); err != nil {
		return rows, err
	}
	return rows, rerr
}

// CompareReport writes the comparison page of the rows that ran into dir
// (report.WriteCompareReport); with none, it writes nothing.
func CompareReport(dir string, rows []results.Compared) error {
	var ran []results.Compared
	for _, r := range rows {
		if r.Result != nil {
			ran = append(ran, r)
		}
	}
	if len(ran) == 0 {
		return nil
	}
	return report.WriteCompareReport(dir, ran)
}
