package report

import (
	"cureslab/cases/results"
	"fmt"
	"image/color"
	"math"
	"sort"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// mapFigure draws the depth–time map of temperature (cure false) or degree
// of cure, with the layer faces, and the peak (temperature) or the gel
// front (cure), and its colour bar.
func mapFigure(d *runData, ts timeScale, cure bool) (string, error) {
	vals, lo, hi := d.T, 0.0, 1.0
	label, title := "temperature (°C)", "depth–time map of temperature"
	if cure {
		vals = d.Cure
		label, title = "degree of cure (–)", "depth–time map of degree of cure"
	} else {
		lo, hi = d.TLo, d.THi // over every output time, kept or not
		if hi-lo < 1 {
			lo, hi = (lo+hi)/2-0.5, (lo+hi)/2+0.5
		}
	}
	img := mapImage(d.FieldTimes, d.Faces, vals, lo, hi)
	L := thickness(d)
	x0, x1 := d.FieldTimes[0]/ts.div, d.FieldTimes[len(d.FieldTimes)-1]/ts.div
	return svgFigure(figWidth, mapHeight, title, func(dc draw.Canvas) error {
		p := newPlot("time ("+ts.unit+")", "depth (mm)")
		invertDepth(p, L)
		p.X.Min, p.X.Max = x0, x1
		p.Add(&rasterMap{img: img, x0: x0, x1: x1, y0: 0, y1: L})
		if cure {
			for _, l := range d.Layers {
				if !l.Curing {
					p.Add(&hatchedBand{X0: x0, X1: x1, Y0: l.Top, Y1: l.Bottom})
				}
			}
		}
		if err := addLayerFaces(p, d, x0, x1, true); err != nil {
			return err
		}
		for _, l := range d.Layers {
			name := l.Name
			if cure && !l.Curing {
				name += " (does not cure)"
			}
			p.Add(&tag{X: x0, Y: l.Top, Text: name, XAlign: draw.XLeft, YAlign: draw.YTop,
				DX: vg.Points(4), DY: vg.Points(-3), MaxHeight: l.Bottom - l.Top})
		}
		if cure {
			if err := addGelFronts(p, d, ts, x0, x1); err != nil {
				return err
			}
		} else if pt, pz := float64(d.Summary.PeakTimeS)/ts.div, float64(d.Summary.PeakDepthMM); d.Summary.PeakTimeS.Known() && d.Summary.PeakDepthMM.Known() {
			p.Add(&marker{X: pt, Y: pz})
			tg := &tag{X: pt, Y: pz, Text: "peak " + fmtC(float64(d.Summary.PeakTemperatureC)),
				XAlign: draw.XLeft, YAlign: draw.YCenter, DX: vg.Points(7)}
			if pt > x0+0.72*(x1-x0) {
				tg.XAlign, tg.DX = draw.XRight, vg.Points(-7)
			}
			p.Add(tg)
		}
		left := draw.Crop(dc, 0, -colorBarWidth, 0, 0)
		p.Draw(left)
		da := p.DataCanvas(left)
		strip := draw.Crop(dc, dc.Max.X-dc.Min.X-colorBarWidth, 0, 0, 0)
		colorBar(strip, da, lo, hi, label)
		return nil
	})
}

// addLayerFaces draws the faces between layers across [x0, x1]: dashed
// with a white band on a map, dotted grey on a line panel.
func addLayerFaces(p *plot.Plot, d *runData, x0, x1 float64, onMap bool) error {
	for _, l := range d.Layers[1:] {
		s := series{X: []float64{x0, x1}, Y: []float64{l.Top, l.Top}, Color: ink,
			Width: vg.Points(0.6), Dash: faceDashed.Dash, Halo: true}
		if !onMap {
			s.Color, s.Width, s.Dash, s.Halo = inkSoft, vg.Points(0.5), faceDotted.Dash, false
		}
		if _, err := addSeries(p, s); err != nil {
			return err
		}
	}
	return nil
}

// addGelFronts draws, for every curing layer whose gel point is known, the
// line through (gel time, depth) of its cells, and a label at its latest
// point.
func addGelFronts(p *plot.Plot, d *runData, ts timeScale, x0, x1 float64) error {
	for _, l := range d.Layers {
		if !l.GelPointKnown {
			continue
		}
		var x, y []float64
		last, lastZ := math.Inf(-1), 0.0
		for i := l.First; i < l.End; i++ {
			x = append(x, d.GelTime[i]/ts.div)
			y = append(y, d.Centers[i])
			if d.GelTime[i] > last {
				last, lastZ = d.GelTime[i], d.Centers[i]
			}
		}
		if math.IsInf(last, -1) {
			continue
		}
		if _, err := addSeries(p, series{X: x, Y: y, Color: ink, Width: vg.Points(1.3), Halo: true}); err != nil {
			return err
		}
		tg := &tag{X: last / ts.div, Y: lastZ, Text: "gel front (α = " + strconv.FormatFloat(l.GelPoint, 'g', 3, 64) + ")",
			XAlign: draw.XLeft, YAlign: draw.YCenter, DX: vg.Points(6)}
		if last/ts.div > x0+0.7*(x1-x0) {
			tg.XAlign, tg.DX = draw.XRight, vg.Points(-6)
		}
		p.Add(tg)
	}
	return nil
}

func mapCaption(d *runData, cure bool) string {
	var b strings.Builder
	if cure {
		b.WriteString("Degree of cure (0 uncured, 1 fully cured) over time and depth; depth 0 is the top face. " +
			capital(faceDashed.Word) + " lines: faces between layers; white, hatched: layers that do not cure. " +
			"Solid black line: the gel front, the time at which each depth reaches its layer's gel point (read from the output times, linearly interpolated).")
		for _, l := range d.Layers {
			if l.Curing && !l.GelPointKnown {
				fmt.Fprintf(&b, " The gel front of %q is not drawn: the output files do not record its gel point.", l.Name)
			}
		}
		return b.String()
	}
	b.WriteString("Temperature over time and depth; depth 0 is the top face. " + capital(faceDashed.Word) + " lines: faces between layers. " +
		"The ring marks the hottest point of the run.")
	return b.String()
}

// profileTimes picks the output times of the profiles among times (the
// kept ones, runData.FieldTimes): the ones nearest to 1/5, 2/5, …, 5/5 of
// the run, and the one nearest to the peak. It returns indices into times,
// increasing, and the index of the peak's (or −1).
func profileTimes(times []float64, peak float64) ([]int, int) {
	nt := len(times)
	near := func(t float64) int {
		k := sort.SearchFloat64s(times, t)
		switch {
		case k >= nt:
			return nt - 1
		case k > 0 && t-times[k-1] <= times[k]-t:
			return k - 1
		}
		return k
	}
	seen := map[int]bool{}
	var idx []int
	for k := 1; k <= 5; k++ {
		i := near(times[0] + (times[nt-1]-times[0])*float64(k)/5)
		if !seen[i] {
			seen[i] = true
			idx = append(idx, i)
		}
	}
	pk := -1
	if !math.IsNaN(peak) {
		pk = near(peak)
		if !seen[pk] {
			idx = append(idx, pk)
		}
	}
	sort.Ints(idx)
	return idx, pk
}

// profileFigure draws temperature and degree of cure against depth at the
// times of profileTimes, side by side, with one legend of the times.
func profileFigure(d *runData, ts timeScale) (string, string, error) {
	idx, pk := profileTimes(d.FieldTimes, float64(d.Summary.PeakTimeS))
	L := thickness(d)
	withCure := curingLayers(d) > 0
	caption := "Temperature"
	if withCure {
		caption += " (left) and degree of cure (right)"
	}
	caption += " through the thickness at five output times spread evenly over the run, and at the output time nearest the peak (thick line). " +
		"Depth 0 is the top face; " + faceDotted.Word + " lines: faces between layers."
	svg, err := svgFigure(figWidth, profileHeight, "profiles through the thickness", func(dc draw.Canvas) error {
		pT, pA, plots := profilePlots(L, withCure)
		var sel [][]float64
		for _, k := range idx {
			sel = append(sel, d.T[k])
		}
		lo, hi := valueRange(sel...)
		pT.X.Min, pT.X.Max = niceRange(lo, hi, 0.04, 2)
		if err := addLayerFaces(pT, d, pT.X.Min, pT.X.Max, false); err != nil {
			return err
		}
		if pA != nil {
			pA.X.Min, pA.X.Max = 0, 1.0
			if err := addLayerFaces(pA, d, 0, 1, false); err != nil {
				return err
			}
		}
		leg := newLegend()
		var labels []string
		for j, k := range idx {
			c, dash := lineColor(j)
			w := vg.Points(1.3)
			name := "t = " + strconv.FormatFloat(d.FieldTimes[k]/ts.div, 'g', 3, 64) + " " + ts.unit
			if k == pk {
				w = vg.Points(2.6)
				name += " (peak)"
			}
			l, err := addSeries(pT, series{X: d.T[k], Y: d.Centers, Color: c, Width: w, Dash: dash})
			if err != nil {
				return err
			}
			if pA != nil {
				if _, err := addSeries(pA, series{X: d.Cure[k], Y: d.Centers, Color: c, Width: w, Dash: dash}); err != nil {
					return err
				}
			}
			if l != nil {
				leg.Add(name, l)
				labels = append(labels, name)
			}
		}
		lw := legendWidthFor(labels)
		left := draw.Crop(dc, 0, -lw, 0, 0)
		tiles := draw.Tiles{Rows: 1, Cols: len(plots), PadX: vg.Points(16)}
		cs := plot.Align([][]*plot.Plot{plots}, tiles, left)
		for i, p := range plots {
			p.Draw(cs[0][i])
		}
		da := pT.DataCanvas(cs[0][0])
		legendAt(draw.Crop(dc, dc.Max.X-dc.Min.X-lw+vg.Points(10), 0, 0, 0), da, leg)
		return nil
	})
	return svg, caption, err
}

// legendWidthFor returns the width of a legend strip for the given entry
// texts: at least legendWidth, at most 40 % of the figure.
func legendWidthFor(labels []string) vg.Length {
	sty := textStyle(legendSize)
	w := vg.Length(0)
	for _, l := range labels {
		w = max(w, sty.Width(l))
	}
	return min(max(legendWidth, w+vg.Points(22+5+14)), 0.4*figWidth)
}

// legendAt draws leg in the strip c, its top level with the top of the data
// area da.
func legendAt(c draw.Canvas, da draw.Canvas, leg plot.Legend) {
	c.Max.Y = da.Max.Y
	leg.Draw(c)
}

// historyFigure draws the probe temperatures with the driving temperatures,
// the probe cures, and the power fraction, over time, in panels one above
// the other with a shared time axis.
func historyFigure(d *runData, ts timeScale) (string, string, error) {
	hp := historyPanels{d: d, t: ts.of(d.Times), xl: "time (" + ts.unit + ")", limits: map[string]float64{}}
	hp.x0, hp.x1 = hp.t[0], hp.t[len(hp.t)-1]
	for _, pr := range d.Probes {
		if pr.Cure != nil {
			hp.withCure = true
		}
	}
	for _, v := range d.Summary.Criteria {
		hp.limits[v.Name] = v.Limit
	}
	nPanels := 1
	if hp.withCure {
		nPanels++
	}
	if d.Power != nil {
		nPanels++
	}
	h := vg.Length(panelHeight*nPanels + 20)
	svg, err := svgFigure(figWidth, h, "probe histories", func(dc draw.Canvas) error {
		hp.leg = newLegend()
		pT, err := hp.temperature()
		if err != nil {
			return err
		}
		plots := [][]*plot.Plot{{pT}}
		if hp.withCure {
			pA, err := hp.cure()
			if err != nil {
				return err
			}
			plots = append(plots, []*plot.Plot{pA})
		}
		if d.Power != nil {
			pP, err := hp.power()
			if err != nil {
				return err
			}
			plots = append(plots, []*plot.Plot{pP})
		}
		for i, row := range plots {
			row[0].X.Min, row[0].X.Max = hp.x0, hp.x1
			if i < len(plots)-1 {
				row[0].X.Label.Text = "" // the panels share the time axis of the lowest
			}
		}
		lw := legendWidthFor(hp.labels)
		left := draw.Crop(dc, 0, -lw, 0, 0)
		cs := plot.Align(plots, draw.Tiles{Rows: len(plots), Cols: 1, PadY: vg.Points(8)}, left)
		for i, row := range plots {
			row[0].Draw(cs[i][0])
		}
		da := pT.DataCanvas(cs[0][0])
		legendAt(draw.Crop(dc, dc.Max.X-dc.Min.X-lw+vg.Points(10), 0, 0, 0), da, hp.leg)
		return nil
	})
	return svg, hp.caption(), err
}

// historyPanels is what the panels of historyFigure share: the run, the
// times on the figure's scale, the limits of the criteria, and the legend
// (of the temperature and power panels) with its labels.
type historyPanels struct {
	d        *runData
	t        []float64 // the output times in the figure's unit
	x0, x1   float64
	xl       string // the time axis label
	withCure bool   // a probe lies in a curing layer
	limits   map[string]float64
	leg      plot.Legend
	labels   []string
}

func (hp *historyPanels) legAdd(name string, l plot.Thumbnailer) {
	hp.leg.Add(name, l)
	hp.labels = append(hp.labels, name)
}

// caption says what each panel of historyFigure draws.
func (hp *historyPanels) caption() string {
	d := hp.d
	caption := "Temperature at each probe depth"
	if len(d.Drivers) > 0 {
		var parts []string
		for j, dv := range d.Drivers {
			st := driverStyleOf(dv.Column, j)
			parts = append(parts, driverCaption(dv, d.Summary)+" ("+st.Describe()+")")
		}
		caption += ", with " + joinAnd(parts)
	}
	if hp.withCure {
		caption += "; degree of cure at the probes in curing layers"
	}
	if d.Power != nil {
		caption += "; the power fraction of the controlled volumetric heating"
	}
	return caption + ". Horizontal " + dashDotLine.Word + " lines: the limits of the criteria."
}

// temperature is the top panel: the control program under the probes (so
// that the sensor's trace is seen on it), the probes, the other driving
// temperatures, and the max_temperature limit.
func (hp *historyPanels) temperature() (*plot.Plot, error) {
	d, t := hp.d, hp.t
	pT := newPlot(hp.xl, "temperature (°C)")
	addGrid(pT)
	var lines [][]float64
	sensor := math.NaN()
	if z := d.Summary.ControlSensorDepthMM; z != nil {
		sensor = float64(*z)
	}
	// addDrivers draws the driving temperatures that are (program true)
	// or are not the control program.
	addDrivers := func(program bool) error {
		for j, dv := range d.Drivers {
			if (dv.Column == results.ProgramColumn) != program {
				continue
			}
			st := driverStyleOf(dv.Column, j)
			l, err := addSeries(pT, series{X: t, Y: dv.Values, Color: st.Color, Width: st.Width, Dash: st.Dash.Dash})
			if err != nil {
				return err
			}
			lines = append(lines, dv.Values)
			if l != nil {
				hp.legAdd(dv.Name, l)
			}
		}
		return nil
	}
	if err := addDrivers(true); err != nil {
		return nil, err
	}
	for j, pr := range d.Probes {
		c, dash := lineColor(j)
		l, err := addSeries(pT, series{X: t, Y: pr.T, Color: c, Dash: dash})
		if err != nil {
			return nil, err
		}
		lines = append(lines, pr.T)
		if l != nil {
			name := "at " + pr.Label + " mm"
			if pr.Depth == sensor {
				name += " (sensor)"
			}
			hp.legAdd(name, l)
		}
	}
	if err := addDrivers(false); err != nil {
		return nil, err
	}
	lo, hi := valueRange(lines...)
	if lim, ok := hp.limits[results.CriterionMaxTemperature]; ok && !math.IsNaN(lim) {
		if err := addLimit(pT, hp.x0, hp.x1, lim, "max_temperature "+strconv.FormatFloat(lim, 'g', 4, 64)+" °C"); err != nil {
			return nil, err
		}
		lo, hi = min(lo, lim), max(hi, lim)
	}
	if math.IsInf(lo, 1) {
		lo, hi = 0, 1
	}
	pT.Y.Min, pT.Y.Max = niceRange(lo, hi, 0.05, 2)
	return pT, nil
}

// cure is the panel of the degree of cure at the probes in curing layers,
// with the min_cure limit.
func (hp *historyPanels) cure() (*plot.Plot, error) {
	pA := newPlot(hp.xl, "degree of cure (–)")
	addGrid(pA)
	for j, pr := range hp.d.Probes {
		if pr.Cure == nil {
			continue
		}
		c, dash := lineColor(j)
		if _, err := addSeries(pA, series{X: hp.t, Y: pr.Cure, Color: c, Dash: dash}); err != nil {
			return nil, err
		}
	}
	if lim, ok := hp.limits[results.CriterionMinCure]; ok && !math.IsNaN(lim) {
		if err := addLimit(pA, hp.x0, hp.x1, lim, "min_cure "+strconv.FormatFloat(lim, 'g', 4, 64)); err != nil {
			return nil, err
		}
	}
	pA.Y.Min, pA.Y.Max = 0, 1.04
	return pA, nil
}

// power is the panel of the controller's power fraction.
func (hp *historyPanels) power() (*plot.Plot, error) {
	pP := newPlot(hp.xl, "power fraction (–)")
	addGrid(pP)
	l, err := addSeries(pP, series{X: hp.t, Y: hp.d.Power, Color: ink, Width: vg.Points(1.1)})
	if err != nil {
		return nil, err
	}
	if l != nil {
		hp.legAdd("power fraction", l)
	}
	pP.Y.Min, pP.Y.Max = 0, 1.04
	return pP, nil
}

// addLimit draws a criterion limit as a horizontal dash-dot line across the
// panel, labelled at its right end.
func addLimit(p *plot.Plot, x0, x1, y float64, label string) error {
	if _, err := addSeries(p, series{X: []float64{x0, x1}, Y: []float64{y, y}, Color: ink, Width: vg.Points(0.9),
		Dash: dashDotLine.Dash}); err != nil {
		return err
	}
	// The label goes below the line in the upper part of the panel and above
	// it in the lower part, so that it stays inside (see limitLabels).
	p.Add(&limitTag{tag{X: x1, Y: y, Text: label, XAlign: draw.XRight, DX: vg.Points(-3)}})
	return nil
}

// limitTag is a tag on a limit line that sits below the line when the line
// is in the upper half of the panel, above it otherwise.
type limitTag struct{ tag }

// Plot implements plot.Plotter.
func (t *limitTag) Plot(c draw.Canvas, p *plot.Plot) {
	tg := t.tag
	if p.Y.Norm(tg.Y) > 0.5 {
		tg.YAlign, tg.DY = draw.YTop, vg.Points(-3)
	} else {
		tg.YAlign, tg.DY = draw.YBottom, vg.Points(3)
	}
	tg.Plot(c, p)
}

// profilePlots returns the empty plots of profiles through a stack of
// thickness L (mm): temperature, and degree of cure when withCure (else nil),
// depth downward, with grids; plots lists them left to right.
func profilePlots(L float64, withCure bool) (pT, pA *plot.Plot, plots []*plot.Plot) {
	pT = newPlot("temperature (°C)", "depth (mm)")
	invertDepth(pT, L)
	addGrid(pT)
	plots = []*plot.Plot{pT}
	if withCure {
		pA = newPlot("degree of cure (–)", "depth (mm)")
		invertDepth(pA, L)
		addGrid(pA)
		plots = append(plots, pA)
	}
	return pT, pA, plots
}

// driverStyle is how a driving temperature is drawn in the probe histories.
type driverStyle struct {
	Color     color.Color
	ColorWord string // "black", "grey"
	Width     vg.Length
	Band      bool // a wide pale band rather than a line
	Dash      dashStyle
}

// Describe names the style as the caption does: "black dashed", "grey
// dotted", "wide grey band".
func (st driverStyle) Describe() string {
	if st.Band {
		return "wide " + st.ColorWord + " band"
	}
	return st.ColorWord + " " + st.Dash.Word
}

// driverStyleOf returns the style of the driving-temperature column col,
// the j-th of the run: the control program as a wide pale band under the
// probe lines (the track the sensor should keep to, visible where a probe
// leaves it), the air temperatures as thin lines, black dashed for the
// first and grey dotted for the second.
func driverStyleOf(col string, j int) driverStyle {
	if col == results.ProgramColumn {
		return driverStyle{Color: programBand, ColorWord: "grey", Width: vg.Points(6), Band: true, Dash: solidLine}
	}
	if j%2 == 1 {
		return driverStyle{Color: inkSoft, ColorWord: "grey", Width: vg.Points(1.1), Dash: dottedLine}
	}
	return driverStyle{Color: ink, ColorWord: "black", Width: vg.Points(1.1), Dash: dashedLine}
}

// programBand is the colour of the control program's band: a pale warm
// grey that the coloured probe lines stand out on.
var programBand = color.RGBA{0xc8, 0xc4, 0xba, 0xff}

// driverCaption says what a driving temperature is, for the caption.
func driverCaption(dv seriesData, s results.Summary) string {
	switch dv.Column {
	case results.ProgramColumn:
		if z := s.ControlSensorDepthMM; z != nil && z.Known() {
			return "the control program that the sensor at " + fmtMM(float64(*z)) + " follows"
		}
		return "the control program"
	case "air_top_C":
		return "the air over the top face"
	case "air_bottom_C":
		return "the air under the bottom face"
	}
	return dv.Name
}

// viscosityFigure draws the resin's viscosity at each probe over time on a
// logarithmic axis, with the flow threshold of the flow window and the
// first and last gel times of the curing layers (vertical lines; each
// trace ends where its probe gels). "" when no probe has a viscosity.
func viscosityFigure(d *runData, ts timeScale) (string, string, error) {
	s := d.Summary
	flow := math.NaN()
	if s.FlowViscosityPaS != nil {
		flow = float64(*s.FlowViscosityPaS)
	}
	lo, hi, any := viscosityScale(d, flow)
	if !any {
		return "", "", nil
	}
	t := ts.of(d.Times)
	x0, x1 := t[0], t[len(t)-1]
	svg, err := svgFigure(figWidth, profileHeight, "viscosity at the probes", func(dc draw.Canvas) error {
		p := newPlot("time ("+ts.unit+")", "viscosity, log scale (Pa·s)")
		addGrid(p)
		p.Y.Scale = plot.LogScale{}
		p.Y.Tick.Marker = logTicks{}
		leg := newLegend()
		var labels []string
		for j, pr := range d.Probes {
			if pr.Viscosity == nil {
				continue
			}
			y := make([]float64, len(pr.Viscosity))
			for k, v := range pr.Viscosity {
				y[k] = v
				if !(v > 0) || v > hi {
					y[k] = math.NaN() // off the axis (gelled, or far above the threshold)
				}
			}
			c, dash := lineColor(j)
			l, err := addSeries(p, series{X: t, Y: y, Color: c, Dash: dash})
			if err != nil {
				return err
			}
			if l != nil {
				name := "at " + pr.Label + " mm"
				leg.Add(name, l)
				labels = append(labels, name)
			}
		}
		if !math.IsNaN(flow) {
			if err := addLimit(p, x0, x1, flow, "flow threshold "+strconv.FormatFloat(flow, 'g', 4, 64)+" Pa·s"); err != nil {
				return err
			}
		}
		if err := addGelLines(p, s, ts, lo, hi); err != nil {
			return err
		}
		p.X.Min, p.X.Max = x0, x1
		p.Y.Min, p.Y.Max = lo, hi
		lw := legendWidthFor(labels)
		left := draw.Crop(dc, 0, -lw, 0, 0)
		p.Draw(left)
		legendAt(draw.Crop(dc, dc.Max.X-dc.Min.X-lw+vg.Points(10), 0, 0, 0), p.DataCanvas(left), leg)
		return nil
	})
	return svg, viscosityCaption(s, flow), err
}

// viscosityScale returns the logarithmic axis of viscosityFigure: whole
// decades around the probes' finite viscosities and the flow threshold
// flow (NaN when none), the top capped at 10^4 times the threshold (the
// traces rise steeply toward gel). any is false when no probe has a
// viscosity.
func viscosityScale(d *runData, flow float64) (lo, hi float64, any bool) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, pr := range d.Probes {
		for _, v := range pr.Viscosity {
			if v > 0 && !math.IsInf(v, 0) {
				any = true
				lo, hi = min(lo, v), max(hi, v)
			}
		}
	}
	if !any {
		return lo, hi, false
	}
	if !math.IsNaN(flow) {
		lo, hi = min(lo, flow), max(hi, flow)
		hi = min(hi, flow*1e4)
	}
	lo, hi = math.Pow(10, math.Floor(math.Log10(lo))), math.Pow(10, math.Ceil(math.Log10(hi)))
	if hi <= lo {
		hi = lo * 10
	}
	return lo, hi, true
}

// viscosityCaption says what viscosityFigure draws.
func viscosityCaption(s results.Summary, flow float64) string {
	caption := "Viscosity of the resin at each probe depth in a layer with a viscosity law, logarithmic scale; a trace ends where its probe reaches the gel point"
	if !math.IsNaN(flow) {
		caption += ". Horizontal " + dashDotLine.Word + " line: the flow threshold (" + strconv.FormatFloat(flow, 'g', 4, 64) +
			" Pa·s); the flow window is the time a cell spends below it before gel"
	}
	var gels []string
	if s.GelTimeFirstS.Known() {
		gels = append(gels, "the first gel time")
	}
	if s.GelTimeLastS.Known() && s.GelTimeLastS != s.GelTimeFirstS {
		gels = append(gels, "the last gel time")
	}
	if len(gels) > 0 {
		caption += ". Vertical dashed lines: " + joinAnd(gels) + " of the curing layers"
	}
	return caption + "."
}

// addGelLines draws the first and the last gel time of the curing layers
// as vertical dashed lines from lo to hi, labelled at the top: the first's
// label left of its line, the last's right, so that the two never overlap.
// The last is left out when it equals the first.
func addGelLines(p *plot.Plot, s results.Summary, ts timeScale, lo, hi float64) error {
	for _, g := range []struct {
		at   results.Float
		text string
	}{{s.GelTimeFirstS, "first gel"}, {s.GelTimeLastS, "last gel"}} {
		if !g.at.Known() || (g.text == "last gel" && s.GelTimeLastS == s.GelTimeFirstS) {
			continue
		}
		x := ts.of([]float64{float64(g.at)})[0]
		if _, err := addSeries(p, series{X: []float64{x, x}, Y: []float64{lo, hi}, Color: ink, Width: vg.Points(0.9),
			Dash: []vg.Length{vg.Points(4), vg.Points(3)}}); err != nil {
			return err
		}
		tg := &tag{X: x, Y: hi, Text: g.text, XAlign: draw.XLeft, YAlign: draw.YTop, DX: vg.Points(3), DY: vg.Points(-3)}
		if g.text == "first gel" {
			tg.XAlign, tg.DX = draw.XRight, vg.Points(-3)
		}
		p.Add(tg)
	}
	return nil
}
