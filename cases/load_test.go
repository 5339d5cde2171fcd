package cases

import (
	"bytes"
	"errors"
	"flag"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"cureslab/physics"
)

// The golden files of TestBad are rewritten with
//
//	go test ./cases -run TestBad -update
//
// The flag may also be registered by other test files of the package; it is
// registered here only if none did, and read by name.
func init() {
	if flag.Lookup("update") == nil {
		flag.Bool("update", false, "rewrite golden files")
	}
}

func updating() bool {
	f := flag.Lookup("update")
	if f == nil {
		return false
	}
	b, _ := strconv.ParseBool(f.Value.String())
	return b
}

const (
	badDir  = "../testdata/bad"
	goodDir = "../testdata/good"
)

var kinds = map[string]error{
	"syntax": ErrSyntax, "unknown": ErrUnknownKey, "type": ErrType, "unit": ErrUnit,
	"range": ErrRange, "missing": ErrMissing, "duplicate": ErrDuplicate,
	"reference": ErrReference, "file": ErrFile,
}

// TestBad parses every malformed case of testdata/bad. Each file has one
// problem, declared in its second line as
//
//	# want: LOCATION KEY KIND
//
// where LOCATION is the expected line in the case file, FILE:LINE for a
// problem in another file, or "-" for no position; KEY is the key path ("-"
// for none) and KIND names the sentinel error. The full message is compared
// with cases/testdata/load_NAME.golden.
func TestBad(t *testing.T) {
	files, err := filepath.Glob(filepath.Join(badDir, "*.toml"))
	if err != nil {
		t.Fatal(err)
	}
	if len(files) < 30 {
		t.Fatalf("only %d bad case files in %s", len(files), badDir)
	}
	for _, path := range files {
		name := filepath.Base(path)
		t.Run(strings.TrimSuffix(name, ".toml"), func(t *testing.T) {
			data, err := os.ReadFile(path)
			if err != nil {
				t.Fatal(err)
			}
			loc, key, kind := wantOf(t, data)
			c, err := Parse(name, data, badDir)
			if err == nil {
				t.Fatalf("Parse accepted a bad case: %+v", c)
			}
			if c != nil {
				t.Errorf("Parse returned a case with the error %v", err)
			}
			var list ErrorList
			if !errors.As(err, &list) {
				t.Fatalf("error %T is not an ErrorList: %v", err, err)
			}
			if len(list) != 1 {
				t.Errorf("want exactly one error (one problem per file), got %d:\n%v", len(list), err)
			}
			if !errors.Is(err, kinds[kind]) {
				t.Errorf("error does not wrap %v:\n%v", kinds[kind], err)
			}
			msg := err.Error()
			first := strings.SplitN(msg, "\n", 2)[0]
			switch {
			case loc == "-":
				if want := name + ": "; !strings.HasPrefix(first, want) {
					t.Errorf("want a message without position starting %q, got\n%s", want, msg)
				}
			case strings.Contains(loc, ":"):
				if want := filepath.Join(badDir, loc) + ":"; !strings.HasPrefix(first, want) {
					t.Errorf("want the message to start %q, got\n%s", want, msg)
				}
			default:
				if want := name + ":" + loc + ":"; !strings.HasPrefix(first, want) {
					t.Errorf("want the message to start %q, got\n%s", want, msg)
				}
			}
			if key != "-" && list[0].Key != key {
				t.Errorf("key: got %q, want %q in\n%s", list[0].Key, key, msg)
			}
			if key != "-" && !strings.Contains(first, ": "+key+": ") {
				t.Errorf("message does not name the key path %q:\n%s", key, msg)
			}
			golden(t, filepath.Join("testdata", "load_"+strings.TrimSuffix(name, ".toml")+".golden"), msg+"\n")
		})
	}
}

// wantOf reads the "# want: LOCATION KEY KIND" line of a bad case.
func wantOf(t *testing.T, data []byte) (loc, key, kind string) {
	t.Helper()
	for _, line := range strings.SplitN(string(data), "\n", 4)[:3] {
		if rest, ok := strings.CutPrefix(line, "# want: "); ok {
			f := strings.Fields(rest)
			if len(f) != 3 || kinds[f[2]] == nil {
				t.Fatalf("malformed want line %q", line)
			}
			return f[0], f[1], f[2]
		}
	}
	t.Fatal("no # want: line in the first lines")
	return
}

func golden(t *testing.T, path, got string) {
	t.Helper()
	if updating() {
		if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run with -update to create it)", err)
	}
	if got != string(want) {
		t.Errorf("message differs from %s (run with -update after checking it)\ngot:\n%s\nwant:\n%s", path, got, want)
	}
}

func loadGood(t *testing.T, name string) *Case {
	t.Helper()
	c, err := Load(filepath.Join(goodDir, name))
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

func cellsPerLayer(c *Case) []int {
	m := c.Problem.Mesh
	n := make([]int, len(m.Layers))
	for j := range n {
		n[j] = m.First[j+1] - m.First[j]
	}
	return n
}

// TestGoodPotting checks the resolved SI values of a case that uses every
// supported section.
func TestGoodPotting(t *testing.T) {
	c := loadGood(t, "potting.toml")
	p := c.Problem
	if c.Title != "10 mm potting over a board in an aluminium cup" {
		t.Errorf("Title = %q", c.Title)
	}
	// Source: SI definition, T/K = t/°C + 273.15.
	checkNear(t, "InitialTemperature", p.InitialTemperature, 296.15)
	checkNear(t, "InitialCure", p.InitialCure, 0.01)

	// The oven program: 23 C, 2 C/min to 70 C, 90 min, 2 C/min to 120 C,
	// 60 min, -3 C/min to 40 C.
	// Source: analytic, each ramp lasts |to − from| / |rate| with 1 C/min = 1/60 K/s:
	// 47 K/(2/60 K/s) = 1410 s, 5400 s, 50 K/(2/60 K/s) = 1500 s, 3600 s, 80 K/(3/60 K/s) = 1600 s.
	oven := c.Schedules["oven"]
	times, temps := oven.Points()
	checkSlice(t, "oven times", times, []float64{0, 1410, 6810, 8310, 11910, 13510})
	checkSlice(t, "oven temperatures", temps, []float64{296.15, 343.15, 343.15, 393.15, 393.15, 313.15})
	// Source: analytic, 2 C/min = 2/60 K/s.
	checkNear(t, "first ramp rate", (temps[1]-temps[0])/(times[1]-times[0]), 2.0/60)
	// Source: analytic, the unused schedule "spare" (10 h) does not count.
	checkNear(t, "End", p.End, 13510)
	checkNear(t, "OutputEvery", c.OutputEvery, 60)
	// Source: analytic, 60 s, 120 s, ..., 13500 s, then End: 225 + 1 times.
	if n := len(p.OutputTimes); n != 226 {
		t.Fatalf("len(OutputTimes) = %d, want 226", n)
	}
	checkSlice(t, "OutputTimes ends", []float64{p.OutputTimes[0], p.OutputTimes[224], p.OutputTimes[225]}, []float64{60, 13500, 13510})
	checkNear(t, "MaxStep", p.MaxStep, 60)
	checkNear(t, "TemperatureTolerance", p.TemperatureTolerance, 0.05)
	checkNear(t, "CureTolerance", p.CureTolerance, 0.002)
	checkNear(t, "AbortTemperature", p.AbortTemperature, 523.15)

	// Source: the README's Case file reference, cells = max(4, ceil(thickness/max_cell)) unless given:
	// 40 given; 1.6/0.25 = 6.4 -> 7; 2/0.25 = 8.
	if got, want := cellsPerLayer(c), []int{40, 7, 8}; !reflect.DeepEqual(got, want) {
		t.Errorf("cells per layer = %v, want %v", got, want)
	}
	checkNear(t, "total thickness", p.Mesh.Thickness(), 13.6e-3)
	checkNear(t, "board contact resistance", p.Mesh.Layers[1].ContactResistance, 2e-4)
	wantLayers := []LayerInfo{{"potting", "grey-potting-7", false}, {"board", "fr4", false}, {"cup", "aluminium", true}}
	if !reflect.DeepEqual(c.Layers, wantLayers) {
		t.Errorf("Layers = %+v, want %+v", c.Layers, wantLayers)
	}
	if !reflect.DeepEqual(c.Replaced, []string{"fr4"}) {
		t.Errorf("Replaced = %v, want [fr4]", c.Replaced)
	}
	for i, d := range c.Layers {
		if p.Materials[i] != c.Materials[d.Material] {
			t.Errorf("layer %d: Problem.Materials and Case.Materials differ", i)
		}
	}

	resin := p.Materials[0]
	checkNear(t, "resin density", resin.Density, 1150)
	tt, tv := resin.SpecificHeat.Uncured.Points()
	checkSlice(t, "specific heat table temperatures", tt, []float64{293.15, 423.15})
	checkSlice(t, "specific heat table values", tv, []float64{1300, 1800})
	if !resin.SpecificHeat.HasCured || !resin.Conductivity.HasCured {
		t.Error("cured properties missing")
	}
	// Source: analytic, linear in cure between uncured 0.19 and cured 0.23 W/m/K.
	k, _, dk := resin.Conductivity.At(300, 0.5)
	checkNear(t, "k(α = 0.5)", k, 0.21)
	checkNear(t, "dk/dα", dk, 0.04)
	cure := resin.Cure
	if cure == nil {
		t.Fatal("resin has no cure")
	}
	// Source: analytic, 62 kJ/mol = 62000 J/mol; 420 J/g = 420000 J/kg.
	if got, want := cure.Model, (physics.Autocatalytic{A1: 2e4, E1: 62e3, A2: 6e5, E2: 58e3, M: 0.45, N: 1.6}); got != want {
		t.Errorf("Model = %+v, want %+v", got, want)
	}
	checkNear(t, "TotalHeat", cure.TotalHeat, 420e3)
	checkNear(t, "ResinFraction", cure.ResinFraction, 0.8)
	checkNear(t, "GelPoint", cure.GelPoint, 0.58)
	if got, want := *cure.Diffusion, (physics.Diffusion{C: 30, Alpha0: -1.1, AlphaT: 0.0052}); !near(got.C, want.C) || !near(got.Alpha0, want.Alpha0) || !near(got.AlphaT, want.AlphaT) {
		t.Errorf("Diffusion = %+v, want %+v", got, want)
	}
	g := cure.Glass
	checkSlice(t, "glass transition", []float64{g.Tg0, g.TgFull, g.Lambda}, []float64{238.15, 423.15, 0.42})
	if d := resin.Dielectric; d == nil || !near(d.Permittivity, 4.2) || !near(d.LossFactor, 0.6) || !near(d.LossFactorCured, 0.06) {
		t.Errorf("Dielectric = %+v", resin.Dielectric)
	}

	// The case's fr4 replaces the built-in one.
	checkNear(t, "fr4 density", p.Materials[1].Density, 1900)
	al, _ := physics.Builtin("aluminium")
	if !reflect.DeepEqual(p.Materials[2], al) {
		t.Errorf("aluminium = %+v, want the built-in %+v", p.Materials[2], al)
	}

	if p.Top.Kind != physics.Convection || p.Bottom.Kind != physics.Convection {
		t.Errorf("face kinds %v, %v", p.Top.Kind, p.Bottom.Kind)
	}
	checkNear(t, "top h", p.Top.H, 20)
	checkNear(t, "top emissivity", p.Top.Emissivity, 0.9)
	checkNear(t, "bottom h", p.Bottom.H, 8)
	checkNear(t, "bottom emissivity", p.Bottom.Emissivity, 0)
	// Source: analytic, halfway up the first ramp: 23 C + 705 s · 2/60 K/s.
	checkNear(t, "top air at 705 s", p.Top.Air.At(705), 296.15+23.5)
	checkNear(t, "bottom air at 705 s", p.Bottom.Air.At(705), 296.15+23.5)
	if c.TopAir != "oven" || c.BottomAir != "oven" {
		t.Errorf("TopAir, BottomAir = %q, %q", c.TopAir, c.BottomAir)
	}

	checkSlice(t, "Probes", p.Probes, []float64{0, 5e-3, 10e-3, 11.6e-3, 13.6e-3})
	checkSlice(t, "Case.Probes", c.Probes, p.Probes)
	checkSlice(t, "criteria", []float64{c.Criteria.MinCure, c.Criteria.MaxTemperature, c.Criteria.MaxSpread}, []float64{0.9, 413.15, 15})
	checkNear(t, "MinCure", p.MinCure, 0.9)
}

// TestGoodPlaten checks a case heated through a fixed face programmed by
// points, with the defaults of [time] and of the cure.
func TestGoodPlaten(t *testing.T) {
	c := loadGood(t, "platen.toml")
	p := c.Problem
	// Source: analytic, End defaults to the last point of the platen program, 50 min.
	checkNear(t, "End", p.End, 3000)
	// Source: the README's Case file reference, output_every defaults to end/100.
	checkNear(t, "OutputEvery", c.OutputEvery, 30)
	if len(p.OutputTimes) != 100 || !near(p.OutputTimes[0], 30) || !near(p.OutputTimes[99], 3000) {
		t.Errorf("OutputTimes = %v", p.OutputTimes)
	}
	// Source: solver.DefaultAbortTemperature, 400 C (README, Case file
	// reference).
	checkNear(t, "AbortTemperature", p.AbortTemperature, 673.15)
	if p.MaxStep != 0 || p.TemperatureTolerance != 0 || p.CureTolerance != 0 {
		t.Errorf("unset step controls should stay 0 (solver defaults): %g %g %g", p.MaxStep, p.TemperatureTolerance, p.CureTolerance)
	}
	if p.Bottom.Kind != physics.Fixed {
		t.Fatalf("bottom kind %v", p.Bottom.Kind)
	}
	// Source: analytic, linear between (0 min, 20 C) and (15 min, 150 C).
	checkNear(t, "platen at 7.5 min", p.Bottom.Set.At(450), 358.15)
	checkNear(t, "top air (constant)", p.Top.Air.At(1234), 293.15)
	if c.TopAir != "20 C" || c.BottomAir != "platen" {
		t.Errorf("TopAir, BottomAir = %q, %q", c.TopAir, c.BottomAir)
	}
	// Source: the README's Case file reference, 3/0.25 = 12; 10 given; 1/0.25 = 4.
	if got, want := cellsPerLayer(c), []int{12, 10, 4}; !reflect.DeepEqual(got, want) {
		t.Errorf("cells per layer = %v, want %v", got, want)
	}
	cure := p.Materials[1].Cure
	if got, want := cure.Model, (physics.NthOrder{A: 5e6, E: 75e3, N: 1.2}); got != want {
		t.Errorf("Model = %+v, want %+v", got, want)
	}
	checkNear(t, "default GelPoint", cure.GelPoint, physics.DefaultGelPoint)
	checkNear(t, "default ResinFraction", cure.ResinFraction, 1)
	if cure.Diffusion != nil || cure.Glass != nil {
		t.Error("optional cure sections should be nil")
	}
	if !math.IsNaN(c.Criteria.MinCure) || !math.IsNaN(c.Criteria.MaxTemperature) || !math.IsNaN(c.Criteria.MaxSpread) || p.MinCure != 0 {
		t.Errorf("unset criteria = %+v, MinCure %g", c.Criteria, p.MinCure)
	}
	if len(c.Replaced) != 0 || !c.Layers[0].Builtin || c.Layers[1].Builtin {
		t.Errorf("Replaced %v, Layers %+v", c.Replaced, c.Layers)
	}
}

// TestGoodLamp checks a flux face given by points and an explicit end.
func TestGoodLamp(t *testing.T) {
	c := loadGood(t, "lamp.toml")
	p := c.Problem
	checkNear(t, "End", p.End, 1800)
	// Source: analytic, multiples of 7 min below 30 min, then 30 min.
	checkSlice(t, "OutputTimes", p.OutputTimes, []float64{420, 840, 1260, 1680, 1800})
	if p.Top.Kind != physics.Flux || p.Bottom.Kind != physics.Insulated {
		t.Fatalf("face kinds %v, %v", p.Top.Kind, p.Bottom.Kind)
	}
	// Source: analytic, linear from 0 to 1.5 kW/m^2 over 10 min, held after.
	checkNear(t, "flux at 5 min", p.Top.Flux.At(300), 750)
	checkNear(t, "flux at 20 min", p.Top.Flux.At(1200), 1500)
	// Source: the README's Case file reference, max(4, ceil(0.2/0.25)) = 4 and ceil(0.8/0.25) = 4.
	if got, want := cellsPerLayer(c), []int{4, 4}; !reflect.DeepEqual(got, want) {
		t.Errorf("cells per layer = %v, want %v", got, want)
	}
	// Source: analytic, 200 um = 2e-4 m.
	checkNear(t, "coating thickness", p.Mesh.Layers[0].Thickness, 2e-4)
	if c.TopAir != "" || c.BottomAir != "" {
		t.Errorf("TopAir, BottomAir = %q, %q; no face is driven by a temperature", c.TopAir, c.BottomAir)
	}
}

// TestGoodLogged checks a schedule read from a CSV file next to the case.
func TestGoodLogged(t *testing.T) {
	c := loadGood(t, "logged.toml")
	p := c.Problem
	if c.Title != "logged" {
		t.Errorf("default Title = %q, want the file name", c.Title)
	}
	log := c.Schedules["log"]
	times, temps := log.Points()
	// Source: testdata/good/oven-log.csv, °C + 273.15.
	checkSlice(t, "log times", times, []float64{0, 600, 1800, 3600, 4500})
	checkSlice(t, "log temperatures", temps, []float64{295.15, 333.65, 393.15, 393.15, 318.15})
	checkNear(t, "End", p.End, 4500)
	checkNear(t, "top set at 300 s", p.Top.Set.At(300), (295.15+333.65)/2)
	checkNear(t, "bottom air at 300 s", p.Bottom.Air.At(300), (295.15+333.65)/2)
}

// TestParseCollectsAll checks that several problems are reported together,
// in line order, with problems without a position last.
func TestParseCollectsAll(t *testing.T) {
	src := `title = 3
[initial]
temperature = 20

[[layer]]
name = "a"
material = "copper"
thickness = "-1 mm"

[[layer]]
name = "b"
material = "nope"
thickness = "1 mm"

[top]
kind = "insulated"
`
	_, err := Parse("multi.toml", []byte(src), "")
	var list ErrorList
	if !errors.As(err, &list) {
		t.Fatalf("got %v, want an ErrorList", err)
	}
	var got []string
	for _, e := range list {
		got = append(got, fmt.Sprintf("%d %s", e.Line, e.Key))
	}
	want := []string{"1 title", "3 initial.temperature", "8 layer.0.thickness", "12 layer.1.material", "0 bottom"}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("errors:\n%v\nwant lines and keys %v", err, want)
	}
	for _, k := range []error{ErrType, ErrUnit, ErrRange, ErrReference, ErrMissing} {
		if !errors.Is(err, k) {
			t.Errorf("the list does not wrap %v", k)
		}
	}
}

// TestLoadMissingFile checks the error for a case file that cannot be read.
func TestLoadMissingFile(t *testing.T) {
	_, err := Load(filepath.Join(goodDir, "no-such-case.toml"))
	if !errors.Is(err, ErrFile) || !errors.Is(err, os.ErrNotExist) {
		t.Errorf("got %v, want ErrFile wrapping os.ErrNotExist", err)
	}
}

// TestParseSyntaxCaret checks that a TOML syntax error keeps the parser's
// position and shows the line with a caret.
func TestParseSyntaxCaret(t *testing.T) {
	src := "title = \"x\"\n[initial]\ntemperature = \"23 C\" junk\n"
	_, err := Parse("syn.toml", []byte(src), "")
	var e *Error
	if !errors.As(err, &e) {
		t.Fatalf("got %v", err)
	}
	if e.Line != 3 || !errors.Is(err, ErrSyntax) {
		t.Errorf("got line %d, error %v", e.Line, err)
	}
	lines := strings.Split(e.Hint, "\n")
	if len(lines) != 2 || lines[0] != `temperature = "23 C" junk` || strings.Index(lines[1], "^") != e.Col-1 {
		t.Errorf("caret context %q for column %d", e.Hint, e.Col)
	}
}

// FuzzParse checks that any input gives either an error made of positioned
// *Error values or a complete case, and never a panic.
func FuzzParse(f *testing.F) {
	for _, dir := range []string{goodDir, badDir} {
		files, _ := filepath.Glob(filepath.Join(dir, "*.toml"))
		for _, p := range files {
			if data, err := os.ReadFile(p); err == nil {
				f.Add(data)
			}
		}
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		c, err := Parse("fuzz.toml", data, goodDir)
		if err != nil {
			var list ErrorList
			if !errors.As(err, &list) || len(list) == 0 {
				t.Fatalf("error %T is not a non-empty ErrorList: %v", err, err)
			}
			for _, e := range list {
				if e.Err == nil || e.Line < 0 || (e.Line > 0 && e.File == "fuzz.toml" && e.Line > bytes.Count(data, []byte("\n"))+1) {
					t.Fatalf("bad error %#v", e)
				}
			}
			return
		}
		p := c.Problem
		if p == nil || p.Mesh == nil || len(p.Materials) != len(p.Mesh.Layers) || !(p.End > 0) || len(p.OutputTimes) == 0 {
			t.Fatalf("incomplete case %+v", p)
		}
		if last := p.OutputTimes[len(p.OutputTimes)-1]; last != p.End {
			t.Fatalf("last output time %g != End %g", last, p.End)
		}
	})
}
