package report

import (
	"context"
	"cureslab/cases/check"
	"cureslab/cases/dscfile"
	"cureslab/cases/internal/textout"
	"cureslab/physics/dsc"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"time"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// WriteFitPlot writes the HTML page of a DSC analysis to path: one
// self-contained page in the style of the run report with
//
//   - the scans (program, window, peak, heat, and the residual of the fit);
//   - the rate of cure dα/dt measured and of the fitted law for every scan:
//     dynamic scans against temperature, isothermal ones against time
//     since the start of the window (without a fit, the measured rates
//     only);
//   - the isoconversional activation energy E(α) of Friedman with ± one
//     standard error, the Ozawa–Flynn–Wall values at the same α and the
//     Kissinger value, when there are at least two heating rates.
//
// Method: the curves are those of an (dsc.Analyze): an.Fit.Curves[i]
// belongs to an.Curves[i]. name is the material name of the page title.
//
// Preconditions: an from dsc.Analyze. The file is written with
// WriteFileAtomic; its directory must exist. When ctx is done (checked
// before each figure) nothing is written and the error wraps ctx.Err().
// Cost: linear in the samples.
func WriteFitPlot(ctx context.Context, path string, an *dsc.Analysis, name string) error {
	if an == nil || len(an.Curves) == 0 {
		return errors.New("report.WriteFitPlot: an analysis with at least one scan is required")
	}
	if fi, err := os.Stat(filepath.Dir(path)); err != nil || !fi.IsDir() {
		return fmt.Errorf("cannot write %s: its directory does not exist", path)
	}
	b, err := drawPage(ctx, func(w io.Writer) error { return renderFitPage(ctx, w, an, name, reportClock()) })
	if err != nil {
		return fmt.Errorf("drawing %s: %w", path, err)
	}
	return textout.WriteFileAtomic(filepath.Dir(path), filepath.Base(path), func(w io.Writer) error {
		_, err := w.Write(b)
		return err
	})
}

func renderFitPage(ctx context.Context, w io.Writer, an *dsc.Analysis, name string, now time.Time) error {
	pg := &page{Title: "DSC fit: " + name, Kind: "DSC fit", Drawn: stamp(now), Scope: check.CautionScope{Curing: true}}
	if an.Fit != nil {
		pg.Status, pg.StatusOK = fmt.Sprintf("fitted: R² %.4f, RMS residual %.2g %% of the peak rates", an.Fit.R2, 100*an.Fit.RMS), true
	} else if an.FitRefused != "" {
		pg.Alerts = append(pg.Alerts, "No model fitted: "+an.FitRefused)
	}
	var rows [][]string
	for i, c := range an.Curves {
		res := "–"
		if an.Fit != nil && i < len(an.Fit.Curves) {
			res = fmt.Sprintf("%.2g %%", 100*an.Fit.Curves[i].RMS)
		}
		rows = append(rows, []string{filepath.Base(c.Scan.Name), dscfile.ProgramLabel(c.Program), dscfile.WindowLabel(c), dscfile.PeakLabel(c), dscfile.HeatLabel(c), res})
	}
	pg.Sections = append(pg.Sections, section{ID: "scans", Heading: "Scans",
		Body: tableHTML([]string{"scan", "program", "window", "peak", "heat", "RMS residual of the fit"}, rows, nil)})
	if err := ctx.Err(); err != nil {
		return err
	}
	svg, err := fitRateFigure(an)
	if err != nil {
		return err
	}
	caption := "Rate of cure of each scan: measured (solid) and of the fitted law (dashed, same colour)."
	if an.Fit == nil {
		caption = "Rate of cure of each scan as measured (smoothed); no model was fitted."
	}
	pg.Sections = append(pg.Sections, section{ID: "rates", Heading: "Rate of cure, measured and fitted", Body: figureHTML(svg, caption)})
	if len(an.Friedman) > 0 {
		if err := ctx.Err(); err != nil {
			return err
		}
		svg, err := fitFriedmanFigure(an)
		if err != nil {
			return err
		}
		pg.Sections = append(pg.Sections, section{ID: "friedman", Heading: "Activation energy against degree of cure",
			Body: figureHTML(svg, "Friedman's isoconversional activation energy with ± one standard error (bars), "+
				"Ozawa–Flynn–Wall at the same degrees of cure, and Kissinger's single value (dashed). "+
				"A single-step law has a flat E(α); a strong variation suggests several steps.")})
	}
	return renderPage(ctx, w, pg)
}

// fitRateFigure draws dα/dt per scan: a panel against temperature for the
// dynamic scans, one against time for the isothermal scans.
func fitRateFigure(an *dsc.Analysis) (string, error) {
	var dyn, iso []int
	for i, c := range an.Curves {
		if c.Program.Kind == dsc.Isothermal {
			iso = append(iso, i)
		} else {
			dyn = append(dyn, i)
		}
	}
	var labels []string
	for _, c := range an.Curves {
		labels = append(labels, filepath.Base(c.Scan.Name))
	}
	groups := [][]int{}
	for _, g := range [][]int{dyn, iso} {
		if len(g) > 0 {
			groups = append(groups, g)
		}
	}
	h := vg.Length(profileHeight*len(groups) + 20)
	return svgFigure(figWidth, h, "rate of cure, measured and fitted", func(dc draw.Canvas) error {
		var plots [][]*plot.Plot
		var legs []plot.Legend
		for _, g := range groups {
			leg := newLegend()
			isoG := an.Curves[g[0]].Program.Kind == dsc.Isothermal
			xl := "temperature (°C)"
			if isoG {
				xl = "time in the window (min)"
			}
			p := newPlot(xl, "rate of cure dα/dt (1/min)")
			addGrid(p)
			var all [][]float64
			for n, i := range g {
				c := an.Curves[i]
				col, dash := lineColor(n)
				var t, temp, meas, model []float64
				if an.Fit != nil && i < len(an.Fit.Curves) {
					fc := an.Fit.Curves[i]
					t, temp, meas, model = fc.Time, fc.Temp, fc.Measured, fc.Model
				} else {
					t, temp, meas = c.Time, c.Temp, c.Rate
				}
				x := make([]float64, len(t))
				for k := range t {
					if isoG {
						x[k] = (t[k] - c.Time[0]) / 60
					} else {
						x[k] = temp[k] - 273.15
					}
				}
				perMin := func(v []float64) []float64 {
					out := make([]float64, len(v))
					for k := range v {
						out[k] = v[k] * 60
					}
					return out
				}
				l, err := addSeries(p, series{X: x, Y: perMin(meas), Color: col, Dash: dash, Width: vg.Points(1.1)})
				if err != nil {
					return err
				}
				all = append(all, perMin(meas))
				if l != nil {
					leg.Add(labels[i], l)
				}
				if model != nil {
					if _, err := addSeries(p, series{X: x, Y: perMin(model), Color: col, Width: vg.Points(1.6),
						Dash: []vg.Length{vg.Points(4), vg.Points(2.5)}}); err != nil {
						return err
					}
					all = append(all, perMin(model))
				}
			}
			lo, hi := valueRange(all...)
			if !math.IsInf(lo, 0) {
				p.Y.Min, p.Y.Max = niceRange(min(lo, 0), hi, 0.04, 1e-9)
			}
			plots = append(plots, []*plot.Plot{p})
			legs = append(legs, leg)
		}
		lw := legendWidthFor(labels)
		left := draw.Crop(dc, 0, -lw, 0, 0)
		cs := plot.Align(plots, draw.Tiles{Rows: len(plots), Cols: 1, PadY: vg.Points(10)}, left)
		for i, row := range plots {
			row[0].Draw(cs[i][0])
			legendAt(draw.Crop(dc, dc.Max.X-dc.Min.X-lw+vg.Points(10), 0, 0, 0), row[0].DataCanvas(cs[i][0]), legs[i])
		}
		return nil
	})
}

// fitFriedmanFigure draws E(α) of Friedman with error bars, the OFW values
// and the Kissinger value.
func fitFriedmanFigure(an *dsc.Analysis) (string, error) {
	return svgFigure(figWidth, profileHeight, "activation energy against degree of cure", func(dc draw.Canvas) error {
		p := newPlot("degree of cure α (–)", "activation energy (kJ/mol)")
		addGrid(p)
		p.X.Min, p.X.Max = 0, 1
		leg := newLegend()
		var a, e, bx, by []float64
		for _, f := range an.Friedman {
			a, e = append(a, f.Alpha), append(e, f.E/1000)
			if !math.IsNaN(f.SE) {
				bx = append(bx, f.Alpha, f.Alpha, math.NaN())
				by = append(by, (f.E-f.SE)/1000, (f.E+f.SE)/1000, math.NaN())
			}
		}
		c0, _ := lineColor(0)
		l, err := addSeries(p, series{X: a, Y: e, Color: c0, Width: vg.Points(1.5)})
		if err != nil {
			return err
		}
		if _, err := addSeries(p, series{X: bx, Y: by, Color: c0, Width: vg.Points(0.9)}); err != nil {
			return err
		}
		if l != nil {
			leg.Add("Friedman", l)
		}
		lines := [][]float64{by, e}
		var oa, oe []float64
		for _, o := range an.OFWTable {
			oa, oe = append(oa, o.Alpha), append(oe, o.E/1000)
		}
		if pts := xyOf(oa, oe); len(pts) > 0 {
			c1, _ := lineColor(1)
			sc, err := plotter.NewScatter(pts)
			if err != nil {
				return err
			}
			sc.GlyphStyle = draw.GlyphStyle{Color: c1, Radius: vg.Points(2.4), Shape: draw.CircleGlyph{}}
			p.Add(sc)
			leg.Add("Ozawa–Flynn–Wall", sc)
			lines = append(lines, oe)
		}
		if k := an.Kissinger; k != nil {
			c2, _ := lineColor(2)
			kl, err := addSeries(p, series{X: []float64{0, 1}, Y: []float64{k.E / 1000, k.E / 1000}, Color: c2,
				Width: vg.Points(1.1), Dash: []vg.Length{vg.Points(5), vg.Points(3)}})
			if err != nil {
				return err
			}
			if kl != nil {
				leg.Add("Kissinger", kl)
			}
			lines = append(lines, []float64{k.E / 1000})
		}
		lo, hi := valueRange(lines...)
		if !math.IsInf(lo, 0) {
			p.Y.Min, p.Y.Max = niceRange(lo, hi, 0.08, 5)
		}
		names := []string{"Friedman", "Ozawa–Flynn–Wall", "Kissinger"}
		lw := legendWidthFor(names)
		left := draw.Crop(dc, 0, -lw, 0, 0)
		p.Draw(left)
		legendAt(draw.Crop(dc, dc.Max.X-dc.Min.X-lw+vg.Points(10), 0, 0, 0), p.DataCanvas(left), leg)
		return nil
	})
}

// xyOf pairs x and y, dropping points where either is not finite.
func xyOf(x, y []float64) plotter.XYs {
	var out plotter.XYs
	for i := range x {
		if !math.IsNaN(x[i]) && !math.IsNaN(y[i]) && !math.IsInf(x[i], 0) && !math.IsInf(y[i], 0) {
			out = append(out, plotter.XY{X: x[i], Y: y[i]})
		}
	}
	return out
}
