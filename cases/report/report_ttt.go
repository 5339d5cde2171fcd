package report

import (
	"context"
	"cureslab/cases/check"
	"cureslab/cases/internal/textout"
	"cureslab/cases/ttt"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"time"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// WriteTTTPlot writes the HTML page of an isothermal TTT table to path: one
// self-contained page in the style of the run report with the
// time–temperature–transformation diagram (cure temperature in °C upwards,
// time on a logarithmic axis to the right) and the table of times.
//
// Method: one curve per state, through the rows of t in order of
// temperature: the time to gel, to vitrify (only with a glass transition)
// and to the target cure. A time that is never reached (+Inf), does not
// apply (NaN) or is zero (vitrified from the start, at or below Tg0) has
// no place on a log axis and is left out; the line breaks there. The time
// unit is minutes when the longest plotted time is below 10 h, hours
// otherwise (tttTimeScale).
//
// Preconditions: t from TTT with at least one row. The file is written with
// WriteFileAtomic; its directory must exist. When ctx is done nothing is
// written and the error wraps ctx.Err(). Cost: linear in the rows.
func WriteTTTPlot(ctx context.Context, path string, t *ttt.Table) error {
	if t == nil || len(t.Rows) == 0 {
		return errors.New("report.WriteTTTPlot: a TTT table with at least one row is required")
	}
	if fi, err := os.Stat(filepath.Dir(path)); err != nil || !fi.IsDir() {
		return fmt.Errorf("cannot write %s: its directory does not exist", path)
	}
	b, err := drawPage(ctx, func(w io.Writer) error { return renderTTTPage(ctx, w, t, reportClock()) })
	if err != nil {
		return fmt.Errorf("drawing %s: %w", path, err)
	}
	return textout.WriteFileAtomic(filepath.Dir(path), filepath.Base(path), func(w io.Writer) error {
		_, err := w.Write(b)
		return err
	})
}

// tttCurve is one curve of the TTT diagram: x in the unit of the time
// scale (NaN where the point is left out), y in °C.
type tttCurve struct {
	Name string
	X, Y []float64
}

// tttCurves returns the curves of t on the time scale ts: gel, then
// vitrification when t has a glass transition, then the target cure.
func tttCurves(t *ttt.Table, ts timeScale) []tttCurve {
	x := func(v float64) float64 {
		if math.IsNaN(v) || math.IsInf(v, 0) || !(v > 0) {
			return math.NaN()
		}
		return v / ts.div
	}
	gel := tttCurve{Name: "gel (α = " + strconv.FormatFloat(t.GelPoint, 'g', 3, 64) + ")"}
	vit := tttCurve{Name: "vitrification"}
	tgt := tttCurve{Name: "cure α = " + strconv.FormatFloat(t.Target, 'g', 3, 64)}
	for _, r := range t.Rows {
		y := r.Temp - 273.15
		gel.X, gel.Y = append(gel.X, x(r.Gel)), append(gel.Y, y)
		vit.X, vit.Y = append(vit.X, x(r.Vitrify)), append(vit.Y, y)
		tgt.X, tgt.Y = append(tgt.X, x(r.Target)), append(tgt.Y, y)
	}
	if t.Glass == nil {
		return []tttCurve{gel, tgt}
	}
	return []tttCurve{gel, vit, tgt}
}

// tttTimeScale returns minutes when the longest finite positive time of t
// is below 10 h (or there is none), hours otherwise.
func tttTimeScale(t *ttt.Table) timeScale {
	longest := 0.0
	for _, r := range t.Rows {
		for _, v := range []float64{r.Gel, r.Vitrify, r.Target} {
			if v > 0 && !math.IsInf(v, 0) {
				longest = max(longest, v)
			}
		}
	}
	if longest >= 10*3600 {
		return timeScale{3600, "h"}
	}
	return timeScale{60, "min"}
}

func renderTTTPage(ctx context.Context, w io.Writer, t *ttt.Table, now time.Time) error {
	pg := &page{Title: "TTT diagram: " + t.Material, Kind: "TTT diagram", Drawn: stamp(now), Scope: check.CautionScope{Curing: true}}
	ts := tttTimeScale(t)
	curves := tttCurves(t, ts)
	plotted := 0
	for _, c := range curves {
		for _, v := range c.X {
			if !math.IsNaN(v) {
				plotted++
			}
		}
	}
	if plotted == 0 {
		pg.Alerts = append(pg.Alerts, "No state is reached in a finite time at any of these cure temperatures: the diagram is empty.")
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	svg, err := tttFigure(t, ts, curves)
	if err != nil {
		return err
	}
	caption := fmt.Sprintf("Isothermal times from an initial cure of %g to gelation, to the target cure", t.InitialCure)
	if t.Glass != nil {
		caption += fmt.Sprintf(" and to vitrification, where the glass transition Tg of the resin reaches the cure temperature (Tg from %s to %s; below Tg0 the resin is glassy from the start, "+
			"a zero time not shown on the log axis)", fmtC(t.Glass.Tg0-273.15), fmtC(t.Glass.TgFull-273.15))
	} else {
		caption += "; the material has no glass_transition, so there is no vitrification curve"
	}
	caption += ". A state never reached at a temperature has no point there."
	pg.Sections = append(pg.Sections, section{ID: "ttt", Heading: "Time–temperature–transformation diagram",
		Body: figureHTML(svg, caption)})
	h := func(v float64) string {
		switch {
		case math.IsNaN(v):
			return "–"
		case math.IsInf(v, 1):
			return "never"
		}
		return ttt.FormatTime(v)
	}
	var rows [][]string
	for _, r := range t.Rows {
		rows = append(rows, []string{fmtC(r.Temp - 273.15), h(r.Gel), h(r.Vitrify), h(r.Target)})
	}
	pg.Sections = append(pg.Sections, section{ID: "table", Heading: "Times",
		Body: tableHTML([]string{"cure temperature", "to gel", "to vitrify", "to cure " + strconv.FormatFloat(t.Target, 'g', -1, 64)},
			rows, map[int]bool{0: true, 1: true, 2: true, 3: true})})
	return renderPage(ctx, w, pg)
}

// tttFigure draws the TTT diagram: temperature against log time.
func tttFigure(t *ttt.Table, ts timeScale, curves []tttCurve) (string, error) {
	return svgFigure(figWidth, profileHeight+40, "isothermal time-temperature-transformation diagram", func(dc draw.Canvas) error {
		p := newPlot("time at the cure temperature, log scale ("+ts.unit+")", "cure temperature (°C)")
		addGrid(p)
		p.X.Scale = plot.LogScale{}
		p.X.Tick.Marker = logTicks{}
		leg := newLegend()
		var names []string
		var xs, ys [][]float64
		for k, c := range curves {
			col, _ := lineColor(k)
			var dash []vg.Length
			if k == 1 && len(curves) == 3 {
				dash = []vg.Length{vg.Points(5), vg.Points(2.5)}
			}
			l, err := addSeries(p, series{X: c.X, Y: c.Y, Color: col, Dash: dash, Width: vg.Points(1.5)})
			if err != nil {
				return err
			}
			if pts := xyOf(c.X, c.Y); len(pts) > 0 {
				sc, err := plotter.NewScatter(pts)
				if err != nil {
					return err
				}
				sc.GlyphStyle = draw.GlyphStyle{Color: col, Radius: vg.Points(2), Shape: draw.CircleGlyph{}}
				p.Add(sc)
			}
			if l != nil {
				leg.Add(c.Name, l)
				names = append(names, c.Name)
			}
			xs, ys = append(xs, c.X), append(ys, c.Y)
		}
		lo, hi := valueRange(xs...)
		if math.IsInf(lo, 0) {
			lo, hi = 1, 100
		}
		p.X.Min = math.Pow(10, math.Floor(math.Log10(lo)+1e-9))
		p.X.Max = math.Pow(10, math.Ceil(math.Log10(hi)-1e-9))
		if !(p.X.Max > p.X.Min) {
			p.X.Max = 10 * p.X.Min
		}
		ylo, yhi := valueRange(ys...)
		p.Y.Min, p.Y.Max = niceRange(ylo, yhi, 0.04, 10)
		if len(names) == 0 {
			names = []string{"no state reached"}
		}
		lw := legendWidthFor(names)
		left := draw.Crop(dc, 0, -lw, 0, 0)
		p.Draw(left)
		legendAt(draw.Crop(dc, dc.Max.X-dc.Min.X-lw+vg.Points(10), 0, 0, 0), p.DataCanvas(left), leg)
		return nil
	})
}

// logTicks places major ticks at the powers of ten of [lo, hi] (lo > 0),
// labelled, and unlabelled minor ticks at 2…9 times them; over less than
// two decades the ticks at 2 and 5 times a power of ten are labelled too.
// The labels of one axis share one form (logLabels): plain numbers when
// every label fits 0.001 … 10000, else all in exponent form, so that an
// axis never shows "10000" next to "1e+05".
type logTicks struct{}

// Ticks implements plot.Ticker.
func (logTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(lo > 0) || !(hi >= lo) || math.IsInf(hi, 0) {
		return nil
	}
	few := math.Log10(hi/lo) < 2+1e-9
	var out []plot.Tick
	var labelled []int
	for e := math.Floor(math.Log10(lo) + 1e-9); ; e++ {
		d := math.Pow(10, e)
		if d > hi*(1+1e-9) {
			break
		}
		for k := 1.0; k <= 9; k++ {
			v := k * d
			if v < lo*(1-1e-9) || v > hi*(1+1e-9) {
				continue
			}
			if k == 1 || (few && (k == 2 || k == 5)) {
				labelled = append(labelled, len(out))
			}
			out = append(out, plot.Tick{Value: v})
		}
	}
	vals := make([]float64, len(labelled))
	for i, j := range labelled {
		vals[i] = out[j].Value
	}
	for i, l := range logLabels(vals) {
		out[labelled[i]].Label = l
	}
	return out
}

// logLabels writes the tick values vs of one log axis in one form: plainly
// ("0.01", "2000") when every value lies in [0.001, 100000), otherwise each
// as a mantissa and a power of ten without padding ("1e-4", "2e3", "1e5").
func logLabels(vs []float64) []string {
	plain := true
	for _, v := range vs {
		if !(v >= 1e-3*(1-1e-9) && v < 1e5*(1-1e-9)) {
			plain = false
		}
	}
	out := make([]string, len(vs))
	for i, v := range vs {
		if plain {
			r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', 3, 64), 64)
			out[i] = strconv.FormatFloat(r, 'f', -1, 64)
			continue
		}
		e := int(math.Floor(math.Log10(v) + 1e-9))
		m := v / math.Pow10(e)
		out[i] = strconv.FormatFloat(m, 'g', 3, 64) + "e" + strconv.Itoa(e)
	}
	return out
}
