package calibrate

import (
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"cureslab/cases"
	"cureslab/cases/outdir"
	"cureslab/physics/lsq"
)

// keyLog makes a log of the case file at the values vals of the key paths
// keys (set through the case text, as calibrate does): readings every
// minute over the run at depths (m), exact when sigma is 0.
func keyLog(t *testing.T, file string, keys []string, vals, depths []float64, sigma float64, seed uint64) (*Log, []byte) {
	t.Helper()
	data, err := os.ReadFile(file)
	if err != nil {
		t.Fatal(err)
	}
	v, _, err := cases.NewCaseVariant(file, data, filepath.Dir(file))
	if err != nil {
		t.Fatal(err)
	}
	var frees []Free
	for _, k := range keys {
		frees = append(frees, Free{Key: k})
	}
	b, err := bind(v, frees)
	if err != nil {
		t.Fatal(err)
	}
	p, err := b.problem(vals)
	if err != nil {
		t.Fatal(err)
	}
	return logOf(t, p, depths, sigma, seed), data
}

func frees(keys ...string) []Free {
	var out []Free
	for _, k := range keys {
		f, err := ParseFree(k)
		if err != nil {
			panic(err)
		}
		out = append(out, f)
	}
	return out
}

func TestCalibrateThroughKeyPaths(t *testing.T) {
	// The slab through its case text: a log made without noise at known
	// values gives them back (analytic: the residuals vanish there), and
	// calibrated.toml holds them and runs.
	keys := []string{"top.h", "bottom.h", "materials.test-epoxy.cure.total_heat"}
	l, data := keyLog(t, "testdata/slab.toml", keys, []float64{8, 18, 120}, []float64{0, 2e-3, 6e-3}, 0, 1)
	r, err := Calibrate(context.Background(), "testdata/slab.toml", data, "testdata", l, frees(keys...), Options{Jobs: 2})
	if err != nil {
		t.Fatal(err)
	}
	if !r.Converged() {
		t.Fatalf("status %v", r.Status)
	}
	want := []float64{8, 18, 120}
	for i, p := range r.Params {
		if math.Abs(p.Value/want[i]-1) > 1e-4 {
			t.Errorf("%s = %.8g, made with %g", p.Key, p.Value, want[i])
		}
	}
	if r.Params[0].Unit != "W/m^2/K" || r.Params[2].Unit != "J/g" || !r.Params[0].Log || r.Params[2].Log {
		t.Errorf("units and scales: %+v", r.Params)
	}
	c, err := cases.Parse("calibrated.toml", []byte(r.Calibrated), "testdata")
	if err != nil {
		t.Fatalf("calibrated.toml does not load: %v\n%s", err, r.Calibrated)
	}
	// 6 significant digits written.
	if math.Abs(c.Problem.Top.H/8-1) > 1e-5 || math.Abs(c.Problem.Bottom.H/18-1) > 1e-5 ||
		math.Abs(c.Problem.Materials[0].Cure.TotalHeat/120e3-1) > 1e-5 {
		t.Errorf("calibrated.toml has h %g, %g, heat %g", c.Problem.Top.H, c.Problem.Bottom.H, c.Problem.Materials[0].Cure.TotalHeat)
	}
	if !strings.HasPrefix(r.Calibrated, "# Calibrated by cureslab against log.csv") {
		t.Errorf("calibrated.toml starts with %q", r.Calibrated[:80])
	}
}

func TestAbsentValueIsInserted(t *testing.T) {
	// The plate case leaves layer.plate.contact_resistance to its default:
	// with a range it is fitted from the range's geometric middle and
	// written under the plate's [[layer]].
	file := "testdata/plate.toml"
	data, _ := os.ReadFile(file)
	v, _, err := cases.NewCaseVariant(file, data, "testdata")
	if err != nil {
		t.Fatal(err)
	}
	b, err := bind(v, frees("layer.plate.contact_resistance=1e-4m^2*K/W:1e-2m^2*K/W"))
	if err != nil {
		t.Fatal(err)
	}
	if p := b.params[0]; p.Start != math.Sqrt(1e-4*1e-2) || !p.Log || p.Unit != "m^2*K/W" {
		t.Fatalf("param %+v", p)
	}
	l := keyLogWith(t, b, []float64{2e-3}, []float64{0, 6e-3, 9e-3})
	r, err := Calibrate(context.Background(), file, data, "testdata", l, frees("layer.plate.contact_resistance=1e-4m^2*K/W:1e-2m^2*K/W"), Options{Jobs: 1})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(r.Params[0].Value/2e-3-1) > 1e-3 {
		t.Errorf("contact resistance %g, made with 2e-3 (%v)", r.Params[0].Value, r.Status)
	}
	i := strings.Index(r.Calibrated, "name = \"plate\"")
	j := strings.Index(r.Calibrated, "contact_resistance = \"0.002")
	k := strings.LastIndex(r.Calibrated[:max(i, 0)], "[[layer]]")
	if i < 0 || j < k || j > i || k < 0 {
		t.Errorf("contact_resistance not written under the plate's [[layer]]:\n%s", r.Calibrated)
	}
	if _, err := cases.Parse("c.toml", []byte(r.Calibrated), "testdata"); err != nil {
		t.Errorf("calibrated.toml does not load: %v", err)
	}
}

// keyLogWith makes an exact log of a bound case at vals.
func keyLogWith(t *testing.T, b *binding, vals, depths []float64) *Log {
	t.Helper()
	p, err := b.problem(vals)
	if err != nil {
		t.Fatal(err)
	}
	return logOf(t, p, depths, 0, 0)
}

func TestFreeErrors(t *testing.T) {
	data, _ := os.ReadFile("testdata/slab.toml")
	l, _ := keyLog(t, "testdata/slab.toml", []string{"top.h"}, []float64{12}, []float64{0}, 0, 1)
	for _, c := range []struct {
		spec, want string
	}{
		{"top.hh", `--free top.hh: unknown key "hh"; did you mean "h"?`},
		{"title", "[title] describes the computation"},
		{"time.max_step", "[time] describes the computation"},
		{"top.kind", `the case has "convection" there, not a number or a quantity`},
		{"top.air", `the case has "oven" there, not a number or a quantity`},
		{"top.h=5:40", "the lower bound 5 needs a unit, such as"},
		{"top.h=5W/m^2/K:40C", `to = "40 C" is not a heat transfer coefficient like from`},
		{"top.h=20W/m^2/K:40W/m^2/K", "the case's value 12 W/m^2/K is not inside the range"},
		{"top.h=40W/m^2/K:20W/m^2/K", "--free top.h: the lower bound is not below the upper one"},
		{"layer.slab.contact_resistance", "the case does not set it: give its range"},
		{"layer.slab.cells", "the case is invalid when it changes"},
		{"materials.test-epoxy.cure.n=1:2", "" /* fine: a plain number with plain bounds */},
		{"materials.test-epoxy.cure.n=2:3", "the case's value 1.5 is not inside the range:" /* no unit, no space before the colon */},
		{"materials.test-epoxy.cure.n=1mm:2mm", "must be a plain number, as the value is"},
	} {
		f, err := ParseFree(c.spec)
		if err == nil {
			_, err = Calibrate(context.Background(), "testdata/slab.toml", data, "testdata", l, []Free{f}, Options{Jobs: 1, MaxIter: 1})
		}
		if c.want == "" {
			if err != nil {
				t.Errorf("--free %s: %v", c.spec, err)
			}
			continue
		}
		if err == nil || !strings.Contains(err.Error(), c.want) || !errors.Is(err, ErrFree) {
			t.Errorf("--free %s: got %v, want ErrFree with %q", c.spec, err, c.want)
		}
	}
	if _, err := Calibrate(context.Background(), "testdata/slab.toml", data, "testdata", l, nil, Options{}); !errors.Is(err, ErrFree) {
		t.Errorf("no free value: %v", err)
	}
	if _, err := Calibrate(context.Background(), "testdata/slab.toml", data, "testdata", l, frees("top.h", "top.h"), Options{}); err == nil ||
		!strings.Contains(err.Error(), "the same value as --free top.h") {
		t.Errorf("twice: %v", err)
	}
}

func TestLogOutsideTheCase(t *testing.T) {
	data, _ := os.ReadFile("testdata/slab.toml")
	l, err := ReadLog("log.csv", []byte("time_s,T_4mm_C,T_9mm_C\n0,25,25\n60,26,26\n99999,30,30\n"))
	if err != nil {
		t.Fatal(err)
	}
	_, err = Calibrate(context.Background(), "testdata/slab.toml", data, "testdata", l, frees("top.h"), Options{})
	for _, w := range []string{"log.csv:1:16: T_9mm_C: depth 9 mm is outside the stack (0 to 8 mm)",
		"log.csv:4: time_s: 99999 s is after the end of the run at 4700 s"} {
		if err == nil || !strings.Contains(err.Error(), w) || !errors.Is(err, ErrLog) {
			t.Errorf("got %v, want ErrLog with %q", err, w)
		}
	}
}

func TestUnfinishedFitsAreMarked(t *testing.T) {
	// One iteration: not converged, the best point written and marked.
	// Interrupted after the first accepted step: the same, marked so.
	keys := []string{"top.h", "bottom.h"}
	l, data := keyLog(t, "testdata/slab.toml", keys, []float64{8, 18}, []float64{0, 6e-3}, 0.3, 2)
	r, err := Calibrate(context.Background(), "testdata/slab.toml", data, "testdata", l, frees(keys...), Options{Jobs: 1, MaxIter: 1})
	if err != nil {
		t.Fatal(err)
	}
	if r.Status != lsq.IterationLimit || !strings.HasPrefix(r.Calibrated, "# NOT CONVERGED") {
		t.Errorf("status %v, calibrated.toml starts %q", r.Status, r.Calibrated[:40])
	}
	if !(r.RMSAll < r.StartRMSAll) {
		t.Errorf("one step did not improve: RMS %g from %g", r.RMSAll, r.StartRMSAll)
	}
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	r, err = Calibrate(ctx, "testdata/slab.toml", data, "testdata", l, frees(keys...), Options{Jobs: 2,
		Progress: func(int, float64, int) { cancel() }})
	if err != nil {
		t.Fatal(err)
	}
	if r.Status != lsq.Interrupted || !strings.HasPrefix(r.Calibrated, "# INTERRUPTED") || !(r.RMSAll < r.StartRMSAll) {
		t.Errorf("status %v, RMS %g from %g, calibrated.toml starts %q", r.Status, r.RMSAll, r.StartRMSAll, r.Calibrated[:40])
	}
	dir := t.TempDir()
	set, err := outdir.Open(dir, Kind)
	if err != nil {
		t.Fatal(err)
	}
	if err := StageFiles(set, r); err != nil {
		t.Fatal(err)
	}
	if err := set.Commit(); err != nil {
		t.Fatal(err)
	}
	for _, f := range []string{CalibratedFile, CalibrationFile, ResidualsFile} {
		if _, err := os.Stat(filepath.Join(dir, f)); err != nil {
			t.Errorf("%s: %v", f, err)
		}
	}
}

func TestNoWaveWarningWithoutNoise(t *testing.T) {
	// An exact log leaves residuals of the solver's own error only
	// (< 1e-3 K): they may be correlated in time, but they are no model
	// error to warn about. With the heat of reaction wrong and not free,
	// the residuals wander by kelvins and every thermocouple is warned.
	keys := []string{"top.h", "bottom.h", "materials.test-epoxy.cure.total_heat"}
	l, data := keyLog(t, "testdata/slab.toml", keys, []float64{8, 18, 120}, []float64{0, 4e-3}, 0, 1)
	r, err := Calibrate(context.Background(), "testdata/slab.toml", data, "testdata", l, frees(keys...), Options{Jobs: 2})
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range r.Warnings {
		if strings.Contains(w, "long waves") {
			t.Errorf("exact log: %s", w)
		}
	}
	r, err = Calibrate(context.Background(), "testdata/slab.toml", data, "testdata", l, frees("top.h", "bottom.h"), Options{Jobs: 2})
	if err != nil {
		t.Fatal(err)
	}
	waves := 0
	for _, w := range r.Warnings {
		if strings.Contains(w, "long waves") {
			waves++
		}
	}
	if waves != 2 {
		t.Errorf("heat of reaction 100 J/g against a log made with 120: %d wave warnings, want 2 (RMS %v, lag-1 %v)", waves, r.RMS, r.Autocorr)
	}
}

func TestWideIntervalWarning(t *testing.T) {
	// A contact resistance of 1e-3 m²K/W between 6 mm of resin and a
	// steel plate changes the temperatures by a few tenths of a kelvin,
	// comparable to the 0.3 K noise: the log pins it down only loosely,
	// its 95 % interval is wider than the value, and the fit says so.
	file := "testdata/plate.toml"
	data, _ := os.ReadFile(file)
	v, _, err := cases.NewCaseVariant(file, data, "testdata")
	if err != nil {
		t.Fatal(err)
	}
	spec := "layer.plate.contact_resistance=1e-7m^2*K/W:1e-1m^2*K/W"
	b, err := bind(v, frees(spec))
	if err != nil {
		t.Fatal(err)
	}
	p, err := b.problem([]float64{1e-3})
	if err != nil {
		t.Fatal(err)
	}
	l := logOf(t, p, []float64{0, 6e-3, 9e-3}, 0.3, 9)
	r, err := Calibrate(context.Background(), file, data, "testdata", l, frees(spec), Options{Jobs: 1})
	if err != nil {
		t.Fatal(err)
	}
	pr := r.Params[0]
	if pr.AtBound || !(pr.High-pr.Low > pr.Value) {
		t.Fatalf("the test needs an interior value with a wide interval: %g, interval %g to %g", pr.Value, pr.Low, pr.High)
	}
	found := false
	for _, w := range r.Warnings {
		if strings.Contains(w, "the 95 % interval of layer.plate.contact_resistance") && strings.Contains(w, "is wider than the value: "+cannotTell) {
			found = true
		}
	}
	if !found {
		t.Errorf("no wide-interval warning: %g, interval %g to %g, warnings %q", pr.Value, pr.Low, pr.High, r.Warnings)
	}
}
