package report

import (
	"bytes"
	"context"
	"cureslab/cases/internal/testkit"
	"cureslab/cases/outdir"
	"cureslab/cases/results"
	"cureslab/cases/sweep"
	"cureslab/physics/dsc"
	"errors"
	"io"
	"os"
	"path/filepath"
	"testing"
	"time"
)

// checkInterruptible draws a page with draw: first with a context that is
// never cancelled, counting its checks (at least minChecks: one per figure,
// so the drawing is stopped part-way and not only before it starts), then
// once with the cancellation at each of those checks in turn. Each of
// those must end with context.Canceled and leave nothing (nothing reports
// whether anything was written).
func checkInterruptible(t *testing.T, minChecks int64, draw func(ctx context.Context) error, nothing func() bool) {
	t.Helper()
	count := testkit.NewStopAfter(-1)
	if err := draw(count); err != nil {
		t.Fatalf("uninterrupted: %v", err)
	}
	checks := count.Checks()
	if checks < minChecks {
		t.Errorf("%d checks of the context, want at least %d (one per figure)", checks, minChecks)
	}
	for n := range checks {
		if !nothing() {
			t.Fatalf("stop at check %d: the uninterrupted page is still there", n)
		}
		err := draw(testkit.NewStopAfter(n))
		if !errors.Is(err, context.Canceled) {
			t.Errorf("stop at check %d of %d: %v, want context.Canceled", n+1, checks, err)
		}
		if !nothing() {
			t.Errorf("stop at check %d of %d: a page was written", n+1, checks)
		}
	}
}

// absent reports whether path does not exist, removing nothing.
func absent(path string) func() bool {
	return func() bool { _, err := os.Stat(path); return errors.Is(err, os.ErrNotExist) }
}

// The run page: WriteReport, RedrawReport (reading the files too) and
// StageReport stop at any check and write or stage nothing.
func TestRunReportInterrupted(t *testing.T) {
	fixedClock(t)
	c, r := runReportCase(t, "150 C")
	s := results.Summarize(c, r)
	dir := t.TempDir()
	page := filepath.Join(dir, ReportFile)
	// Map, cure map, profiles, histories: four figures.
	checkInterruptible(t, 4, func(ctx context.Context) error {
		err := WriteReport(ctx, dir, c, r, s)
		if err == nil {
			os.Remove(page)
		}
		return err
	}, absent(page))

	if err := results.WriteRun(dir, c, r, s); err != nil {
		t.Fatal(err)
	}
	checkInterruptible(t, 5, func(ctx context.Context) error {
		err := RedrawReport(ctx, dir)
		if err == nil {
			os.Remove(page)
		}
		return err
	}, absent(page))

	set, err := outdir.Open(filepath.Join(t.TempDir(), "staged"), results.RunKind)
	if err != nil {
		t.Fatal(err)
	}
	defer set.Abort()
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if err := StageReport(ctx, set, c, r, s); !errors.Is(err, context.Canceled) || len(set.Staged()) != 0 {
		t.Errorf("StageReport after Ctrl-C: %v, staged %v", err, set.Staged())
	}
}

// The other pages: the comparison, the sweep, the DSC fit, the TTT diagram
// and the calibration.
func TestOtherPagesInterrupted(t *testing.T) {
	fixedClock(t)
	c1, r1 := runReportCase(t, "150 C")
	c2, r2 := runReportCase(t, "40 C")
	rows := []results.Compared{
		{Name: "a", Case: c1, Ran: true, Result: r1, Summary: results.Summarize(c1, r1)},
		{Name: "b", Case: c2, Ran: true, Result: r2, Summary: results.Summarize(c2, r2)},
	}
	// writerCase draws a page into a buffer: nothing written is an empty
	// buffer.
	writerCase := func(t *testing.T, minChecks int64, draw func(ctx context.Context, w io.Writer) error) {
		var b bytes.Buffer
		checkInterruptible(t, minChecks, func(ctx context.Context) error {
			b.Reset()
			err := draw(ctx, &b)
			if err == nil {
				b.Reset()
			}
			return err
		}, func() bool { return b.Len() == 0 })
	}
	t.Run("compare", func(t *testing.T) {
		writerCase(t, 3, func(ctx context.Context, w io.Writer) error { return CompareReport(ctx, w, rows, ".") })
	})
	t.Run("calibration", func(t *testing.T) {
		cal := calibrationResult(t, 0)
		writerCase(t, 2, func(ctx context.Context, w io.Writer) error { return CalibrationReport(ctx, w, cal) })
	})
	fileCase := func(t *testing.T, minChecks int64, path string, draw func(ctx context.Context) error) {
		checkInterruptible(t, minChecks, func(ctx context.Context) error {
			err := draw(ctx)
			if err == nil {
				os.Remove(path)
			}
			return err
		}, absent(path))
	}
	t.Run("sweep", func(t *testing.T) {
		dir := t.TempDir()
		runSweep(t, newTinySweep(t, "", sweep.Settings{Vary: mustVary(t,
			"layer.resin.thickness=2mm,3mm",
			"schedules.oven.segments.1.hold=1min,3min")}), dir, sweep.Options{Jobs: 1})
		os.Remove(filepath.Join(dir, SweepReportFile))
		fileCase(t, 2, filepath.Join(dir, SweepReportFile), func(ctx context.Context) error { return WriteSweepReport(ctx, dir, "", nil) })
	})
	t.Run("comparison from files", func(t *testing.T) {
		rows := comparedRows(t, results.StatusNotRun)[:2]
		dir := filepath.Join(t.TempDir(), "cmp")
		writeComparison(t, dir, dir, rows)
		fileCase(t, 2, filepath.Join(dir, CompareReportFile), func(ctx context.Context) error { return RedrawCompareReport(ctx, dir) })
	})
	t.Run("fit", func(t *testing.T) {
		an := demoAnalysis(t)
		path := filepath.Join(t.TempDir(), "fit.html")
		fileCase(t, 2, path, func(ctx context.Context) error { return WriteFitPlot(ctx, path, an, "resin") })
	})
	t.Run("ttt", func(t *testing.T) {
		tt := tttTable(t, true)
		path := filepath.Join(t.TempDir(), "ttt.html")
		fileCase(t, 1, path, func(ctx context.Context) error { return WriteTTTPlot(ctx, path, tt) })
	})
}

// drawPage returns at once when the context is cancelled, however long the
// figure being drawn still takes (a page of a thousand probes keeps gonum
// busy for seconds): the drawing goes on in the background and its page
// is thrown away.
func TestDrawPageStopsWithinASecond(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	release := make(chan struct{})
	defer close(release)
	returned := make(chan error, 1)
	go func() {
		_, err := drawPage(ctx, func(io.Writer) error { <-release; return nil })
		returned <- err
	}()
	time.Sleep(20 * time.Millisecond)
	cancel()
	select {
	case err := <-returned:
		if !errors.Is(err, context.Canceled) {
			t.Errorf("drawPage after Ctrl-C: %v", err)
		}
	case <-time.After(time.Second):
		t.Fatal("drawPage still waits for the figure a second after Ctrl-C")
	}
}

// demoAnalysis analyses the example scans with the autocatalytic law.
func demoAnalysis(t *testing.T) *dsc.Analysis {
	t.Helper()
	an, err := dsc.Analyze(readDemo(t), dsc.Options{Model: dsc.Autocatalytic})
	if err != nil {
		t.Fatal(err)
	}
	return an
}
