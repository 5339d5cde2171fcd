package report

import (
	"context"
	"cureslab/cases"
	"cureslab/cases/internal/testkit"
	"cureslab/cases/results"
	"cureslab/cases/sweep"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"
)

// sweepPage runs a tiny sweep into a temporary directory, writes its report
// and returns the directory and the page.
func sweepPage(t *testing.T, set sweep.Settings, crit *cases.Criteria) (string, string) {
	t.Helper()
	fixedClock(t)
	s := newTinySweep(t, "", set)
	dir := t.TempDir()
	runSweep(t, s, dir, sweep.Options{Jobs: 2})
	var c *cases.Case
	if crit != nil {
		var err error
		if c, err = s.Case(0); err != nil {
			t.Fatal(err)
		}
		c.Criteria = *crit
	}
	if err := WriteSweepReport(context.Background(), dir, "tiny sweep", c); err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(filepath.Join(dir, SweepReportFile))
	if err != nil {
		t.Fatal(err)
	}
	return dir, string(b)
}

func hasText(texts []string, want string) bool { return slices.Contains(texts, want) }

// checkSelfContained fails when the page refers to anything on a network or
// loads a resource.
func checkSelfContained(t *testing.T, page string) {
	t.Helper()
	url := regexp.MustCompile(`(?i)(https?:|ftp:)//[^"'\s<>)]*`)
	for _, u := range url.FindAllString(page, -1) {
		if u != "http://www.w3.org/2000/svg" {
			t.Errorf("page refers to %s", u)
		}
	}
	for _, bad := range []string{"<script", "<link", "<iframe", "@import", "url(", "xlink:", "src="} {
		if strings.Contains(strings.ToLower(page), bad) {
			t.Errorf("page contains %q", bad)
		}
	}
}

// A 3 × 3 grid of thickness and hold time: two maps of 9 cells each, axes
// with the units of the values as written, the runs that fail a criterion
// of the case (min_cure 0.5, max_temperature 200 °C) crossed on the map.
func TestSweepReportGrid(t *testing.T) {
	set := sweep.Settings{Vary: mustVary(t,
		"layer.resin.thickness=2mm,3mm,4mm",
		"schedules.oven.segments.1.hold=1min,3min,10min")}
	dir, page := sweepPage(t, set, nil)
	checkSelfContained(t, page)
	figs := svgs(page)
	if len(figs) != 2 {
		t.Fatalf("%d figures, want 2 maps", len(figs))
	}
	for i, s := range figs {
		texts := svgTexts(t, s)
		for _, want := range []string{"layer.resin.thickness (mm)", "schedules.oven.segments.1.hold (min)", "2", "3", "4", "1", "10"} {
			if !hasText(texts, want) {
				t.Errorf("map %d lacks the text %q", i, want)
			}
		}
		bar := []string{"least final cure (–)", "peak temperature (°C)"}[i]
		if !hasText(texts, bar) {
			t.Errorf("map %d lacks the colour bar label %q", i, bar)
		}
	}
	sd, err := readSweepData(context.Background(), dir)
	if err != nil {
		t.Fatal(err)
	}
	if len(sd.Rows) != 9 {
		t.Fatalf("%d rows, want 9", len(sd.Rows))
	}
	var failing []int // cells iy*nx+ix; run = ix*3 + iy (the last key varies fastest)
	for _, r := range sd.Rows {
		if !r.passed() {
			failing = append(failing, (r.Run%3)*3+r.Run/3)
		}
	}
	if len(failing) == 0 || len(failing) == 9 {
		t.Fatalf("%d of 9 runs fail; the test needs some to pass and some to fail", len(failing))
	}
	slices.Sort(failing)
	for _, col := range []string{colCure, colPeak} {
		_, m, err := sweepMapFigure(sd, col)
		if err != nil {
			t.Fatal(err)
		}
		if m.drawn != 9 || m.nx != 3 || m.ny != 3 {
			t.Errorf("%s: %d cells drawn on %d × %d, want 9 on 3 × 3", col, m.drawn, m.nx, m.ny)
		}
		marked := slices.Clone(m.marked)
		slices.Sort(marked)
		if !slices.Equal(marked, failing) {
			t.Errorf("%s: cells %v crossed, want the failing runs' cells %v", col, marked, failing)
		}
	}
	// The failing runs are listed, marked, under their own heading.
	if !strings.Contains(page, "Runs that did not pass") || !strings.Contains(page, `<tr class="fail">`) ||
		!strings.Contains(page, `<span class="badge bad">✗ `+strconv.Itoa(len(failing))+` of 9 runs did not pass</span>`) {
		t.Error("the page does not show the failing runs")
	}
}

// One key: two line panels against it, its unit on the x axis.
func TestSweepReportOneKey(t *testing.T) {
	_, page := sweepPage(t, sweep.Settings{Vary: mustVary(t, "layer.resin.thickness=2mm,3mm,4mm,8mm")}, nil)
	checkSelfContained(t, page)
	figs := svgs(page)
	if len(figs) != 1 {
		t.Fatalf("%d figures, want 1", len(figs))
	}
	texts := svgTexts(t, figs[0])
	for _, want := range []string{"layer.resin.thickness (mm)", "least final cure (–)", "peak temperature (°C)"} {
		if !hasText(texts, want) {
			t.Errorf("figure lacks the axis label %q; texts %q", want, texts)
		}
	}
}

// A resin with a viscosity law: a third panel, the flow window of each run
// (summary.csv's flow_window_s), and a flow-window column in the table of
// runs that did not pass.
func TestSweepReportFlowWindow(t *testing.T) {
	fixedClock(t)
	s := newTinySweep(t, testkit.TinyViscosity, sweep.Settings{Vary: mustVary(t, "layer.resin.thickness=2mm,3mm,4mm")})
	dir := t.TempDir()
	runSweep(t, s, dir, sweep.Options{Jobs: 2})
	c, err := s.Case(0)
	if err != nil {
		t.Fatal(err)
	}
	// A flow window longer than any run's: every run fails min_flow_window.
	c.Criteria = cases.Criteria{MinCure: math.NaN(), MaxTemperature: math.NaN(), MaxSpread: math.NaN(), FlowViscosity: 100, MinFlowWindow: 1e6}
	if err := WriteSweepReport(context.Background(), dir, "tiny sweep", c); err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(filepath.Join(dir, SweepReportFile))
	if err != nil {
		t.Fatal(err)
	}
	page := string(b)
	figs := svgs(page)
	if len(figs) != 1 {
		t.Fatalf("%d figures, want 1", len(figs))
	}
	texts := svgTexts(t, figs[0])
	for _, want := range []string{"least final cure (–)", "peak temperature (°C)", "flow window (s)"} {
		if !hasText(texts, want) {
			t.Errorf("figure lacks the axis label %q; texts %q", want, texts)
		}
	}
	if !strings.Contains(page, "Least final cure, peak temperature and flow window of each run.") {
		t.Error("the caption does not name the flow window")
	}
	if !strings.Contains(page, "Flow window: the shortest time any resin cell spends below the flow threshold (100 Pa·s, criteria.flow_viscosity) before it gels.") {
		t.Error("the caption does not say what the flow window is")
	}
	if !strings.Contains(page, "<th>flow window (s)</th>") {
		t.Error("the table of runs that did not pass has no flow-window column")
	}
	// Without a viscosity law: two panels, as before.
	_, plain := sweepPage(t, sweep.Settings{Vary: mustVary(t, "layer.resin.thickness=2mm,3mm")}, nil)
	if hasText(svgTexts(t, svgs(plain)[0]), "flow window (s)") {
		t.Error("a sweep without a viscosity law draws a flow window")
	}
}

// Three keys: no figure, a table of every run, the smallest margin first.
func TestSweepReportTable(t *testing.T) {
	crit := &cases.Criteria{MinCure: 0.5, MaxTemperature: 200 + 273.15, MaxSpread: math.NaN()}
	_, page := sweepPage(t, sweep.Settings{Vary: mustVary(t,
		"layer.resin.thickness=2mm,4mm",
		"top.h=10W/m^2/K,30W/m^2/K",
		"schedules.oven.segments.1.hold=2min,10min")}, crit)
	checkSelfContained(t, page)
	if n := len(svgs(page)); n != 0 {
		t.Errorf("%d figures, want none", n)
	}
	rows := regexp.MustCompile(`<tr(?: class="fail")?><td>(\d+)</td>`).FindAllStringSubmatch(page, -1)
	if len(rows) != 8 {
		t.Fatalf("%d run rows, want 8", len(rows))
	}
	margins := regexp.MustCompile(`<td class="num">([+-][0-9.]+) %</td>`).FindAllStringSubmatch(page, -1)
	if len(margins) != 8 {
		t.Fatalf("%d margins, want 8", len(margins))
	}
	prev := math.Inf(-1)
	for _, m := range margins {
		v, _ := strconv.ParseFloat(m[1], 64)
		if v < prev {
			t.Errorf("margins not in rising order: %v after %v", v, prev)
		}
		prev = v
	}
}

// The margins by hand, from the definition in WriteSweepReport.
func TestSweepMarginOrder(t *testing.T) {
	row := func(run int, status string, cure, peak float64) sweepRow {
		return sweepRow{Run: run, Status: status, Num: map[string]float64{colCure: cure, colPeak: peak}}
	}
	sd := &sweepData{Rows: []sweepRow{
		row(0, results.StatusOK, 0.9, 100),                     // cure (0.9−0.5)/0.5 = 0.8; T 100/473.15 = 0.211
		row(1, results.StatusCriteriaFailed, 0.45, 150),        // cure −0.05/0.5 = −0.1
		row(2, results.StatusOK, 0.6, 190),                     // cure 0.2; T 10/473.15 = 0.0211
		row(3, results.StatusFailed, math.NaN(), math.NaN()),   // no values: first
		row(4, results.StatusCriteriaFailed, 0.95, 210),        // T −10/473.15 = −0.0211
		row(5, results.StatusOK, math.NaN(), 120),              // no curing layer: T 80/473.15 = 0.169
		row(6, results.StatusRunaway, math.NaN(), math.NaN())}} // no values: first
	crit := &cases.Criteria{MinCure: 0.5, MaxTemperature: 200 + 273.15, MaxSpread: math.NaN()}
	var got []int
	for _, i := range sweepOrder(sd, crit) {
		got = append(got, sd.Rows[i].Run)
	}
	if want := []int{3, 6, 1, 4, 2, 5, 0}; !slices.Equal(got, want) {
		t.Errorf("order %v, want %v", got, want)
	}
	if m := sweepMargin(&sd.Rows[1], sweepLimits(crit)); math.Abs(m+0.1) > 1e-12 {
		t.Errorf("margin of run 1 %v, want -0.1", m)
	}
	// Without limits: by status, then least final cure.
	got = got[:0]
	for _, i := range sweepOrder(sd, nil) {
		got = append(got, sd.Rows[i].Run)
	}
	if want := []int{3, 6, 1, 4, 2, 0, 5}; !slices.Equal(got, want) {
		t.Errorf("order without limits %v, want %v", got, want)
	}
	// min_flow_window: (v − L)/L, by hand.
	fl := sweepRow{Run: 7, Status: results.StatusOK, Num: map[string]float64{colCure: 0.9, colPeak: 100, colFlow: 900}}
	lim := sweepLimits(&cases.Criteria{MinCure: math.NaN(), MaxTemperature: math.NaN(), MaxSpread: math.NaN(), MinFlowWindow: 1200})
	if m := sweepMargin(&fl, lim); math.Abs(m+0.25) > 1e-12 {
		t.Errorf("flow-window margin %v, want (900−1200)/1200 = -0.25", m)
	}
}

func TestSweepReportErrors(t *testing.T) {
	dir := t.TempDir()
	if err := WriteSweepReport(context.Background(), dir, "", nil); err == nil || !strings.Contains(err.Error(), results.SweepDefinitionFile) {
		t.Errorf("empty directory: err %v, want one naming %s", err, results.SweepDefinitionFile)
	}
	s := newTinySweep(t, "", sweep.Settings{Vary: mustVary(t, "layer.resin.thickness=1mm,2mm")})
	runSweep(t, s, dir, sweep.Options{Jobs: 1})
	if err := os.WriteFile(filepath.Join(dir, results.SweepSummaryFile), []byte("run,status\n0,ok\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	err := WriteSweepReport(context.Background(), dir, "", nil)
	if err == nil || !strings.Contains(err.Error(), `no column "layer.resin.thickness"`) {
		t.Errorf("summary without the key column: err %v", err)
	}
	if _, err := os.Stat(filepath.Join(dir, SweepReportFile)); err == nil {
		t.Error("a report was written from a bad summary")
	}
}

func TestNewSweepAxis(t *testing.T) {
	ax := newSweepAxis("k", []string{"4mm", "0.5cm"}, false)
	if ax.Numeric || ax.Label != "k" || ax.Ticks[1].Label != "0.5cm" {
		t.Errorf("mixed units: %+v", ax)
	}
	ax = newSweepAxis("k", []string{"1.5", "2e1"}, false)
	if !ax.Numeric || ax.Label != "k (–)" || ax.Pos["2e1"] != 20 {
		t.Errorf("plain numbers: %+v", ax)
	}
	ax = newSweepAxis("top.h", []string{"10W/m^2/K", "20 W/m^2/K"}, true)
	if ax.Numeric || ax.Label != "top.h (W/m^2/K)" || ax.Ticks[1].Label != "20" || ax.Pos["20 W/m^2/K"] != 1 {
		t.Errorf("cells: %+v", ax)
	}
}

func mustVary(t testing.TB, specs ...string) []cases.Vary {
	t.Helper()
	var out []cases.Vary
	for _, s := range specs {
		v, err := sweep.ParseVary(s)
		if err != nil {
			t.Fatalf("ParseVary(%q): %v", s, err)
		}
		out = append(out, v)
	}
	return out
}

func newTinySweep(t testing.TB, extra string, set sweep.Settings) *sweep.Sweep {
	t.Helper()
	s, err := sweep.New("tiny.toml", tinyCase(t, extra), sweepDir, set)
	if err != nil {
		t.Fatalf("sweep.New: %v", err)
	}
	return s
}

func runSweep(t testing.TB, s *sweep.Sweep, dir string, opt sweep.Options) sweep.Report {
	t.Helper()
	rep, err := s.Run(context.Background(), dir, opt)
	if err != nil {
		t.Fatalf("Run: %v", err)
	}
	return rep
}

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
