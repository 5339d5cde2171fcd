package report

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"cureslab/cases"
	"cureslab/cases/results"
	"cureslab/solver"
)

// standingCase is a curing layer in a metal tray under a controlled plane
// wave from the top, swept over a band when band is true.
func standingCase(t *testing.T, band bool) (*cases.Case, *solver.Result) {
	t.Helper()
	freq := `frequency = "2.45 GHz"`
	if band {
		freq = "band = [\"2.2 GHz\", \"2.7 GHz\"]\nband_points = 11"
	}
	text := `title = "absorbed power"
[initial]
temperature = "23 C"
[[layer]]
name = "resin"
material = "resin-T"
thickness = "8 mm"
cells = 32
[[layer]]
name = "tray"
material = "aluminium"
thickness = "1 mm"
cells = 4
[materials.resin-T]
density = "1200 kg/m^3"
specific_heat = "1400 J/kg/K"
conductivity = "0.2 W/m/K"
[materials.resin-T.cure]
model = "nth-order"
total_heat = "300 J/g"
A1 = "2e5 1/s"
E1 = "60 kJ/mol"
n = 1.5
[materials.resin-T.dielectric]
permittivity = 4
loss_factor = 0.4
loss_factor_cured = 0.1
[schedules.cure]
start = "23 C"
segments = [{ ramp = "2 C/min", to = "60 C" }, { hold = "20 min" }]
[volumetric]
attenuation = "standing-wave"
incident = "top"
incident_power = "5 kW/m^2"
` + freq + `
[volumetric.control]
sensor = "2 mm"
program = "cure"
[top]
kind = "convection"
h = "5 W/m^2/K"
air = "23 C"
[bottom]
kind = "insulated"
`
	c, err := cases.Parse("standing.toml", []byte(text), "")
	if err != nil {
		t.Fatal(err)
	}
	r, err := solver.Run(context.Background(), c.Problem)
	if err != nil || r.Status != solver.OK {
		t.Fatalf("run: %v %v", err, r.Err)
	}
	return c, r
}

// The report of a run under volumetric heating draws the absorbed power
// through the thickness, from memory and from fields.csv alike; the
// comparison of one frequency with a band draws both profiles.
func TestReportAbsorbedPower(t *testing.T) {
	fixedClock(t)
	c, r := standingCase(t, false)
	dir := t.TempDir()
	if err := results.WriteRun(dir, c, r, results.Summarize(c, r)); err != nil {
		t.Fatal(err)
	}
	if err := WriteReport(context.Background(), dir, c, r, results.Summarize(c, r)); err != nil {
		t.Fatal(err)
	}
	mem, err := os.ReadFile(filepath.Join(dir, ReportFile))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(mem), "Absorbed power through the thickness") || !strings.Contains(string(mem), "absorbed power at full output (kW/m³)") {
		t.Error("no absorbed-power figure in the report of a volumetric run")
	}
	for _, s := range svgs(string(mem)) {
		svgTexts(t, s) // well-formed
	}
	if err := RedrawReport(context.Background(), dir); err != nil {
		t.Fatal(err)
	}
	files, err := os.ReadFile(filepath.Join(dir, ReportFile))
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(mem, files) {
		t.Error("the report from fields.csv differs from the report from memory")
	}

	cb, rb := standingCase(t, true)
	rows := []results.Compared{
		{Name: "single", Case: c, Ran: true, Summary: results.Summarize(c, r), Result: r},
		{Name: "band", Case: cb, Ran: true, Summary: results.Summarize(cb, rb), Result: rb},
	}
	var page bytes.Buffer
	if err := CompareReport(context.Background(), &page, rows, "."); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(page.String(), "Absorbed power through the thickness") {
		t.Error("the comparison draws no absorbed power")
	}
}
