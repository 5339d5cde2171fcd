package results

import (
	"cureslab/cases"
	"cureslab/cases/outdir"
	"cureslab/solver"
	"errors"
	"fmt"
	"io"
)

// runWriter writes fields.csv and probes.csv of a run into an output set
// row by row as its snapshots arrive from the solver (Add is a
// solver.Sink for solver.RunStream), so that the memory of a run stays
// proportional to its cells however many output times it has. It keeps
// what the summary needs of the snapshots (the control error) as they
// pass, and summarises the run once at the end (Summarize). The bytes of
// the files are those WriteRun writes for the same snapshots.
//
// Use: newRunWriter, Add for every snapshot, Close, then Summarize and
// StageSummary; the files go in place at the set's Commit (Abort removes
// them, however far they got).
type runWriter struct {
	c              *cases.Case
	fields, probes *outdir.File
	rows           *fieldRows
	fb, pb         []byte // the rows not yet handed to the files
	k              int    // snapshots written
	ctl            controlTrack
	err            error // the first error, which ends the writing
}

// newRunWriter stages fields.csv and probes.csv of a run of c in set and
// writes their header rows. Preconditions: c validated (cases.Load or
// cases.Parse). Errors: file-system errors, wrapped with the file's name;
// nothing stays staged then.
func newRunWriter(set *outdir.Set, c *cases.Case) (*runWriter, error) {
	if c == nil || c.Problem == nil || c.Problem.Mesh == nil {
		return nil, errors.New("results.newRunWriter: case, problem and mesh are required")
	}
	w := &runWriter{c: c, ctl: newControlTrack(c)}
	var err error
	if w.fields, err = set.Create(FieldsFile); err != nil {
		return nil, fmt.Errorf("writing %s: %w", FieldsFile, err)
	}
	if w.probes, err = set.Create(ProbesFile); err != nil {
		w.fields.Close()
		return nil, fmt.Errorf("writing %s: %w", ProbesFile, err)
	}
	var head []string
	w.rows, head = newFieldRows(c)
	w.fb = appendCSVRecord(make([]byte, 0, csvChunk+512), head)
	w.pb = appendCSVRecord(make([]byte, 0, csvChunk+512), probesHeader(c))
	return w, nil
}

// Add writes the rows of snapshot s: its cells to fields.csv, its probes
// to probes.csv. It keeps nothing of s but what the summary needs. After
// an error it writes nothing more and returns that error (the solver then
// stops the run). Cost: formatting the rows, no allocation once the
// buffers have grown.
func (w *runWriter) Add(s *solver.Snapshot) error {
	if w.err != nil {
		return w.err
	}
	var err error
	if w.fb, err = w.rows.append(w.fields, w.fb, s, w.k); err != nil {
		w.err = fmt.Errorf("writing %s: %w", FieldsFile, err)
		return w.err
	}
	if w.pb, err = appendProbeRow(w.probes, w.pb, w.c, s); err != nil {
		w.err = fmt.Errorf("writing %s: %w", ProbesFile, err)
		return w.err
	}
	w.ctl.add(s)
	w.k++
	return nil
}

// Close writes the rows still buffered and closes both files (flushed and
// synced). It returns the first error of the writing, Add's included.
func (w *runWriter) Close() error {
	for _, f := range []struct {
		name string
		file *outdir.File
		b    []byte
	}{{FieldsFile, w.fields, w.fb}, {ProbesFile, w.probes, w.pb}} {
		err := w.err
		if err == nil {
			if _, err = f.file.Write(f.b); err != nil {
				err = fmt.Errorf("writing %s: %w", f.name, err)
			}
		}
		if cerr := f.file.Close(); err == nil && cerr != nil {
			err = fmt.Errorf("writing %s: %w", f.name, cerr)
		}
		w.err = err
	}
	w.fb, w.pb = nil, nil
	return w.err
}

// Summarize returns the summary of run r, whose snapshots went through Add:
// as Summarize, with the control error accumulated as they passed.
func (w *runWriter) Summarize(r *solver.Result) Summary {
	return summarize(w.c, r, w.ctl.value())
}

// StageSummary writes summary.json of a run into the output set: it goes
// in place with the set's other files at Commit.
func StageSummary(set *outdir.Set, s Summary) error {
	if err := set.Stage(SummaryFile, func(w io.Writer) error { return writeSummary(w, s) }); err != nil {
		return fmt.Errorf("writing %s: %w", SummaryFile, err)
	}
	return nil
}

// StreamRun runs a case with its snapshots written into set as they come:
// run is solver.RunStream, or a Workspace's, on c.Problem with the sink it
// is handed; every snapshot goes to a runWriter (made at the first one,
// once the solver has accepted the problem) and then to also, when not
// nil. summary.json is not staged: the caller may complete the summary
// first (StageSummary).
//
// If the solver refuses the problem, r is nil and err says why; nothing is
// staged. Otherwise r is the run, possibly stopped early, s its summary,
// computed once (runWriter.Summarize), and err is non-nil when an output
// could not be written, or also failed (either stops the run where it
// happened).
func StreamRun(set *outdir.Set, c *cases.Case, run func(solver.Sink) (*solver.Result, error), also solver.Sink) (r *solver.Result, s Summary, err error) {
	var w *runWriter
	var werr, aerr error // the writer could not be made; also failed
	sink := func(snap *solver.Snapshot) error {
		if w == nil {
			if w, werr = newRunWriter(set, c); werr != nil {
				return werr
			}
		}
		if err := w.Add(snap); err != nil {
			return err
		}
		if also != nil {
			aerr = also(snap)
		}
		return aerr
	}
	if r, err = run(sink); err != nil {
		return nil, Summary{}, err
	}
	if w == nil { // the solver hands over the initial state, unless the writer failed
		if werr == nil {
			werr = fmt.Errorf("the run of %s produced no snapshot", c.File)
		}
		return r, Summarize(c, r), werr
	}
	if err = w.Close(); err == nil {
		err = aerr
	}
	return r, w.Summarize(r), err
}
