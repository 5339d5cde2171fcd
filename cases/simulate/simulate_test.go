package simulate

import (
	"context"
	"cureslab/cases"
	"cureslab/cases/internal/testkit"
	"cureslab/cases/results"
	"errors"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"testing"
)

// TestCompareOvenMicrowave compares the two potting examples, the same part
// cured in an oven and by controlled microwave heating, and checks the table against the runs.
func TestCompareOvenMicrowave(t *testing.T) {
	oven, micro := exampleCase(t, "thick-potting-oven"), exampleCase(t, "thick-potting-microwave")
	dir := t.TempDir()
	rows, err := Compare(context.Background(), []*cases.Case{oven, micro}, dir, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 2 || rows[0].Name != "thick-potting-oven" || rows[1].Name != "thick-potting-microwave" {
		t.Fatalf("rows %+v", rows)
	}
	for _, r := range rows {
		if !r.Ran || r.Err != nil || r.Result == nil {
			t.Fatalf("%s: ran %v, err %v", r.Name, r.Ran, r.Err)
		}
		for _, f := range []string{results.FieldsFile, results.ProbesFile, results.SummaryFile} {
			if _, err := os.Stat(filepath.Join(dir, r.Name, f)); err != nil {
				t.Error(err)
			}
		}
		// Source: energy conservation; the ledger balances to round-off by
		// construction of the scheme (DEVELOPERS.md, One time step).
		if e := float64(r.Summary.ConservationResidual); e > 1e-9 {
			t.Errorf("%s: conservation residual %g", r.Name, e)
		}
	}
	so, sm := rows[0].Summary, rows[1].Summary
	t.Logf("oven:      spread %.2f K, overshoot %.2f K, peak %.2f C, min cure %.4f, gel front %.0f s",
		so.MaxSpreadK, so.OvershootK, so.PeakTemperatureC, so.MinFinalCure, float64(so.GelTimeLastS-so.GelTimeFirstS))
	t.Logf("microwave: spread %.2f K, overshoot %.2f K, peak %.2f C, min cure %.4f, gel front %.0f s, control %.3f K",
		sm.MaxSpreadK, sm.OvershootK, sm.PeakTemperatureC, sm.MinFinalCure, float64(sm.GelTimeLastS-sm.GelTimeFirstS), *sm.ControlMaxErrorK)

	// Design intent of the pair (not a reference value): heating from
	// inside under control keeps the exotherm's peak far lower than the
	// oven does, while both meet their cure. (The through-thickness spread
	// is not smaller: the standing wave over the cup puts a node on the
	// metal, so the bottom of the resin heats by conduction, as in the
	// oven.)
	if !(so.PeakTemperatureC > sm.PeakTemperatureC+10) || !(sm.MinFinalCure >= 0.85 && so.MinFinalCure >= 0.85) {
		t.Errorf("oven peak %.2f C, microwave %.2f C; least cure %.4f and %.4f", so.PeakTemperatureC, sm.PeakTemperatureC, so.MinFinalCure, sm.MinFinalCure)
	}
	if so.ControlMaxErrorK != nil || sm.ControlMaxErrorK == nil {
		t.Errorf("control_max_error_K: oven %v, microwave %v; want it for the controlled case only", so.ControlMaxErrorK, sm.ControlMaxErrorK)
	}

	// The microwave's sensor follows its program. Closed-loop microwave cure
	// systems hold about ±1 °C (common practice); judged after the first
	// 10 minutes of the run, at every output time.
	ctl := micro.Problem.Volumetric.Control
	k := cases.SensorProbe(micro.Problem.Probes, ctl.Sensor)
	if k < 0 {
		t.Fatal("no probe at the sensor")
	}
	worst := 0.0
	for _, s := range rows[1].Result.Snapshots {
		if !(s.PowerFraction >= 0 && s.PowerFraction <= 1) {
			t.Errorf("t = %g s: power fraction %g outside [0, 1]", s.Time, s.PowerFraction)
		}
		if s.Time >= 600 {
			worst = max(worst, math.Abs(s.ProbeT[k]-ctl.Program.At(s.Time)))
		}
	}
	t.Logf("microwave sensor: worst deviation after 10 min %.3f K", worst)
	if worst > 1 {
		t.Errorf("the sensor strays %.3f K from its program (±1 K expected)", worst)
	}

	// compare.csv: one row per case with the values of its summary.
	tab := testkit.ReadCSV(t, filepath.Join(dir, results.CompareFile))
	if len(tab) != 3 || !reflect.DeepEqual(tab[0], results.CompareHeader) {
		t.Fatalf("compare.csv:\n%v", tab)
	}
	col := func(name string) int {
		for i, h := range tab[0] {
			if h == name {
				return i
			}
		}
		t.Fatalf("no column %s", name)
		return -1
	}
	for i, r := range rows {
		row := tab[i+1]
		if row[col("case")] != r.Name || row[col("title")] != r.Case.Title || row[col("status")] != r.Summary.Status {
			t.Errorf("row %d: %v", i, row[:3])
		}
		if got, _ := strconv.ParseFloat(row[col("max_spread_K")], 64); got != float64(r.Summary.MaxSpreadK) {
			t.Errorf("%s: max_spread_K %s, summary %v", r.Name, row[col("max_spread_K")], r.Summary.MaxSpreadK)
		}
		first, _ := strconv.ParseFloat(row[col("gel_time_first_s")], 64)
		last, _ := strconv.ParseFloat(row[col("gel_time_last_s")], 64)
		spread, _ := strconv.ParseFloat(row[col("gel_front_spread_s")], 64)
		// Source: the definition, gel_front_spread_s = last − first.
		if math.Abs(spread-(last-first)) > 1e-6 {
			t.Errorf("%s: gel front spread %g, last − first = %g", r.Name, spread, last-first)
		}
	}
	if tab[1][col("control_max_error_K")] != "" || tab[2][col("control_max_error_K")] == "" {
		t.Errorf("control_max_error_K cells %q, %q", tab[1][col("control_max_error_K")], tab[2][col("control_max_error_K")])
	}
}

// TestCompareInterrupted checks that cases not started after a cancellation
// are recorded as such and the table is still written.
func TestCompareInterrupted(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	c := exampleCase(t, "tile-on-spreader")
	dir := filepath.Join(t.TempDir(), "out")
	rows, err := Compare(ctx, []*cases.Case{c, c}, dir, Options{})
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range rows {
		if r.Ran || !errors.Is(r.Err, context.Canceled) || r.Summary.Status != results.StatusFailed {
			t.Errorf("%s: ran %v, err %v, status %q", r.Name, r.Ran, r.Err, r.Summary.Status)
		}
	}
	tab := testkit.ReadCSV(t, filepath.Join(dir, results.CompareFile))
	want := []string{"tile-on-spreader-2", c.Title, results.StatusFailed}
	if len(tab) != 3 || !reflect.DeepEqual(tab[2][:3], want) {
		t.Fatalf("compare.csv:\n%v", tab)
	}
	for _, cell := range tab[2][3:] {
		if cell != "" {
			t.Errorf("a case not run has values: %v", tab[2])
			break
		}
	}
	if _, err := os.Stat(filepath.Join(dir, "tile-on-spreader")); !os.IsNotExist(err) {
		t.Errorf("a case not run has an output directory: %v", err)
	}
}

// exampleCase parses an embedded example.
func exampleCase(t *testing.T, name string) *cases.Case {
	t.Helper()
	ex, ok := cases.ExampleByName(name)
	if !ok {
		t.Fatalf("no example %s", name)
	}
	c, err := cases.Parse(name+".toml", ex.Text, "")
	if err != nil {
		t.Fatalf("example %s does not load:\n%v", name, err)
	}
	return c
}
