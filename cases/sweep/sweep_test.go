package sweep

import (
	"bytes"
	"context"
	"cureslab/cases"
	"cureslab/cases/internal/testkit"
	"cureslab/cases/results"
	"cureslab/solver"
	"encoding/csv"
	"encoding/json"
	"errors"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"
)

const sweepDir = "../../testdata/sweep"

// tinyCase returns the text of testdata/sweep/tiny.toml plus extra.
func tinyCase(t testing.TB, extra string) []byte {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(sweepDir, "tiny.toml"))
	if err != nil {
		t.Fatal(err)
	}
	return append(b, extra...)
}

func mustVary(t testing.TB, specs ...string) []cases.Vary {
	t.Helper()
	var out []cases.Vary
	for _, s := range specs {
		v, err := ParseVary(s)
		if err != nil {
			t.Fatalf("ParseVary(%q): %v", s, err)
		}
		out = append(out, v)
	}
	return out
}

func newTinySweep(t testing.TB, extra string, set Settings) *Sweep {
	t.Helper()
	s, err := New("tiny.toml", tinyCase(t, extra), sweepDir, set)
	if err != nil {
		t.Fatalf("sweep.New: %v", err)
	}
	return s
}

func readFile(t testing.TB, path string) []byte {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

func TestParseVary(t *testing.T) {
	for _, tc := range []struct {
		spec string
		want cases.Vary
	}{
		{"layer.potting.thickness=4mm,8mm,12mm", cases.Vary{Key: "layer.potting.thickness", Values: []any{"4 mm", "8 mm", "12 mm"}}},
		{"top.h=12W/m^2/K", cases.Vary{Key: "top.h", Values: []any{"12 W/m^2/K"}}},
		{"top.h=12 W/m^2/K, 15 W/m^2/K", cases.Vary{Key: "top.h", Values: []any{"12 W/m^2/K", "15 W/m^2/K"}}},
		{"schedules.oven.segments.0.ramp=1C/min:5C/min:5", cases.Vary{Key: "schedules.oven.segments.0.ramp", From: "1 C/min", To: "5 C/min", Count: 5}},
		{"materials.r.cure.E1=60kJ/mol:70kJ/mol", cases.Vary{Key: "materials.r.cure.E1", From: "60 kJ/mol", To: "70 kJ/mol"}},
		{"materials.r.cure.A1=1e5 1/s,2e5 1/s", cases.Vary{Key: "materials.r.cure.A1", Values: []any{"1e5 1/s", "2e5 1/s"}}},
		{"materials.r.cure.n=1.2,1.5,2", cases.Vary{Key: "materials.r.cure.n", Values: []any{1.2, 1.5, int64(2)}}},
		{"layer.a.cells=4:16:4", cases.Vary{Key: "layer.a.cells", From: int64(4), To: int64(16), Count: 4}},
		{"top.air=oven,23C", cases.Vary{Key: "top.air", Values: []any{"oven", "23 C"}}},
		{"top.air=2nd-oven", cases.Vary{Key: "top.air", Values: []any{"2nd-oven"}}},
		{"materials.r.dielectric.shield=true,false", cases.Vary{Key: "materials.r.dielectric.shield", Values: []any{true, false}}},
	} {
		t.Run(tc.spec, func(t *testing.T) {
			got, err := ParseVary(tc.spec)
			if err != nil {
				t.Fatalf("ParseVary(%q): %v", tc.spec, err)
			}
			if !reflect.DeepEqual(got, tc.want) {
				t.Errorf("ParseVary(%q)\n got %#v\nwant %#v", tc.spec, got, tc.want)
			}
		})
	}
	for _, tc := range []struct{ spec, inErr string }{
		{"top.h", "want KEY=V1,V2"},
		{"=1,2", "key path before '=' is empty"},
		{"top.h=", "no values"},
		{"top.h=1W/m^2/K,,2W/m^2/K", "empty value"},
		{"top.h=1W/m^2/K,1 W/m^2/K", "listed twice"},
		{"top.h=1:2:3:4", "got 4 parts"},
		{"top.h=1W/m^2/K:5W/m^2/K:x", `COUNT "x" is not a whole number`},
		{"top.h=1W/m^2/K:5W/m^2/K:1", "COUNT must be between 2"},
		{"top.h=:5W/m^2/K:3", "start of the range is empty"},
		{"top.h=1C/min:5mm:3", "is not a heating rate like"},
		{"top.h=1mm:5:3", "must both be"},
		{"top.h=5mm:5mm:3", "from and to are equal"},
		{"top h=1,2", "contains a space"},
	} {
		t.Run("bad "+tc.spec, func(t *testing.T) {
			_, err := ParseVary(tc.spec)
			if err == nil || !strings.Contains(err.Error(), tc.inErr) || !errors.Is(err, ErrInvalid) {
				t.Errorf("ParseVary(%q) = %v, want an ErrInvalid containing %q", tc.spec, err, tc.inErr)
			}
		})
	}
}

// TestSweepGridValues checks the run table of a grid: every combination,
// the last key fastest; range values linear in SI, written in the unit of
// FROM with the shortest decimal.
func TestSweepGridValues(t *testing.T) {
	s := newTinySweep(t, "", Settings{Vary: mustVary(t,
		"layer.resin.thickness=1mm,2mm",
		// 300 K/h = 5 K/min (analytic): 1, 3, 5 C/min.
		"schedules.oven.segments.0.ramp=1C/min:300K/h:3",
		"top.h=0.1W/m^2/K:0.3W/m^2/K:3",
	)})
	if s.Runs != 18 || s.Mode != cases.ModeGrid {
		t.Fatalf("runs %d mode %s, want 18 grid", s.Runs, s.Mode)
	}
	want := [][]string{
		{"1 mm", "1 C/min", "0.1 W/m^2/K"},
		{"1 mm", "1 C/min", "0.2 W/m^2/K"},
		{"1 mm", "1 C/min", "0.3 W/m^2/K"},
		{"1 mm", "3 C/min", "0.1 W/m^2/K"},
	}
	for r, w := range want {
		if got := s.Values(r); !slices.Equal(got, w) {
			t.Errorf("run %d: got %q, want %q", r, got, w)
		}
	}
	if got, w := s.Values(17), []string{"2 mm", "5 C/min", "0.3 W/m^2/K"}; !slices.Equal(got, w) {
		t.Errorf("run 17: got %q, want %q", got, w)
	}
	c, err := s.Case(17)
	if err != nil {
		t.Fatal(err)
	}
	// Analytic: 2 mm resin + 1 mm plate.
	if th := c.Problem.Mesh.Thickness(); math.Abs(th-3e-3) > 1e-15 {
		t.Errorf("run 17 stack thickness %g m, want 3e-3", th)
	}
	// Analytic: 0.3 W/m^2/K as given.
	if h := c.Problem.Top.H; math.Abs(h-0.3) > 1e-15 {
		t.Errorf("run 17 top.h = %g, want 0.3", h)
	}

	for _, tc := range []struct {
		spec string
		want []string
	}{
		{"initial.temperature=20C:80C:4", []string{"20 C", "40 C", "60 C", "80 C"}},
		{"layer.resin.cells=2:9:3", []string{"2", "6", "9"}}, // 5.5 rounds to 6
		{"materials.tiny-resin.cure.n=1:2:3", []string{"1", "2"}},
		{"materials.tiny-resin.cure.n=1.0:2.0:5", []string{"1", "1.25", "1.5", "1.75", "2"}},
	} {
		if strings.HasSuffix(tc.spec, "1:2:3") {
			// Integer ends round to integers: 1, 2 (1.5 -> 2) repeats a value.
			_, err := New("tiny.toml", tinyCase(t, ""), sweepDir, Settings{Vary: mustVary(t, tc.spec)})
			if err == nil || !strings.Contains(err.Error(), "twice") {
				t.Errorf("%s: got %v, want an error about a repeated value", tc.spec, err)
			}
			continue
		}
		s := newTinySweep(t, "", Settings{Vary: mustVary(t, tc.spec)})
		var got []string
		for r := range s.Runs {
			got = append(got, s.Values(r)[0])
		}
		if !slices.Equal(got, tc.want) {
			t.Errorf("%s: got %q, want %q", tc.spec, got, tc.want)
		}
	}
}

func TestSweepKeyErrors(t *testing.T) {
	for _, tc := range []struct{ spec, inErr string }{
		{"layer.resn.thickness=1mm", `no element named "resn"; did you mean "resin"?`},
		{"top.hh=1W/m^2/K", `unknown key "hh"`},
		{"layer.resin.thicknes=1mm", `did you mean "thickness"?`},
		{"materials.aluminium.conductivity=1W/m/K", "a built-in material cannot be varied"},
		{"materials.tiny-resn.conductivity=1W/m/K", `did you mean "tiny-resin"?`},
		{"volumetric.field=1kV/m", "the case has no [volumetric]"},
		{"mesh.max_cell=0.1mm", "the case has no [mesh]"},
		{"time.max_stepp=30s", `unknown key "max_stepp"; did you mean "max_step"?`},
		{"schedule.oven.start=20C", `did you mean "schedules"?`},
		{"layer.resin=1mm", "is a table"},
		{"output.probes=1mm", "is an array"},
		{"schedules.oven.segments.2.to=100C", `no element "2": it has 2`},
		{"schedules.oven.segments.0.to.x=100C", "is a single value"},
		{"sweep.mode=grid", "cannot be varied"},
		{"top.h=10,20", "top.h is a heat transfer coefficient with its unit"},
		{"top.h=10mm,20mm", "top.h is a heat transfer coefficient"},
		{"materials.tiny-resin.cure.n=1mm", "is a plain number"},
		{"layer.resin.thickness=1mm:5mm", "a range in a grid needs a count"},
	} {
		t.Run(tc.spec, func(t *testing.T) {
			_, err := New("tiny.toml", tinyCase(t, ""), sweepDir, Settings{Vary: mustVary(t, tc.spec)})
			if err == nil || !errors.Is(err, ErrInvalid) || !strings.Contains(err.Error(), tc.inErr) {
				t.Errorf("got %v, want an ErrInvalid containing %q", err, tc.inErr)
			}
		})
	}
	// A key the case does not have, in a table it has, and that a case
	// file accepts, is fine.
	s := newTinySweep(t, "", Settings{Vary: mustVary(t, "time.max_step=30s,60s", "title=a,b")})
	if s.Runs != 4 {
		t.Errorf("runs %d, want 4", s.Runs)
	}
	if _, err := New("tiny.toml", tinyCase(t, ""), sweepDir, Settings{}); err == nil || !strings.Contains(err.Error(), "nothing to vary") {
		t.Errorf("no vary: got %v", err)
	}
}

// TestSweepSection reads [sweep] from the case file: a valid one runs, bad
// ones are positioned errors of the loader.
func TestSweepSection(t *testing.T) {
	good := `
[sweep]
mode = "grid"
[[sweep.vary]]
key = "layer.resin.thickness"
values = ["1 mm", "2mm"]
[[sweep.vary]]
key = "schedules.oven.segments.0.ramp"
from = "5 C/min"
to = "15 C/min"
count = 3
`
	if _, err := cases.Parse("tiny.toml", tinyCase(t, good), sweepDir); err != nil {
		t.Fatalf("a case with a valid [sweep] must load: %v", err)
	}
	s := newTinySweep(t, good, Settings{})
	if s.Runs != 6 || !slices.Equal(s.Keys, []string{"layer.resin.thickness", "schedules.oven.segments.0.ramp"}) {
		t.Fatalf("runs %d keys %q", s.Runs, s.Keys)
	}
	if got, want := s.Values(5), []string{"2 mm", "15 C/min"}; !slices.Equal(got, want) {
		t.Errorf("run 5: got %q, want %q", got, want)
	}
	// The command line replaces the file's list.
	s = newTinySweep(t, good, Settings{Vary: mustVary(t, "top.h=5W/m^2/K,6W/m^2/K")})
	if s.Runs != 2 || !slices.Equal(s.Keys, []string{"top.h"}) {
		t.Errorf("--vary must replace [[sweep.vary]]: runs %d keys %q", s.Runs, s.Keys)
	}

	base := strings.Count(string(tinyCase(t, "")), "\n")
	for _, tc := range []struct {
		name, text string
		line       int // in the appended text, 1 = first line after the case
		key        string
		kind       error
	}{
		{"bad mode", "[sweep]\nmode = \"gird\"\n", 2, "sweep.mode", cases.ErrRange},
		{"lhs without samples", "[sweep]\nmode = \"latin-hypercube\"\n", 1, "sweep.samples", cases.ErrMissing},
		{"samples with grid", "[sweep]\nsamples = 4\n", 2, "sweep.samples", cases.ErrRange},
		{"unknown key", "[sweep]\n[[sweep.vary]]\nkey = \"top.h\"\nvalue = [\"1 W/m^2/K\"]\n", 4, "sweep.vary.0.value", cases.ErrUnknownKey},
		{"range without count", "[[sweep.vary]]\nkey = \"top.h\"\nfrom = \"1 W/m^2/K\"\nto = \"2 W/m^2/K\"\n", 1, "sweep.vary.0.count", cases.ErrMissing},
		{"bad path", "[[sweep.vary]]\nkey = \"layer.resn.thickness\"\nvalues = [\"1 mm\"]\n", 2, "sweep.vary.0.key", cases.ErrReference},
		{"mixed range", "[[sweep.vary]]\nkey = \"top.h\"\nfrom = \"1 W/m^2/K\"\nto = 2.0\ncount = 2\n", 4, "sweep.vary.0.to", cases.ErrUnit},
		{"duplicate value", "[[sweep.vary]]\nkey = \"top.h\"\nvalues = [\"1 W/m^2/K\", \"1W/m^2/K\"]\n", 3, "sweep.vary.0.values.1", cases.ErrDuplicate},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := cases.Parse("tiny.toml", tinyCase(t, tc.text), sweepDir)
			var list cases.ErrorList
			if !errors.As(err, &list) || len(list) != 1 {
				t.Fatalf("want one error, got %v", err)
			}
			e := list[0]
			if e.Line != base+tc.line || e.Key != tc.key || !errors.Is(e, tc.kind) {
				t.Errorf("got line %d key %q (%v), want line %d key %q kind %v:\n%v", e.Line, e.Key, e.Err, base+tc.line, tc.key, tc.kind, e)
			}
		})
	}
}

// TestLatinHypercube checks the stratification of Latin hypercube sampling:
// with N samples, each of the N equal-probability strata of every variable
// holds exactly one sample.
// Source: McKay, Beckman & Conover, Technometrics 21(2):239–245 (1979), §2.
func TestLatinHypercube(t *testing.T) {
	set := Settings{Mode: cases.ModeLatinHypercube, Samples: 40, Seed: 7, SeedSet: true, Vary: mustVary(t,
		"layer.resin.thickness=1mm:3mm",
		"top.h=10W/m^2/K:30W/m^2/K",
		// 40 samples over 4 values: each value in 10 runs (40/4, analytic).
		"materials.tiny-resin.cure.n=1.2,1.4,1.6,1.8",
	)}
	s := newTinySweep(t, "", set)
	n := s.Runs
	if n != 40 {
		t.Fatalf("runs %d, want 40", n)
	}
	for k := range 3 {
		used := make([]int, n)
		for r := range n {
			u := s.u.At(r, k)
			if !(u >= 0 && u < 1) {
				t.Fatalf("u[%d][%d] = %g outside [0, 1)", r, k, u)
			}
			used[int(u*float64(n))]++
		}
		for j, c := range used {
			if c != 1 {
				t.Errorf("variable %d: stratum %d holds %d samples, want 1", k, j, c)
			}
		}
	}
	count := make(map[string]int)
	for r := range n {
		v := s.Values(r)
		count[v[2]]++
		num, _ := cases.SplitNumber(v[0])
		if th, err := strconv.ParseFloat(num, 64); err != nil || th < 1 || th > 3 {
			t.Errorf("run %d thickness %q outside 1..3 mm", r, v[0])
		}
	}
	for _, v := range []string{"1.2", "1.4", "1.6", "1.8"} {
		if count[v] != 10 {
			t.Errorf("value %s used %d times, want 10", v, count[v])
		}
	}
	// Same seed, same runs; another seed, other runs.
	again := newTinySweep(t, "", set)
	set.Seed = 8
	other := newTinySweep(t, "", set)
	same, differ := true, false
	for r := range n {
		same = same && slices.Equal(s.Values(r), again.Values(r))
		differ = differ || !slices.Equal(s.Values(r), other.Values(r))
	}
	if !same || !bytes.Equal(s.def, again.def) {
		t.Error("the same seed gave different runs")
	}
	if !differ || bytes.Equal(s.def, other.def) {
		t.Error("seeds 7 and 8 gave the same runs")
	}
}

func runSweep(t testing.TB, s *Sweep, dir string, opt Options) Report {
	t.Helper()
	rep, err := s.Run(context.Background(), dir, opt)
	if err != nil {
		t.Fatalf("Run: %v", err)
	}
	return rep
}

func tinyGrid(t testing.TB) *Sweep {
	return newTinySweep(t, "", Settings{Vary: mustVary(t,
		"layer.resin.thickness=1mm,2mm,4mm",
		"top.h=10W/m^2/K:30W/m^2/K:3",
		"schedules.oven.segments.0.ramp=5C/min,10C/min",
	)})
}

// TestSweepRows runs a grid and checks its summary.csv against single runs
// of the same cases.
func TestSweepRows(t *testing.T) {
	s := tinyGrid(t)
	dir := t.TempDir()
	rep := runSweep(t, s, dir, Options{Jobs: 2})
	if rep.Runs != 18 || rep.Done != 18 || rep.Resumed != 0 || rep.OK+rep.CriteriaFailed+rep.Runaway+rep.Failed != 18 || rep.Interrupted {
		t.Fatalf("report %+v", rep)
	}
	recs := testkit.ReadCSV(t, filepath.Join(dir, results.SweepSummaryFile))
	if len(recs) != 19 {
		t.Fatalf("%d records, want a header and 18 rows", len(recs))
	}
	if !slices.Equal(recs[0], results.SweepHeader(s.Keys)) {
		t.Errorf("header %q", recs[0])
	}
	for r, rec := range recs[1:] {
		if rec[0] != itoa(r) || !slices.Equal(rec[1:4], s.Values(r)) {
			t.Errorf("row %d starts %q, want run %d with %q", r, rec[:4], r, s.Values(r))
		}
	}
	// Row 7 is the same as summary.json of the case run alone.
	c, err := s.Case(7)
	if err != nil {
		t.Fatal(err)
	}
	one := t.TempDir()
	res, err := solverRun(c)
	if err != nil {
		t.Fatal(err)
	}
	if err := results.WriteRun(one, c, res, results.Summarize(c, res)); err != nil {
		t.Fatal(err)
	}
	var sum map[string]any
	if err := json.Unmarshal(readFile(t, filepath.Join(one, results.SummaryFile)), &sum); err != nil {
		t.Fatal(err)
	}
	row := recs[8]
	for i, name := range recs[0] {
		v, ok := sum[name]
		if !ok {
			continue
		}
		want := ""
		switch x := v.(type) {
		case string:
			want = x
		case float64:
			b, _ := json.Marshal(x)
			want = string(b)
		}
		if row[i] != want {
			t.Errorf("run 7 %s = %q in summary.csv, %q in summary.json", name, row[i], want)
		}
	}
}

// TestSweepColumns checks that every summary column of summary.csv is a
// key of summary.json.
func TestSweepColumns(t *testing.T) {
	// The viscosity keys are written only for cases with a viscosity law.
	var zero results.Float
	b, err := json.Marshal(results.Summary{MinViscosityPaS: &zero, FlowWindowS: &zero})
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	for _, c := range results.SweepColumns {
		if _, ok := m[c.Name]; !ok {
			t.Errorf("column %s is not a key of summary.json", c.Name)
		}
	}
}

// TestSweepShardMerge: three shards merged give the summary.csv of the
// whole sweep, byte for byte.
func TestSweepShardMerge(t *testing.T) {
	s := tinyGrid(t)
	root := t.TempDir()
	whole := filepath.Join(root, "whole")
	runSweep(t, s, whole, Options{Jobs: 2})
	var dirs []string
	for i := range 3 {
		d := filepath.Join(root, "shard-"+itoa(i))
		rep := runSweep(t, s, d, Options{Jobs: 2, Shard: i, Shards: 3})
		if rep.Runs != 6 || rep.Done != 6 {
			t.Fatalf("shard %d: %+v", i, rep)
		}
		dirs = append(dirs, d)
	}
	out := filepath.Join(root, "merged")
	rep, err := Merge(context.Background(), out, dirs, false)
	if err != nil {
		t.Fatal(err)
	}
	if rep.Rows != 18 || len(rep.Missing) != 0 || rep.Conflicts != 0 {
		t.Errorf("merge report %+v", rep)
	}
	want := readFile(t, filepath.Join(whole, results.SweepSummaryFile))
	if got := readFile(t, filepath.Join(out, results.SweepSummaryFile)); !bytes.Equal(got, want) {
		t.Errorf("merged summary.csv differs from the unsharded one:\n%s\nwant:\n%s", got, want)
	}
	if !bytes.Equal(readFile(t, filepath.Join(out, results.SweepDefinitionFile)), readFile(t, filepath.Join(whole, results.SweepDefinitionFile))) {
		t.Error("merged sweep.json differs")
	}
	// The merged directory is a finished sweep: running into it does nothing.
	if rep := runSweep(t, s, out, Options{}); rep.Resumed != 18 || rep.Done != 18 {
		t.Errorf("resume into the merged directory: %+v", rep)
	}

	// A missing shard: nothing is written unless allowed; the sweep run into
	// the partial merge finishes it.
	partial := filepath.Join(root, "partial")
	rep, err = Merge(context.Background(), partial, dirs[:2], false)
	if !errors.Is(err, ErrIncomplete) || !slices.Equal(rep.Missing, []int{2, 5, 8, 11, 14, 17}) {
		t.Fatalf("merge without shard 2: %v, missing %v", err, rep.Missing)
	}
	if _, err := os.Stat(partial); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("an incomplete merge wrote %s", partial)
	}
	if _, err := Merge(context.Background(), partial, dirs[:2], true); err != nil {
		t.Fatal(err)
	}
	if rep := runSweep(t, s, partial, Options{Jobs: 2}); rep.Resumed != 12 || rep.Done != 18 {
		t.Errorf("finishing a partial merge: %+v", rep)
	}
	if got := readFile(t, filepath.Join(partial, results.SweepSummaryFile)); !bytes.Equal(got, want) {
		t.Errorf("finished partial merge differs from the unsharded summary.csv")
	}

	// Shards of another sweep are refused.
	other := filepath.Join(root, "other")
	runSweep(t, newTinySweep(t, "", Settings{Vary: mustVary(t, "top.h=5W/m^2/K,6W/m^2/K")}), other, Options{})
	if _, err := Merge(context.Background(), filepath.Join(root, "mixed"), []string{dirs[0], other}, false); !errors.Is(err, ErrMismatch) ||
		!strings.Contains(err.Error(), "the varied keys differ") {
		t.Errorf("merging different sweeps: %v", err)
	}
}

// TestSweepResume interrupts a sweep after k committed runs, damages the
// end of its journal as a crash while appending would, resumes, and
// compares with an uninterrupted sweep byte for byte.
func TestSweepResume(t *testing.T) {
	s := tinyGrid(t)
	root := t.TempDir()
	whole := filepath.Join(root, "whole")
	runSweep(t, s, whole, Options{Jobs: 2})
	want := readFile(t, filepath.Join(whole, results.SweepSummaryFile))

	dir := filepath.Join(root, "cut")
	const k = 5
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	rep, err := s.Run(ctx, dir, Options{Jobs: 2, commitEvery: time.Nanosecond, afterCommit: func(done int) {
		if done >= k {
			cancel()
		}
	}})
	if err != nil {
		t.Fatal(err)
	}
	if !rep.Interrupted || rep.Done < k || rep.Done >= 18 {
		t.Fatalf("interrupted sweep: %+v", rep)
	}
	if part := readFile(t, filepath.Join(dir, results.SweepSummaryFile)); bytes.Count(part, []byte("\n")) != rep.Done+1 {
		t.Errorf("the summary of an interrupted sweep has %d lines for %d runs", bytes.Count(part, []byte("\n")), rep.Done)
	}
	// A crash while appending leaves half a record.
	jf, err := os.OpenFile(filepath.Join(dir, results.SweepJournalFile), os.O_WRONLY|os.O_APPEND, 0)
	if err != nil {
		t.Fatal(err)
	}
	jf.WriteString("17,4 mm,30 W/m^2/K,10 C/min,123.4")
	jf.Close()

	done := rep.Done
	rep = runSweep(t, s, dir, Options{Jobs: 2})
	if rep.Resumed != done || rep.Done != 18 || !rep.Repaired || rep.Interrupted {
		t.Errorf("resumed sweep: %+v, want %d resumed, 18 done, repaired", rep, done)
	}
	if got := readFile(t, filepath.Join(dir, results.SweepSummaryFile)); !bytes.Equal(got, want) {
		t.Errorf("resumed summary.csv differs from the uninterrupted one:\n%s\nwant:\n%s", got, want)
	}
	// Running again finds everything done and changes nothing.
	if rep := runSweep(t, s, dir, Options{}); rep.Resumed != 18 || rep.Repaired {
		t.Errorf("second resume: %+v", rep)
	}
	if got := readFile(t, filepath.Join(dir, results.SweepSummaryFile)); !bytes.Equal(got, want) {
		t.Error("summary.csv changed on a resume with nothing to do")
	}
	log := string(readFile(t, filepath.Join(dir, results.SweepLogFile)))
	if strings.Count(log, " start ") != 3 || !strings.Contains(log, "host=") {
		t.Errorf("sweep.log:\n%s", log)
	}
}

// TestSweepResumeMismatch: resuming into a directory of another sweep is an
// error and leaves it alone.
func TestSweepResumeMismatch(t *testing.T) {
	dir := t.TempDir()
	runSweep(t, tinyGrid(t), dir, Options{Jobs: 2})
	before := readFile(t, filepath.Join(dir, results.SweepSummaryFile))
	for name, s := range map[string]*Sweep{
		"the varied values differ": newTinySweep(t, "", Settings{Vary: mustVary(t,
			"layer.resin.thickness=1mm,2mm,5mm", "top.h=10W/m^2/K:30W/m^2/K:3", "schedules.oven.segments.0.ramp=5C/min,10C/min")}),
		"the varied keys differ": newTinySweep(t, "", Settings{Vary: mustVary(t, "layer.resin.thickness=1mm,2mm,4mm")}),
		"the case file differs": newTinySweep(t, "# edited\n", Settings{Vary: mustVary(t,
			"layer.resin.thickness=1mm,2mm,4mm", "top.h=10W/m^2/K:30W/m^2/K:3", "schedules.oven.segments.0.ramp=5C/min,10C/min")}),
	} {
		_, err := s.Run(context.Background(), dir, Options{})
		if !errors.Is(err, ErrMismatch) || !strings.Contains(err.Error(), name) {
			t.Errorf("%s: got %v", name, err)
		}
	}
	if !bytes.Equal(readFile(t, filepath.Join(dir, results.SweepSummaryFile)), before) {
		t.Error("a refused resume changed summary.csv")
	}
}

// TestSweepFailures: a runaway and an invalid value become rows with their
// status and error; the sweep completes.
func TestSweepFailures(t *testing.T) {
	s := newTinySweep(t, "", Settings{Vary: mustVary(t,
		// 1e5 J/g over 1500 J/kg/K is an adiabatic rise of ~6.7e4 K
		// (analytic): far past the 400 C abort limit.
		"materials.tiny-resin.cure.total_heat=300J/g,100000J/g",
		"layer.resin.thickness=2mm,-1mm",
	)})
	dir := t.TempDir()
	rep := runSweep(t, s, dir, Options{Jobs: 2, KeepFields: true})
	if rep.Done != 4 || rep.Runaway != 1 || rep.Failed != 2 || rep.OK+rep.CriteriaFailed != 1 {
		t.Fatalf("report %+v, want 1 runaway and 2 failed of 4", rep)
	}
	f, _ := os.Open(filepath.Join(dir, results.SweepSummaryFile))
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	status := results.SweepStatusCol(recs[0])
	errc := status + 1
	for _, tc := range []struct {
		run           int
		status, inErr string
	}{
		{0, results.StatusOK, ""},
		{1, results.StatusFailed, "tiny.toml:15:13: layer.0.thickness: thickness must be positive"},
		{2, results.StatusRunaway, "passed the abort limit"},
		{3, results.StatusFailed, "thickness must be positive"},
	} {
		rec := recs[tc.run+1]
		if rec[status] != tc.status || !strings.Contains(rec[errc], tc.inErr) || (tc.inErr == "") != (rec[errc] == "") {
			t.Errorf("run %d: status %q error %q, want %q with %q", tc.run, rec[status], rec[errc], tc.status, tc.inErr)
		}
	}
	// --keep-fields: the runs that ran have their output files.
	for _, r := range []string{"00000", "00002"} {
		if _, err := os.Stat(filepath.Join(dir, results.SweepRunsDir, r, results.SummaryFile)); err != nil {
			t.Errorf("run %s: %v", r, err)
		}
	}
}

// TestSweepDroppedProbe: a probe that a thinner run puts below the stack is
// dropped from that run instead of failing it.
func TestSweepDroppedProbe(t *testing.T) {
	s := newTinySweep(t, "", Settings{Vary: mustVary(t, "layer.resin.thickness=1mm")})
	c, err := s.Case(0)
	if err != nil {
		t.Fatalf("the 3 mm probe of a 2 mm stack must be dropped: %v", err)
	}
	if want := []float64{0, 1e-3}; len(c.Probes) != 2 || math.Abs(c.Probes[1]-want[1]) > 1e-15 {
		t.Errorf("probes %v, want %v", c.Probes, want)
	}
	// The run says so: in the case's notes, the note column of its row,
	// sweep.log, and the report of the sweep.
	const note = "left out the probe below the 2 mm stack of this run: output.probes.2 (3 mm)"
	if len(c.Notes) != 1 || c.Notes[0] != note {
		t.Errorf("notes %q, want %q", c.Notes, note)
	}
	s2 := newTinySweep(t, "", Settings{Vary: mustVary(t, "layer.resin.thickness=1mm,2.5mm")})
	dir := t.TempDir()
	rep := runSweep(t, s2, dir, Options{Jobs: 1})
	if len(rep.Noted) != 1 || rep.Noted[0] != 0 || rep.Note != note {
		t.Errorf("report: noted runs %v, note %q; want run 0 with %q", rep.Noted, rep.Note, note)
	}
	rows := testkit.ReadCSV(t, filepath.Join(dir, results.SweepSummaryFile))
	if h := rows[0]; h[len(h)-1] != "note" || rows[1][len(h)-1] != note || rows[2][len(h)-1] != "" {
		t.Errorf("summary.csv note column: header %q, rows %q and %q", h[len(h)-1], rows[1][len(h)-1], rows[2][len(h)-1])
	}
	logText, err := os.ReadFile(filepath.Join(dir, results.SweepLogFile))
	if err != nil || !strings.Contains(string(logText), "run 00000 ok") || !strings.Contains(string(logText), `note="`+note+`"`) {
		t.Errorf("sweep.log does not note the probe left out (%v):\n%s", err, logText)
	}
	// A varied probe is checked as written.
	s = newTinySweep(t, "", Settings{Vary: mustVary(t, "output.probes.2=9mm")})
	if _, err := s.Case(0); err == nil || !strings.Contains(err.Error(), "output.probes.2") {
		t.Errorf("a varied probe below the stack: %v", err)
	}
}

func itoa(i int) string { return strconv.Itoa(i) }

func solverRun(c *cases.Case) (*solver.Result, error) {
	return solver.Run(context.Background(), c.Problem)
}

// TestSweepSectionMalformed: odd [sweep] sections are errors, never panics.
func TestSweepSectionMalformed(t *testing.T) {
	for _, text := range []string{
		"sweep = 3\n",
		"[sweep]\nvary = \"x\"\n",
		"[sweep]\nvary = [1, 2]\n",
		"[sweep]\nmode = 7\n",
		"[sweep]\nmode = \"latin-hypercube\"\nsamples = -1\n",
		"[sweep]\nmode = \"latin-hypercube\"\nsamples = 2\nseed = -4\n",
		"[sweep]\nseed = 4\n",
		"[[sweep.vary]]\nkey = 5\nvalues = [\"1 mm\"]\n",
		"[[sweep.vary]]\nkey = \"\"\nvalues = [\"1 mm\"]\n",
		"[[sweep.vary]]\nkey = \"layer..thickness\"\nvalues = [\"1 mm\"]\n",
		"[[sweep.vary]]\nkey = \"layer.9.thickness\"\nvalues = [\"1 mm\"]\n",
		"[[sweep.vary]]\nkey = \"output.probes.0.x\"\nvalues = [\"1 mm\"]\n",
		"[[sweep.vary]]\nkey = \"top.h\"\nvalues = [[1]]\n",
		"[[sweep.vary]]\nkey = \"top.h\"\nvalues = []\n",
		"[[sweep.vary]]\nkey = \"top.h\"\nvalues = \"1 W/m^2/K\"\n",
		"[[sweep.vary]]\nkey = \"top.h\"\nfrom = { a = 1 }\nto = 2\ncount = 2\n",
		"[[sweep.vary]]\nkey = \"top.h\"\nfrom = \"1 W/m^2/K\"\ncount = 3\n",
		"[[sweep.vary]]\nkey = \"top.h\"\nfrom = \"1 W/m^2/K\"\nto = \"2 W/m^2/K\"\ncount = 1\n",
		"[[sweep.vary]]\nkey = \"top.h\"\nfrom = \"1 W/m^2/K\"\nto = \"2 W/m^2/K\"\ncount = 99999999999\n",
		"[[sweep.vary]]\nkey = \"top.h\"\nvalues = [\"1 W/m^2/K\"]\ncount = 3\n",
		"[[sweep.vary]]\nkey = \"top.h\"\nvalues = [\"1 W/m^2/K\"]\nfrom = \"1 W/m^2/K\"\n",
		"[[sweep.vary]]\nkey = \"top.h\"\nvalues = [\"1 W/m^2/K\"]\n[[sweep.vary]]\nkey = \"top.h\"\nvalues = [\"2 W/m^2/K\"]\n",
		"[[sweep.vary]]\nkey = \"top.h\"\nfrom = \"1e400 W/m^2/K\"\nto = \"2 W/m^2/K\"\ncount = 2\n",
		"[[sweep.vary]]\nkey = \"top.h\"\nfrom = \"-0 W/m^2/K\"\nto = \"0 W/m^2/K\"\ncount = 2\n",
	} {
		_, err := cases.Parse("tiny.toml", tinyCase(t, "\n"+text), sweepDir)
		if err == nil {
			t.Errorf("accepted:\n%s", text)
		}
	}
}

// TestSweepJournalNoNewline: a last record cut just before its newline is
// whole; a resume ends its line before appending.
func TestSweepJournalNoNewline(t *testing.T) {
	s := tinyGrid(t)
	root := t.TempDir()
	whole := filepath.Join(root, "whole")
	runSweep(t, s, whole, Options{Jobs: 1})
	dir := filepath.Join(root, "cut")
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	rep, err := s.Run(ctx, dir, Options{Jobs: 1, commitEvery: time.Nanosecond, afterCommit: func(done int) {
		if done >= 3 {
			cancel()
		}
	}})
	if err != nil || !rep.Interrupted {
		t.Fatalf("%v %+v", err, rep)
	}
	path := filepath.Join(dir, results.SweepJournalFile)
	b := readFile(t, path)
	if err := os.WriteFile(path, bytes.TrimSuffix(b, []byte("\n")), 0o644); err != nil {
		t.Fatal(err)
	}
	first := rep.Done
	rep = runSweep(t, s, dir, Options{Jobs: 1})
	if rep.Resumed != first || rep.Done != 18 || rep.Repaired {
		t.Errorf("resume: %+v, want %d resumed, 18 done, not repaired", rep, first)
	}
	if !bytes.Equal(readFile(t, filepath.Join(dir, results.SweepSummaryFile)), readFile(t, filepath.Join(whole, results.SweepSummaryFile))) {
		t.Error("summary.csv differs from the uninterrupted one")
	}
	jc, err := readJournal(context.Background(), path, results.SweepHeader(s.Keys), s.Runs)
	if err != nil || len(jc.Rows) != 18 || len(jc.Damaged) != 0 {
		t.Errorf("journal after resume: %v, %v", jc, err)
	}
}

// TestSweepGroupCommit: with a commit window longer than the sweep, the
// first finished run is committed at once and every other one in a single
// final commit; the journal and summary.csv are those of a sweep that
// commits run by run.
func TestSweepGroupCommit(t *testing.T) {
	s := tinyGrid(t)
	root := t.TempDir()
	each := filepath.Join(root, "each")
	runSweep(t, s, each, Options{Jobs: 2, commitEvery: time.Nanosecond})
	grouped := filepath.Join(root, "grouped")
	var commits []int
	rep := runSweep(t, s, grouped, Options{Jobs: 2, commitEvery: time.Hour, afterCommit: func(done int) {
		commits = append(commits, done)
	}})
	if rep.Done != 18 || len(commits) != 2 || commits[0] != 1 || commits[1] != 18 {
		t.Errorf("done %d, commits after %v runs; want 18 done in two commits (1, then 18)", rep.Done, commits)
	}
	if a, b := readFile(t, filepath.Join(each, results.SweepSummaryFile)), readFile(t, filepath.Join(grouped, results.SweepSummaryFile)); !bytes.Equal(a, b) {
		t.Errorf("summary.csv differs between grouped and run-by-run commits")
	}
	jc, err := readJournal(context.Background(), filepath.Join(grouped, results.SweepJournalFile), results.SweepHeader(s.Keys), s.Runs)
	if err != nil || len(jc.Rows) != 18 {
		t.Errorf("journal: %v, %v", jc, err)
	}
}

// earlierJournal rewrites the journal of dir as a version without the
// columns results.SweepColumnsAdded wrote it: those columns dropped from
// the header and from every record, each record's checksum recomputed.
func earlierJournal(t *testing.T, dir string) {
	t.Helper()
	path := filepath.Join(dir, results.SweepJournalFile)
	recs, err := csv.NewReader(bytes.NewReader(readFile(t, path))).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var keep []int
	for i, col := range recs[0] {
		if !slices.Contains(results.SweepColumnsAdded, col) {
			keep = append(keep, i)
		}
	}
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	for n, rec := range recs {
		var out []string
		for _, i := range keep {
			out = append(out, rec[i])
		}
		if n > 0 {
			out[len(out)-1] = recordCRC(out[:len(out)-1])
		}
		w.Write(out)
	}
	w.Flush()
	if err := os.WriteFile(path, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
}

// A journal written by a version without the viscosity columns: resuming
// a case that cannot fill them keeps every run, and summary.csv is that of
// a fresh sweep; a case with a viscosity law refuses it (the old runs lack
// values it would have).
func TestSweepResumeEarlierJournal(t *testing.T) {
	fresh, old := t.TempDir(), t.TempDir()
	runSweep(t, tinyGrid(t), fresh, Options{Jobs: 2})
	runSweep(t, tinyGrid(t), old, Options{Jobs: 2})
	earlierJournal(t, old)
	os.Remove(filepath.Join(old, results.SweepSummaryFile))
	rep := runSweep(t, tinyGrid(t), old, Options{Jobs: 2})
	if rep.Upgraded != rep.Runs || rep.Resumed != rep.Runs {
		t.Errorf("taken over %d and resumed %d of %d runs, want all", rep.Upgraded, rep.Resumed, rep.Runs)
	}
	if !bytes.Equal(readFile(t, filepath.Join(old, results.SweepSummaryFile)), readFile(t, filepath.Join(fresh, results.SweepSummaryFile))) {
		t.Error("summary.csv after taking over an earlier journal differs from a fresh sweep's")
	}
	// The journal is now in the present layout: a second resume reads it plainly.
	if rep := runSweep(t, tinyGrid(t), old, Options{Jobs: 2}); rep.Upgraded != 0 || rep.Resumed != rep.Runs {
		t.Errorf("second resume: upgraded %d, resumed %d of %d", rep.Upgraded, rep.Resumed, rep.Runs)
	}

	s := newTinySweep(t, testkit.TinyViscosity, Settings{Vary: mustVary(t, "layer.resin.thickness=1mm,2mm")})
	dir := t.TempDir()
	runSweep(t, s, dir, Options{Jobs: 2})
	earlierJournal(t, dir)
	if _, err := s.Run(context.Background(), dir, Options{Jobs: 2}); !errors.Is(err, ErrMismatch) {
		t.Errorf("a viscous case took over an earlier journal: %v", err)
	}
}

// A Ctrl-C at any point of a merge before it writes (between shards, while
// a journal is read, before the first file) ends it with the context's
// error and nothing written. A merge that is not stopped removes the page
// of an earlier merge into its directory.
func TestMergeInterrupted(t *testing.T) {
	s := tinyGrid(t)
	root := t.TempDir()
	var dirs []string
	for i := range 2 {
		d := filepath.Join(root, "shard-"+itoa(i))
		runSweep(t, s, d, Options{Jobs: 2, Shard: i, Shards: 2})
		dirs = append(dirs, d)
	}
	// An earlier page in the output directory goes with the merge that
	// replaces its summary.
	whole := filepath.Join(root, "whole")
	if err := os.MkdirAll(whole, 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(whole, sweepPageFile), []byte("<p>an earlier merge</p>"), 0o644); err != nil {
		t.Fatal(err)
	}
	count := testkit.NewStopAfter(-1)
	if _, err := Merge(count, whole, dirs, false); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(whole, sweepPageFile)); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("the page of an earlier merge is left beside the new summary: %v", err)
	}
	// Two shards, each read in at least one chunk, and the check before
	// writing.
	if count.Checks() < 5 {
		t.Errorf("%d checks of the context, want at least 5", count.Checks())
	}
	for n := range count.Checks() {
		out := filepath.Join(root, "cut-"+itoa(int(n)))
		_, err := Merge(testkit.NewStopAfter(n), out, dirs, false)
		if !errors.Is(err, context.Canceled) {
			t.Errorf("stopped at check %d: %v", n+1, err)
		}
		if _, err := os.Stat(out); !errors.Is(err, os.ErrNotExist) {
			t.Errorf("stopped at check %d: %s was created", n+1, out)
		}
	}
}
