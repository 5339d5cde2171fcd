package report

import (
	"bytes"
	"context"
	"encoding/xml"
	"os"
	"regexp"
	"strings"
	"testing"

	"cureslab/cases"
	"cureslab/cases/calibrate"
	"cureslab/cases/check"
)

// calibrationResult fits top.h and bottom.h of the calibration test slab to
// a noisy log made at other values, in at most maxIter iterations.
func calibrationResult(t *testing.T, maxIter int) *calibrate.Result {
	t.Helper()
	const file = "../calibrate/testdata/slab.toml"
	data, err := os.ReadFile(file)
	if err != nil {
		t.Fatal(err)
	}
	c, err := cases.Parse(file, data, "")
	if err != nil {
		t.Fatal(err)
	}
	p := *c.Problem
	p.Top.H, p.Bottom.H = 8, 18
	var times []float64
	for tm := 0.0; tm <= p.End; tm += 60 {
		times = append(times, tm)
	}
	logData, err := calibrate.SyntheticLog(context.Background(), &p, calibrate.Synth{Depths: []float64{0, 4e-3}, Times: times, Sigma: 0.3, Seed: 4, Decimals: 2})
	if err != nil {
		t.Fatal(err)
	}
	l, err := calibrate.ReadLog("log.csv", logData)
	if err != nil {
		t.Fatal(err)
	}
	var free []calibrate.Free
	for _, k := range []string{"top.h", "bottom.h"} {
		f, _ := calibrate.ParseFree(k)
		free = append(free, f)
	}
	r, err := calibrate.Calibrate(context.Background(), file, data, "", l, free, calibrate.Options{Jobs: 1, MaxIter: maxIter})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func TestCalibrationReport(t *testing.T) {
	fixedClock(t)
	r := calibrationResult(t, 0)
	var b bytes.Buffer
	if err := CalibrationReport(context.Background(), &b, r); err != nil {
		t.Fatal(err)
	}
	page := b.String()
	for _, want := range []string{
		"<h1>Calibration: 8 mm slab, both faces in oven air</h1>",
		"fitted: RMS residual",
		"Fitted values", "Residuals per thermocouple", "Measured and simulated temperatures",
		"Residuals over time", "Correlation of the fitted values",
		"T at 4 mm (°C)", "simulated − measured (K)",
		"drawn 2030-01-02 03:04 UTC",
	} {
		if !strings.Contains(page, htmlEscaped(want)) && !strings.Contains(page, want) {
			t.Errorf("page lacks %q", want)
		}
	}
	// The two film coefficients of this slab correlate beyond 0.95 (top
	// face and mid-plane only): the cell is marked, the warning listed.
	if r.Corr == nil || !(r.Corr.At(0, 1) < -0.95) {
		t.Fatalf("correlation %v: the test expects the two h to correlate beyond 0.95", r.Corr)
	}
	if !strings.Contains(page, `<td class="fail">`) || !strings.Contains(page, htmlEscaped("the log cannot tell these apart")) {
		t.Error("correlation beyond 0.95 not marked, or no warning")
	}
	for _, s := range check.Cautions(check.CautionScope{Curing: true}) {
		if !strings.Contains(page, htmlEscaped(s)) {
			t.Errorf("caution missing: %q", s)
		}
	}
	// Every figure is well-formed XML, and nothing is fetched.
	for _, svg := range regexp.MustCompile(`(?s)<svg.*?</svg>`).FindAllString(page, -1) {
		if err := xml.Unmarshal([]byte(svg), new(struct{})); err != nil {
			t.Errorf("figure is not XML: %v", err)
		}
	}
	for _, bad := range []string{"<script", "<link", "src=", "url("} {
		if strings.Contains(strings.ToLower(page), bad) {
			t.Errorf("page contains %q", bad)
		}
	}

	// One iteration: marked as not converged.
	b.Reset()
	if err := CalibrationReport(context.Background(), &b, calibrationResult(t, 1)); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), "NOT CONVERGED") || !strings.Contains(b.String(), `class="alert"`) {
		t.Error("an unconverged fit is not marked")
	}
}
