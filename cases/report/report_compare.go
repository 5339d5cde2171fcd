package report

import (
	"context"
	"cureslab/cases/results"
	"errors"
	"fmt"
	"html/template"
	"io"
	"math"
	"os"
	"path"
	"path/filepath"
	"strings"
	"time"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// CompareReportFile is the name of the HTML report of a comparison.
const CompareReportFile = "report.html"

// CompareReport draws the report page of a comparison and writes it to w:
// the summaries and criteria of the cases side by side, their histories
// overlaid (the hottest cell and the least-cured cell over time, with the
// air that drives each case), and their final profiles through the
// thickness overlaid. The page names each case's own report.html by its
// path from the page's folder: cases/NAME/report.html, where cases is the
// folder holding the cases' folders relative to the page's ("." for
// 'cureslab compare', whose case folders are inside its directory; ".."
// for the demo's comparisons, beside the examples' folders); only the
// pages that exist in row.Dir are named. A row without a result
// is a case that did not run (it is listed, not drawn). A row whose result
// keeps no snapshots (streamed to its files, package simulate) is read back
// from its directory (row.Dir), as RedrawReport reads it.
//
// Method: each case becomes the same report data as WriteReport uses, so
// values are those of its output files. The page is drawn in memory and
// written to w in one go. Cost: as WriteReport per case.
//
// Preconditions: at least one row; each case validated, each summary that
// of its result (results.Summarize). When ctx is done (checked before each
// case and each figure) nothing is written to w and the error wraps
// ctx.Err().
func CompareReport(ctx context.Context, w io.Writer, rows []results.Compared, cases string) error {
	if len(rows) == 0 {
		return errors.New("report.CompareReport: no case to compare")
	}
	names := make([]string, len(rows))
	ds := make([]*runData, len(rows))
	for i, row := range rows {
		names[i] = row.Name
		c := row.Case
		if err := ctx.Err(); err != nil {
			return fmt.Errorf("drawing %s: %w", CompareReportFile, err)
		}
		var d *runData
		var err error
		switch {
		case row.Result == nil || c == nil || c.Problem == nil || c.Problem.Mesh == nil:
			continue
		case len(row.Result.Snapshots) == 0 && row.Err != nil:
			continue // its files were not written: nothing to read back
		case len(row.Result.Snapshots) == 0 && row.Dir != "":
			// A streamed run: its fields are read back from its files.
			d, err = readRunData(ctx, row.Dir)
		default:
			d, err = runDataOf(c, row.Result, row.Summary)
		}
		if err != nil {
			return fmt.Errorf("report of %s: %w", names[i], err)
		}
		d.Page = casePage(cases, row.Name, row.Dir)
		ds[i] = d
	}
	b, err := drawPage(ctx, func(w io.Writer) error { return renderCompareReport(ctx, w, names, ds, reportClock()) })
	if err != nil {
		return fmt.Errorf("drawing %s: %w", CompareReportFile, err)
	}
	_, err = w.Write(b)
	return err
}

// renderCompareReport writes the comparison page; ds[i] is nil for a case
// that did not run.
func renderCompareReport(ctx context.Context, w io.Writer, names []string, ds []*runData, now time.Time) error {
	pg := &page{Title: "Comparison: " + strings.Join(names, " · "), Kind: "comparison", Drawn: stamp(now)}
	for _, d := range ds {
		if d != nil {
			pg.Scope.Curing = pg.Scope.Curing || curingLayers(d) > 0
			pg.Scope.Volumetric = pg.Scope.Volumetric || d.Volumetric
		}
	}
	ran := 0
	worst := ""
	for i, d := range ds {
		if d == nil {
			pg.Alerts = append(pg.Alerts, "✗ "+names[i]+" did not run.")
			worst = "✗ not every case ran"
			continue
		}
		ran++
		for _, a := range runAlerts(d) {
			pg.Alerts = append(pg.Alerts, names[i]+": "+a)
		}
	}
	pg.Status, pg.StatusOK = "✓ every case met its criteria", len(pg.Alerts) == 0
	if !pg.StatusOK {
		pg.Status = "✗ not every case met its criteria"
		if worst != "" {
			pg.Status = worst
		}
	}
	intro := "The report of each case, with its maps, is the report.html in its folder."
	var pages []string
	for _, d := range ds {
		if d != nil && d.Page != "" {
			pages = append(pages, d.Page)
		}
	}
	if len(pages) > 0 {
		intro = "The report of each case, with its maps: " + strings.Join(pages, ", ") + " (paths from the folder of this page)."
	}
	pg.Sections = append(pg.Sections, section{ID: "summary", Heading: "Summaries side by side",
		Intro: intro, Body: compareTable(names, ds)})
	if ran == 0 {
		return renderPage(ctx, w, pg)
	}
	end := 0.0
	for _, d := range ds {
		if d != nil {
			end = max(end, d.Times[len(d.Times)-1])
		}
	}
	ts := timeScaleFor(end)
	if err := ctx.Err(); err != nil {
		return err
	}
	svg, err := compareHistoryFigure(names, ds, ts)
	if err != nil {
		return err
	}
	pg.Sections = append(pg.Sections, section{ID: "histories", Heading: "Histories",
		Body: figureHTML(svg, "Top: temperature of the hottest cell of each case over time (solid), with the air "+
			"temperature at its top face where it has one (dashed, same colour). Bottom: degree of cure of the least-cured "+
			"cell of each case's curing layers. Dash-dot lines: limits of the criteria where every case sets the same.")})
	if err := ctx.Err(); err != nil {
		return err
	}
	svg, err = compareProfileFigure(names, ds)
	if err != nil {
		return err
	}
	pg.Sections = append(pg.Sections, section{ID: "profiles", Heading: "Final profiles through the thickness",
		Body: figureHTML(svg, "Temperature and degree of cure through the thickness at the last output time of each case. Depth 0 is the top face.")})
	if err := ctx.Err(); err != nil {
		return err
	}
	svg, err = compareAbsorbedFigure(names, ds)
	if err != nil {
		return err
	}
	if svg != "" {
		pg.Sections = append(pg.Sections, section{ID: "absorbed-power", Heading: "Absorbed power through the thickness",
			Body: figureHTML(svg, "Power absorbed per unit volume at full output (the power divided by the controller's power fraction), "+
				"through the thickness of each case with volumetric heating, at its first output time with power: the field in the uncured part. "+
				"One frequency against a swept band shows what the sweep fills in; a node on the face of a metal stays whatever the frequency. Depth 0 is the top face.")})
	}
	return renderPage(ctx, w, pg)
}

// casePage returns the path, from a comparison page's folder, of the own
// report.html of the case name whose folder is cases/name from there, if
// dir, the folder where the case's files are now (perhaps under a staging
// name), holds one; "" otherwise.
func casePage(cases, name, dir string) string {
	if dir == "" {
		return ""
	}
	if fi, err := os.Stat(filepath.Join(dir, ReportFile)); err != nil || !fi.Mode().IsRegular() {
		return ""
	}
	return path.Join(filepath.ToSlash(cases), name, ReportFile)
}

// compareTable sets the summaries of the cases side by side, one column per
// case, with a row per criterion that any case sets.
func compareTable(names []string, ds []*runData) template.HTML {
	var cmp []results.Compared
	for i, d := range ds {
		c := results.Compared{Name: names[i], Ran: d != nil}
		if d != nil {
			c.Summary = d.Summary
		}
		cmp = append(cmp, c)
	}
	table := results.ComparisonRows(cmp)
	head, rows := table[0], table[1:]
	for _, r := range rows {
		for j := 1; j < len(r); j++ {
			if ds[j-1] == nil {
				r[j] = "did not run"
			}
		}
	}
	var crit []string
	seen := map[string]bool{}
	for _, d := range ds {
		if d == nil {
			continue
		}
		for _, v := range d.Summary.Criteria {
			if !seen[v.Name] {
				seen[v.Name] = true
				crit = append(crit, v.Name)
			}
		}
	}
	for _, name := range crit {
		r := []string{"criterion " + name}
		for _, d := range ds {
			cell := "not set"
			if d != nil {
				for _, v := range d.Summary.Criteria {
					if v.Name != name {
						continue
					}
					_, value := criterionText(v, d.Summary)
					cell = value + "  " + passMark
					switch {
					case v.Unjudged:
						cell = value + "  not judged"
					case !v.Pass:
						cell = "!" + value + "  " + failMark
					}
				}
			}
			r = append(r, cell)
		}
		rows = append(rows, r)
	}
	return tableHTML(head, rows, nil)
}

// commonLimit returns the limit of criterion name when every case that ran
// sets it to the same value.
func commonLimit(ds []*runData, name string) (float64, bool) {
	lim, n := math.NaN(), 0
	for _, d := range ds {
		if d == nil {
			continue
		}
		found := false
		for _, v := range d.Summary.Criteria {
			if v.Name == name {
				if n > 0 && v.Limit != lim {
					return 0, false
				}
				lim, found = v.Limit, true
			}
		}
		if !found {
			return 0, false
		}
		n++
	}
	return lim, n > 0
}

func compareHistoryFigure(names []string, ds []*runData, ts timeScale) (string, error) {
	withCure := false
	for _, d := range ds {
		if d != nil && curingLayers(d) > 0 {
			withCure = true
		}
	}
	n := 1
	if withCure {
		n = 2
	}
	return svgFigure(figWidth, vg.Length(panelHeight*n+30), "comparison of histories", func(dc draw.Canvas) error {
		leg := newLegend()
		pT := newPlot("time ("+ts.unit+")", "temperature (°C)")
		addGrid(pT)
		pA := newPlot("time ("+ts.unit+")", "degree of cure (–)")
		addGrid(pA)
		var lines [][]float64
		x1 := 0.0
		for i, d := range ds {
			if d == nil {
				continue
			}
			c, dash := lineColor(i)
			t := ts.of(d.Times)
			x1 = max(x1, t[len(t)-1])
			hot := d.Hottest
			l, err := addSeries(pT, series{X: t, Y: hot, Color: c, Dash: dash, Width: vg.Points(1.5)})
			if err != nil {
				return err
			}
			lines = append(lines, hot)
			if l != nil {
				leg.Add(names[i], l)
			}
			for _, dv := range d.Drivers {
				if dv.Column != "air_top_C" {
					continue
				}
				if _, err := addSeries(pT, series{X: t, Y: dv.Values, Color: c, Width: vg.Points(0.9),
					Dash: []vg.Length{vg.Points(4), vg.Points(3)}}); err != nil {
					return err
				}
				lines = append(lines, dv.Values)
			}
			if withCure {
				if _, err := addSeries(pA, series{X: t, Y: d.LeastCure, Color: c, Dash: dash, Width: vg.Points(1.5)}); err != nil {
					return err
				}
			}
		}
		lo, hi := valueRange(lines...)
		if lim, ok := commonLimit(ds, results.CriterionMaxTemperature); ok {
			if err := addLimit(pT, 0, x1, lim, "max_temperature "+fmtG(lim)+" °C"); err != nil {
				return err
			}
			lo, hi = min(lo, lim), max(hi, lim)
		}
		pT.Y.Min, pT.Y.Max = niceRange(lo, hi, 0.05, 2)
		plots := [][]*plot.Plot{{pT}}
		if withCure {
			if lim, ok := commonLimit(ds, results.CriterionMinCure); ok {
				if err := addLimit(pA, 0, x1, lim, "min_cure "+fmtG(lim)); err != nil {
					return err
				}
			}
			pA.Y.Min, pA.Y.Max = 0, 1.04
			plots = append(plots, []*plot.Plot{pA})
			pT.X.Label.Text = ""
		}
		for _, row := range plots {
			row[0].X.Min, row[0].X.Max = 0, x1
		}
		lw := legendWidthFor(names)
		left := draw.Crop(dc, 0, -lw, 0, 0)
		cs := plot.Align(plots, draw.Tiles{Rows: len(plots), Cols: 1, PadY: vg.Points(8)}, left)
		for i, row := range plots {
			row[0].Draw(cs[i][0])
		}
		legendAt(draw.Crop(dc, dc.Max.X-dc.Min.X-lw+vg.Points(10), 0, 0, 0), pT.DataCanvas(cs[0][0]), leg)
		return nil
	})
}

func compareProfileFigure(names []string, ds []*runData) (string, error) {
	L := 0.0
	withCure := false
	for _, d := range ds {
		if d != nil {
			L = max(L, thickness(d))
			withCure = withCure || curingLayers(d) > 0
		}
	}
	return svgFigure(figWidth, profileHeight, "comparison of final profiles", func(dc draw.Canvas) error {
		pT, pA, plots := profilePlots(L, withCure)
		if pA != nil {
			pA.X.Min, pA.X.Max = 0, 1
		}
		leg := newLegend()
		var lines [][]float64
		for i, d := range ds {
			if d == nil {
				continue
			}
			c, dash := lineColor(i)
			k := len(d.FieldTimes) - 1 // the last output time is always kept
			l, err := addSeries(pT, series{X: d.T[k], Y: d.Centers, Color: c, Dash: dash, Width: vg.Points(1.5)})
			if err != nil {
				return err
			}
			lines = append(lines, d.T[k])
			if pA != nil {
				if _, err := addSeries(pA, series{X: d.Cure[k], Y: d.Centers, Color: c, Dash: dash, Width: vg.Points(1.5)}); err != nil {
					return err
				}
			}
			if l != nil {
				leg.Add(names[i], l)
			}
		}
		lo, hi := valueRange(lines...)
		pT.X.Min, pT.X.Max = niceRange(lo, hi, 0.04, 2)
		lw := legendWidthFor(names)
		left := draw.Crop(dc, 0, -lw, 0, 0)
		cs := plot.Align([][]*plot.Plot{plots}, draw.Tiles{Rows: 1, Cols: len(plots), PadX: vg.Points(16)}, left)
		for i, p := range plots {
			p.Draw(cs[0][i])
		}
		legendAt(draw.Crop(dc, dc.Max.X-dc.Min.X-lw+vg.Points(10), 0, 0, 0), pT.DataCanvas(cs[0][0]), leg)
		return nil
	})
}
