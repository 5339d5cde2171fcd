package results

import (
	"bytes"
	"cureslab/cases"
	"cureslab/cases/internal/testkit"
	"cureslab/cases/outdir"
	"errors"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"testing"
)

// TestCompareHeaderGolden pins the columns of compare.csv.
func TestCompareHeaderGolden(t *testing.T) {
	dir := t.TempDir()
	set, err := outdir.Open(dir, CompareKind)
	if err != nil {
		t.Fatal(err)
	}
	if err := StageComparison(set, nil); err != nil {
		t.Fatal(err)
	}
	if err := set.Commit(); err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(filepath.Join(dir, CompareFile))
	if err != nil {
		t.Fatal(err)
	}
	testkit.Golden(t, "compare_header.golden", b)
}

func TestCompareNames(t *testing.T) {
	cs := []*cases.Case{{File: "a/oven.toml"}, {File: "b/oven.toml"}, {File: "micro.case.toml"}, {File: "compare.csv.toml"}, {File: "oven-2.toml"}}
	want := []string{"oven", "oven-2", "micro.case", "compare.csv-2", "oven-2-2"}
	if got := CompareNames(cs); !reflect.DeepEqual(got, want) {
		t.Errorf("CompareNames = %v, want %v", got, want)
	}
}

// TestPrintComparisonGolden pins the printed table on fixed summaries.
func TestPrintComparisonGolden(t *testing.T) {
	nan := Float(math.NaN())
	e := Float(0.42)
	a := Summary{Title: "in the oven", Status: StatusOK, PeakTemperatureC: 106.5, PeakDepthMM: 5.375, OvershootK: 41.5,
		MaxSpreadK: 10.7, MinFinalCure: 0.8534, MinFinalCureDepthMM: 11.875, TimeToMinCureS: 14120,
		GelTimeFirstS: 5357, GelTimeLastS: 5673, ConservationResidual: 6e-15}
	b := Summary{Title: "by microwave", Status: StatusCriteriaFailed, PeakTemperatureC: 69.3, PeakDepthMM: 5.375, OvershootK: 6.8,
		MaxSpreadK: 6.3, MinFinalCure: 0.8159, MinFinalCureDepthMM: 11.875, TimeToMinCureS: nan,
		GelTimeFirstS: 7440, GelTimeLastS: 8726, ConservationResidual: 1e-13, ControlMaxErrorK: &e}
	crit := &cases.Case{Criteria: cases.Criteria{MinCure: 0.85, MaxTemperature: math.NaN(), MaxSpread: math.NaN()}}
	rows := []Compared{
		{Name: "oven", Case: crit, Ran: true, Summary: a},
		{Name: "microwave", Case: crit, Ran: true, Summary: b},
		{Name: "third", Summary: Summary{Title: "not run", Status: StatusNotRun}, Err: errors.New("not run: interrupted")},
	}
	var buf bytes.Buffer
	if err := PrintComparison(&buf, rows); err != nil {
		t.Fatal(err)
	}
	testkit.Golden(t, "compare_print.golden", buf.Bytes())
}
