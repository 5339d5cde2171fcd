package report

import (
	"context"
	"fmt"
	"html/template"
	"image/color"
	"io"
	"math"
	"strconv"
	"strings"
	"time"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"cureslab/cases/calibrate"
	"cureslab/physics/lsq"
)

// CalibrationReport writes the report page of a calibration (report.html)
// to w: one self-contained page in the style of the run report with
//
//   - the fitted values (case value, fitted value, standard error, 95 %
//     interval) and the RMS residual per depth, at the case's values and
//     fitted;
//   - per thermocouple depth, the measured readings against the simulated
//     temperatures at the case's values and at the fitted ones;
//   - the residuals (fitted simulation − measured) over time, per depth;
//   - the correlation matrix of the fitted values, |r| > 0.95 marked;
//   - the warnings and how the fit ended (an unconverged or interrupted
//     fit is marked in the header).
//
// The page is drawn in memory and written to w in one go; when ctx is done
// (checked before each figure) nothing is written to w and the error wraps
// ctx.Err(). Cost: linear in the readings.
func CalibrationReport(ctx context.Context, w io.Writer, r *calibrate.Result) error {
	b, err := drawPage(ctx, func(w io.Writer) error { return renderCalibrationPage(ctx, w, r, reportClock()) })
	if err != nil {
		return fmt.Errorf("drawing %s: %w", calibrate.ReportFile, err)
	}
	_, err = w.Write(b)
	return err
}

func renderCalibrationPage(ctx context.Context, w io.Writer, r *calibrate.Result, now time.Time) error {
	title := r.Title
	if title == "" {
		title = r.CaseFile
	}
	pg := &page{Title: "Calibration: " + title, Kind: "calibration", Drawn: stamp(now), Scope: r.Scope}
	switch r.Status {
	case lsq.Converged:
		pg.Status, pg.StatusOK = fmt.Sprintf("fitted: RMS residual %.2f K", r.RMSAll), true
	case lsq.IterationLimit:
		pg.Status = "NOT CONVERGED"
		pg.Alerts = append(pg.Alerts, fmt.Sprintf("The fit did not converge in %d iterations: the values are the best point reached, not a fit.", r.Iterations))
	case lsq.Interrupted:
		pg.Status = "INTERRUPTED"
		pg.Alerts = append(pg.Alerts, "The fit was interrupted: the values are the best point reached so far, not a fit.")
	}
	pg.Sections = append(pg.Sections, section{ID: "values", Heading: "Fitted values",
		Intro: fmt.Sprintf("%s against %s: %d thermocouples, %d readings, every reading weighted alike. Standard errors from the Jacobian at the optimum scaled by the residual variance (s = %.3f K on %d degrees of freedom); 95 %% intervals from Student's t, symmetric in the logarithm for values fitted on a logarithmic scale. They assume independent scatter of the readings about the model.",
			r.CaseFile, r.Log.File, len(r.Log.Probes), r.Readings, r.Sigma, r.DoF),
		Body: calibrationValuesTable(r)})
	var rows [][]string
	for k, p := range r.Log.Probes {
		rows = append(rows, []string{p.Label + " mm", strconv.Itoa(p.Readings()), fmt.Sprintf("%.3f K", r.StartRMS[k]),
			fmt.Sprintf("%.3f K", r.RMS[k]), fmtG3(r.Autocorr[k])})
	}
	rows = append(rows, []string{"all", strconv.Itoa(r.Readings), fmt.Sprintf("%.3f K", r.StartRMSAll), fmt.Sprintf("%.3f K", r.RMSAll), ""})
	pg.Sections = append(pg.Sections, section{ID: "rms", Heading: "Residuals per thermocouple",
		Intro: "RMS of simulated − measured over each thermocouple's readings, with the case's own values and with the fitted ones; the lag-1 autocorrelation of the fitted residuals (near 0 for independent scatter, near 1 for residuals that wander: a model that misses something there).",
		Body:  tableHTML([]string{"depth", "readings", "RMS, case values", "RMS, fitted", "lag-1 autocorrelation"}, rows, map[int]bool{1: true, 2: true, 3: true, 4: true})})
	ts := timeScaleFor(r.Log.Times[len(r.Log.Times)-1])
	if err := ctx.Err(); err != nil {
		return err
	}
	svg, err := calibrationTracesFigure(r, ts)
	if err != nil {
		return err
	}
	pg.Sections = append(pg.Sections, section{ID: "traces", Heading: "Measured and simulated temperatures",
		Body: figureHTML(svg, "Each thermocouple depth in its own panel: the readings (grey dots), the simulation with the case's own values (vermillion, dashed 4 pt on 2.5 pt) and with the fitted values (blue, solid, drawn over the readings).")})
	if err := ctx.Err(); err != nil {
		return err
	}
	svg, err = calibrationResidualFigure(r, ts)
	if err != nil {
		return err
	}
	pg.Sections = append(pg.Sections, section{ID: "residuals", Heading: "Residuals over time",
		Body: figureHTML(svg, "Fitted simulation − measured at every reading, per depth (colour and shape). Scatter about zero is what the intervals assume; slow waves or a trend mean the model misses something (a heat path, a property, the program as really run).")})
	if len(r.Params) > 1 {
		pg.Sections = append(pg.Sections, section{ID: "correlation", Heading: "Correlation of the fitted values",
			Intro: "Near ±1: the log determines a combination of the two values rather than each; beyond |r| = 0.95 (marked) measure another depth or fix one of them.",
			Body:  correlationTable(r)})
	}
	if len(r.Warnings) > 0 {
		var b strings.Builder
		b.WriteString("<ul>\n")
		for _, s := range r.Warnings {
			b.WriteString("<li>" + template.HTMLEscapeString(s) + "</li>\n")
		}
		b.WriteString("</ul>\n")
		pg.Sections = append(pg.Sections, section{ID: "warnings", Heading: "Warnings", Body: template.HTML(b.String())})
	}
	return renderPage(ctx, w, pg)
}

func fmtG3(v float64) string {
	if math.IsNaN(v) {
		return "n/a"
	}
	return strconv.FormatFloat(v, 'f', 2, 64)
}

// calibrationValuesTable lists the free values as Param.Shown writes them.
func calibrationValuesTable(r *calibrate.Result) template.HTML {
	var rows [][]string
	for _, p := range r.Params {
		v, se, iv := p.Shown()
		if p.AtBound {
			iv = "!" + iv + " of its range"
		}
		unit := p.Unit
		if unit == "" {
			unit = "–"
		}
		rows = append(rows, []string{p.Key, strconv.FormatFloat(p.Start, 'g', 6, 64), v, se, iv, unit})
	}
	return tableHTML([]string{"free value", "case", "fitted", "standard error", "95 % interval", "unit"}, rows, map[int]bool{1: true, 2: true, 3: true, 4: true})
}

// correlationTable is the correlation matrix, |r| > 0.95 marked failed.
func correlationTable(r *calibrate.Result) template.HTML {
	head := []string{""}
	for _, p := range r.Params {
		head = append(head, p.Key)
	}
	var rows [][]string
	for i, p := range r.Params {
		row := []string{p.Key}
		for j := range r.Params {
			c := "n/a"
			if r.Corr != nil {
				v := r.Corr.At(i, j)
				c = fmt.Sprintf("%+.3f", v)
				if math.IsNaN(v) {
					c = "n/a"
				} else if i == j {
					c = "1"
				} else if math.Abs(v) > 0.95 {
					c = "!" + c
				}
			}
			row = append(row, c)
		}
		rows = append(rows, row)
	}
	num := map[int]bool{}
	for j := range r.Params {
		num[j+1] = true
	}
	return tableHTML(head, rows, num)
}

// calibrationTracesFigure draws one panel per depth: readings as dots, the
// simulation at the case's values dashed, the fitted one solid.
func calibrationTracesFigure(r *calibrate.Result, ts timeScale) (string, error) {
	n := len(r.Log.Probes)
	t := ts.of(r.Log.Times)
	labels := []string{"measured", "case values", "fitted"}
	return svgFigure(figWidth, vg.Length(panelHeight*n+30), "measured and simulated temperatures", func(dc draw.Canvas) error {
		var plots [][]*plot.Plot
		leg := newLegend()
		for k, pr := range r.Log.Probes {
			p := newPlot("time ("+ts.unit+")", "T at "+pr.Label+" mm (°C)")
			addGrid(p)
			meas, start, fit := celsius(pr.T), celsius(r.Start[k]), celsius(r.Fitted[k])
			c0, _ := lineColor(0)
			c1, _ := lineColor(1)
			if pts := xyOf(t, meas); len(pts) > 0 {
				sc, err := plotter.NewScatter(pts)
				if err != nil {
					return err
				}
				sc.GlyphStyle = draw.GlyphStyle{Color: readingGrey, Radius: vg.Points(1.5), Shape: draw.CircleGlyph{}}
				p.Add(sc)
				if k == 0 {
					leg.Add(labels[0], sc)
				}
			}
			ls, err := addSeries(p, series{X: t, Y: start, Color: c1, Width: vg.Points(1.1), Dash: []vg.Length{vg.Points(4), vg.Points(2.5)}})
			if err != nil {
				return err
			}
			lf, err := addSeries(p, series{X: t, Y: fit, Color: c0, Width: vg.Points(1.6)})
			if err != nil {
				return err
			}
			if k == 0 {
				if ls != nil {
					leg.Add(labels[1], ls)
				}
				if lf != nil {
					leg.Add(labels[2], lf)
				}
			}
			lo, hi := valueRange(meas, start, fit)
			if !math.IsInf(lo, 0) {
				p.Y.Min, p.Y.Max = niceRange(lo, hi, 0.05, 2)
			}
			p.X.Min, p.X.Max = t[0], t[len(t)-1]
			if k < n-1 {
				p.X.Label.Text = ""
			}
			plots = append(plots, []*plot.Plot{p})
		}
		lw := legendWidthFor(labels)
		left := draw.Crop(dc, 0, -lw, 0, 0)
		cs := plot.Align(plots, draw.Tiles{Rows: len(plots), Cols: 1, PadY: vg.Points(8)}, left)
		for i, row := range plots {
			row[0].Draw(cs[i][0])
		}
		legendAt(draw.Crop(dc, dc.Max.X-dc.Min.X-lw+vg.Points(10), 0, 0, 0), plots[0][0].DataCanvas(cs[0][0]), leg)
		return nil
	})
}

// calibrationResidualFigure draws the fitted residuals over time, one line
// per depth, with the zero line.
func calibrationResidualFigure(r *calibrate.Result, ts timeScale) (string, error) {
	t := ts.of(r.Log.Times)
	var labels []string
	for _, pr := range r.Log.Probes {
		labels = append(labels, pr.Label+" mm")
	}
	return svgFigure(figWidth, profileHeight, "residuals over time", func(dc draw.Canvas) error {
		p := newPlot("time ("+ts.unit+")", "simulated − measured (K)")
		addGrid(p)
		leg := newLegend()
		if _, err := addSeries(p, series{X: []float64{t[0], t[len(t)-1]}, Y: []float64{0, 0}, Color: inkSoft, Width: vg.Points(0.8)}); err != nil {
			return err
		}
		var all [][]float64
		for k, pr := range r.Log.Probes {
			res := make([]float64, len(t))
			for i := range res {
				res[i] = r.Fitted[k][i] - pr.T[i]
			}
			c, _ := lineColor(k)
			if pts := xyOf(t, res); len(pts) > 0 {
				sc, err := plotter.NewScatter(pts)
				if err != nil {
					return err
				}
				sc.GlyphStyle = draw.GlyphStyle{Color: c, Radius: vg.Points(1.3), Shape: residualGlyphs[k%len(residualGlyphs)]}
				p.Add(sc)
				leg.Add(labels[k], sc)
			}
			all = append(all, res)
		}
		lo, hi := valueRange(all...)
		if !math.IsInf(lo, 0) {
			m := max(math.Abs(lo), math.Abs(hi))
			p.Y.Min, p.Y.Max = niceRange(-m, m, 0.05, 0.2)
		}
		p.X.Min, p.X.Max = t[0], t[len(t)-1]
		lw := legendWidthFor(labels)
		left := draw.Crop(dc, 0, -lw, 0, 0)
		p.Draw(left)
		legendAt(draw.Crop(dc, dc.Max.X-dc.Min.X-lw+vg.Points(10), 0, 0, 0), p.DataCanvas(left), leg)
		return nil
	})
}

// readingGrey draws the measured readings under the simulated lines.
var readingGrey = color.RGBA{0xa8, 0xa6, 0xa0, 0xff}

// residualGlyphs tell the depths apart by shape as well as colour.
var residualGlyphs = []draw.GlyphDrawer{draw.CircleGlyph{}, draw.SquareGlyph{}, draw.TriangleGlyph{}, draw.PlusGlyph{}, draw.CrossGlyph{}, draw.RingGlyph{}}

// celsius converts temperatures in K to °C (NaN stays NaN).
func celsius(T []float64) []float64 {
	out := make([]float64, len(T))
	for i, v := range T {
		out[i] = v - 273.15
	}
	return out
}
