package report

import (
	"bytes"
	"context"
	"cureslab/cases"
	"cureslab/cases/results"
	"cureslab/solver"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"strconv"
	"strings"
	"testing"
)

// feed adds N output times of n cells to f: temperature k/10 °C in every
// cell except a hot spot of 1000 °C at output time hot; power from output
// time powered on; cure k/N.
func feed(f *fieldColumns, n, N, hot, powered int) {
	for k := range N {
		c := f.column()
		for i := range n {
			c.T[i], c.Cure[i] = float64(k)/10, float64(k)/float64(N)
			if k == hot {
				c.T[i] = 1000
			}
			if c.P != nil {
				c.P[i] = 0
				if k >= powered {
					c.P[i] = 5e4
				}
			}
		}
		f.add(float64(k)*60, c)
	}
}

// keptTimes returns the output-time indices of the kept columns.
func keptTimes(f *fieldColumns) []int {
	var ks []int
	for _, c := range f.columns() {
		ks = append(ks, c.k)
	}
	return ks
}

// The rule of the kept output times (fieldColumns): all of them up to
// fieldTimesKept; beyond, every s-th (s the smallest power of two leaving
// at most fieldTimesKept, the first included), plus the last, the hottest
// and the first with power, in time order. Source: the rule as the README
// states it (no outside reference).
func TestFieldColumnsRule(t *testing.T) {
	f := newFieldColumns(3, true, []float64{math.NaN(), math.NaN(), math.NaN()})
	feed(f, 3, 300, 7, 5)
	if got := keptTimes(f); len(got) != 300 || got[0] != 0 || got[299] != 299 {
		t.Errorf("300 output times: kept %d (%v…), want all", len(got), got[:min(5, len(got))])
	}

	const N, hot, powered = 5000, 4321, 777
	f = newFieldColumns(3, true, []float64{math.NaN(), math.NaN(), math.NaN()})
	feed(f, 3, N, hot, powered)
	// ⌈5000/8⌉ = 625 > 512 ≥ ⌈5000/16⌉ = 313: every 16th.
	var want []int
	for k := 0; k < N; k += 16 {
		want = append(want, k)
	}
	want = append(want, powered, hot, N-1)
	slices.Sort(want)
	if got := keptTimes(f); !slices.Equal(got, want) {
		t.Errorf("5000 output times: kept %d times, want %d (every 16th, the first with power %d, the hottest %d, the last %d)",
			len(got), len(want), powered, hot, N-1)
	}
	// Dropped columns are reused: no more columns exist than are kept,
	// plus the ones waiting for reuse (at most the grid's last halving).
	if len(f.free)+len(f.columns()) > fieldTimesKept+4+fieldTimesKept/2+1 {
		t.Errorf("%d free columns and %d kept: dropped columns are not reused", len(f.free), len(f.columns()))
	}
	// Every output time counts where all are needed: the hottest of each
	// and the temperature range, the dropped ones included.
	if len(f.hottest) != N || f.hottest[hot] != 1000 || f.hottest[hot+1] != float64(hot+1)/10 || f.tHi != 1000 || f.tLo != 0 {
		t.Errorf("per-time values: %d hottest, hottest at %d = %g, range %g to %g", len(f.hottest), hot, f.hottest[hot], f.tLo, f.tHi)
	}
}

// Gel time of a cell: the first output time at which its cure reaches the
// gel point, linear in time from the output time before; followed over
// every output time, kept or not. Source: linear interpolation (the cure
// k/N reaches 0.5 at output time N/2 exactly, 0.3 at 0.3·N).
func TestFieldColumnsGelTime(t *testing.T) {
	const N = 4000
	f := newFieldColumns(3, false, []float64{0.5, 0.3, math.NaN()})
	feed(f, 3, N, -1, 0)
	if g := f.gelTime[0]; g != float64(N/2)*60 {
		t.Errorf("gel point 0.5: gel time %g s, want %g s", g, float64(N/2)*60)
	}
	if g := f.gelTime[1]; math.Abs(g-0.3*N*60) > 1e-9*N*60 {
		t.Errorf("gel point 0.3: gel time %g s, want %g s", g, 0.3*N*60)
	}
	if g := f.gelTime[2]; !math.IsNaN(g) {
		t.Errorf("unknown gel point: gel time %g s, want NaN", g)
	}
}

// withOutputs returns the report test case with the given cells in its
// resin layer and n output times evenly over its 40 minutes.
func withOutputs(t *testing.T, cells, n int) *cases.Case {
	t.Helper()
	text := strings.Replace(reportText("150 C"), "cells = 12", "cells = "+strconv.Itoa(cells), 1)
	c, err := cases.Parse("report-test.toml", []byte(text), "")
	if err != nil {
		t.Fatal(err)
	}
	p := c.Problem
	p.OutputTimes = make([]float64, n)
	for k := range p.OutputTimes {
		p.OutputTimes[k] = p.End * float64(k+1) / float64(n)
	}
	return c
}

// Above fieldTimesKept output times the page drawn at the end of a run
// still equals, byte for byte, the one redrawn from the run's files: both
// keep the same output times. Source: the contract of RedrawReport (a
// regression guard).
func TestReportAboveTheCapFromFilesEqualsFromMemory(t *testing.T) {
	fixedClock(t)
	c := withOutputs(t, 12, 3*fieldTimesKept)
	r, err := solver.Run(context.Background(), c.Problem)
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	s := results.Summarize(c, r)
	if err := results.WriteRun(dir, c, r, s); err != nil {
		t.Fatal(err)
	}
	if err := WriteReport(context.Background(), dir, c, r, s); err != nil {
		t.Fatal(err)
	}
	mem, _ := os.ReadFile(filepath.Join(dir, ReportFile))
	d, err := runDataOf(c, r, s)
	if err != nil {
		t.Fatal(err)
	}
	if len(d.FieldTimes) > fieldTimesKept+3 || len(d.Times) != len(r.Snapshots) {
		t.Errorf("%d output times, %d kept: want all times for the histories and at most %d kept", len(d.Times), len(d.FieldTimes), fieldTimesKept+3)
	}
	if err := RedrawReport(context.Background(), dir); err != nil {
		t.Fatal(err)
	}
	files, _ := os.ReadFile(filepath.Join(dir, ReportFile))
	if len(mem) == 0 || !bytes.Equal(mem, files) {
		t.Error("above the cap, the report from the files differs from the report from memory")
	}
}

// retained returns the live heap that a Collector holds once a run of c
// has streamed its snapshots into it (after a garbage collection: a count
// of bytes, not a timing).
func retained(t *testing.T, c *cases.Case) (uint64, int) {
	var a, b runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&a)
	col := NewCollector(c)
	r, err := solver.RunStream(context.Background(), c.Problem, col.Add)
	if err != nil || r.Status != solver.OK {
		t.Fatal(err, r.Status)
	}
	runtime.GC()
	runtime.ReadMemStats(&b)
	runtime.KeepAlive(col)
	return b.HeapAlloc - min(a.HeapAlloc, b.HeapAlloc), len(col.tb.Times)
}

// What the report keeps of a run is proportional to its cells, not to
// cells × output times: from 1,024 to 8,192 output times (both above
// fieldTimesKept) of 404 cells, what it holds grows by less than a tenth of what keeping the
// temperature and cure of every cell at each added output time would take
// (404 × 2 × 8 B); only the per-time values of the probes, the air and the
// output times themselves grow.
func TestCollectorMemoryProportionalToCells(t *testing.T) {
	const cells = 400
	few, nFew := retained(t, withOutputs(t, cells, 1024))
	many, nMany := retained(t, withOutputs(t, cells, 8192))
	perTime := float64(many-min(few, many)) / float64(nMany-nFew)
	fields := float64((cells + 4) * 2 * 8)
	t.Logf("%d output times: %d kB held; %d output times: %d kB held; %.0f B more per output time (keeping the fields: %.0f B)",
		nFew, few>>10, nMany, many>>10, perTime, fields)
	if perTime > fields/10 {
		t.Errorf("%.0f B more held per added output time: want under a tenth of the %.0f B of its fields", perTime, fields)
	}
}
