package testkit

import (
	"bytes"
	"cureslab/cases"
	"cureslab/mesh"
	"cureslab/physics"
	"cureslab/solver"
	"encoding/csv"
	"flag"
	"math"
	"os"
	"path/filepath"
	"testing"
)

// The golden files of this package are rewritten by `go test -update`. The
// flag is shared with other test files of the package that may define it
// first (this file sorts last, and init runs after every package-level
// variable), so it is registered here only when missing.
func init() {
	if flag.Lookup("update") == nil {
		flag.Bool("update", false, "rewrite the golden files in testdata")
	}
}

func Updating() bool {
	f := flag.Lookup("update")
	return f != nil && f.Value.String() == "true"
}

// Golden compares got with testdata/name, or rewrites the file with -update.
func Golden(t *testing.T, name string, got []byte) {
	t.Helper()
	path := filepath.Join("testdata", name)
	if Updating() {
		if err := os.MkdirAll("testdata", 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, got, 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test -update to create it)", err)
	}
	if !bytes.Equal(got, want) {
		t.Errorf("%s differs from the golden file (go test -update rewrites it)\ngot:\n%s\nwant:\n%s", name, got, want)
	}
}

// HandBuiltCase builds a small case by hand, without the loader: a curing
// resin layer 6.35 mm (1/4 in) thick over an FR-4 board 11.1125 mm (7/16 in)
// thick, convective top driven by an oven program, insulated bottom. The
// odd imperial depths exercise the shortest-decimal probe names.
func HandBuiltCase(t testing.TB) *cases.Case {
	t.Helper()
	resin := &physics.Material{
		Name:    "resin-X",
		Density: 1100,
		SpecificHeat: physics.Blend{
			Uncured: physics.Constant(1500), Cured: physics.Constant(1300), HasCured: true,
		},
		Conductivity: physics.Inert(physics.Constant(0.2)),
		Cure: &physics.Cure{
			Model:         physics.NthOrder{A: 1e5, E: 60e3, N: 1},
			TotalHeat:     400e3,
			ResinFraction: 1,
			GelPoint:      0.6,
			Glass:         &physics.DiBenedetto{Tg0: 238.15, TgFull: 423.15, Lambda: 0.4},
		},
		Source: "invented for the tests",
	}
	board, ok := physics.Builtin("fr4")
	if !ok {
		t.Fatal("built-in fr4 is missing")
	}
	m, err := mesh.Build([]mesh.Layer{
		{Name: "resin", Thickness: 6.35e-3, Cells: 2},
		{Name: "board", Thickness: 11.1125e-3, Cells: 2, ContactResistance: 2e-4},
	}, mesh.Options{})
	if err != nil {
		t.Fatal(err)
	}
	oven, err := physics.FromSegments(296.15, []physics.Segment{{Rate: 2.0 / 60, To: 343.15}, {Hold: 3600}})
	if err != nil {
		t.Fatal(err)
	}
	probes := []float64{0, 6.35e-3, 17.4625e-3}
	p := &solver.Problem{
		Mesh:               m,
		Materials:          []*physics.Material{resin, board},
		Top:                physics.Face{Kind: physics.Convection, H: 15, Air: oven},
		Bottom:             physics.Face{Kind: physics.Insulated},
		InitialTemperature: 296.15,
		End:                5010,
		Probes:             probes,
		MinCure:            0.9,
	}
	return &cases.Case{
		File:    "hand-built.toml",
		Title:   "hand-built resin on a board",
		Problem: p,
		Layers: []cases.LayerInfo{
			{Name: "resin", Material: "resin-X"},
			{Name: "board", Material: "fr4", Builtin: true},
		},
		Materials:   map[string]*physics.Material{"resin-X": resin, "fr4": board},
		Schedules:   map[string]physics.Schedule{"oven": oven},
		OutputEvery: 60,
		Criteria:    cases.Criteria{MinCure: 0.9, MaxTemperature: 413.15, MaxSpread: math.NaN()},
		Probes:      probes,
		TopAir:      "oven",
	}
}

// HandBuiltResult is a hand-made result for HandBuiltCase: two snapshots with
// values that test the number format (23.000000000000043 °C, a NaN glass
// transition, a probe in the board).
func HandBuiltResult() *solver.Result {
	nan := math.NaN()
	return &solver.Result{
		Status: solver.OK,
		Snapshots: []solver.Snapshot{
			{
				Time: 0,
				T:    []float64{296.15, 296.15, 296.15, 296.15},
				Cure: []float64{0, 0, nan, nan}, Rate: []float64{1.25e-7, 1.25e-7, nan, nan},
				Tg:     []float64{238.15, 238.15, nan, nan},
				ProbeT: []float64{296.15, 296.15, 296.15}, ProbeCure: []float64{0, 0, nan},
				AirTop: 296.15, AirBottom: nan, HeatIn: 0,
			},
			{
				Time: 3600.0000001,
				T:    []float64{393.15000000000003, 380.123456789, 350.5, 349.25},
				Cure: []float64{0.950000000004, 0.82, nan, nan}, Rate: []float64{3.3333333333e-5, math.Copysign(0, -1), nan, nan},
				Tg:     []float64{401.2, nan, nan, nan},
				ProbeT: []float64{395.0, 366.3, 349.0}, ProbeCure: []float64{0.96, 0.8, nan},
				AirTop: 343.15, AirBottom: nan, HeatIn: 123456.789123,
			},
		},
		Ledger: solver.Ledger{Faces: 1e5, Reaction: 2e5, Stored: 3e5},
		Summary: solver.Summary{
			PeakTemperature: 393.15000000000003, PeakTime: 3600, PeakDepth: 1.5875e-3,
			Overshoot: 50.000000000000028, HottestDriving: 343.15,
			HeatingLag: 27.123456789, HeatingLagTime: 1800, HeatingLagDepth: 4.7625e-3,
			CoolingLag: nan, CoolingLagTime: nan, CoolingLagDepth: nan,
			MaxSpread: 31.2, LayerSpread: []float64{31.2, 0.7000000001}, MinFinalCure: 0.82, MinFinalCureDepth: 4.7625e-3,
			MeanFinalCure: 0.885, TimeToMinCure: nan, GelTimeFirst: 2400.5, GelTimeLast: nan,
			MinFinalGlass: 401.2, ConservationResidual: 1.2345678912e-15, Steps: 123,
		},
		EndTime: 5010,
	}
}

// ReadCSV reads a CSV output file whole.
func ReadCSV(t testing.TB, path string) [][]string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return rows
}

const TuneDir = "../../testdata/tune"

// TuneCase returns the text of testdata/tune/NAME.toml with extra appended.
func TuneCase(t *testing.T, name, extra string) []byte {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(TuneDir, name+".toml"))
	if err != nil {
		t.Fatal(err)
	}
	return append(b, []byte("\n"+extra)...)
}

// TTTCase is a case with one curing resin (invented numbers: autocatalytic
// with diffusion and a glass transition) on an aluminium plate.
const TTTCase = `title = "ttt"
[initial]
temperature = "23 C"
cure = 0.01
[[layer]]
name = "resin"
material = "resin-T"
thickness = "4 mm"
[[layer]]
name = "plate"
material = "aluminium"
thickness = "2 mm"
[materials.resin-T]
density = "1150 kg/m^3"
specific_heat = "1500 J/kg/K"
conductivity = "0.2 W/m/K"
[materials.resin-T.cure]
model = "autocatalytic"
total_heat = "400 J/g"
A1 = "4.5e5 1/s"
E1 = "70 kJ/mol"
A2 = "1.2e5 1/s"
E2 = "55 kJ/mol"
m = 0.6
n = 1.6
gel_point = 0.58
[materials.resin-T.cure.diffusion]
C = 30.0
alpha_c0 = -0.98
alpha_cT = "0.0052 1/K"
[materials.resin-T.cure.glass_transition]
Tg0 = "-35 C"
Tg_full = "130 C"
lambda = 0.42
[schedules.oven]
start = "23 C"
segments = [{ ramp = "2 C/min", to = "80 C" }, { hold = "2 h" }]
[top]
kind = "convection"
h = "10 W/m^2/K"
air = "oven"
[bottom]
kind = "insulated"
[criteria]
min_cure = 0.85
`

// VolumetricCase is a small case with volumetric heating for check and output
// tests: one layer of material mat under still air, the [volumetric] and
// extra text given.
func VolumetricCase(t *testing.T, dielectric, volumetric string) *cases.Case {
	t.Helper()
	src := `title = "volumetric check"
[initial]
temperature = "20 C"
[time]
end = "30 min"
[[layer]]
name = "wet"
material = "wet"
thickness = "10 mm"
[materials.wet]
density = "1000 kg/m^3"
specific_heat = "4180 J/kg/K"
conductivity = "0.6 W/m/K"
[materials.wet.dielectric]
` + dielectric + `
[schedules.cure]
start = "20 C"
segments = [{ ramp = "5 C/min", to = "60 C" }, { hold = "20 min" }]
[top]
kind = "convection"
h = "5 W/m^2/K"
air = "20 C"
[bottom]
kind = "insulated"
` + volumetric
	c, err := cases.Parse("vol.toml", []byte(src), "")
	if err != nil {
		t.Fatalf("Parse: %v", err)
	}
	return c
}

// TinyViscosity, appended to testdata/sweep/tiny.toml, gives its resin a
// Castro–Macosko viscosity law (invented values), so that the runs have a
// least viscosity and a flow window.
const TinyViscosity = `
[materials.tiny-resin.viscosity]
model = "castro-macosko"
eta0 = "3.2e-8 Pa*s"
E = "60 kJ/mol"
a = 1.5
b = 1.0
`
