package report

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"cureslab/cases/dscfile"
	"cureslab/physics/dsc"
)

func fitPage(t *testing.T, scans []*dsc.Scan, model string) string {
	t.Helper()
	fixedClock(t)
	an, err := dsc.Analyze(scans, dsc.Options{Model: model})
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "fit.html")
	if err := WriteFitPlot(context.Background(), path, an, "demo <resin>"); err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// The example scans: a rate figure with a panel for the dynamic scans and
// one for the isothermal scans, and the E(α) figure, axes with units.
func TestWriteFitPlot(t *testing.T) {
	page := fitPage(t, readDemo(t), dsc.Autocatalytic)
	checkSelfContained(t, page)
	if !strings.Contains(page, "<h1>DSC fit: demo &lt;resin&gt;</h1>") {
		t.Error("title missing or not escaped")
	}
	figs := svgs(page)
	if len(figs) != 2 {
		t.Fatalf("%d figures, want 2 (rates, E(α))", len(figs))
	}
	rates, ea := svgTexts(t, figs[0]), svgTexts(t, figs[1])
	for _, want := range []string{"temperature (°C)", "time in the window (min)", "rate of cure dα/dt (1/min)",
		"dyn-02Kmin.csv", "dyn-20Kmin.csv", "iso-130C.csv"} {
		if !hasText(rates, want) {
			t.Errorf("rate figure lacks %q", want)
		}
	}
	for _, want := range []string{"degree of cure α (–)", "activation energy (kJ/mol)", "Friedman", "Ozawa–Flynn–Wall", "Kissinger"} {
		if !hasText(ea, want) {
			t.Errorf("E(α) figure lacks %q", want)
		}
	}
	for _, want := range []string{"fitted: R²", "<td>dyn-05Kmin.csv</td><td>5 K/min</td>"} {
		if !strings.Contains(page, want) {
			t.Errorf("page lacks %q", want)
		}
	}
}

// One heating rate: no model and no Friedman plot; the page says why and
// shows the measured rate.
func TestWriteFitPlotNoFit(t *testing.T) {
	page := fitPage(t, readDemo(t)[2:3], dsc.NthOrder)
	checkSelfContained(t, page)
	if !strings.Contains(page, `<div class="alert" role="alert"><p>No model fitted: `) {
		t.Error("the page does not say that no model was fitted")
	}
	figs := svgs(page)
	if len(figs) != 1 {
		t.Fatalf("%d figures, want 1 (measured rate)", len(figs))
	}
	if !hasText(svgTexts(t, figs[0]), "rate of cure dα/dt (1/min)") {
		t.Error("rate figure lacks its axis label")
	}
}

func TestWriteFitPlotErrors(t *testing.T) {
	if err := WriteFitPlot(context.Background(), filepath.Join(t.TempDir(), "fit.html"), &dsc.Analysis{}, "x"); err == nil {
		t.Error("an empty analysis gave no error")
	}
	an, err := dsc.Analyze(readDemo(t)[:2], dsc.Options{})
	if err != nil {
		t.Fatal(err)
	}
	if err := WriteFitPlot(context.Background(), filepath.Join(t.TempDir(), "no", "fit.html"), an, "x"); err == nil || !strings.Contains(err.Error(), "does not exist") {
		t.Errorf("missing directory: err %v", err)
	}
}

// readDemo reads the example scans of testdata/dsc.
func readDemo(t *testing.T) []*dsc.Scan {
	t.Helper()
	var scans []*dsc.Scan
	for _, spec := range dsc.DemoScans() {
		s, err := dscfile.ReadScan(context.Background(), filepath.Join("../../testdata/dsc", spec.Name))
		if err != nil {
			t.Fatal(err)
		}
		scans = append(scans, s)
	}
	return scans
}
