package main

import (
	"context"
	"cureslab/cases"
	"cureslab/cases/calibrate"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestCalibrateCommand(t *testing.T) {
	dir := chdir(t)
	for name, file := range map[string]string{"thick-potting-oven": "potting.toml", "thick-potting-oven-trial.csv": "trial.csv"} {
		code, out, _ := cl(t, "example", name)
		if code != exitOK {
			t.Fatalf("example %s: exit %d", name, code)
		}
		if err := os.WriteFile(file, []byte(out), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	free := []string{"--free", "top.h", "--free", "bottom.h", "--free", "materials.potting-resin-A.cure.total_heat"}

	// The README's worked example: exit 0, every output written.
	code, out, errs := cl(t, append([]string{"calibrate", "potting.toml", "--measured", "trial.csv", "-j", "2"}, free...)...)
	if code != exitOK || !strings.Contains(out, "converged after") || !strings.Contains(out, "outputs in ./potting-calibrated") {
		t.Fatalf("calibrate: exit %d\nstdout:\n%s\nstderr:\n%s", code, out, errs)
	}
	for _, f := range []string{"calibrated.toml", "calibration.csv", "residuals.csv", "report.html"} {
		if _, err := os.Stat(filepath.Join(dir, "potting-calibrated", f)); err != nil {
			t.Errorf("%s not written: %v", f, err)
		}
	}
	// calibrated.toml is a case that runs.
	if code, _, errs := cl(t, "check", filepath.Join("potting-calibrated", "calibrated.toml")); code != exitOK {
		t.Errorf("check calibrated.toml: exit %d\n%s", code, errs)
	}

	// Not converged within one iteration: exit 3, outputs written and marked.
	code, _, errs = cl(t, append([]string{"calibrate", "potting.toml", "--measured", "trial.csv", "--max-iter", "1", "-o", "one"}, free...)...)
	toml, _ := os.ReadFile(filepath.Join(dir, "one", "calibrated.toml"))
	if code != exitFailure || !strings.HasPrefix(string(toml), "# NOT CONVERGED") || !strings.Contains(errs, "did not converge") {
		t.Errorf("--max-iter 1: exit %d, stderr %q, calibrated.toml starts %.40q", code, errs, toml)
	}

	// Bad logs and options: exit 2, a positioned message, nothing written.
	os.WriteFile("back.csv", []byte("time_s,T_6mm_C\n0,23\n120,24\n60,25\n"), 0o644)
	os.WriteFile("deep.csv", []byte("time_s,T_6mm_C,T_40mm_C\n0,23,23\n"), 0o644)
	os.WriteFile("late.csv", []byte("time_s,T_6mm_C\n0,23\n90000,24\n"), 0o644)
	os.WriteFile("none.csv", []byte("time_s,air_C\n0,23\n"), 0o644)
	for _, tc := range []struct {
		args []string
		msg  string
	}{
		{[]string{"--measured", "back.csv", "--free", "top.h"}, "back.csv:4:1: time_s: 60 s does not come after 120 s on line 3"},
		{[]string{"--measured", "deep.csv", "--free", "top.h"}, "deep.csv:1:16: T_40mm_C: depth 40 mm is outside the stack (0 to 15.6 mm)"},
		{[]string{"--measured", "late.csv", "--free", "top.h"}, "late.csv:3: time_s: 90000 s is after the end of the run"},
		{[]string{"--measured", "none.csv", "--free", "top.h"}, "none.csv:1:1: no temperature column"},
		{[]string{"--measured", "trial.csv", "--free", "top.kind"}, "not a number or a quantity"},
		{[]string{"--measured", "trial.csv"}, "give at least one value to fit"},
		{[]string{"--free", "top.h"}, "give the thermocouple log"},
		{[]string{"--measured", "missing.csv", "--free", "top.h"}, "cannot read the log"},
		{[]string{"--measured", "trial.csv", "--free", "top.h=5:"}, "needs a unit"},
		{[]string{"--measured", "trial.csv", "--free", "top.h", "--max-iter", "0"}, "--max-iter wants at least 1"},
	} {
		args := append([]string{"calibrate", "potting.toml", "-o", "bad"}, tc.args...)
		code, _, errs := cl(t, args...)
		if code != exitUsage || !strings.Contains(errs, tc.msg) {
			t.Errorf("cureslab %q: exit %d, stderr %q; want 2 and %q", args, code, errs, tc.msg)
		}
		if _, err := os.Stat(filepath.Join(dir, "bad")); err == nil {
			t.Fatalf("cureslab %q wrote its output directory", args)
		}
	}
}

// A Ctrl-C before the page of a calibration is drawn (during the fit, or
// while it is drawn): the three files go in place without the page, and
// the page of an earlier calibration into the directory is removed.
func TestWriteCalibrationInterrupted(t *testing.T) {
	ex, _ := cases.ExampleByName("thick-potting-oven")
	l, err := calibrate.ReadLog("trial.csv", calibrate.ExampleLog())
	if err != nil {
		t.Fatal(err)
	}
	f, err := calibrate.ParseFree("top.h")
	if err != nil {
		t.Fatal(err)
	}
	res, err := calibrate.Calibrate(context.Background(), "potting.toml", ex.Text, ".", l, []calibrate.Free{f}, calibrate.Options{Jobs: 1, MaxIter: 1})
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(t.TempDir(), "cal")
	if drawn, err := writeCalibration(context.Background(), dir, res); err != nil || !drawn {
		t.Fatalf("uninterrupted: drawn %v, %v", drawn, err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	drawn, err := writeCalibration(ctx, dir, res)
	if err != nil || drawn {
		t.Fatalf("interrupted: drawn %v, %v", drawn, err)
	}
	for _, name := range []string{calibrate.CalibratedFile, calibrate.CalibrationFile, calibrate.ResidualsFile} {
		if _, err := os.Stat(filepath.Join(dir, name)); err != nil {
			t.Errorf("%s: %v", name, err)
		}
	}
	if _, err := os.Stat(filepath.Join(dir, calibrate.ReportFile)); !os.IsNotExist(err) {
		t.Errorf("the earlier page is left beside the new files: %v", err)
	}
}
