package outdir

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

var (
	runKind   = Kind{Name: "run", Marks: []string{"summary.json"}, Names: []string{"fields.csv", "summary.json", "report.html", "uncertainty.csv", "runs"}}
	sweepKind = Kind{Name: "sweep", Marks: []string{"sweep.json"}, Names: []string{"summary.csv", "sweep.json", "report.html"}}
)

func init() { registered = []Kind{runKind, sweepKind} }

// write stages each name with content "tag name" (a folder for "runs").
func write(t *testing.T, dir string, k Kind, tag string, names ...string) {
	t.Helper()
	s, err := Open(dir, k)
	if err != nil {
		t.Fatal(err)
	}
	stage(t, s, tag, names...)
	if err := s.Commit(); err != nil {
		t.Fatal(err)
	}
}

func stage(t *testing.T, s *Set, tag string, names ...string) {
	t.Helper()
	for _, n := range names {
		if n == "runs" {
			p, err := s.StageDir(n)
			if err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(filepath.Join(p, "0.json"), []byte(tag), 0o644); err != nil {
				t.Fatal(err)
			}
			continue
		}
		if err := s.Stage(n, func(w io.Writer) error { _, err := io.WriteString(w, tag+" "+n); return err }); err != nil {
			t.Fatal(err)
		}
	}
}

// listing returns every entry of dir (folders with a slash) and the
// contents of its files, as one string.
func listing(t *testing.T, dir string) string {
	t.Helper()
	var b strings.Builder
	filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err != nil || p == dir {
			return err
		}
		rel, _ := filepath.Rel(dir, p)
		if d.IsDir() {
			fmt.Fprintf(&b, "%s/\n", rel)
			return nil
		}
		if rel == manifestFile {
			fmt.Fprintf(&b, "%s\n", rel)
			return nil
		}
		c, _ := os.ReadFile(p)
		fmt.Fprintf(&b, "%s: %s\n", rel, c)
		return nil
	})
	return b.String()
}

// A new set replaces the previous one whole: the files written again are
// new, a file of the kind not written again goes (a report after
// --no-report, a runs/ folder), a file of the user's stays.
func TestCommitReplacesTheSet(t *testing.T) {
	dir := t.TempDir()
	write(t, dir, runKind, "one", "fields.csv", "summary.json", "report.html", "uncertainty.csv", "runs")
	os.WriteFile(filepath.Join(dir, "notes.txt"), []byte("mine"), 0o644)
	write(t, dir, runKind, "two", "fields.csv", "summary.json")
	want := ".cureslab-set.json\nfields.csv: two fields.csv\nnotes.txt: mine\nsummary.json: two summary.json\n"
	if got := listing(t, dir); got != want {
		t.Errorf("after the second set:\n%s\nwant:\n%s", got, want)
	}
}

// An older directory without a manifest: its stale files of the kind go
// too.
func TestCommitRemovesStaleFilesWithoutManifest(t *testing.T) {
	dir := t.TempDir()
	for _, n := range []string{"fields.csv", "summary.json", "report.html", "uncertainty.csv"} {
		os.WriteFile(filepath.Join(dir, n), []byte("old"), 0o644)
	}
	write(t, dir, runKind, "new", "fields.csv", "summary.json")
	want := ".cureslab-set.json\nfields.csv: new fields.csv\nsummary.json: new summary.json\n"
	if got := listing(t, dir); got != want {
		t.Errorf("got:\n%s\nwant:\n%s", got, want)
	}
}

// A directory holding another kind of output is refused, naming what is
// there, with a manifest and without one; nothing changes.
func TestOpenRefusesAnotherKind(t *testing.T) {
	dir := t.TempDir()
	write(t, dir, sweepKind, "s", "summary.csv", "sweep.json")
	before := listing(t, dir)
	_, err := Open(dir, runKind)
	var ke *KindError
	if !errors.As(err, &ke) || ke.Found != "sweep" || !strings.Contains(err.Error(), "sweep.json, summary.csv") {
		t.Errorf("a run into a sweep's directory: %v", err)
	}
	if listing(t, dir) != before {
		t.Error("the refused Open changed the directory")
	}
	old := t.TempDir()
	os.WriteFile(filepath.Join(old, "sweep.json"), []byte("{}"), 0o644)
	if _, err := Open(old, runKind); !errors.As(err, &ke) || !strings.Contains(err.Error(), "sweep.json") {
		t.Errorf("a run into an older sweep directory: %v", err)
	}
	run := t.TempDir()
	os.WriteFile(filepath.Join(run, "summary.json"), []byte("{}"), 0o644)
	if _, err := Open(run, sweepKind); !errors.As(err, &ke) || ke.Found != "run" {
		t.Errorf("a sweep into an older run directory: %v", err)
	}
}

// A rename that fails part-way through the commit leaves the previous set,
// exactly, and no staging or set-aside file.
func TestCommitFailureLeavesPreviousSet(t *testing.T) {
	defer func() { rename = os.Rename }()
	for k := 0; ; k++ {
		dir := t.TempDir()
		write(t, dir, runKind, "one", "fields.csv", "summary.json", "report.html", "runs")
		before := listing(t, dir)
		calls := 0
		rename = func(a, b string) error {
			calls++
			if calls > k {
				return errors.New("disk trouble")
			}
			return os.Rename(a, b)
		}
		s, err := Open(dir, runKind)
		if err != nil {
			t.Fatal(err)
		}
		stage(t, s, "two", "fields.csv", "summary.json", "uncertainty.csv")
		err = s.Commit()
		rename = os.Rename
		if err == nil {
			if k < 8 {
				t.Fatalf("commit succeeded after %d renames; expected more renames", k)
			}
			return
		}
		if got := listing(t, dir); got != before {
			t.Fatalf("rename %d failed: the directory holds\n%s\nwant the previous set\n%s", k+1, got, before)
		}
	}
}

// A commit cut short after any rename (the process killed) is finished by
// the next Open: the directory then holds the previous set or the new one,
// exactly, never a mix.
func TestOpenRecoversCutShortCommit(t *testing.T) {
	defer func() { rename = os.Rename }()
	type killed struct{}
	for k := 0; ; k++ {
		dir := t.TempDir()
		write(t, dir, runKind, "one", "fields.csv", "summary.json", "report.html", "runs")
		prev := listing(t, dir)
		full := t.TempDir()
		write(t, full, runKind, "one", "fields.csv", "summary.json", "report.html", "runs")
		write(t, full, runKind, "two", "fields.csv", "summary.json", "uncertainty.csv")
		next := listing(t, full)

		calls := 0
		rename = func(a, b string) error {
			calls++
			if calls > k {
				panic(killed{})
			}
			return os.Rename(a, b)
		}
		s, err := Open(dir, runKind)
		if err != nil {
			t.Fatal(err)
		}
		stage(t, s, "two", "fields.csv", "summary.json", "uncertainty.csv")
		finished := func() (ok bool) {
			defer func() {
				if r := recover(); r != nil {
					if _, is := r.(killed); !is {
						panic(r)
					}
				}
			}()
			s.Commit()
			return true
		}()
		rename = os.Rename
		if finished {
			if k < 8 {
				t.Fatalf("commit finished after %d renames", k)
			}
			return
		}
		s2, err := Open(dir, runKind)
		if err != nil {
			t.Fatalf("killed after rename %d: %v", k, err)
		}
		s2.Abort()
		if got := listing(t, dir); got != prev && got != next {
			t.Fatalf("killed after rename %d: the directory holds\n%s\nwant the previous set\n%s\nor the new one\n%s", k, got, prev, next)
		}
	}
}

// Abort removes what was staged and keeps the previous set.
func TestAbortKeepsPreviousSet(t *testing.T) {
	dir := t.TempDir()
	write(t, dir, runKind, "one", "fields.csv", "summary.json")
	before := listing(t, dir)
	s, err := Open(dir, runKind)
	if err != nil {
		t.Fatal(err)
	}
	stage(t, s, "two", "fields.csv", "runs")
	s.Abort()
	if got := listing(t, dir); got != before {
		t.Errorf("after Abort:\n%s\nwant\n%s", got, before)
	}
}

// Unstage deletes what was staged under a name, and Commit then removes
// the previous set's file of that name instead of keeping it beside the
// new set.
func TestUnstage(t *testing.T) {
	dir := t.TempDir()
	write(t, dir, runKind, "one", "fields.csv", "summary.json", "runs")
	s, err := Open(dir, runKind)
	if err != nil {
		t.Fatal(err)
	}
	stage(t, s, "two", "summary.json", "runs")
	s.Unstage("runs")
	s.Unstage("report.html") // never staged: nothing happens
	if _, err := os.Stat(filepath.Join(dir, "runs"+stagingExt)); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("the staged folder is still there: %v", err)
	}
	if err := s.Commit(); err != nil {
		t.Fatal(err)
	}
	want := manifestFile + "\nsummary.json: two summary.json\n"
	if got := listing(t, dir); got != want {
		t.Errorf("after Unstage and Commit:\n%s\nwant\n%s", got, want)
	}
}

// A second writer is refused while the first holds the directory; a lock
// left by a process that no longer runs is taken over.
func TestLock(t *testing.T) {
	dir := t.TempDir()
	s, err := Open(dir, sweepKind)
	if err != nil {
		t.Fatal(err)
	}
	var be *BusyError
	if _, err := Open(dir, sweepKind); !errors.As(err, &be) || !strings.Contains(err.Error(), "another cureslab") {
		t.Errorf("second writer: %v, want a BusyError", err)
	}
	s.Abort()
	if _, err := os.Stat(filepath.Join(dir, lockFile)); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("the lock is still there after Abort: %v", err)
	}
	// A process id above any the system hands out: no such process.
	os.WriteFile(filepath.Join(dir, lockFile), []byte("2147483646\n"), 0o644)
	s, err = Open(dir, sweepKind)
	if err != nil {
		t.Fatalf("a stale lock: %v", err)
	}
	s.Abort()
}

// Files of the user that end like staging names are left alone by the
// recovery.
func TestRecoveryLeavesOtherFiles(t *testing.T) {
	dir := t.TempDir()
	for _, n := range []string{"notes.staging", "draft.previous"} {
		os.WriteFile(filepath.Join(dir, n), []byte("mine"), 0o644)
	}
	write(t, dir, runKind, "one", "summary.json")
	got := listing(t, dir)
	for _, n := range []string{"notes.staging: mine", "draft.previous: mine"} {
		if !strings.Contains(got, n) {
			t.Errorf("%q gone:\n%s", n, got)
		}
	}
	if slices.Contains(strings.Split(got, "\n"), "notes: mine") {
		t.Error("a user file was renamed")
	}
}

// A file written piece by piece (Create) is part of the set once closed and
// committed; a set aborted part-way through such a file leaves the previous
// set, with no staging file behind. Source: the package's contract.
func TestCreateWritesPieceByPiece(t *testing.T) {
	dir := t.TempDir()
	write(t, dir, runKind, "one", "fields.csv", "summary.json")
	before := listing(t, dir)
	s, err := Open(dir, runKind)
	if err != nil {
		t.Fatal(err)
	}
	f, err := s.Create("fields.csv")
	if err != nil {
		t.Fatal(err)
	}
	io.WriteString(f, "two rows: ")
	s.Abort() // stopped before Close
	if got := listing(t, dir); got != before {
		t.Errorf("after Abort with a file open:\n%s\nwant\n%s", got, before)
	}
	s, err = Open(dir, runKind)
	if err != nil {
		t.Fatal(err)
	}
	if f, err = s.Create("fields.csv"); err != nil {
		t.Fatal(err)
	}
	for _, piece := range []string{"row 1, ", "row 2"} {
		if _, err := io.WriteString(f, piece); err != nil {
			t.Fatal(err)
		}
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	stage(t, s, "two", "summary.json")
	if err := s.Commit(); err != nil {
		t.Fatal(err)
	}
	if got, want := listing(t, dir), ".cureslab-set.json\nfields.csv: row 1, row 2\nsummary.json: two summary.json\n"; got != want {
		t.Errorf("after Commit:\n%s\nwant\n%s", got, want)
	}
}
