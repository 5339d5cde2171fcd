package simulate

import (
	"context"
	"cureslab/cases"
	"cureslab/cases/internal/num"
	"cureslab/cases/internal/testkit"
	"cureslab/cases/results"
	"errors"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"runtime"
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
	// The run streamed its snapshots to its files: read them back from
	// probes.csv (°C rounded to 1e-6).
	pr := testkit.ReadCSV(t, filepath.Join(dir, rows[1].Name, results.ProbesFile))
	pcol := func(name string) int { return column(t, results.ProbesFile, pr[0], name) }
	iT, iU := pcol("T_"+num.FormatDepth(micro.Problem.Probes[k])+"mm_C"), pcol("power_fraction")
	worst := 0.0
	for _, row := range pr[1:] {
		tm, _ := strconv.ParseFloat(row[0], 64)
		T, _ := strconv.ParseFloat(row[iT], 64)
		u, _ := strconv.ParseFloat(row[iU], 64)
		if !(u >= 0 && u <= 1) {
			t.Errorf("t = %g s: power fraction %g outside [0, 1]", tm, u)
		}
		if tm >= 600 {
			worst = max(worst, math.Abs(T+273.15-ctl.Program.At(tm)))
		}
	}
	if len(pr) < 50 {
		t.Fatalf("probes.csv has %d rows", len(pr))
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
	col := func(name string) int { return column(t, results.CompareFile, tab[0], name) }
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

// TestCompareInterrupted checks that the cases not started after a
// cancellation that came once a case had finished are recorded as not run,
// with the table written and no folder of theirs; cancelled before any
// case ran, Compare writes nothing at all.
func TestCompareInterrupted(t *testing.T) {
	c := exampleCase(t, "tile-on-spreader")
	dir := filepath.Join(t.TempDir(), "out")
	ctx := whenExists{context.Background(), filepath.Join(dir, "tile-on-spreader.staging", results.SummaryFile)}
	rows, err := Compare(ctx, []*cases.Case{c, c}, dir, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if r := rows[0]; !r.Ran || r.Err != nil || r.Summary.Status != results.StatusOK {
		t.Errorf("first case: ran %v, err %v, status %q", r.Ran, r.Err, r.Summary.Status)
	}
	if r := rows[1]; r.Ran || !errors.Is(r.Err, ErrNotRun) || r.Summary.Status != results.StatusNotRun {
		t.Errorf("%s: ran %v, err %v, status %q", r.Name, r.Ran, r.Err, r.Summary.Status)
	}
	tab := testkit.ReadCSV(t, filepath.Join(dir, results.CompareFile))
	want := []string{"tile-on-spreader-2", c.Title, results.StatusNotRun}
	if len(tab) != 3 || !reflect.DeepEqual(tab[2][:3], want) || tab[1][2] != results.StatusOK {
		t.Fatalf("compare.csv:\n%v", tab)
	}
	for _, cell := range tab[2][3:] {
		if cell != "" {
			t.Errorf("a case not run has values: %v", tab[2])
			break
		}
	}
	if _, err := os.Stat(filepath.Join(dir, "tile-on-spreader", results.SummaryFile)); err != nil {
		t.Errorf("the finished case has no outputs: %v", err)
	}
	if _, err := os.Stat(filepath.Join(dir, "tile-on-spreader-2")); !os.IsNotExist(err) {
		t.Errorf("a case not run has an output directory: %v", err)
	}

	cancelled, cancel := context.WithCancel(context.Background())
	cancel()
	fresh := filepath.Join(t.TempDir(), "fresh")
	rows, err = Compare(cancelled, []*cases.Case{c, c}, fresh, Options{})
	if !errors.Is(err, ErrNoneFinished) {
		t.Fatalf("cancelled before any case ran: %v", err)
	}
	for _, r := range rows {
		if r.Ran || r.Summary.Status != results.StatusNotRun {
			t.Errorf("%s: ran %v, status %q", r.Name, r.Ran, r.Summary.Status)
		}
	}
	if _, err := os.Stat(fresh); !os.IsNotExist(err) {
		t.Errorf("nothing ran, yet the output directory was made: %v", err)
	}
}

// column returns the index of the column name in the header head of file.
func column(t *testing.T, file string, head []string, name string) int {
	t.Helper()
	for i, h := range head {
		if h == name {
			return i
		}
	}
	t.Fatalf("%s has no column %s", file, name)
	return -1
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

// allocatedByRun returns the bytes a run of the oven potting example with
// the given number of output times allocates (runtime.MemStats.TotalAlloc,
// a count, not a timing), without its report (the report's own bound is
// tested in cases/report: it holds a bounded set of output times, while
// drawing the probe histories makes short-lived garbage per output time).
func allocatedByRun(t *testing.T, outputs int) uint64 {
	t.Helper()
	c := exampleCase(t, "thick-potting-oven")
	p := c.Problem
	p.OutputTimes = make([]float64, outputs)
	for k := range p.OutputTimes {
		p.OutputTimes[k] = p.End * float64(k+1) / float64(outputs)
	}
	dir := t.TempDir()
	var a, b runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&a)
	out := Case(context.Background(), c, dir, Options{})
	runtime.ReadMemStats(&b)
	if out.Err != nil || out.Summary.Status != results.StatusOK {
		t.Fatalf("%d output times: %v, status %s", outputs, out.Err, out.Summary.Status)
	}
	return b.TotalAlloc - a.TotalAlloc
}

// The memory of a run is proportional to its cells, not to cells × output
// times: its snapshots go to fields.csv and probes.csv as they come. The
// same case with 100 times as many output times allocates in all (a bound
// on its peak) less than twice as much; keeping the snapshots would take
// 5,000 × cells × five values of 8 B more. Source: the design of the output
// path (no outside reference; a count of bytes, not a timing).
func TestRunMemoryProportionalToCells(t *testing.T) {
	cells := exampleCase(t, "thick-potting-oven").Problem.Mesh.Cells()
	few, many := allocatedByRun(t, 50), allocatedByRun(t, 5000)
	kept := uint64(5000 * cells * 5 * 8)
	t.Logf("%d cells: 50 output times allocate %d kB, 5000 allocate %d kB (keeping 5000 snapshots: %d kB)", cells, few>>10, many>>10, kept>>10)
	if many > 2*few {
		t.Errorf("%d cells: 5000 output times allocate %d kB, 50 allocate %d kB: want less than twice as much", cells, many>>10, few>>10)
	}
}
