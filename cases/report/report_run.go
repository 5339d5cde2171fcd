package report

import (
	"context"
	"cureslab/cases/check"
	"cureslab/cases/results"
	"fmt"
	"html/template"
	"io"
	"math"
	"strconv"
	"strings"
	"time"
)

// Figure sizes, in points.
const (
	figWidth      = 520
	mapHeight     = 225
	profileHeight = 250
	panelHeight   = 140
	legendWidth   = 118
)

// renderRunReport writes the report page of one run. It checks ctx before
// each figure and returns ctx.Err() once ctx is done, having written
// nothing to w.
func renderRunReport(ctx context.Context, w io.Writer, d *runData, now time.Time) error {
	s := d.Summary
	pg := &page{Title: d.Title, Kind: "run report", Drawn: stamp(now),
		Scope: check.CautionScope{Curing: curingLayers(d) > 0, Volumetric: d.Volumetric}}
	pg.Status, pg.StatusOK = statusBadge(s)
	pg.Alerts = runAlerts(d)
	ts := timeScaleFor(d.Times[len(d.Times)-1])

	pg.Sections = append(pg.Sections, section{ID: "summary", Heading: "Summary and criteria", Body: summaryHTML(d)})
	if len(d.Times) < 2 {
		pg.Sections = append(pg.Sections, section{Heading: "Plots",
			Intro: "The run holds a single output time, so there is nothing to plot over time."})
		return renderPage(ctx, w, pg)
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	svg, err := mapFigure(d, ts, false)
	if err != nil {
		return err
	}
	pg.Sections = append(pg.Sections, section{ID: "temperature-map", Heading: "Temperature through the thickness",
		Body: figureHTML(svg, mapCaption(d, false))})
	if err := ctx.Err(); err != nil {
		return err
	}
	if d.Absorbed != nil {
		svg, caption, err := absorbedFigure(d, ts)
		if err != nil {
			return err
		}
		if svg != "" {
			pg.Sections = append(pg.Sections, section{ID: "absorbed-power", Heading: "Absorbed power through the thickness",
				Body: figureHTML(svg, caption)})
		}
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	if curingLayers(d) > 0 {
		svg, err := mapFigure(d, ts, true)
		if err != nil {
			return err
		}
		pg.Sections = append(pg.Sections, section{ID: "cure-map", Heading: "Degree of cure through the thickness",
			Body: figureHTML(svg, mapCaption(d, true))})
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	svg, caption, err := profileFigure(d, ts)
	if err != nil {
		return err
	}
	pg.Sections = append(pg.Sections, section{ID: "profiles", Heading: "Profiles through the thickness",
		Body: figureHTML(svg, caption)})
	if err := ctx.Err(); err != nil {
		return err
	}
	if len(d.Probes) > 0 || len(d.Drivers) > 0 || d.Power != nil {
		svg, caption, err := historyFigure(d, ts)
		if err != nil {
			return err
		}
		pg.Sections = append(pg.Sections, section{ID: "histories", Heading: "Probe histories and the program",
			Body: figureHTML(svg, caption)})
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	if svg, caption, err := viscosityFigure(d, ts); err != nil {
		return err
	} else if svg != "" {
		pg.Sections = append(pg.Sections, section{ID: "viscosity", Heading: "Viscosity at the probes and the flow window",
			Body: figureHTML(svg, caption)})
	}
	pg.Sections = append(pg.Sections, section{ID: "stack", Heading: "Stack", Body: stackHTML(d)})
	return renderPage(ctx, w, pg)
}

// statusBadge returns the word shown next to the title and whether it is
// good news.
func statusBadge(s results.Summary) (string, bool) {
	switch s.Status {
	case results.StatusOK:
		if len(s.Criteria) == 0 {
			return "ran to the end · no criteria set", true
		}
		return "✓ every criterion met", true
	case results.StatusCriteriaFailed:
		n := 0
		for _, v := range s.Criteria {
			if !v.Pass {
				n++
			}
		}
		if n == 1 {
			return "✗ 1 criterion FAILED", false
		}
		return fmt.Sprintf("✗ %d criteria FAILED", n), false
	case results.StatusRunaway:
		return "✗ RUNAWAY", false
	case results.StatusFailed:
		return "✗ run FAILED", false
	case results.StatusInterrupted:
		return "interrupted · criteria not judged", false
	}
	return s.Status, false
}

// runAlerts lists what went wrong, one sentence each, for the box under the
// title.
func runAlerts(d *runData) []string {
	s := d.Summary
	var out []string
	switch s.Status {
	case results.StatusRunaway:
		out = append(out, "✗ Runaway: "+s.Message)
	case results.StatusFailed:
		out = append(out, "✗ The run failed: "+s.Message)
	case results.StatusInterrupted:
		// The message starts "interrupted (Ctrl-C or SIGTERM); ...".
		msg := "interrupted: " + s.Message
		if strings.HasPrefix(s.Message, "interrupted") {
			msg = s.Message
		}
		out = append(out, "The run was "+msg+". The criteria are not judged.")
	}
	for _, v := range s.Criteria {
		if !v.Pass && !v.Unjudged {
			out = append(out, "✗ "+criterionSentence(v, s))
		}
	}
	return out
}

// criterionText returns what a criterion requires, the value reached and
// the limit, with units.
func criterionText(v results.Verdict, s results.Summary) (req, value string) {
	val, lim := results.FormatValueLimit(v.Value, v.Limit)
	switch v.Name {
	case results.CriterionMinCure:
		req = "final cure ≥ " + lim + " in every curing cell"
		value = val
		if !math.IsNaN(v.Value) {
			value += " at " + fmtMM(float64(s.MinFinalCureDepthMM))
		}
	case results.CriterionMaxTemperature:
		req = "peak temperature ≤ " + lim + " °C"
		value = val + " °C"
		if !math.IsNaN(v.Value) {
			value += " at " + fmtMM(float64(s.PeakDepthMM)) + ", t = " + fmtTime(float64(s.PeakTimeS))
		}
	case results.CriterionMaxSpread:
		req = "spread in the curing layers ≤ " + lim + " K"
		value = val + " K"
	case results.CriterionShareMet:
		req = fmt.Sprintf("every criterion met in ≥ %.1f %% of the uncertainty samples", 100*v.Limit)
		value = fmt.Sprintf("%.1f %% of the samples", 100*v.Value)
	default:
		req, value = v.Name+" limit "+lim, val
	}
	if math.IsNaN(v.Value) {
		value = "n/a (no curing layer)"
	}
	return req, value
}

func criterionSentence(v results.Verdict, s results.Summary) string {
	req, value := criterionText(v, s)
	return fmt.Sprintf("%s FAILED: %s, required %s.", v.Name, value, req)
}

// summaryHTML is the summary table and the criteria table.
func summaryHTML(d *runData) template.HTML {
	s := d.Summary
	var rows [][]string
	for _, r := range results.SummaryRows(s) {
		rows = append(rows, []string{r.Label, r.Value})
	}
	if s.Message != "" {
		rows = append(rows, []string{"stopped", s.Message})
	}
	var b strings.Builder
	b.WriteString(`<div class="cols"><div>`)
	b.WriteString(string(tableHTML([]string{"result", "value"}, rows, map[int]bool{1: true})))
	b.WriteString("</div><div>")
	if len(s.Criteria) == 0 {
		b.WriteString("<p>No acceptance criteria were set ([criteria] in the case file).</p>")
	} else {
		var cr [][]string
		for _, v := range s.Criteria {
			req, value := criterionText(v, s)
			r := []string{v.Name, req, value, passMark}
			switch {
			case v.Unjudged:
				r[3] = "not judged"
			case !v.Pass:
				r[0], r[3] = "!"+v.Name, failMark
			}
			cr = append(cr, r)
		}
		b.WriteString(string(tableHTML([]string{"criterion", "requirement", "reached", "result"}, cr, map[int]bool{2: true})))
	}
	b.WriteString("</div></div>\n")
	return template.HTML(b.String())
}

// stackHTML lists the layers as the output files hold them.
func stackHTML(d *runData) template.HTML {
	var rows [][]string
	for _, l := range d.Layers {
		cures, gel := "no", ""
		if l.Curing {
			cures = "yes"
			gel = "not recorded"
			if l.GelPointKnown {
				gel = strconv.FormatFloat(l.GelPoint, 'g', 4, 64)
			}
		}
		rows = append(rows, []string{l.Name,
			strconv.FormatFloat(l.Top, 'g', 5, 64) + " – " + strconv.FormatFloat(l.Bottom, 'g', 5, 64),
			strconv.FormatFloat(l.Bottom-l.Top, 'g', 5, 64), strconv.Itoa(l.End - l.First), cures, gel})
	}
	return tableHTML([]string{"layer", "depth (mm)", "thickness (mm)", "cells", "cures", "gel point"}, rows,
		map[int]bool{1: true, 2: true, 3: true})
}

func curingLayers(d *runData) int {
	n := 0
	for _, l := range d.Layers {
		if l.Curing {
			n++
		}
	}
	return n
}

func thickness(d *runData) float64 { return d.Faces[len(d.Faces)-1] }

// valueRange returns the smallest and largest value of v that are not NaN.
func valueRange(v ...[]float64) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, x := range v {
		for _, y := range x {
			if !math.IsNaN(y) {
				lo, hi = min(lo, y), max(hi, y)
			}
		}
	}
	return lo, hi
}

// capital returns s with its first letter in upper case.
func capital(s string) string {
	if s == "" {
		return s
	}
	return strings.ToUpper(s[:1]) + s[1:]
}

// joinAnd joins a list as a sentence does: "a", "a and b", "a, b and c".
func joinAnd(parts []string) string {
	switch len(parts) {
	case 0:
		return ""
	case 1:
		return parts[0]
	}
	return strings.Join(parts[:len(parts)-1], ", ") + " and " + parts[len(parts)-1]
}
