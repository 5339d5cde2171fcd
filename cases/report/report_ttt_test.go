package report

import (
	"context"
	"cureslab/cases"
	"cureslab/cases/internal/testkit"
	"cureslab/cases/ttt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// tttTable returns the TTT table of resin-T in tttCase (ttt_test.go), with
// or without its glass transition.
func tttTable(t *testing.T, glass bool) *ttt.Table {
	t.Helper()
	text := testkit.TTTCase
	if !glass {
		text = strings.Replace(testkit.TTTCase, "[materials.resin-T.cure.glass_transition]\nTg0 = \"-35 C\"\nTg_full = \"130 C\"\nlambda = 0.42\n", "", 1)
		if text == testkit.TTTCase {
			t.Fatal("could not remove the glass transition from the test case")
		}
	}
	c, err := cases.Parse("ttt.toml", []byte(text), "")
	if err != nil {
		t.Fatal(err)
	}
	tt, err := ttt.Tabulate(context.Background(), c, "resin-T", ttt.Options{})
	if err != nil {
		t.Fatal(err)
	}
	return tt
}

func tttPage(t *testing.T, tt *ttt.Table) string {
	t.Helper()
	fixedClock(t)
	path := filepath.Join(t.TempDir(), "ttt.html")
	if err := WriteTTTPlot(context.Background(), path, tt); err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// With a glass transition: one figure, well-formed SVG, axes with their
// units, a legend naming gel, vitrification and the target cure (0.85,
// criteria.min_cure of the case), nothing loaded from a network.
func TestWriteTTTPlot(t *testing.T) {
	tt := tttTable(t, true)
	page := tttPage(t, tt)
	checkSelfContained(t, page)
	if !strings.Contains(page, "<h1>TTT diagram: resin-T</h1>") {
		t.Error("title missing")
	}
	figs := svgs(page)
	if len(figs) != 1 {
		t.Fatalf("%d figures, want 1", len(figs))
	}
	texts := svgTexts(t, figs[0])
	unit := tttTimeScale(tt).unit
	for _, want := range []string{"cure temperature (°C)", "time at the cure temperature, log scale (" + unit + ")",
		"gel (α = 0.58)", "vitrification", "cure α = 0.85"} {
		if !hasText(texts, want) {
			t.Errorf("TTT figure lacks %q; texts %q", want, texts)
		}
	}
	if !strings.Contains(page, "<th>to vitrify</th>") || !strings.Contains(page, ">never</td>") {
		t.Error("the table of times lacks the vitrification column or a state never reached")
	}
}

// Without a glass transition there is no vitrification curve and the
// caption says why.
func TestWriteTTTPlotNoGlass(t *testing.T) {
	tt := tttTable(t, false)
	page := tttPage(t, tt)
	checkSelfContained(t, page)
	figs := svgs(page)
	if len(figs) != 1 {
		t.Fatalf("%d figures, want 1", len(figs))
	}
	texts := svgTexts(t, figs[0])
	for _, s := range texts {
		if strings.Contains(s, "vitrif") {
			t.Errorf("figure without a glass transition shows %q", s)
		}
	}
	for _, want := range []string{"gel (α = 0.58)", "cure α = 0.85", "cure temperature (°C)"} {
		if !hasText(texts, want) {
			t.Errorf("TTT figure lacks %q", want)
		}
	}
	if !strings.Contains(page, "no vitrification curve") {
		t.Error("the caption does not say that there is no vitrification curve")
	}
	if n := len(tttCurves(tt, timeScale{60, "min"})); n != 2 {
		t.Errorf("%d curves, want 2 (gel, target)", n)
	}
}

// The curves carry every finite positive time of the table, in the unit of
// the axis, and leave out the rest. Above Tg_full = 130 °C the DiBenedetto
// Tg never reaches the cure temperature, so those rows have no
// vitrification point.
// Source: Pascault & Williams, J. Polym. Sci. B 28:85 (1990), Tg(α) ≤ Tg∞ (confirmed).
func TestTTTCurvesOmitNever(t *testing.T) {
	tt := tttTable(t, true)
	ts := timeScale{60, "min"}
	cs := tttCurves(tt, ts)
	if len(cs) != 3 {
		t.Fatalf("%d curves, want 3", len(cs))
	}
	hot := 0
	for i, r := range tt.Rows {
		for k, v := range []float64{r.Gel, r.Vitrify, r.Target} {
			x := cs[k].X[i]
			finite := v > 0 && !math.IsInf(v, 0) && !math.IsNaN(v)
			switch {
			case finite && math.Abs(x-v/60) > 1e-12*v:
				t.Errorf("row %d curve %d: x %g, want %g min", i, k, x, v/60)
			case !finite && !math.IsNaN(x):
				t.Errorf("row %d curve %d: time %g plotted as %g", i, k, v, x)
			}
			if math.Abs(cs[k].Y[i]-(r.Temp-273.15)) > 1e-9 {
				t.Errorf("row %d curve %d: y %g, want %g °C", i, k, cs[k].Y[i], r.Temp-273.15)
			}
		}
		if r.Temp-273.15 > 130+1e-9 {
			hot++
			if !math.IsNaN(cs[1].X[i]) {
				t.Errorf("vitrification plotted at %g °C, above Tg_full", r.Temp-273.15)
			}
		}
	}
	if hot == 0 {
		t.Error("the default range has no row above Tg_full; the test checks nothing there")
	}
}

// Log ticks: labelled powers of ten, minor ticks between; over less than
// two decades 2 and 5 labelled too. Common practice for log axes.
func TestLogTicks(t *testing.T) {
	labels := func(lo, hi float64) []string {
		var out []string
		for _, tk := range (logTicks{}).Ticks(lo, hi) {
			if tk.Label != "" {
				out = append(out, tk.Label)
			}
		}
		return out
	}
	if got := strings.Join(labels(0.01, 1000), " "); got != "0.01 0.1 1 10 100 1000" {
		t.Errorf("labels of 0.01..1000: %s", got)
	}
	if got := strings.Join(labels(1, 100), " "); got != "1 2 5 10 20 50 100" {
		t.Errorf("labels of 1..100: %s", got)
	}
	if got := strings.Join(labels(1e5, 1e7), " "); got != "1e5 2e5 5e5 1e6 2e6 5e6 1e7" {
		t.Errorf("labels of 1e5..1e7: %s", got)
	}
	// One form per axis: an axis that needs the exponent form for 1e5 writes
	// every label in it, never "10000" beside "1e5".
	if got := strings.Join(labels(1, 1e6), " "); got != "1e0 1e1 1e2 1e3 1e4 1e5 1e6" {
		t.Errorf("labels of 1..1e6: %s", got)
	}
	if got := strings.Join(labels(0.001, 10000), " "); got != "0.001 0.01 0.1 1 10 100 1000 10000" {
		t.Errorf("labels of 0.001..1e4: %s", got)
	}
	if n := len((logTicks{}).Ticks(1, 10)); n != 10 {
		t.Errorf("%d ticks over 1..10, want 10 (1…9 and 10)", n)
	}
}

func TestTTTTimeScale(t *testing.T) {
	tab := &ttt.Table{Rows: []ttt.Row{{Temp: 400, Gel: 600, Vitrify: math.NaN(), Target: math.Inf(1)}}}
	if u := tttTimeScale(tab).unit; u != "min" {
		t.Errorf("10 min: unit %s, want min", u)
	}
	tab.Rows[0].Target = 11 * 3600
	if u := tttTimeScale(tab).unit; u != "h" {
		t.Errorf("11 h: unit %s, want h", u)
	}
}

func TestWriteTTTPlotErrors(t *testing.T) {
	if err := WriteTTTPlot(context.Background(), filepath.Join(t.TempDir(), "ttt.html"), &ttt.Table{}); err == nil {
		t.Error("an empty table gave no error")
	}
	if err := WriteTTTPlot(context.Background(), filepath.Join(t.TempDir(), "ttt.html"), nil); err == nil {
		t.Error("a nil table gave no error")
	}
	tt := tttTable(t, true)
	if err := WriteTTTPlot(context.Background(), filepath.Join(t.TempDir(), "no-such-dir", "ttt.html"), tt); err == nil {
		t.Error("a missing directory gave no error")
	}
	// Nothing reached anywhere: the page is written with an alert.
	empty := &ttt.Table{Material: "x", Target: 0.9, GelPoint: 0.5,
		Rows: []ttt.Row{{Temp: 300, Gel: math.Inf(1), Vitrify: math.NaN(), Target: math.Inf(1)}}}
	page := tttPage(t, empty)
	if !strings.Contains(page, `role="alert"`) {
		t.Error("an empty diagram carries no alert")
	}
	svgTexts(t, svgs(page)[0])
}
