package report

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"cureslab/cases/outdir"
	"cureslab/cases/results"
)

// A comparison's page redrawn from compare.csv and its cases' folders is
// the page drawn from memory at the end of the comparison, byte for byte;
// a case listed without values is shown as not run; a folder whose summary
// is not that of its row is refused, nothing written.
func TestRedrawCompareReport(t *testing.T) {
	fixedClock(t)
	rows := comparedRows(t, results.StatusNotRun)
	c1, r1 := rows[0].Case, rows[0].Result
	var mem bytes.Buffer
	if err := CompareReport(context.Background(), &mem, rows, "."); err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(t.TempDir(), "cmp")
	writeComparison(t, dir, dir, rows)
	if !IsComparison(dir) || IsComparison(filepath.Join(dir, "cool-limit")) {
		t.Error("IsComparison does not tell the comparison from its cases")
	}
	if err := RedrawCompareReport(context.Background(), dir); err != nil {
		t.Fatal(err)
	}
	page, _ := os.ReadFile(filepath.Join(dir, CompareReportFile))
	if !bytes.Equal(page, mem.Bytes()) {
		t.Error("the comparison page from the files differs from the page from memory")
	}
	if !strings.Contains(string(page), "✗ never-ran did not run.") {
		t.Error("the case not run is not listed as such")
	}

	// Another run's outputs in a case's folder: refused, the page left.
	os.Remove(filepath.Join(dir, CompareReportFile))
	if err := results.WriteRun(filepath.Join(dir, "tight-limit"), c1, r1, results.Summarize(c1, r1)); err != nil {
		t.Fatal(err)
	}
	err := RedrawCompareReport(context.Background(), dir)
	if err == nil || !strings.Contains(err.Error(), "compare.csv:3") || !strings.Contains(err.Error(), "no folder holds its outputs") {
		t.Errorf("a folder of another run: %v", err)
	}
	if _, err := os.Stat(filepath.Join(dir, CompareReportFile)); !os.IsNotExist(err) {
		t.Error("a page was written")
	}
}

// A demo's comparison folder: the cases' folders sit beside it. The page
// is redrawn from there, also when the folder is given as "."; a folder
// beside it holding a run with the same title and status but other values
// (another run of the same case) is refused, not drawn under the case's
// name.
func TestRedrawCompareReportBeside(t *testing.T) {
	fixedClock(t)
	rows := comparedRows(t, results.StatusNotRun)[:2]
	var mem bytes.Buffer
	if err := CompareReport(context.Background(), &mem, rows, ".."); err != nil {
		t.Fatal(err)
	}
	base := t.TempDir()
	dir := filepath.Join(base, "compare")
	writeComparison(t, dir, base, rows)
	t.Chdir(dir)
	if err := RedrawCompareReport(context.Background(), "."); err != nil {
		t.Fatalf(`report ".": %v`, err)
	}
	if page, _ := os.ReadFile(CompareReportFile); !bytes.Equal(page, mem.Bytes()) {
		t.Error("the page redrawn from the folders beside differs from the page from memory")
	}

	// The same case run again with other values, same title and status.
	os.Remove(CompareReportFile)
	other := rows[0].Summary
	other.PeakTemperatureC += 1
	if err := results.WriteRun(filepath.Join(base, rows[0].Name), rows[0].Case, rows[0].Result, other); err != nil {
		t.Fatal(err)
	}
	err := RedrawCompareReport(context.Background(), ".")
	if err == nil || !strings.Contains(err.Error(), "no folder holds its outputs") {
		t.Errorf("a folder beside holding another run of the same title and status: %v", err)
	}
	if _, err := os.Stat(CompareReportFile); !os.IsNotExist(err) {
		t.Error("a page was written")
	}
}

// writeComparison writes a comparison of rows into dir as compare does:
// the folder of each case that ran under casesDir (dir itself, or its
// parent for a demo's layout), then compare.csv through the comparison's
// output set.
func writeComparison(t *testing.T, dir, casesDir string, rows []results.Compared) {
	t.Helper()
	for _, r := range rows {
		if !r.Ran {
			continue
		}
		if err := results.WriteRun(filepath.Join(casesDir, r.Name), r.Case, r.Result, r.Summary); err != nil {
			t.Fatal(err)
		}
	}
	set, err := outdir.Open(dir, results.CompareKind)
	if err != nil {
		t.Fatal(err)
	}
	if err := results.StageComparison(set, rows); err != nil {
		t.Fatal(err)
	}
	if err := set.Commit(); err != nil {
		t.Fatal(err)
	}
}
