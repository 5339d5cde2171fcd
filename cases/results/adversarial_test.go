package results

// Adversarial cases end to end: each case file goes through Parse,
// solver.Run and WriteRun into a temporary directory, and is either solved
// correctly — checked against an analytic value or a physical bound, and the
// energy ledger — or refused by the loader with a clear, positioned message.
// No output file may hold NaN or Inf, or a temperature at or below absolute
// zero. The solver-level twins of these cases, with tighter analytic checks,
// are in solver/adversarial_test.go.

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"cureslab/cases"
	"cureslab/cases/internal/testkit"
	"cureslab/physics"
	"cureslab/solver"
)

// advKnown names a failure these tests found and that has since been fixed;
// the test runs always and guards against its return.
func advKnown(t *testing.T, what string) {
	t.Helper()
	t.Log("regression test for a fixed failure: " + what)
}

// advOutcome is a case run end to end.
type advOutcome struct {
	c       *cases.Case
	r       *solver.Result
	dir     string
	summary map[string]any
	probes  [][]string // probes.csv, header first
}

// advEndToEnd parses text as a case (its schedule files, if any, in dir),
// runs it, writes its outputs and checks every output file: fields.csv and
// probes.csv parse, every cell is empty or a finite number, temperatures
// are above absolute zero and cures in [0, 1]; summary.json parses and its
// status matches the run.
func advEndToEnd(t *testing.T, text string) *advOutcome {
	t.Helper()
	c, err := cases.Parse("adv.toml", []byte(text), t.TempDir())
	if err != nil {
		t.Fatalf("Parse: %v", err)
	}
	r, err := solver.Run(context.Background(), c.Problem)
	if err != nil {
		t.Fatalf("Run: %v", err)
	}
	out := &advOutcome{c: c, r: r, dir: filepath.Join(t.TempDir(), "out")}
	if err := WriteRun(out.dir, c, r, Summarize(c, r)); err != nil {
		t.Fatalf("WriteRun: %v", err)
	}
	fields := advCSV(t, filepath.Join(out.dir, FieldsFile))
	advCheckColumns(t, FieldsFile, fields)
	out.probes = advCSV(t, filepath.Join(out.dir, ProbesFile))
	advCheckColumns(t, ProbesFile, out.probes)
	if want := len(r.Snapshots) * c.Problem.Mesh.Cells(); len(fields)-1 != want {
		t.Errorf("fields.csv has %d rows, want %d (every snapshot kept)", len(fields)-1, want)
	}
	data, err := os.ReadFile(filepath.Join(out.dir, SummaryFile))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(data, &out.summary); err != nil {
		t.Fatalf("summary.json: %v\n%s", err, data)
	}
	if got, want := out.summary["status"], StatusOf(r, Judge(c, r)); got != want {
		t.Errorf("summary.json status %v, run %v", got, want)
	}
	if out.summary["conservation_residual"] == nil || out.summary["peak_temperature_C"] == nil {
		t.Errorf("summary.json lacks the conservation residual or the peak: %s", data)
	}
	entries, _ := os.ReadDir(out.dir)
	for _, e := range entries {
		if strings.Contains(e.Name(), ".tmp") {
			t.Errorf("temporary file %s left in the output directory", e.Name())
		}
	}
	return out
}

// advCSV reads a CSV output file whole.
func advCSV(t *testing.T, path string) [][]string {
	t.Helper()
	rows := testkit.ReadCSV(t, path)
	if len(rows) < 2 {
		t.Fatalf("%s has no data rows", path)
	}
	return rows
}

// advCheckColumns checks every numeric column of an output CSV (all but
// "layer"): empty or a finite number; temperatures (columns ending in _C)
// above −273.15 °C; cures (columns starting with "cure") in [0, 1].
func advCheckColumns(t *testing.T, name string, rows [][]string) {
	t.Helper()
	head := rows[0]
	for i, row := range rows[1:] {
		for j, cell := range row {
			if head[j] == "layer" || cell == "" {
				continue
			}
			x, err := strconv.ParseFloat(cell, 64)
			if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
				t.Fatalf("%s line %d, %s = %q is not a finite number", name, i+2, head[j], cell)
			}
			switch {
			case strings.HasSuffix(head[j], "_C") && !(x > -273.15):
				t.Fatalf("%s line %d, %s = %s: at or below absolute zero", name, i+2, head[j], cell)
			case strings.HasPrefix(head[j], "cure_") && head[j] != "cure_rate_per_s" || head[j] == "cure":
				if !(x >= 0 && x <= 1) {
					t.Fatalf("%s line %d, %s = %s outside [0, 1]", name, i+2, head[j], cell)
				}
			}
		}
	}
}

// column returns the values of the named column of probes.csv, as numbers.
func (o *advOutcome) column(t *testing.T, name string) []float64 {
	t.Helper()
	for j, h := range o.probes[0] {
		if h != name {
			continue
		}
		var out []float64
		for _, row := range o.probes[1:] {
			x, _ := strconv.ParseFloat(row[j], 64)
			out = append(out, x)
		}
		return out
	}
	t.Fatalf("probes.csv has no column %s (header %v)", name, o.probes[0])
	return nil
}

func (o *advOutcome) num(t *testing.T, key string) float64 {
	t.Helper()
	x, ok := o.summary[key].(float64)
	if !ok {
		t.Fatalf("summary.json %s = %v, want a number", key, o.summary[key])
	}
	return x
}

// advOK checks a run that must reach its end with a balanced ledger.
func (o *advOutcome) ok(t *testing.T) {
	t.Helper()
	if o.r.Status != solver.OK || o.r.EndTime != o.c.Problem.End {
		t.Fatalf("status %v at %g s of %g s: %v", o.r.Status, o.r.EndTime, o.c.Problem.End, o.r.Err)
	}
	// The ledger balances to round-off (energy conservation); 1e-8 leaves room for the
	// Newton tolerance over many steps.
	if e := o.num(t, "conservation_residual"); !(e < 1e-8) {
		t.Errorf("conservation_residual %g", e)
	}
}

// advOven is the ramp-and-hold oven of the test cases.
const advOven = `
[schedules.oven]
start = "23 C"
segments = [{ ramp = "3 C/min", to = "120 C" }, { hold = "2 h" }]
`

// advResin is an invented autocatalytic resin.
const advResin = `
[materials.test-resin]
density = "1150 kg/m^3"
specific_heat = "1500 J/kg/K"
conductivity = "0.2 W/m/K"

[materials.test-resin.cure]
model = "autocatalytic"
total_heat = "400 J/g"
A1 = "2e4 1/s"
E1 = "62 kJ/mol"
A2 = "6e5 1/s"
E2 = "58 kJ/mol"
m = 0.45
n = 1.6
`

// TestAdversarialCasesRun runs the adversarial cases that must be solved:
// each must reach its end with a balanced ledger and clean output files,
// plus the physical check of its own.
func TestAdversarialCasesRun(t *testing.T) {
	faces := `
[top]
kind = "convection"
h = "20 W/m^2/K"
air = "oven"
[bottom]
kind = "convection"
h = "10 W/m^2/K"
air = "oven"
` + advOven
	oven := "[initial]\ntemperature = \"23 C\"\n" + faces
	cases := []struct {
		name  string
		text  string
		check func(t *testing.T, o *advOutcome)
	}{
		{"1 um film on 50 mm", oven + `
[[layer]]
name = "film"
material = "epoxy-cured"
thickness = "1 um"
[[layer]]
name = "glass"
material = "borosilicate-glass"
thickness = "50 mm"
[output]
probes = ["0 mm", "0.001 mm", "50.001 mm"]
`, func(t *testing.T, o *advOutcome) {
			// An oven only heats: no temperature exceeds the hottest air
			// (maximum principle for conduction without sources).
			if pk := o.num(t, "peak_temperature_C"); pk > 120+1e-6 {
				t.Errorf("peak %g C above the oven's 120 C", pk)
			}
		}},
		{"1 um film on 50 mm, graded", oven + `
[mesh]
growth = 1.2
[[layer]]
name = "film"
material = "epoxy-cured"
thickness = "1 um"
[[layer]]
name = "glass"
material = "borosilicate-glass"
thickness = "50 mm"
`, func(t *testing.T, o *advOutcome) {
			if pk := o.num(t, "peak_temperature_C"); pk > 120+1e-6 {
				t.Errorf("peak %g C above the oven's 120 C", pk)
			}
		}},
		// Source: copper k = 401 W/m/K (Incropera & DeWitt, Fundamentals of Heat
		// and Mass Transfer, Appendix A); the foam (k = 0.004 W/m/K) is invented: a ratio of 1e5.
		{"copper against foam", oven + `
[[layer]]
name = "skin"
material = "copper"
thickness = "2 mm"
[[layer]]
name = "core"
material = "foam"
thickness = "10 mm"
[[layer]]
name = "base"
material = "copper"
thickness = "2 mm"
[materials.foam]
density = "30 kg/m^3"
specific_heat = "1500 J/kg/K"
conductivity = "0.004 W/m/K"
[output]
probes = ["2 mm", "12 mm"]
`, func(t *testing.T, o *advOutcome) {
			if pk := o.num(t, "peak_temperature_C"); pk > 120+1e-6 {
				t.Errorf("peak %g C above the oven's 120 C", pk)
			}
		}},
		{"h = 1e6 W/m^2/K", `
[initial]
temperature = "23 C"
[time]
end = "1 h"
[[layer]]
name = "slab"
material = "epoxy-cured"
thickness = "10 mm"
[top]
kind = "convection"
h = "1e6 W/m^2/K"
air = "150 C"
[bottom]
kind = "convection"
h = "1e6 W/m^2/K"
air = "150 C"
[output]
probes = ["0 mm", "5 mm"]
`, func(t *testing.T, o *advOutcome) {
			// After 23 diffusion times a²/α of the half-slab (epoxy-cured:
			// α = 0.2/(1200·1050) m²/s) every point is at the air temperature
			// (slowest mode e^{−2.47·23}, analytic).
			for _, col := range []string{"T_0mm_C", "T_5mm_C"} {
				v := o.column(t, col)
				if last := v[len(v)-1]; math.Abs(last-150) > 0.01 {
					t.Errorf("%s = %g C at the end, want 150 C", col, last)
				}
				for _, x := range v {
					if x < 23-1e-6 || x > 150+1e-6 {
						t.Errorf("%s = %g C outside [23, 150] C", col, x)
					}
				}
			}
		}},
		{"1000 K/min platen on curing resin", advResin + `
[initial]
temperature = "23 C"
[time]
output_every = "1 s"
end = "10 min"
[[layer]]
name = "resin"
material = "test-resin"
thickness = "4 mm"
[[layer]]
name = "plate"
material = "aluminium"
thickness = "2 mm"
[schedules.platen]
start = "23 C"
segments = [{ ramp = "1000 C/min", to = "180 C" }, { hold = "10 min" }]
[top]
kind = "fixed"
temperature = "platen"
[bottom]
kind = "insulated"
[output]
probes = ["0 mm", "4 mm"]
`, func(t *testing.T, o *advOutcome) {
			// The probe on a fixed face reads the face: the platen program
			// itself, landed on exactly at every output time.
			times, top := o.column(t, "time_s"), o.column(t, "T_0mm_C")
			for i, tm := range times {
				want := math.Min(23+1000.0/60*tm, 180)
				if math.Abs(top[i]-want) > 1e-6 {
					t.Errorf("t = %g s: face %g C, platen %g C", tm, top[i], want)
				}
			}
		}},
		{"resin that cures in a second", `
[initial]
temperature = "23 C"
[time]
end = "5 s"
output_every = "0.05 s"
[[layer]]
name = "resin"
material = "flash"
thickness = "1 mm"
[materials.flash]
density = "1150 kg/m^3"
specific_heat = "1500 J/kg/K"
conductivity = "0.2 W/m/K"
[materials.flash.cure]
model = "nth-order"
total_heat = "420 J/g"
A1 = "3.3e9 1/s"
E1 = "50 kJ/mol"
n = 1
[top]
kind = "insulated"
[bottom]
kind = "insulated"
`, func(t *testing.T, o *advOutcome) {
			// Insulated: the adiabatic rise H/c_p = 280 K (energy balance,
			// analytic), all of it, since the part cures fully.
			if a := o.num(t, "min_final_cure"); a < 1-1e-6 {
				t.Errorf("min final cure %g, want full cure", a)
			}
			if pk := o.num(t, "peak_temperature_C"); math.Abs(pk-(23+280)) > 1e-3 {
				t.Errorf("peak %g C, adiabatic limit %g C", pk, 23.0+280)
			}
			if gel := o.num(t, "gel_time_first_s"); !(gel > 0 && gel < 1) {
				t.Errorf("gel at %g s, want within the first second", gel)
			}
		}},
		{"initial cure 0.999", advResin + faces + `
[initial]
temperature = "23 C"
cure = 0.999
[[layer]]
name = "resin"
material = "test-resin"
thickness = "5 mm"
`, func(t *testing.T, o *advOutcome) {
			if a := o.num(t, "min_final_cure"); !(a >= 0.999 && a <= 1) {
				t.Errorf("min final cure %g: cure fell below its initial 0.999 or above 1", a)
			}
			for _, sn := range o.r.Snapshots {
				for i, a := range sn.Cure {
					if a < 0.999 || a > 1 {
						t.Fatalf("t = %g s, cell %d: cure %g", sn.Time, i, a)
					}
				}
			}
		}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			o := advEndToEnd(t, c.text)
			o.ok(t)
			c.check(t, o)
		})
	}
}

// TestAdversarialCasesDuplicateSection: a section written twice (easy to
// do when pasting blocks together) is a TOML error with its position, never
// a silent merge or a run of something else.
func TestAdversarialCasesDuplicateSection(t *testing.T) {
	text := "[initial]\ntemperature = \"23 C\"\n[initial]\ncure = 0.5\n"
	_, err := cases.Parse("dup.toml", []byte(text), "")
	var list cases.ErrorList
	if !errors.As(err, &list) || len(list) == 0 || list[0].Line != 3 || !errors.Is(list[0], cases.ErrSyntax) {
		t.Fatalf("duplicate [initial]: %v", err)
	}
}

// advContactCase is a stack on a platen: epoxy layers (k = 0.2 W/m/K)
// totalling top mm, then 2 mm of aluminium (k = 237 W/m/K, Incropera & DeWitt,
// Fundamentals of Heat and Mass Transfer, Appendix A) behind a contact resistance rc (m²K/W), the platen at 120 °C,
// the bottom held at the initial 20 °C; probes at the given depths.
func advContactCase(epoxy []string, rc string, probes ...string) string {
	var b strings.Builder
	b.WriteString(`
[initial]
temperature = "20 C"
[time]
end = "20 min"
temperature_tolerance = "1e-4 K"
[top]
kind = "fixed"
temperature = "120 C"
[bottom]
kind = "fixed"
temperature = "20 C"
`)
	for i, th := range epoxy {
		fmt.Fprintf(&b, "[[layer]]\nname = \"epoxy%d\"\nmaterial = \"epoxy\"\nthickness = %q\n", i, th)
	}
	fmt.Fprintf(&b, "[[layer]]\nname = \"plate\"\nmaterial = \"aluminium\"\nthickness = \"2 mm\"\ncontact_resistance = %q\n", rc)
	b.WriteString("[materials.epoxy]\ndensity = \"1150 kg/m^3\"\nspecific_heat = \"1500 J/kg/K\"\nconductivity = \"0.2 W/m/K\"\n")
	b.WriteString("[output]\nprobes = [")
	for i, p := range probes {
		if i > 0 {
			b.WriteString(", ")
		}
		fmt.Fprintf(&b, "%q", p)
	}
	b.WriteString("]\n")
	return b.String()
}

// TestAdversarialCasesProbeOnFace: contact resistances of 0 and 1 m²K/W,
// and a probe exactly on the epoxy/aluminium face, which reads the upper
// (epoxy) side (README, Case file reference). In the steady state reached after 20 min (the
// aluminium is pinned to the bottom platen by its own conductance k/L =
// 1.2e5 W/m²K, far above the gap's 1/R_c ≤ 100 W/m²K, so the slowest time
// constant is the epoxy's L²/α ≈ 35 s; analytic estimates) the sides are
//
//	upper = 120 C − q·L_e/k_e,  lower = upper − q·R_c,
//	q = 100 K / (L_e/k_e + R_c + L_a/k_a)
//
// (series resistances, analytic). The temperature tolerance is 1e-4 K; the
// finite-volume steady state is exact, so the check is 1e-4 K.
func TestAdversarialCasesProbeOnFace(t *testing.T) {
	for _, c := range []struct {
		name   string
		epoxy  []string
		le, rc float64 // m, m²K/W
		rcText string
		face   string // the probe on the face as written
		below  string // a probe just below it
	}{
		{"Rc=0", []string{"2 mm"}, 2e-3, 0, "0 m^2*K/W", "2 mm", "2.000001 mm"},
		{"Rc=1e-2", []string{"2 mm"}, 2e-3, 1e-2, "1e-2 m^2*K/W", "2 mm", "2.000001 mm"},
		{"Rc=1", []string{"2 mm"}, 2e-3, 1, "1 m^2*K/W", "2 mm", "2.000001 mm"},
	} {
		t.Run(c.name, func(t *testing.T) {
			o := advEndToEnd(t, advContactCase(c.epoxy, c.rcText, c.face, c.below))
			o.ok(t)
			q := 100 / (c.le/0.2 + c.rc + 2e-3/237)
			upper := 120 - q*c.le/0.2
			lower := upper - q*c.rc
			// The probe just below sits 1 nm under the face: the gradient in
			// the aluminium, q/k_a ≤ 1e4/237 ≈ 42 K/m, moves it < 1e-7 K.
			for _, p := range []struct {
				col  string
				want float64
			}{{"T_" + strings.TrimSuffix(strings.ReplaceAll(c.face, " ", ""), "mm") + "mm_C", upper},
				{"T_" + strings.TrimSuffix(strings.ReplaceAll(c.below, " ", ""), "mm") + "mm_C", lower}} {
				v := o.column(t, p.col)
				if got := v[len(v)-1]; math.Abs(got-p.want) > 1e-4 {
					t.Errorf("%s = %.6f C at the end, want %.6f C (upper side %.6f, lower %.6f)", p.col, got, p.want, upper, lower)
				}
			}
		})
	}
}

// TestAdversarialCasesProbeOnFaceRounding: a probe written on a layer face
// whose depth, added up from the layer thicknesses in floating point, comes
// out an ulp short of the probe's own value: 0.1 mm + 0.3 mm =
// 0.39999999999999996 mm, while "0.4 mm" is 0.4 mm. The probe must still
// read the upper layer's side (README, Case file reference), 103.3 C here, not the lower
// side at 20.1 C.
func TestAdversarialCasesProbeOnFaceRounding(t *testing.T) {
	advKnown(t, "a probe written on a layer face reads the lower layer when the face depth, summed from the "+
		"thicknesses, is an ulp short of the probe (0.1 mm + 0.3 mm, probe \"0.4 mm\")")
	o := advEndToEnd(t, advContactCase([]string{"0.1 mm", "0.3 mm"}, "1e-2 m^2*K/W", "0.4 mm"))
	o.ok(t)
	le, rc := 0.4e-3, 1e-2
	q := 100 / (le/0.2 + rc + 2e-3/237)
	upper := 120 - q*le/0.2
	v := o.column(t, "T_0.4mm_C")
	if got := v[len(v)-1]; math.Abs(got-upper) > 1e-4 {
		t.Errorf("probe on the face at 0.4 mm reads %.6f C, the upper side is %.6f C (lower %.6f C)", got, upper, upper-q*rc)
	}
}

// advFK is the Frank-Kamenetskii slab of solver/adversarial_test.go as a
// case file: 10 mm of resin (ρ 1150, c_p 1500, k 0.2) between platens at
// T0 = 400 K, zero-order kinetics with E = 40 R T0 and A set for δ
// (Frank-Kamenetskii, Diffusion and Heat Exchange in Chemical Kinetics), abort at T0 + 50 K.
func advFK(delta float64) string {
	const T0, a, rho, k, H, eps = 400.0, 5e-3, 1150.0, 0.2, 420e3, 1.0 / 40
	E := physics.GasConstant * T0 / eps
	A := delta * k * math.Exp(1/eps) / (1 / (eps * T0) * H * rho * a * a)
	return fmt.Sprintf(`
[initial]
temperature = "400 K"
[time]
end = "3000 s"
abort_temperature = "450 K"
[[layer]]
name = "resin"
material = "fk-resin"
thickness = "10 mm"
cells = 100
[materials.fk-resin]
density = "1150 kg/m^3"
specific_heat = "1500 J/kg/K"
conductivity = "0.2 W/m/K"
[materials.fk-resin.cure]
model = "nth-order"
total_heat = "420 J/g"
A1 = "%.17g 1/s"
E1 = "%.17g J/mol"
n = 0
[top]
kind = "fixed"
temperature = "400 K"
[bottom]
kind = "fixed"
temperature = "400 K"
[output]
probes = ["5 mm"]
`, A, E)
}

// TestAdversarialCasesRunaway: the Frank-Kamenetskii slab end to end. At
// δ = 0.5 the centre settles at θ(0) = 0.328952 (lower branch of the exact slab solution of
// Frank-Kamenetskii, Diffusion and Heat Exchange in Chemical Kinetics; within
// 2 % for E/(R T0) = 40; see TestAdversarialFrankKamenetskii), i.e. 3.29 K
// above the walls; at δ = 1.2 > δc = 0.8785 it runs away: status "runaway"
// (exit code 3 in the command), the outputs kept up to that moment and the
// message saying so.
func TestAdversarialCasesRunaway(t *testing.T) {
	t.Run("delta=0.5", func(t *testing.T) {
		o := advEndToEnd(t, advFK(0.5))
		o.ok(t)
		v := o.column(t, "T_5mm_C")
		// θ = (T − T0)/(ε T0) with ε T0 = 10 K.
		theta := (v[len(v)-1] + 273.15 - 400) / 10
		if math.Abs(theta-0.328952)/0.328952 > 0.02 {
			t.Errorf("θ(0) = %.6f, Frank-Kamenetskii 0.328952", theta)
		}
	})
	t.Run("delta=1.2", func(t *testing.T) {
		o := advEndToEnd(t, advFK(1.2))
		if o.summary["status"] != StatusRunaway {
			t.Fatalf("status %v, want %s", o.summary["status"], StatusRunaway)
		}
		end := o.num(t, "end_time_s")
		times := o.column(t, "time_s")
		if last := times[len(times)-1]; !(end < 3000) || math.Abs(last-end) > 1e-6 {
			t.Errorf("runaway at %g s, last probe row at %g s", end, last)
		}
		msg, _ := o.summary["message"].(string)
		if !strings.Contains(msg, "runaway") {
			t.Errorf("summary message %q does not say runaway", msg)
		}
		if pk := o.num(t, "peak_temperature_C"); !(pk > 450-273.15) {
			t.Errorf("peak %g C below the abort limit", pk)
		}
	})
}

// TestAdversarialCasesCooling: a lamp face that extracts 100 kW/m² from
// 1 mm of insulated resin: after about 5 s there is no heat left above
// 0 K (analytic: ρ c L T0 / q = 5.2 s). The run must stop with status
// "failed" and keep a physical state in its files.
func TestAdversarialCasesCooling(t *testing.T) {
	advKnown(t, "a cooling flux drives temperatures below absolute zero into the outputs")
	o := advEndToEnd(t, advResin+`
[initial]
temperature = "23 C"
[time]
end = "60 s"
[[layer]]
name = "resin"
material = "test-resin"
thickness = "1 mm"
[top]
kind = "flux"
flux = "-100 kW/m^2"
[bottom]
kind = "insulated"
[output]
probes = ["0 mm", "1 mm"]
`)
	if o.summary["status"] != StatusFailed {
		t.Errorf("status %v, want %s", o.summary["status"], StatusFailed)
	}
}

// TestAdversarialCasesRefused: inputs out of physical range must be refused
// by the loader with a positioned message naming the key, before anything
// runs.
func TestAdversarialCasesRefused(t *testing.T) {
	base := func(extra string) string {
		return `
[initial]
temperature = "23 C"
[time]
end = "1 h"
[[layer]]
name = "slab"
material = "epoxy-cured"
thickness = "2 mm"
[top]
kind = "convection"
h = "20 W/m^2/K"
air = "100 C"
[bottom]
kind = "insulated"
` + extra
	}
	for _, c := range []struct {
		name, text, key string
		kind            error
	}{
		{"initial cure 1", strings.Replace(base(""), "temperature = \"23 C\"\n", "temperature = \"23 C\"\ncure = 1.0\n", 1), "initial.cure", cases.ErrRange},
		{"zero thickness", strings.Replace(base(""), "\"2 mm\"", "\"0 mm\"", 1), "layer.0.thickness", cases.ErrRange},
		{"negative contact resistance", base("[[layer]]\nname = \"b\"\nmaterial = \"copper\"\nthickness = \"1 mm\"\ncontact_resistance = \"-1 m^2*K/W\"\n"), "layer.1.contact_resistance", cases.ErrRange},
		{"ramp of 0", strings.Replace(base("[schedules.s]\nstart = \"23 C\"\nsegments = [{ ramp = \"0 C/min\", to = \"100 C\" }]\n"), "air = \"100 C\"", "air = \"s\"", 1), "schedules.s.segments.0.ramp", cases.ErrRange},
		{"initial below absolute zero", strings.Replace(base(""), "\"23 C\"", "\"-300 C\"", 1), "initial.temperature", cases.ErrUnit},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := cases.Parse("refused.toml", []byte(c.text), "")
			var list cases.ErrorList
			if !errors.As(err, &list) || len(list) == 0 {
				t.Fatalf("accepted: %v", err)
			}
			e := list[0]
			if e.Key != c.key || !errors.Is(e, c.kind) || e.Line < 1 {
				t.Errorf("got %v (key %q, line %d), want key %q, kind %v, a line", e, e.Key, e.Line, c.key, c.kind)
			}
		})
	}
}

// TestAdversarialCasesHotStart: a part that starts above the default abort
// temperature (400 °C) with no abort_temperature of its own. The loader
// must either refuse it (asking for time.abort_temperature, as it does for
// an explicit limit below the start) or run it; it must not accept it and
// then report a "runaway" at the first step of a part that only cools.
func TestAdversarialCasesHotStart(t *testing.T) {
	advKnown(t, "an initial temperature above the default abort temperature (400 C) is accepted, and the run "+
		"reports a runaway at its first step")
	text := `
[initial]
temperature = "450 C"
[time]
end = "1 min"
[[layer]]
name = "slab"
material = "copper"
thickness = "1 mm"
[top]
kind = "convection"
h = "20 W/m^2/K"
air = "23 C"
[bottom]
kind = "insulated"
`
	c, err := cases.Parse("hot.toml", []byte(text), "")
	if err != nil {
		var list cases.ErrorList
		if !errors.As(err, &list) || list[0].Line < 1 {
			t.Fatalf("refused without a position: %v", err)
		}
		return // refused with a position: fine
	}
	r, err := solver.Run(context.Background(), c.Problem)
	if err != nil {
		t.Fatal(err)
	}
	if r.Status == solver.Runaway {
		t.Errorf("a part that only cools from 450 C is reported as a runaway: %v", r.Err)
	}
}

// advStopAfter is a context that reports itself cancelled from its n-th
// Err call on, as a Ctrl-C in the middle of a run would: the solver checks
// it once per step, so the run stops after n−1 steps, deterministically.
type advStopAfter struct {
	context.Context
	calls, n int
}

func (c *advStopAfter) Err() error {
	c.calls++
	if c.calls >= c.n {
		return context.Canceled
	}
	return nil
}

// TestAdversarialCasesStoppedRun: a run stopped from outside (as on Ctrl-C)
// after some output times. WriteRun must write every file with the state
// reached, status "interrupted" and a message that says where the outputs stop;
// nothing of the run may be lost: every snapshot is in fields.csv, and the
// last one is the moment of the stop.
func TestAdversarialCasesStoppedRun(t *testing.T) {
	c, err := cases.Parse("stop.toml", []byte(advFK(0.5)), "")
	if err != nil {
		t.Fatal(err)
	}
	r, err := solver.Run(&advStopAfter{Context: context.Background(), n: 30}, c.Problem)
	if err != nil {
		t.Fatal(err)
	}
	if r.Status != solver.Interrupted || !errors.Is(r.Err, context.Canceled) || len(r.Snapshots) < 3 {
		t.Fatalf("status %v (%v) with %d snapshots, want an interrupted run with some output", r.Status, r.Err, len(r.Snapshots))
	}
	dir := filepath.Join(t.TempDir(), "out")
	if err := WriteRun(dir, c, r, Summarize(c, r)); err != nil {
		t.Fatal(err)
	}
	data, err := os.ReadFile(filepath.Join(dir, SummaryFile))
	if err != nil {
		t.Fatal(err)
	}
	var s map[string]any
	if err := json.Unmarshal(data, &s); err != nil {
		t.Fatal(err)
	}
	if s["status"] != StatusInterrupted || !strings.Contains(fmt.Sprint(s["message"]), "outputs hold the state up to") {
		t.Errorf("summary after a stopped run: %s", data)
	}
	fields := advCSV(t, filepath.Join(dir, FieldsFile))
	advCheckColumns(t, FieldsFile, fields)
	if want := len(r.Snapshots) * c.Problem.Mesh.Cells(); len(fields)-1 != want {
		t.Errorf("fields.csv has %d rows, want %d", len(fields)-1, want)
	}
	last := fields[len(fields)-1][0]
	if tm, _ := strconv.ParseFloat(last, 64); math.Abs(tm-r.EndTime) > 1e-6 {
		t.Errorf("fields.csv ends at t = %s s, the run stopped at %g s", last, r.EndTime)
	}
}

// TestAdversarialCasesEmptyTableName: a table whose name is the empty
// string ([""] or [[""]], valid TOML) is an unknown key, and like every
// other unknown key it must be reported on its line (found by
// FuzzParseResolved, input [[""]]).
func TestAdversarialCasesEmptyTableName(t *testing.T) {
	advKnown(t, `a table named "" ([""] or [[""]]) is reported as an unknown key without a position`)
	for _, text := range []string{`[""]`, `[[""]]`} {
		_, err := cases.Parse("empty.toml", []byte(text+"\n"), "")
		var list cases.ErrorList
		if !errors.As(err, &list) {
			t.Fatalf("%s: %v", text, err)
		}
		for _, e := range list {
			if errors.Is(e, cases.ErrUnknownKey) && e.Line != 1 {
				t.Errorf("%s: unknown key reported on line %d, want 1: %v", text, e.Line, e)
			}
		}
	}
}

// TestAdversarialCasesTooManyCells: a 28 m layer (a unit slip: "28000 mm"
// for 28 mm) needs 112 000 cells at the default 0.25 mm. The loader refuses
// it — and must say where: on the thickness that asks for the cells, since
// the case has no [mesh] section to point at (found by FuzzCaseValues).
func TestAdversarialCasesTooManyCells(t *testing.T) {
	advKnown(t, "\"the mesh would have N cells\" has no position when the case has no [mesh] section")
	text := `
[initial]
temperature = "23 C"
[time]
end = "1 h"
[[layer]]
name = "slab"
material = "epoxy-cured"
thickness = "28000 mm"
[top]
kind = "insulated"
[bottom]
kind = "insulated"
`
	_, err := cases.Parse("big.toml", []byte(text), "")
	var list cases.ErrorList
	if !errors.As(err, &list) || len(list) == 0 {
		t.Fatalf("a 28 m layer at 0.25 mm cells was accepted: %v", err)
	}
	if e := list[0]; e.Line < 1 || !errors.Is(e, cases.ErrRange) {
		t.Errorf("refused without a position: %v (line %d)", e, e.Line)
	}
}
