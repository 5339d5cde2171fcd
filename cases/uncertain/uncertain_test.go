package uncertain

import (
	"context"
	"cureslab/cases"
	"cureslab/cases/internal/testkit"
	"cureslab/cases/results"
	"cureslab/solver"
	"encoding/json"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// uncLine returns the 1-based line of the first line of text containing s.
func uncLine(t *testing.T, text []byte, s string) int {
	t.Helper()
	for i, l := range strings.Split(string(text), "\n") {
		if strings.Contains(l, s) {
			return i + 1
		}
	}
	t.Fatalf("%q not in the case", s)
	return 0
}

func TestUncertaintySection(t *testing.T) {
	text := testkit.TuneCase(t, "hold", `[uncertainty]
"top.h" = "±20 %"
"materials.tune-resin.cure.E1" = "+/-1.5 kJ/mol"
layer.resin.thickness = { spread = "±0.3 mm", distribution = "normal" }
"materials.tune-resin.cure.n" = "±0.05"
"schedules.oven.segments.0.to" = "±5 C"
share = 0.9
`)
	c, err := cases.Parse("u.toml", text, testkit.TuneDir)
	if err != nil {
		t.Fatal(err)
	}
	v, _, err := cases.NewCaseVariant("u.toml", text, testkit.TuneDir)
	if err != nil {
		t.Fatal(err)
	}
	u, err := cases.ReadUncertainty(v.Name, v.Text, v.Doc)
	if err != nil || u == nil {
		t.Fatalf("readUncertainty: %v, %v", u, err)
	}
	_ = c
	want := []cases.UncertainInput{
		{Key: "top.h", Spread: "±20 %", Distribution: cases.DistUniform, Rel: 0.2},
		// Source: analytic, 1.5 kJ/mol = 1500 J/mol.
		{Key: "materials.tune-resin.cure.E1", Spread: "+/-1.5 kJ/mol", Distribution: cases.DistUniform, Abs: 1500},
		// Source: analytic, 0.3 mm = 3e-4 m.
		{Key: "layer.resin.thickness", Spread: "±0.3 mm", Distribution: cases.DistNormal, Abs: 3e-4},
		{Key: "materials.tune-resin.cure.n", Spread: "±0.05", Distribution: cases.DistUniform, Abs: 0.05},
		// Source: analytic, a spread of a temperature is a difference: 5 C = 5 K.
		{Key: "schedules.oven.segments.0.to", Spread: "±5 C", Distribution: cases.DistUniform, Abs: 5},
	}
	if len(u.Inputs) != len(want) {
		t.Fatalf("got %d inputs, want %d: %+v", len(u.Inputs), len(want), u.Inputs)
	}
	for i, w := range want {
		g := u.Inputs[i]
		if g.Key != w.Key || g.Spread != w.Spread || g.Distribution != w.Distribution ||
			math.Abs(g.Abs-w.Abs) > 1e-12*math.Max(1, w.Abs) || math.Abs(g.Rel-w.Rel) > 1e-15 {
			t.Errorf("input %d: got %+v, want %+v", i, g, w)
		}
	}
	if got := strings.Join(u.Inputs[2].Path, "."); got != "layer.0.thickness" {
		t.Errorf("layer.resin.thickness resolves to %s, want layer.0.thickness", got)
	}
	if u.Share != 0.9 {
		t.Errorf("share = %v, want 0.9", u.Share)
	}
}

func TestUncertaintyDefaultShare(t *testing.T) {
	text := testkit.TuneCase(t, "hold", "[uncertainty]\n\"top.h\" = \"±20 %\"\n")
	v, _, err := cases.NewCaseVariant("u.toml", text, testkit.TuneDir)
	if err != nil {
		t.Fatal(err)
	}
	u, err := cases.ReadUncertainty(v.Name, v.Text, v.Doc)
	if err != nil {
		t.Fatal(err)
	}
	// Source: the README's Case file reference, share defaults to 0.95.
	if u.Share != 0.95 {
		t.Errorf("default share = %v, want 0.95", u.Share)
	}
}

func TestUncertaintyErrors(t *testing.T) {
	for _, tc := range []struct {
		name, entry string
		key         string // the error's key path
		kind        error
		msg         string
	}{
		{"unknown key", `"top.hh" = "±20 %"`, "uncertainty.top.hh", cases.ErrReference, `did you mean "h"?`},
		{"unknown section", `"topp.h" = "±20 %"`, "uncertainty.topp.h", cases.ErrReference, `unknown section "topp"`},
		{"absent value", `"time.max_step" = "±20 %"`, "uncertainty.time.max_step", cases.ErrReference, "no value at time.max_step"},
		{"wrong unit", `"top.h" = "±2 mm"`, "uncertainty.top.h", cases.ErrUnit, "heat transfer coefficient"},
		{"no sign", `"top.h" = "20 %"`, "uncertainty.top.h", cases.ErrUnit, "is not a spread"},
		{"percent of a temperature", `"initial.temperature" = "±5 %"`, "uncertainty.initial.temperature", cases.ErrUnit, "percentage of a temperature"},
		{"a name", `"top.air" = "±5 %"`, "uncertainty.top.air", cases.ErrType, "not a quantity"},
		{"a table", `"top" = "±5 %"`, "uncertainty.top", cases.ErrReference, "is a table"},
		{"cells", `"layer.resin.cells" = "±1"`, "uncertainty.layer.resin.cells", cases.ErrType, "number of cells"},
		{"plain number", `"materials.tune-resin.cure.n" = "±x"`, "uncertainty.materials.tune-resin.cure.n", cases.ErrUnit, "needs a plain number"},
		{"negative", `"materials.tune-resin.cure.n" = "±-0.1"`, "uncertainty.materials.tune-resin.cure.n", cases.ErrUnit, "negative"},
		{"distribution", `"top.h" = { spread = "±20 %", distribution = "gauss" }`, "uncertainty.top.h.distribution", cases.ErrRange, `distribution must be`},
		{"misspelt distribution", `"top.h" = { spread = "±20 %", distribution = "normall" }`, "uncertainty.top.h.distribution", cases.ErrRange, `normal`},
		{"missing spread", `"top.h" = { distribution = "normal" }`, "uncertainty.top.h.spread", cases.ErrMissing, "needs \"spread\""},
		{"unknown entry key", `"top.h" = { spread = "±20 %", sigma = 1 }`, "uncertainty.top.h.sigma", cases.ErrUnknownKey, "unknown key"},
		{"share", `share = 1.5`, "uncertainty.share", cases.ErrRange, "share must be in (0, 1]"},
		{"not a string", `"top.h" = 20`, "uncertainty.top.h", cases.ErrType, "expected a spread"},
		{"duplicate", "\"layer.resin.thickness\" = \"±1 %\"\n\"layer.0.thickness\" = \"±2 %\"", "uncertainty.layer.resin.thickness", cases.ErrDuplicate, "already uncertain"},
		{"sweep", `"sweep.mode" = "±1 %"`, "uncertainty.sweep.mode", cases.ErrReference, "cannot be varied"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			text := testkit.TuneCase(t, "hold", "[uncertainty]\n"+tc.entry+"\n")
			_, err := cases.Parse("u.toml", text, testkit.TuneDir)
			var list cases.ErrorList
			if !errors.As(err, &list) || len(list) == 0 {
				t.Fatalf("got %v, want an ErrorList", err)
			}
			var e *cases.Error
			for _, x := range list {
				if x.Key == tc.key {
					e = x
				}
			}
			if e == nil {
				t.Fatalf("no error at key %s; got:\n%v", tc.key, err)
			}
			first := strings.SplitN(tc.entry, "\n", 2)[0]
			if tc.name == "duplicate" {
				first = strings.SplitN(tc.entry, "\n", 2)[1]
			}
			line := uncLine(t, text, first)
			if tc.name == "duplicate" {
				// the key sorted first is reported; both keys are on their own lines
				line = uncLine(t, text, `"layer.resin.thickness"`)
			}
			if !errors.Is(e, tc.kind) || !strings.Contains(e.Error(), tc.msg) || e.Line != line || e.Col < 1 {
				t.Errorf("got %v (line %d col %d), want kind %v at line %d containing %q", e, e.Line, e.Col, tc.kind, line, tc.msg)
			}
		})
	}
}

func TestPerturb(t *testing.T) {
	// Source: analytic, uniform: nominal + w·(2u − 1); normal: nominal +
	// (w/2)·Φ⁻¹(u), so u = Φ(1) gives nominal + w/2.
	phi1 := distuv.UnitNormal.CDF(1)
	for _, tc := range []struct {
		in   cases.UncertainInput
		cur  any
		u    float64
		want string
	}{
		{cases.UncertainInput{Key: "top.h", Rel: 0.2, Distribution: cases.DistUniform}, "20 W/m^2/K", 0, "16 W/m^2/K"},
		{cases.UncertainInput{Key: "top.h", Rel: 0.2, Distribution: cases.DistUniform}, "20 W/m^2/K", 1, "24 W/m^2/K"},
		{cases.UncertainInput{Key: "top.h", Rel: 0.2, Distribution: cases.DistUniform}, "20 W/m^2/K", 0.5, "20 W/m^2/K"},
		{cases.UncertainInput{Key: "x.to", Abs: 5, Distribution: cases.DistUniform}, "100 C", 1, "105 C"},
		{cases.UncertainInput{Key: "x.to", Abs: 5, Distribution: cases.DistUniform}, "212 F", 1, "221 F"},
		{cases.UncertainInput{Key: "x.E", Abs: 1500, Distribution: cases.DistUniform}, "70 kJ/mol", 0.25, "69.25 kJ/mol"},
		{cases.UncertainInput{Key: "x.t", Abs: 3e-4, Distribution: cases.DistNormal}, "3 mm", phi1, "3.15 mm"},
		{cases.UncertainInput{Key: "x.n", Abs: 0.1, Distribution: cases.DistUniform}, 1.5, 0.75, "1.55"},
		{cases.UncertainInput{Key: "x.n", Rel: 0.1, Distribution: cases.DistUniform}, int64(2), 0, "1.8"},
		{cases.UncertainInput{Key: "x.n", Abs: 0, Distribution: cases.DistUniform}, "7 mm", 0.9, "7 mm"},
	} {
		got, val, err := perturb(&tc.in, tc.cur, tc.u)
		if err != nil {
			t.Errorf("perturb(%v, %v): %v", tc.cur, tc.u, err)
			continue
		}
		g, _ := strconv.ParseFloat(strings.Fields(got)[0], 64)
		w, _ := strconv.ParseFloat(strings.Fields(tc.want)[0], 64)
		if math.Abs(g-w) > 1e-8*math.Abs(w) || !strings.HasSuffix(got, strings.TrimLeft(tc.want, "0123456789.-")) {
			t.Errorf("perturb(%v, %v) = %q, want %q", tc.cur, tc.u, got, tc.want)
		}
		if s, ok := val.(string); ok && s != got {
			t.Errorf("perturb(%v): value %q differs from shown %q", tc.cur, s, got)
		}
	}
}

func TestQuantile(t *testing.T) {
	x := []float64{1, 2, 3, 4}
	// Source: Hyndman & Fan (1996) definition 7, h = (n−1)p (analytic):
	// p = 0.05 gives h = 0.15, 1.15; p = 0.5 gives 2.5; p = 0.95 gives 3.85.
	for _, tc := range []struct{ p, want float64 }{{0, 1}, {0.05, 1.15}, {0.5, 2.5}, {0.95, 3.85}, {1, 4}} {
		if got := Quantile(tc.p, x); math.Abs(got-tc.want) > 1e-12 {
			t.Errorf("Quantile(%v) = %v, want %v", tc.p, got, tc.want)
		}
	}
	if got := Quantile(0.95, []float64{7}); got != 7 {
		t.Errorf("Quantile of one value = %v, want 7", got)
	}
}

// uncRun runs Propagate on testdata/tune/NAME.toml with the section.
func uncRun(t *testing.T, name, section string, opt Options) (*cases.Case, *Report) {
	t.Helper()
	text := testkit.TuneCase(t, name, section)
	c, err := cases.Parse(name+".toml", text, testkit.TuneDir)
	if err != nil {
		t.Fatal(err)
	}
	rep, err := Propagate(context.Background(), c, text, opt)
	if err != nil {
		t.Fatal(err)
	}
	return c, rep
}

func TestUncertainLatinHypercube(t *testing.T) {
	const n = 8
	_, rep := uncRun(t, "hold", "[uncertainty]\n\"top.h\" = \"±20 %\"\n\"materials.tune-resin.cure.E1\" = { spread = \"±1 kJ/mol\", distribution = \"normal\" }\n",
		Options{Samples: n, Seed: 3, Jobs: 2})
	if len(rep.Runs) != n {
		t.Fatalf("%d samples, want %d", len(rep.Runs), n)
	}
	// Source: McKay, Beckman & Conover (1979): a Latin hypercube puts one
	// sample in each of the n equal-probability strata of every input. For
	// h uniform on 20 ± 4 W/m^2/K, u = (h − 16)/8; for E1 normal with
	// σ = 0.5 kJ/mol, u = Φ((E1 − 70)/0.5).
	hs, es := make([]bool, n), make([]bool, n)
	for _, s := range rep.Runs {
		h, _ := strconv.ParseFloat(strings.Fields(s.Values[0])[0], 64)
		e, _ := strconv.ParseFloat(strings.Fields(s.Values[1])[0], 64)
		uh := (h - 16) / 8
		ue := distuv.UnitNormal.CDF((e - 70) / 0.5)
		ih, ie := int(uh*n), int(ue*n)
		if ih < 0 || ih >= n || ie < 0 || ie >= n || hs[ih] || es[ie] {
			t.Fatalf("sample (%s, %s) is not alone in its stratum (%d, %d)", s.Values[0], s.Values[1], ih, ie)
		}
		hs[ih], es[ie] = true, true
	}
	// Identities: the shares count the passing samples; the quantiles lie
	// between the smallest and the largest value.
	pass := 0
	for _, s := range rep.Runs {
		if s.Summary.Criteria[0].Pass {
			pass++
		}
	}
	if got := rep.Criteria[0].Share; got != float64(pass)/n || rep.Criteria[0].Name != results.CriterionMinCure {
		t.Errorf("min_cure share = %v (%s), want %d/%d", got, rep.Criteria[0].Name, pass, n)
	}
	for _, f := range rep.Fields {
		if f.N == 0 {
			continue
		}
		if !(f.Min <= f.P5 && f.P5 <= f.P50 && f.P50 <= f.P95 && f.P95 <= f.Max) {
			t.Errorf("%s: min %v p5 %v p50 %v p95 %v max %v out of order", f.Name, f.Min, f.P5, f.P50, f.P95, f.Max)
		}
	}
	// The same seed gives the same samples whatever the number of jobs.
	_, again := uncRun(t, "hold", "[uncertainty]\n\"top.h\" = \"±20 %\"\n\"materials.tune-resin.cure.E1\" = { spread = \"±1 kJ/mol\", distribution = \"normal\" }\n",
		Options{Samples: n, Seed: 3, Jobs: 1})
	for i := range rep.Runs {
		a, b := rep.Runs[i], again.Runs[i]
		if strings.Join(a.Values, ",") != strings.Join(b.Values, ",") || a.Summary.MinFinalCure != b.Summary.MinFinalCure {
			t.Errorf("sample %d differs between -j 2 and -j 1: %v %v, %v %v", i, a.Values, a.Summary.MinFinalCure, b.Values, b.Summary.MinFinalCure)
		}
	}
}

func TestUncertainZeroSpread(t *testing.T) {
	c, rep := uncRun(t, "hold", "[uncertainty]\n\"top.h\" = \"±0 %\"\n", Options{Samples: 4, Jobs: 2})
	r, err := solverRunForTest(c)
	if err != nil {
		t.Fatal(err)
	}
	nominal := results.Summarize(c, r)
	// Identity: with no spread every sample is the nominal case, so its 5,
	// 50 and 95 % values are the nominal value.
	for _, f := range rep.Fields {
		for _, col := range results.SweepColumns {
			if col.Name != f.Name {
				continue
			}
			want, err := strconv.ParseFloat(col.Get(&nominal), 64)
			if err != nil {
				if f.N != 0 {
					t.Errorf("%s: %d values, the nominal has none", f.Name, f.N)
				}
				continue
			}
			if f.P5 != want || f.P50 != want || f.P95 != want {
				t.Errorf("%s: p5 %v p50 %v p95 %v, want all %v", f.Name, f.P5, f.P50, f.P95, want)
			}
		}
	}
	if rep.AllMet != 1 || !rep.Pass() {
		t.Errorf("all criteria share = %v, want 1", rep.AllMet)
	}
}

func TestUncertainNeedsSection(t *testing.T) {
	text := testkit.TuneCase(t, "hold", "")
	c, err := cases.Parse("hold.toml", text, testkit.TuneDir)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := Propagate(context.Background(), c, text, Options{Samples: 3}); !errors.Is(err, ErrNoUncertainty) {
		t.Errorf("got %v, want ErrNoUncertainty", err)
	}
	if _, err := Propagate(context.Background(), c, text, Options{Samples: 0}); err == nil {
		t.Errorf("0 samples: no error")
	}
}

func TestUncertainFailedSample(t *testing.T) {
	// A thickness of 3 mm ± 4 mm goes negative in some samples: those fail
	// with the loader's message and count as meeting no criterion.
	_, rep := uncRun(t, "hold", "[uncertainty]\n\"layer.resin.thickness\" = \"±4 mm\"\n", Options{Samples: 8, Jobs: 2})
	failed := 0
	for _, s := range rep.Runs {
		if s.Summary.Status == results.StatusFailed {
			failed++
			if !strings.Contains(s.Err, "thickness") {
				t.Errorf("failed sample %v: error %q does not name the thickness", s.Values, s.Err)
			}
		}
	}
	// Source: analytic, thickness = 3 + 4(2u − 1) mm < 0 for u < 1/8: one
	// of the 8 strata.
	if failed != 1 || rep.Failed != 1 {
		t.Errorf("%d samples failed (report %d), want 1", failed, rep.Failed)
	}
	if rep.AllMet > 7.0/8 {
		t.Errorf("all criteria share %v counts a failed sample", rep.AllMet)
	}
}

func TestWriteUncertainty(t *testing.T) {
	c, rep := uncRun(t, "hold", "[uncertainty]\n\"top.h\" = \"±20 %\"\n", Options{Samples: 3, Jobs: 2})
	r, err := solverRunForTest(c)
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	if err := results.WriteRun(dir, c, r, results.Summarize(c, r)); err != nil {
		t.Fatal(err)
	}
	before, err := os.ReadFile(filepath.Join(dir, results.SummaryFile))
	if err != nil {
		t.Fatal(err)
	}
	if err := Write(dir, results.Summarize(c, r), rep); err != nil {
		t.Fatal(err)
	}
	once, _ := os.ReadFile(filepath.Join(dir, results.SummaryFile))
	if err := Write(dir, results.Summarize(c, r), rep); err != nil {
		t.Fatal(err)
	}
	twice, _ := os.ReadFile(filepath.Join(dir, results.SummaryFile))
	if string(once) != string(twice) {
		t.Errorf("writing the uncertainty twice changes summary.json:\n%s\n%s", once, twice)
	}
	// The run's summary.json is kept key for key.
	var a, b0 map[string]any
	if err := json.Unmarshal(before, &a); err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(once, &b0); err != nil {
		t.Fatal(err)
	}
	delete(b0, "uncertainty")
	if ja, jb := mustJSON(t, a), mustJSON(t, b0); ja != jb {
		t.Errorf("summary.json changed beyond the uncertainty:\n%s\n%s", ja, jb)
	}
	rows := testkit.ReadCSV(t, filepath.Join(dir, uncertaintyFile))
	if len(rows) != 4 || rows[0][0] != "sample" || rows[0][1] != "top.h" || rows[0][2] != "peak_temperature_C" ||
		rows[0][len(rows[0])-3] != "status" || rows[0][len(rows[0])-1] != "note" || rows[3][0] != "2" {
		t.Errorf("uncertainty.csv: %d rows, header %v", len(rows), rows[0])
	}
	b, err := os.ReadFile(filepath.Join(dir, results.SummaryFile))
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Status      string `json:"status"`
		Uncertainty struct {
			Samples int `json:"samples"`
			Fields  map[string]struct {
				P5, P50, P95 *float64
			} `json:"fields"`
			Criteria map[string]struct {
				Share float64 `json:"share"`
			} `json:"criteria"`
			Pass bool `json:"pass"`
		} `json:"uncertainty"`
	}
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	u := doc.Uncertainty
	if doc.Status == "" || u.Samples != 3 || u.Fields["peak_temperature_C"].P50 == nil || u.Fields["min_final_cure"].P95 == nil {
		t.Errorf("summary.json lacks the nominal status or the uncertainty fields:\n%s", b)
	}
	if _, ok := u.Criteria[results.CriterionMinCure]; !ok {
		t.Errorf("summary.json uncertainty has no min_cure share:\n%s", b)
	}
	for _, k := range []string{`"p5"`, `"p50"`, `"p95"`, `"all_criteria_share"`, `"share_required": 0.95`} {
		if !strings.Contains(string(b), k) {
			t.Errorf("summary.json has no %s", k)
		}
	}
}

func mustJSON(t *testing.T, v any) string {
	t.Helper()
	b, err := json.Marshal(v)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

func solverRunForTest(c *cases.Case) (*solver.Result, error) {
	return solver.Run(context.Background(), c.Problem)
}
