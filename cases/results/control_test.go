package results

import (
	"context"
	"cureslab/cases"
	"cureslab/cases/internal/testkit"
	"cureslab/mesh"
	"cureslab/physics"
	"cureslab/solver"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"testing"
)

// TestGoodVolumetricOpenLoop checks a constant field with the default
// attenuation and a shield given by shield = true alone.
func TestGoodVolumetricOpenLoop(t *testing.T) {
	c := loadGood(t, "volumetric-open-loop.toml")
	p := c.Problem
	v := p.Volumetric
	if v == nil || v.Control != nil {
		t.Fatalf("Volumetric = %+v, want open-loop heating", v)
	}
	// Source: SI units: 27.12 MHz, 20 kV/m.
	checkNear(t, "Frequency", v.Frequency, 27.12e6)
	checkNear(t, "Field", v.Field, 20e3)
	// Source: the README's Case file reference, attenuation defaults to "none", a uniform field.
	if v.Attenuation != physics.Uniform {
		t.Errorf("Attenuation = %v, want none", v.Attenuation)
	}
	coat, plate := p.Materials[0].Dielectric, p.Materials[1].Dielectric
	// Source: the README's Case file reference, loss_factor_cured defaults to loss_factor.
	if coat == nil || coat.Shield || !near(coat.LossFactor, 0.2) || !near(coat.LossFactorCured, 0.2) {
		t.Errorf("coat dielectric = %+v", coat)
	}
	if plate == nil || !plate.Shield {
		t.Errorf("plate dielectric = %+v, want a shield", plate)
	}
	checkSlice(t, "Probes", p.Probes, []float64{0, 0.001})
	if c.Volumetric == nil || c.Volumetric.Program != "" || c.Volumetric.FieldUnused {
		t.Errorf("Case.Volumetric = %+v", c.Volumetric)
	}
	if h := probesHeader(c); slices.Contains(h, "power_fraction") {
		t.Errorf("probes.csv header %v has power_fraction without control", h)
	}
}

// TestControlledProbesAndSummary runs a short controlled case: probes.csv
// has power_fraction after the air columns (README, Case file reference) with values in [0, 1],
// and summary.json carries control_max_error_K.
func TestControlledProbesAndSummary(t *testing.T) {
	c := testkit.VolumetricCase(t, "permittivity = 20\nloss_factor = 5",
		"[volumetric]\nfrequency = \"2.45 GHz\"\n[volumetric.control]\nsensor = \"5 mm\"\nprogram = \"cure\"\nmax_field = \"2 kV/m\"\n[output]\nprobes = [\"0 mm\"]\n")
	c.Problem.End = 600
	c.Problem.OutputTimes = []float64{120, 240, 360, 480, 600}
	r, err := solver.Run(context.Background(), c.Problem)
	if err != nil || r.Status != solver.OK {
		t.Fatalf("run: %v %v", err, r.Err)
	}
	dir := t.TempDir()
	if err := WriteRun(dir, c, r, Summarize(c, r)); err != nil {
		t.Fatal(err)
	}
	rows := testkit.ReadCSV(t, filepath.Join(dir, ProbesFile))
	// Source: the README's Case file reference, column order; the sensor at 5 mm is added as a probe.
	// program_C (the control program at each output time) comes before
	// power_fraction.
	want := []string{"time_s", "T_0mm_C", "cure_0mm", "T_5mm_C", "cure_5mm", "air_top_C", "program_C", "power_fraction", "heat_in_J_per_m2"}
	if !reflect.DeepEqual(rows[0], want) {
		t.Fatalf("probes.csv header %v, want %v", rows[0], want)
	}
	for _, row := range rows[1:] {
		// The program column holds the program at the row's time.
		tm, prog := parseF(t, row[0]), parseF(t, row[6])
		if want := c.Problem.Volumetric.Control.Program.At(tm) - 273.15; math.Abs(prog-want) > 1e-6 {
			t.Errorf("program_C at t = %g s: %g, want %g", tm, prog, want)
		}
		u := parseF(t, row[7])
		if !(u >= 0 && u <= 1) {
			t.Errorf("t = %s s: power_fraction %g outside [0, 1]", row[0], u)
		}
	}
	b, err := os.ReadFile(filepath.Join(dir, SummaryFile))
	if err != nil {
		t.Fatal(err)
	}
	var s map[string]any
	if err := json.Unmarshal(b, &s); err != nil {
		t.Fatal(err)
	}
	e, ok := s["control_max_error_K"].(float64)
	if !ok || math.Abs(e-ControlError(c, r)) > 1e-6 {
		t.Errorf("control_max_error_K = %v, want %g", s["control_max_error_K"], ControlError(c, r))
	}
}

// TestControlError checks the largest deviation of the sensor from its
// program on hand-made snapshots (analytic).
func TestControlError(t *testing.T) {
	m, err := mesh.Build([]mesh.Layer{{Name: "a", Thickness: 0.01, Cells: 4}}, mesh.Options{})
	if err != nil {
		t.Fatal(err)
	}
	prog, _ := physics.NewSchedule([]float64{0, 100}, []float64{300, 310})
	p := &solver.Problem{Mesh: m, Probes: []float64{0, 0.004},
		Volumetric: &physics.Volumetric{Frequency: 2.45e9, Field: 1000,
			Control: &physics.Control{Sensor: 0.004, Program: prog, Period: 1, Gain: 0.2, IntegralTime: 60}}}
	c := &cases.Case{Problem: p}
	r := &solver.Result{Snapshots: []solver.Snapshot{
		{Time: 0, ProbeT: []float64{290, 300}},
		{Time: 50, ProbeT: []float64{290, 304.2}},  // program 305: 0.8 K low
		{Time: 200, ProbeT: []float64{290, 310.5}}, // program 310: 0.5 K high
	}}
	if got := ControlError(c, r); math.Abs(got-0.8) > 1e-12 {
		t.Errorf("ControlError = %.15g, want 0.8", got)
	}
	p.Volumetric.Control = nil
	if got := ControlError(c, r); !math.IsNaN(got) {
		t.Errorf("ControlError without control = %g, want NaN", got)
	}
	if s := Summarize(&cases.Case{Problem: p, Criteria: cases.Criteria{MinCure: math.NaN(), MaxTemperature: math.NaN(), MaxSpread: math.NaN()}}, r); s.ControlMaxErrorK != nil {
		t.Errorf("control_max_error_K = %v without control, want it left out", *s.ControlMaxErrorK)
	}
}

func loadGood(t *testing.T, name string) *cases.Case {
	t.Helper()
	c, err := cases.Load(filepath.Join("../../testdata/good", name))
	if err != nil {
		t.Fatalf("Load(%s): %v", name, err)
	}
	return c
}

func near(got, want float64) bool {
	return math.Abs(got-want) <= 1e-12*math.Max(1, math.Abs(want))
}

func checkNear(t *testing.T, what string, got, want float64) {
	t.Helper()
	if !near(got, want) {
		t.Errorf("%s = %.15g, want %.15g", what, got, want)
	}
}

func parseF(t *testing.T, s string) float64 {
	t.Helper()
	var f Float
	if err := json.Unmarshal([]byte(s), &f); err != nil {
		t.Fatalf("%q: %v", s, err)
	}
	return float64(f)
}

func checkSlice(t *testing.T, what string, got, want []float64) {
	t.Helper()
	if len(got) != len(want) {
		t.Errorf("%s = %v, want %v", what, got, want)
		return
	}
	for i := range got {
		if !near(got[i], want[i]) {
			t.Errorf("%s[%d] = %.15g, want %.15g", what, i, got[i], want[i])
		}
	}
}
