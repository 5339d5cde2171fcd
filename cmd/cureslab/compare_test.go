package main

import (
	"encoding/csv"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"cureslab/cases"
	"cureslab/cases/report"
	"cureslab/cases/results"
)

// TestCompareBadCase: one bad case among good ones is bad input (exit 2):
// every error is reported and nothing is written.
func TestCompareBadCase(t *testing.T) {
	chdir(t)
	writeExample(t, "tile-on-spreader", "tile.toml")
	os.WriteFile("bad.toml", []byte("title = \"no stack\"\n"), 0o644)
	code, out, errs := cl(t, "compare", "tile.toml", "bad.toml", "missing.toml", "-o", "cmp")
	if code != exitUsage {
		t.Errorf("exit %d, want 2\nstdout:\n%s\nstderr:\n%s", code, out, errs)
	}
	for _, want := range []string{"bad.toml", "missing.toml", "nothing was run"} {
		if !strings.Contains(errs, want) {
			t.Errorf("stderr lacks %q:\n%s", want, errs)
		}
	}
	if _, err := os.Stat("cmp"); !os.IsNotExist(err) {
		t.Errorf("a refused comparison touched its output directory: %v", err)
	}
	if code, _, errs := cl(t, "compare", "tile.toml"); code != exitUsage || !strings.Contains(errs, "at least two") {
		t.Errorf("one case: exit %d, stderr %q", code, errs)
	}
	os.WriteFile("afile", nil, 0o644)
	if code, _, errs := cl(t, "compare", "tile.toml", "tile.toml", "-o", "afile"); code != exitUsage || !strings.Contains(errs, "not a directory") {
		t.Errorf("-o onto a file: exit %d, stderr %q", code, errs)
	}
}

// TestCompareRuns runs two cases with the same file name: each gets its
// own directory with the outputs of run, compare.csv has a row for each, the
// table is printed, and the exit status is the worst of the runs.
func TestCompareRuns(t *testing.T) {
	chdir(t)
	writeExample(t, "tile-on-spreader", "tile.toml")
	os.Mkdir("b", 0o755)
	ex, _ := cases.ExampleByName("tile-on-spreader")
	// The same case with a limit it cannot meet: exit 1 for the pair.
	text := strings.Replace(string(ex.Text), `max_temperature = "125 C"`, `max_temperature = "60 C"`, 1)
	if text == string(ex.Text) {
		t.Fatal("the example no longer has max_temperature = \"125 C\"")
	}
	os.WriteFile(filepath.Join("b", "tile.toml"), []byte(text), 0o644)
	code, out, errs := cl(t, "compare", "tile.toml", "b/tile.toml")
	if code != exitCriteria {
		t.Errorf("exit %d, want 1 (the worst of ok and criteria-failed)\nstdout:\n%s\nstderr:\n%s", code, out, errs)
	}
	for _, dir := range []string{"tile", "tile-2"} {
		for _, f := range []string{"fields.csv", "probes.csv", "summary.json"} {
			if _, err := os.Stat(filepath.Join("compare-out", dir, f)); err != nil {
				t.Error(err)
			}
		}
	}
	if s := readSummary(t, filepath.Join("compare-out", "tile-2")); s.Status != results.StatusCriteriaFailed {
		t.Errorf("second case status %q", s.Status)
	}
	f, err := os.Open(filepath.Join("compare-out", results.CompareFile))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 3 || rows[1][0] != "tile" || rows[2][0] != "tile-2" || rows[1][2] != "ok" || rows[2][2] != "criteria-failed" {
		t.Errorf("compare.csv:\n%v", rows)
	}
	if !strings.Contains(out, "tile-2") || !strings.Contains(out, "peak temperature") {
		t.Errorf("stdout lacks the table:\n%s", out)
	}
	// The cases' folders are inside the comparison's.
	namesCasePages(t, "compare-out", "tile/report.html", "tile-2/report.html")
}

// namesCasePages checks that the comparison page in dir names the cases'
// own pages by the given paths from dir, and that they are there.
func namesCasePages(t *testing.T, dir string, pages ...string) {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(dir, report.CompareReportFile))
	if err != nil {
		t.Fatal(err)
	}
	want := "The report of each case, with its maps: " + strings.Join(pages, ", ") + " (paths from the folder of this page)."
	if !strings.Contains(string(b), want) {
		t.Errorf("%s does not say %q", filepath.Join(dir, report.CompareReportFile), want)
	}
	for _, p := range pages {
		if _, err := os.Stat(filepath.Join(dir, filepath.FromSlash(p))); err != nil {
			t.Errorf("the comparison page in %s names %s: %v", dir, p, err)
		}
	}
}
