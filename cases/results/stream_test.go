package results

import (
	"bytes"
	"context"
	"cureslab/cases/outdir"
	"cureslab/solver"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// A run streamed through runWriter writes the same bytes, in fields.csv,
// probes.csv and summary.json, as WriteRun writes for the run kept in
// memory: a controlled volumetric case (power columns, program and power
// fraction, the control error of the summary accumulated as the snapshots
// pass) and a laminate with a layer that does not cure. Source: the
// contract of runWriter (a regression guard, no outside reference).
func TestRunWriterSameBytesAsWriteRun(t *testing.T) {
	for _, name := range []string{"thick-potting-microwave", "tile-on-spreader"} {
		c, r := runExample(t, name)
		kept := t.TempDir()
		if err := WriteRun(kept, c, r, Summarize(c, r)); err != nil {
			t.Fatal(err)
		}
		streamed := t.TempDir()
		set, err := outdir.Open(streamed, RunKind)
		if err != nil {
			t.Fatal(err)
		}
		w, err := newRunWriter(set, c)
		if err != nil {
			t.Fatal(err)
		}
		rs, err := solver.RunStream(context.Background(), c.Problem, w.Add)
		if err != nil {
			t.Fatal(err)
		}
		if err := w.Close(); err != nil {
			t.Fatal(err)
		}
		if err := StageSummary(set, w.Summarize(rs)); err != nil {
			t.Fatal(err)
		}
		if err := set.Commit(); err != nil {
			t.Fatal(err)
		}
		for _, f := range []string{FieldsFile, ProbesFile, SummaryFile} {
			a, _ := os.ReadFile(filepath.Join(kept, f))
			b, _ := os.ReadFile(filepath.Join(streamed, f))
			if len(a) == 0 || !bytes.Equal(a, b) {
				t.Errorf("%s: streamed %s (%d B) differs from the one written from memory (%d B)", name, f, len(b), len(a))
			}
		}
	}
}

// A write error stops the writer: Add returns it, wrapped with the file's
// name, writes nothing more, and Close returns it too.
func TestRunWriterError(t *testing.T) {
	c, r := runExample(t, "tile-on-spreader")
	set, err := outdir.Open(t.TempDir(), RunKind)
	if err != nil {
		t.Fatal(err)
	}
	defer set.Abort()
	w, err := newRunWriter(set, c)
	if err != nil {
		t.Fatal(err)
	}
	w.fields.Close() // its buffered writes now fail once they reach the file
	var first error
	for k := range r.Snapshots {
		if first = w.Add(&r.Snapshots[k]); first != nil {
			break
		}
	}
	if !errors.Is(first, os.ErrClosed) || !strings.Contains(first.Error(), FieldsFile) {
		t.Fatalf("Add on a closed file: %v, want os.ErrClosed naming %s", first, FieldsFile)
	}
	if err := w.Add(&r.Snapshots[0]); err != first {
		t.Errorf("Add after an error: %v, want the first error", err)
	}
	if err := w.Close(); !errors.Is(err, os.ErrClosed) {
		t.Errorf("Close after an error: %v", err)
	}
}

// A problem the solver refuses stages nothing: StreamRun returns no result
// and the solver's error, and the set's staged names stay empty.
func TestStreamRunRefusedStagesNothing(t *testing.T) {
	c, _ := runExample(t, "tile-on-spreader")
	c.Problem.End = -1 // breaks the solver's contract
	set, err := outdir.Open(t.TempDir(), RunKind)
	if err != nil {
		t.Fatal(err)
	}
	defer set.Abort()
	run := func(sink solver.Sink) (*solver.Result, error) {
		return solver.RunStream(context.Background(), c.Problem, sink)
	}
	r, _, err := StreamRun(set, c, run, nil)
	if r != nil || !errors.Is(err, solver.ErrProblem) || len(set.Staged()) != 0 {
		t.Errorf("result %v, error %v, staged %v: want none, solver.ErrProblem, nothing", r, err, set.Staged())
	}
}
