package report

import (
	"context"
	"cureslab/cases"
	"cureslab/cases/check"
	"cureslab/cases/internal/textout"
	"cureslab/cases/limits"
	"cureslab/cases/results"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"regexp"
	"slices"
	"sort"
	"strconv"
	"strings"
	"sync"
	"time"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// SweepReportFile is the name of the HTML report of a sweep.
const SweepReportFile = "report.html"

// WriteSweepReport reads dir/summary.csv and dir/sweep.json (as written by
// Sweep.Run or sweep.Merge) and writes dir/report.html: one self-contained
// page in the style of the run report.
//
//   - two varied keys in grid mode: process-window maps of min_final_cure,
//     of peak_temperature_C and, when any run has one, of flow_window_s,
//     one cell per run (first key across, second
//     key up, in the order of the values as written), coloured with the
//     cividis palette; a cell whose run did not pass (a criterion failed,
//     or the run failed or ran away) is outlined and crossed;
//   - one varied key: min_final_cure, peak_temperature_C and (when any
//     run has one) flow_window_s against it, one panel each, runs that did
//     not pass marked with a cross;
//   - otherwise (more keys, or latin-hypercube with two or more keys): a
//     table of every run, the worst first.
//
// Every page also lists the runs that did not pass. Axes take their unit
// from the values as written ("4mm" → "(mm)"); values without a common
// unit are placed in order, one step apart, and labelled as written.
//
// Order of the tables: with crit (the case's criteria, nil when unknown),
// by the smallest relative margin over the criteria that crit sets,
// smallest first, where the margin of min_cure is (v − L)/L, of
// max_temperature (L − v)/L with both in kelvin, of max_spread (L − v)/L
// and of min_flow_window (v − L)/L; runs without a value (failed) come
// first. crit is ignored
// when a varied key is under "criteria." (the limits differ between runs).
// Without limits: by status (failed, runaway, criteria-failed, ok), then
// by min_final_cure, smallest first.
//
// title heads the page ("" gives "Sweep in DIR"). Errors: a missing or
// malformed summary.csv or sweep.json, with the file named; nothing is
// written then. When ctx is done (checked while summary.csv is read and
// before each figure) nothing is written and the error wraps ctx.Err().
// Cost: linear in the number of runs.
func WriteSweepReport(ctx context.Context, dir, title string, c *cases.Case) error {
	sd, err := readSweepData(ctx, dir)
	if err != nil {
		return err
	}
	if title == "" {
		title = "Sweep in " + filepath.Base(filepath.Clean(dir))
	}
	var crit *cases.Criteria
	if c != nil {
		crit = &c.Criteria
	}
	for _, k := range sd.Keys {
		if strings.HasPrefix(k, "criteria.") {
			crit = nil
		}
	}
	b, err := drawPage(ctx, func(w io.Writer) error {
		return renderSweepReport(ctx, w, sd, title, crit, sweepScope(sd, c), reportClock())
	})
	if err != nil {
		return fmt.Errorf("drawing %s: %w", SweepReportFile, err)
	}
	if err := textout.WriteFileAtomic(dir, SweepReportFile, func(w io.Writer) error {
		_, err := w.Write(b)
		return err
	}); err != nil {
		return fmt.Errorf("writing %s: %w", filepath.Join(dir, SweepReportFile), err)
	}
	return nil
}

// sweepData is the content of a sweep directory as the report shows it.
type sweepData struct {
	Mode   string
	Keys   []string
	Values [][]string  // grid: the values of each key as written, in order
	Ranges [][2]string // latin-hypercube: the range of each key, as written
	Runs   int         // runs of the sweep (rows may be fewer)
	Rows   []sweepRow  // in the order of summary.csv
	Crit   []string    // criteria with a _pass column set in some row
}

// sweepRow is one row of summary.csv.
type sweepRow struct {
	Run    int
	Vals   []string           // varied values as written, one per key
	Num    map[string]float64 // summary columns; NaN when empty
	Pass   map[string]string  // criterion -> "true", "false" or ""
	Status string
	Error  string
	Note   string // what the run left out (a probe below its stack)
}

// passed reports whether the run is ok and fails no criterion.
func (r *sweepRow) passed() bool {
	if r.Status != results.StatusOK {
		return false
	}
	for _, p := range r.Pass {
		if p == "false" {
			return false
		}
	}
	return true
}

func (r *sweepRow) num(col string) float64 {
	if v, ok := r.Num[col]; ok {
		return v
	}
	return math.NaN()
}

func readSweepData(ctx context.Context, dir string) (*sweepData, error) {
	defPath := filepath.Join(dir, results.SweepDefinitionFile)
	b, err := limits.ReadFile(ctx, defPath, limits.MaxFileSize)
	if err != nil && ctx.Err() != nil {
		return nil, ctx.Err()
	}
	if err != nil {
		return nil, fmt.Errorf("sweep report: cannot read %s: %w", defPath, err)
	}
	var def results.SweepDef
	if err := json.Unmarshal(b, &def); err != nil {
		return nil, fmt.Errorf("sweep report: %s is not a sweep definition: %v", defPath, err)
	}
	if def.Format != results.SweepFormat || len(def.Vary) == 0 {
		return nil, fmt.Errorf("sweep report: %s is not a sweep definition of format %s with varied keys", defPath, results.SweepFormat)
	}
	sd := &sweepData{Mode: def.Mode, Runs: def.Runs}
	for _, v := range def.Vary {
		sd.Keys = append(sd.Keys, v.Key)
		sd.Values = append(sd.Values, v.Values)
		sd.Ranges = append(sd.Ranges, [2]string{v.From, v.To})
	}
	sumPath := filepath.Join(dir, results.SweepSummaryFile)
	f, err := limits.Open(sumPath, math.MaxInt64)
	if err != nil {
		return nil, fmt.Errorf("sweep report: cannot read %s: %w", sumPath, err)
	}
	defer f.Close()
	recs, err := csv.NewReader(limits.Reader(ctx, f)).ReadAll()
	if err != nil && ctx.Err() != nil {
		return nil, ctx.Err()
	}
	if err != nil {
		return nil, fmt.Errorf("sweep report: %s: %v", sumPath, err)
	}
	if len(recs) == 0 {
		return nil, fmt.Errorf("sweep report: %s is empty", sumPath)
	}
	col := map[string]int{}
	for i, h := range recs[0] {
		col[h] = i
	}
	for _, need := range append(append([]string{"run"}, sd.Keys...), "status") {
		if _, ok := col[need]; !ok {
			return nil, fmt.Errorf("sweep report: %s has no column %q", sumPath, need)
		}
	}
	seenCrit := map[string]bool{}
	for li, rec := range recs[1:] {
		line := li + 2
		if len(rec) != len(recs[0]) {
			return nil, fmt.Errorf("sweep report: %s:%d: %d fields, want %d", sumPath, line, len(rec), len(recs[0]))
		}
		run, err := strconv.Atoi(rec[col["run"]])
		if err != nil || run < 0 {
			return nil, fmt.Errorf("sweep report: %s:%d: run %q is not a run index", sumPath, line, rec[col["run"]])
		}
		r := sweepRow{Run: run, Num: map[string]float64{}, Pass: map[string]string{}, Status: rec[col["status"]]}
		if i, ok := col["error"]; ok {
			r.Error = rec[i]
		}
		if i, ok := col["note"]; ok {
			r.Note = rec[i]
		}
		for _, k := range sd.Keys {
			r.Vals = append(r.Vals, rec[col[k]])
		}
		for _, c := range results.SweepColumns {
			i, ok := col[c.Name]
			if !ok {
				continue
			}
			v := math.NaN()
			if s := rec[i]; s != "" {
				if v, err = strconv.ParseFloat(s, 64); err != nil {
					return nil, fmt.Errorf("sweep report: %s:%d: %s %q is not a number", sumPath, line, c.Name, s)
				}
			}
			r.Num[c.Name] = v
		}
		for _, c := range results.SweepCriteria {
			if i, ok := col[c+"_pass"]; ok && rec[i] != "" {
				r.Pass[c] = rec[i]
				seenCrit[c] = true
			}
		}
		sd.Rows = append(sd.Rows, r)
	}
	for _, c := range results.SweepCriteria {
		if seenCrit[c] {
			sd.Crit = append(sd.Crit, c)
		}
	}
	return sd, nil
}

// Columns drawn, with their axis labels.
const (
	colCure = "min_final_cure"
	colPeak = "peak_temperature_C"
	colFlow = "flow_window_s"
)

var sweepLabels = map[string]string{
	colCure: results.Heading(colCure),
	colPeak: results.Heading(colPeak),
	colFlow: results.Heading(colFlow),
}

// sweepColumns returns the columns a sweep page draws: the least final cure
// and the peak temperature, and the flow window when any run has one (the
// case's resin has a viscosity law).
func sweepColumns(sd *sweepData) []string {
	cols := []string{colCure, colPeak}
	for i := range sd.Rows {
		if !math.IsNaN(sd.Rows[i].num(colFlow)) {
			return append(cols, colFlow)
		}
	}
	return cols
}

// flowNote says what the flow window is when cols draws it: the shortest
// time, over the resin's cells, spent below the flow threshold before gel,
// with the threshold the case sets (crit; nil when the page does not know
// the case).
func flowNote(cols []string, crit *cases.Criteria) string {
	if !slices.Contains(cols, colFlow) {
		return ""
	}
	th := "criteria.flow_viscosity, 100 Pa·s unless the case sets it"
	if crit != nil {
		v := crit.FlowViscosity
		if v == 0 {
			v = 100
		}
		th = strconv.FormatFloat(v, 'g', 4, 64) + " Pa·s, criteria.flow_viscosity"
	}
	return " Flow window: the shortest time any resin cell spends below the flow threshold (" + th + ") before it gels."
}

// sweepColumnsText names the drawn columns for a caption: "least final cure
// and peak temperature", or with the flow window, "least final cure, peak
// temperature and flow window".
func sweepColumnsText(cols []string) string {
	var b strings.Builder
	for i, c := range cols {
		switch {
		case i == 0:
		case i == len(cols)-1:
			b.WriteString(" and ")
		default:
			b.WriteString(", ")
		}
		b.WriteString(results.Label(c))
	}
	return b.String()
}

// sweepScope returns the cautions' scope of a sweep page: the case's when
// it is known; otherwise curing when a run has a final cure, and
// volumetric (the caution is kept when the page cannot know).
func sweepScope(sd *sweepData, c *cases.Case) check.CautionScope {
	if c != nil {
		return check.ScopeOf(c)
	}
	sc := check.CautionScope{Volumetric: true}
	for i := range sd.Rows {
		if !math.IsNaN(sd.Rows[i].num(colCure)) {
			sc.Curing = true
		}
	}
	return sc
}

func renderSweepReport(ctx context.Context, w io.Writer, sd *sweepData, title string, crit *cases.Criteria, scope check.CautionScope, now time.Time) error {
	pg := &page{Title: title, Kind: "sweep", Drawn: stamp(now), Scope: scope}
	bad := 0
	for i := range sd.Rows {
		if !sd.Rows[i].passed() {
			bad++
		}
	}
	pg.Status, pg.StatusOK = fmt.Sprintf("✓ all %d runs passed", len(sd.Rows)), bad == 0
	if bad > 0 {
		pg.Status = fmt.Sprintf("✗ %d of %d runs did not pass", bad, len(sd.Rows))
	}
	if len(sd.Rows) < sd.Runs {
		pg.Alerts = append(pg.Alerts, fmt.Sprintf("%d of the sweep's %d runs are missing from %s (an unfinished sweep or shard).",
			sd.Runs-len(sd.Rows), sd.Runs, results.SweepSummaryFile))
		pg.StatusOK = false
	}
	pg.Sections = append(pg.Sections, section{ID: "sweep", Heading: "The sweep",
		Body: tableHTML([]string{"", "value"}, sweepFacts(sd), nil)})
	order := sweepOrder(sd, crit)
	switch {
	case len(sd.Rows) == 0:
	case len(sd.Keys) == 2 && sd.Mode == cases.ModeGrid:
		for _, c := range sweepColumns(sd) {
			if err := ctx.Err(); err != nil {
				return err
			}
			svg, _, err := sweepMapFigure(sd, c)
			if err != nil {
				return err
			}
			pg.Sections = append(pg.Sections, section{ID: "map-" + c, Heading: "Process window: " + sweepLabels[c],
				Body: figureHTML(svg, "One cell per run, coloured by "+c+" ("+results.SweepSummaryFile+"). Outlined and crossed cells: "+
					"runs that did not pass (a criterion failed, or the run failed or ran away). White, hatched: no value."+flowNote([]string{c}, crit))})
		}
	case len(sd.Keys) == 1:
		if err := ctx.Err(); err != nil {
			return err
		}
		cols := sweepColumns(sd)
		svg, err := sweepLineFigure(sd, cols)
		if err != nil {
			return err
		}
		pg.Sections = append(pg.Sections, section{ID: "lines", Heading: "Against " + sd.Keys[0],
			Body: figureHTML(svg, capital(sweepColumnsText(cols))+" of each run. Crosses: runs that did not pass "+
				"(a criterion failed, or the run failed or ran away)."+flowNote(cols, crit))})
	default:
		pg.Sections = append(pg.Sections, section{ID: "runs", Heading: "Every run, the worst first",
			Intro: sweepOrderText(crit), Body: sweepTable(sd, order, crit)})
		return renderPage(ctx, w, pg)
	}
	var failing []int
	for _, i := range order {
		if !sd.Rows[i].passed() {
			failing = append(failing, i)
		}
	}
	if len(failing) > 0 {
		pg.Sections = append(pg.Sections, section{ID: "not-passed", Heading: "Runs that did not pass",
			Intro: sweepOrderText(crit), Body: sweepTable(sd, failing, crit)})
	}
	return renderPage(ctx, w, pg)
}

func sweepFacts(sd *sweepData) [][]string {
	mode := sd.Mode
	if mode == cases.ModeGrid {
		mode = "grid (every combination)"
	}
	rows := [][]string{{"mode", mode}, {"runs", fmt.Sprintf("%d in %s of %d", len(sd.Rows), results.SweepSummaryFile, sd.Runs)}}
	for k, key := range sd.Keys {
		v := "sampled from " + sd.Ranges[k][0] + " to " + sd.Ranges[k][1]
		if len(sd.Values[k]) > 0 {
			v = strings.Join(sd.Values[k], ", ")
		}
		rows = append(rows, []string{"varied: " + key, v})
	}
	return rows
}

var valueUnit = sync.OnceValue(func() *regexp.Regexp {
	return regexp.MustCompile(`^\s*([-+]?(?:[0-9]+\.?[0-9]*|\.[0-9]+)(?:[eE][-+]?[0-9]+)?)\s*(.*?)\s*$`)
})

// sweepAxis places values as written on an axis: at their numbers when all
// share one unit (numeric), else at 0, 1, 2 ... labelled as written.
type sweepAxis struct {
	Label   string
	Pos     map[string]float64 // value as written -> position
	Numeric bool
	Ticks   []plot.Tick // for a categorical axis (and for a map)
}

// newSweepAxis builds the axis of key over vals (distinct, in order). With
// cells true the axis is always categorical (a map has one cell per value)
// and the tick labels are the numbers when the unit is common.
func newSweepAxis(key string, vals []string, cells bool) sweepAxis {
	ax := sweepAxis{Pos: map[string]float64{}}
	unit, common := "", true
	nums := make([]string, len(vals))
	numV := make([]float64, len(vals))
	for i, v := range vals {
		m := valueUnit().FindStringSubmatch(v)
		if m == nil {
			common = false
			break
		}
		x, err := strconv.ParseFloat(m[1], 64)
		if err != nil || (i > 0 && m[2] != unit) {
			common = false
			break
		}
		unit, nums[i], numV[i] = m[2], m[1], x
	}
	shown := unit
	if shown == "" {
		shown = "–"
	}
	ax.Label = key
	if common && len(vals) > 0 {
		ax.Label = key + " (" + shown + ")"
	}
	if common && !cells {
		ax.Numeric = true
		for i, v := range vals {
			ax.Pos[v] = numV[i]
		}
		return ax
	}
	step := max(1, (len(vals)+9)/10)
	for i, v := range vals {
		ax.Pos[v] = float64(i)
		lbl := v
		if common {
			lbl = nums[i]
		}
		if i%step != 0 {
			lbl = ""
		}
		ax.Ticks = append(ax.Ticks, plot.Tick{Value: float64(i), Label: lbl})
	}
	return ax
}

func (ax sweepAxis) apply(a *plot.Axis) {
	a.Label.Text = ax.Label
	if !ax.Numeric {
		a.Tick.Marker = plot.ConstantTicks(ax.Ticks)
	}
}

// distinctValues returns the values of key k in the rows, in order of first
// appearance, or as listed in sweep.json when it lists them.
func distinctValues(sd *sweepData, k int) []string {
	if len(sd.Values[k]) > 0 {
		return sd.Values[k]
	}
	var out []string
	seen := map[string]bool{}
	for _, r := range sd.Rows {
		if !seen[r.Vals[k]] {
			seen[r.Vals[k]] = true
			out = append(out, r.Vals[k])
		}
	}
	return out
}

// cellMap is a plotter that draws one coloured cell per grid point at
// integer positions, and outlines and crosses the cells marked failed. It
// counts what it draws (for tests).
type cellMap struct {
	nx, ny int
	idx    []uint8 // palette index, [iy*nx+ix]
	fail   []bool
	drawn  int
	marked []int // cells crossed, iy*nx+ix
	// hatched counts the hatch lines of cells without a value.
	hatched int
}

// Plot implements plot.Plotter.
func (m *cellMap) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	m.drawn, m.marked, m.hatched = 0, nil, 0
	out := draw.LineStyle{Color: ink, Width: vg.Points(1.4)}
	under := draw.LineStyle{Color: white, Width: vg.Points(2.6)}
	for iy := range m.ny {
		for ix := range m.nx {
			k := iy*m.nx + ix
			x0, x1 := trX(float64(ix)-0.5), trX(float64(ix)+0.5)
			y0, y1 := trY(float64(iy)-0.5), trY(float64(iy)+0.5)
			box := []vg.Point{{X: x0, Y: y0}, {X: x1, Y: y0}, {X: x1, Y: y1}, {X: x0, Y: y1}}
			c.FillPolygon(mapPalette[m.idx[k]], box)
			if m.idx[k] == mapSteps {
				m.hatched += hatch(c, vg.Rectangle{Min: vg.Point{X: min(x0, x1), Y: min(y0, y1)}, Max: vg.Point{X: max(x0, x1), Y: max(y0, y1)}})
			}
			m.drawn++
			if !m.fail[k] {
				continue
			}
			d := (x1 - x0) * 0.12
			e := (y1 - y0) * 0.12
			in := []vg.Point{{X: x0 + d, Y: y0 + e}, {X: x1 - d, Y: y0 + e}, {X: x1 - d, Y: y1 - e}, {X: x0 + d, Y: y1 - e}, {X: x0 + d, Y: y0 + e}}
			for _, ls := range []draw.LineStyle{under, out} {
				c.StrokeLines(ls, in)
				c.StrokeLine2(ls, in[0].X, in[0].Y, in[2].X, in[2].Y)
				c.StrokeLine2(ls, in[1].X, in[1].Y, in[3].X, in[3].Y)
			}
			m.marked = append(m.marked, k)
		}
	}
}

// DataRange implements plot.DataRanger.
func (m *cellMap) DataRange() (xmin, xmax, ymin, ymax float64) {
	return -0.5, float64(m.nx) - 0.5, -0.5, float64(m.ny) - 0.5
}

// sweepMapFigure draws the process-window map of column col over the two
// keys of a grid sweep, with its colour bar.
func sweepMapFigure(sd *sweepData, col string) (string, *cellMap, error) {
	xv, yv := distinctValues(sd, 0), distinctValues(sd, 1)
	xa, ya := newSweepAxis(sd.Keys[0], xv, true), newSweepAxis(sd.Keys[1], yv, true)
	m := &cellMap{nx: len(xv), ny: len(yv)}
	m.idx = make([]uint8, m.nx*m.ny)
	m.fail = make([]bool, m.nx*m.ny)
	vals := make([]float64, m.nx*m.ny)
	for i := range vals {
		vals[i] = math.NaN()
	}
	for _, r := range sd.Rows {
		ix, ok1 := xa.Pos[r.Vals[0]]
		iy, ok2 := ya.Pos[r.Vals[1]]
		if !ok1 || !ok2 {
			continue
		}
		k := int(iy)*m.nx + int(ix)
		vals[k] = r.num(col)
		m.fail[k] = !r.passed()
	}
	lo, hi := valueRange(vals)
	if math.IsInf(lo, 0) {
		lo, hi = 0, 1
	}
	minSpan := 1.0
	if col == colCure {
		minSpan = 0.01
	}
	if hi-lo < minSpan {
		lo, hi = (lo+hi)/2-minSpan/2, (lo+hi)/2+minSpan/2
	}
	if col == colCure {
		lo, hi = cureScale(lo, hi)
	}
	for k, v := range vals {
		m.idx[k] = mapIndex(v, lo, hi)
	}
	h := vg.Length(mapHeight + 35)
	svg, err := svgFigure(figWidth, h, "process window of "+col, func(dc draw.Canvas) error {
		dc = draw.Crop(dc, 0, 0, 0, -vg.Points(6)) // room for a tick label at the top of the colour bar
		p := newPlot("", "")
		xa.apply(&p.X)
		ya.apply(&p.Y)
		p.X.Min, p.X.Max = -0.5, float64(m.nx)-0.5
		p.Y.Min, p.Y.Max = -0.5, float64(m.ny)-0.5
		p.Add(m)
		left := draw.Crop(dc, 0, -colorBarWidth, 0, 0)
		p.Draw(left)
		colorBar(draw.Crop(dc, dc.Max.X-dc.Min.X-colorBarWidth, 0, 0, 0), p.DataCanvas(left), lo, hi, sweepLabels[col])
		return nil
	})
	return svg, m, err
}

// cureScale moves a scale [lo, hi] of a degree of cure down so that it ends
// at 1 when it reaches past 1 (no cure above 1 is drawn), keeping its span.
func cureScale(lo, hi float64) (float64, float64) {
	if hi > 1 {
		return lo - (hi - 1), 1
	}
	return lo, hi
}

// sweepLineFigure draws the columns cols (sweepColumns), one panel each,
// against the one varied key, a cross on each run that did not pass.
func sweepLineFigure(sd *sweepData, cols []string) (string, error) {
	ax := newSweepAxis(sd.Keys[0], distinctValues(sd, 0), false)
	rows := append([]sweepRow(nil), sd.Rows...)
	sort.SliceStable(rows, func(i, j int) bool { return ax.Pos[rows[i].Vals[0]] < ax.Pos[rows[j].Vals[0]] })
	return svgFigure(figWidth, vg.Length(len(cols)*panelHeight+40), "sweep over "+sd.Keys[0], func(dc draw.Canvas) error {
		var plots [][]*plot.Plot
		for n, col := range cols {
			p := newPlot(ax.Label, sweepLabels[col])
			addGrid(p)
			ax.apply(&p.X)
			var xs, ys []float64
			var bad plotter.XYs
			for i := range rows {
				x, y := ax.Pos[rows[i].Vals[0]], rows[i].num(col)
				xs, ys = append(xs, x), append(ys, y)
				if !rows[i].passed() && !math.IsNaN(y) {
					bad = append(bad, plotter.XY{X: x, Y: y})
				}
			}
			c, _ := lineColor(n)
			if _, err := addSeries(p, series{X: xs, Y: ys, Color: c, Width: vg.Points(1.3)}); err != nil {
				return err
			}
			var pts plotter.XYs
			for i := range xs {
				if !math.IsNaN(ys[i]) {
					pts = append(pts, plotter.XY{X: xs[i], Y: ys[i]})
				}
			}
			if len(pts) > 0 {
				sc, err := plotter.NewScatter(pts)
				if err != nil {
					return err
				}
				sc.GlyphStyle = draw.GlyphStyle{Color: c, Radius: vg.Points(2.2), Shape: draw.CircleGlyph{}}
				p.Add(sc)
			}
			if len(bad) > 0 {
				sc, err := plotter.NewScatter(bad)
				if err != nil {
					return err
				}
				sc.GlyphStyle = draw.GlyphStyle{Color: ink, Radius: vg.Points(4.5), Shape: draw.CrossGlyph{}}
				p.Add(sc)
			}
			lo, hi := valueRange(ys)
			if !math.IsInf(lo, 0) {
				span := 1.0
				if col == colCure {
					span = 0.01
				}
				p.Y.Min, p.Y.Max = niceRange(lo, hi, 0.08, span)
				if col == colCure {
					p.Y.Min, p.Y.Max = cureScale(p.Y.Min, p.Y.Max)
				}
			}
			if !ax.Numeric {
				p.X.Min, p.X.Max = -0.5, float64(len(ax.Ticks))-0.5
			} else if xlo, xhi := valueRange(xs); !math.IsInf(xlo, 0) {
				p.X.Min, p.X.Max = niceRange(xlo, xhi, 0.04, 1e-9*max(1, math.Abs(xlo)))
			}
			plots = append(plots, []*plot.Plot{p})
		}
		for _, row := range plots[:len(plots)-1] {
			row[0].X.Label.Text = ""
		}
		cs := plot.Align(plots, draw.Tiles{Rows: len(plots), Cols: 1, PadY: vg.Points(8)}, dc)
		for i, row := range plots {
			row[0].Draw(cs[i][0])
		}
		return nil
	})
}
