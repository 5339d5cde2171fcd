package simulate

import (
	"context"
	"cureslab/cases"
	"cureslab/cases/results"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
	"time"
)

// whenExists is a context that is cancelled from the moment the file path
// exists: staged for a run after its solve, it stands for a Ctrl-C that
// comes while the run's page is drawn, after the run has finished.
type whenExists struct {
	context.Context
	path string
}

func (c whenExists) Err() error {
	if _, err := os.Stat(c.path); err == nil {
		return context.Canceled
	}
	return nil
}

// onceExists is whenExists that stays cancelled once the file has been
// seen: a Ctrl-C that comes while a staging file is there, and holds after
// it is renamed.
type onceExists struct {
	context.Context
	path string
	seen *bool
}

func (c onceExists) Err() error {
	if *c.seen || exists(c.path) {
		*c.seen = true
		return context.Canceled
	}
	return nil
}

func exists(path string) bool { _, err := os.Stat(path); return err == nil }

// A Ctrl-C while the page is drawn keeps the finished run's files with its
// own status, draws no page, and leaves no page of an earlier run beside
// them; a Ctrl-C during the run does the same for the interrupted run.
func TestCaseReportNotDrawn(t *testing.T) {
	c := exampleCase(t, "tile-on-spreader")
	dir := filepath.Join(t.TempDir(), "out")
	o := Case(context.Background(), c, dir, Options{Report: true})
	if o.Err != nil || o.ReportNotDrawn || !exists(filepath.Join(dir, "report.html")) {
		t.Fatalf("first run: err %v, not drawn %v", o.Err, o.ReportNotDrawn)
	}
	ctx := whenExists{context.Background(), filepath.Join(dir, results.SummaryFile+".staging")}
	o = Case(ctx, c, dir, Options{Report: true})
	if o.Err != nil || !o.Ran || !o.ReportNotDrawn || o.Summary.Status == results.StatusInterrupted {
		t.Fatalf("page interrupted: err %v, ran %v, not drawn %v, status %q", o.Err, o.Ran, o.ReportNotDrawn, o.Summary.Status)
	}
	for _, f := range []string{results.FieldsFile, results.ProbesFile, results.SummaryFile} {
		if !exists(filepath.Join(dir, f)) {
			t.Errorf("%s is missing", f)
		}
	}
	if exists(filepath.Join(dir, "report.html")) {
		t.Error("the page of the earlier run is left beside the new files")
	}

	Case(context.Background(), c, dir, Options{Report: true})
	cancelled, cancel := context.WithCancel(context.Background())
	cancel()
	o = Case(cancelled, c, dir, Options{Report: true})
	if o.Err != nil || !o.ReportNotDrawn || o.Summary.Status != results.StatusInterrupted {
		t.Fatalf("run interrupted: err %v, not drawn %v, status %q", o.Err, o.ReportNotDrawn, o.Summary.Status)
	}
	if exists(filepath.Join(dir, "report.html")) {
		t.Error("an interrupted run keeps the page of the run before it")
	}
}

// named returns a copy of c read from the file name file (the name of its
// folder in a comparison).
func named(c *cases.Case, file string) *cases.Case {
	d := *c
	d.File = file
	return &d
}

// A comparison removes the case folders of an earlier comparison into the
// same directory that it does not write again, including those of a
// directory written before the record of the set listed its folders, and
// the folder of a case that did not run this time; interrupted before any
// case finished, it leaves the earlier comparison as it was.
func TestCompareRemovesEarlierCases(t *testing.T) {
	c := exampleCase(t, "tile-on-spreader")
	a, b, x := named(c, "a.toml"), named(c, "b.toml"), named(c, "x.toml")
	dir := filepath.Join(t.TempDir(), "cmp")
	bg := context.Background()
	has := func(names ...string) {
		t.Helper()
		for _, n := range []string{"a", "b", "x"} {
			if got, want := exists(filepath.Join(dir, n)), slices.Contains(names, n); got != want {
				t.Errorf("folder %s there: %v, want %v", n, got, want)
			}
		}
	}
	if _, err := Compare(bg, []*cases.Case{a, b}, dir, Options{}); err != nil {
		t.Fatal(err)
	}
	has("a", "b")
	if _, err := Compare(bg, []*cases.Case{a, x}, dir, Options{}); err != nil {
		t.Fatal(err)
	}
	has("a", "x")

	// Written before the record named the folders: found from compare.csv.
	if err := os.Remove(filepath.Join(dir, ".cureslab-set.json")); err != nil {
		t.Fatal(err)
	}
	if _, err := Compare(bg, []*cases.Case{a, b}, dir, Options{}); err != nil {
		t.Fatal(err)
	}
	has("a", "b")

	// Interrupted before any case had finished, whether before the first
	// one started or while it ran: nothing is written, the comparison
	// before stays as it was.
	before := snapshot(t, dir)
	cancelled, cancel := context.WithCancel(bg)
	cancel()
	during := onceExists{bg, filepath.Join(dir, "x.staging", results.FieldsFile+".staging"), new(bool)}
	for _, ctx := range []context.Context{cancelled, during} {
		rows, err := Compare(ctx, []*cases.Case{x, b}, dir, Options{Report: true})
		if !errors.Is(err, ErrNoneFinished) {
			t.Fatalf("interrupted before any case finished: %v", err)
		}
		if !errors.Is(rows[1].Err, ErrNotRun) || rows[1].Summary.Status != results.StatusNotRun {
			t.Errorf("%s: %v, status %q", rows[1].Name, rows[1].Err, rows[1].Summary.Status)
		}
		if got := snapshot(t, dir); got != before {
			t.Errorf("the comparison before was changed:\n%s\nwant\n%s", got, before)
		}
	}
	if exists(filepath.Join(dir, "x")) {
		t.Error("the folder of the interrupted case was left")
	}
}

// snapshot lists every folder under dir, and every file with its size
// and modification time.
func snapshot(t *testing.T, dir string) string {
	t.Helper()
	var b strings.Builder
	err := filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() { // its time changes with the staging files made and removed in it
			fmt.Fprintf(&b, "%s/\n", p)
			return nil
		}
		fi, err := d.Info()
		if err != nil {
			return err
		}
		fmt.Fprintf(&b, "%s %d %s\n", p, fi.Size(), fi.ModTime().Format(time.RFC3339Nano))
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	return b.String()
}

// A Ctrl-C while the comparison page is drawn keeps compare.csv and the
// cases' folders and says so (ErrPageNotDrawn); an earlier page is gone.
func TestComparePageNotDrawn(t *testing.T) {
	c := exampleCase(t, "tile-on-spreader")
	a, b := named(c, "a.toml"), named(c, "b.toml")
	dir := filepath.Join(t.TempDir(), "cmp")
	if _, err := Compare(context.Background(), []*cases.Case{a, b}, dir, Options{Report: true}); err != nil {
		t.Fatal(err)
	}
	if !exists(filepath.Join(dir, "report.html")) {
		t.Fatal("no comparison page")
	}
	ctx := whenExists{context.Background(), filepath.Join(dir, results.CompareFile+".staging")}
	_, err := Compare(ctx, []*cases.Case{a, b}, dir, Options{Report: true})
	if !errors.Is(err, ErrPageNotDrawn) || !errors.Is(err, context.Canceled) {
		t.Fatalf("page interrupted: %v", err)
	}
	if exists(filepath.Join(dir, "report.html")) || !exists(filepath.Join(dir, results.CompareFile)) ||
		!exists(filepath.Join(dir, "a", results.SummaryFile)) || !exists(filepath.Join(dir, "b", results.SummaryFile)) {
		t.Error("not compare.csv and the cases' folders alone")
	}
}
