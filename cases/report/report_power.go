package report

import (
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// fullOutput returns the power absorbed per cell at kept output time k
// (column k of d.Absorbed) at full output, W/m³: the absorbed power divided by the controller's power
// fraction, or as it is without control. ok is false when the output was
// (nearly) off at that time, so that nothing can be said of full output.
func fullOutput(d *runData, k int) ([]float64, bool) {
	P := d.Absorbed[k]
	if d.Power == nil {
		return P, true
	}
	u := d.Power[d.FieldAt[k]]
	if !(u >= 1e-3) {
		return nil, false
	}
	out := make([]float64, len(P))
	for i, v := range P {
		out[i] = v / u
	}
	return out, true
}

// powerScale returns the divisor and unit for power densities up to hi W/m³.
func powerScale(hi float64) (float64, string) {
	switch {
	case hi >= 1e6:
		return 1e6, "MW/m³"
	case hi >= 1e3:
		return 1e3, "kW/m³"
	}
	return 1, "W/m³"
}

// absorbedFigure draws the absorbed power per volume against depth at the
// times of profileTimes (at full output under control), the shape of the
// field in the part. It returns "" when no chosen time has power.
func absorbedFigure(d *runData, ts timeScale) (string, string, error) {
	idx, pk := profileTimes(d.FieldTimes, float64(d.Summary.PeakTimeS))
	var ks []int
	var profs [][]float64
	hi := 0.0
	for _, k := range idx {
		if P, ok := fullOutput(d, k); ok {
			ks, profs = append(ks, k), append(profs, P)
			_, h := valueRange(P)
			hi = max(hi, h)
		}
	}
	// Start of heating: the first output time with power, where the
	// profile shows the field in the uncured part.
	for k := range d.Absorbed {
		if P, ok := fullOutput(d, k); ok {
			if _, h := valueRange(P); h > 0 {
				if len(ks) == 0 || k < ks[0] {
					ks, profs = append([]int{k}, ks...), append([][]float64{P}, profs...)
					hi = max(hi, h)
				}
				break
			}
		}
	}
	if len(ks) == 0 || !(hi > 0) || math.IsInf(hi, 0) {
		return "", "", nil
	}
	div, unit := powerScale(hi)
	what := "absorbed power"
	caption := "Power absorbed per unit volume through the thickness"
	if d.Power != nil {
		what = "absorbed power at full output"
		caption += " at full output (the power at each time divided by the controller's power fraction then; times when the output was off are left out)"
	}
	caption += ", at the first output time with power (the uncured part), at the times of the profiles above, and nearest the peak (thick line). " +
		"Its shape is the field's: under a standing wave, nodes where it falls to almost nothing (always on the face of a metal) and maxima a quarter wavelength away; it falls as the cure lowers the loss factor. " +
		"Depth 0 is the top face; dotted lines: faces between layers."
	L := thickness(d)
	svg, err := svgFigure(figWidth, profileHeight, "absorbed power through the thickness", func(dc draw.Canvas) error {
		p := newPlot(what+" ("+unit+")", "depth (mm)")
		invertDepth(p, L)
		addGrid(p)
		p.X.Min, p.X.Max = 0, hi/div*1.05
		if err := addLayerFaces(p, d, p.X.Min, p.X.Max, false); err != nil {
			return err
		}
		leg := newLegend()
		var labels []string
		for j, k := range ks {
			x := make([]float64, len(profs[j]))
			for i, v := range profs[j] {
				x[i] = v / div
			}
			c, dash := lineColor(j)
			w := vg.Points(1.3)
			name := "t = " + strconv.FormatFloat(d.FieldTimes[k]/ts.div, 'g', 3, 64) + " " + ts.unit
			if k == pk {
				w = vg.Points(2.6)
				name += " (peak)"
			}
			l, err := addSeries(p, series{X: x, Y: d.Centers, Color: c, Width: w, Dash: dash})
			if err != nil {
				return err
			}
			if l != nil {
				leg.Add(name, l)
				labels = append(labels, name)
			}
		}
		lw := legendWidthFor(labels)
		left := draw.Crop(dc, 0, -lw, 0, 0)
		cs := plot.Align([][]*plot.Plot{{p}}, draw.Tiles{Rows: 1, Cols: 1}, left)
		p.Draw(cs[0][0])
		legendAt(draw.Crop(dc, dc.Max.X-dc.Min.X-lw+vg.Points(10), 0, 0, 0), p.DataCanvas(cs[0][0]), leg)
		return nil
	})
	return svg, caption, err
}

// firstPowered returns the first kept output time of d with power (a
// column of d.Absorbed) and its full-output profile (fullOutput), or −1.
func firstPowered(d *runData) (int, []float64) {
	for k := range d.Absorbed {
		if P, ok := fullOutput(d, k); ok {
			if _, h := valueRange(P); h > 0 {
				return k, P
			}
		}
	}
	return -1, nil
}

// compareAbsorbedFigure draws, for each case with volumetric heating, the
// absorbed power at full output through the thickness at its first output
// time with power (the uncured part): one frequency against a band, or one
// applicator against another. It returns "" when no case has any.
func compareAbsorbedFigure(names []string, ds []*runData) (string, error) {
	L, hi := 0.0, 0.0
	profs := make([][]float64, len(ds))
	for i, d := range ds {
		if d == nil || d.Absorbed == nil {
			continue
		}
		L = max(L, thickness(d))
		if _, P := firstPowered(d); P != nil {
			profs[i] = P
			_, h := valueRange(P)
			hi = max(hi, h)
		}
	}
	if !(hi > 0) || math.IsInf(hi, 0) {
		return "", nil
	}
	div, unit := powerScale(hi)
	return svgFigure(figWidth, profileHeight, "comparison of absorbed power", func(dc draw.Canvas) error {
		p := newPlot("absorbed power at full output ("+unit+")", "depth (mm)")
		invertDepth(p, L)
		addGrid(p)
		p.X.Min, p.X.Max = 0, hi/div*1.05
		leg := newLegend()
		var labels []string
		for i, P := range profs {
			if P == nil {
				continue
			}
			x := make([]float64, len(P))
			for j, v := range P {
				x[j] = v / div
			}
			c, dash := lineColor(i)
			l, err := addSeries(p, series{X: x, Y: ds[i].Centers, Color: c, Dash: dash, Width: vg.Points(1.5)})
			if err != nil {
				return err
			}
			if l != nil {
				leg.Add(names[i], l)
				labels = append(labels, names[i])
			}
		}
		lw := legendWidthFor(labels)
		left := draw.Crop(dc, 0, -lw, 0, 0)
		cs := plot.Align([][]*plot.Plot{{p}}, draw.Tiles{Rows: 1, Cols: 1}, left)
		p.Draw(cs[0][0])
		legendAt(draw.Crop(dc, dc.Max.X-dc.Min.X-lw+vg.Points(10), 0, 0, 0), p.DataCanvas(cs[0][0]), leg)
		return nil
	})
}
