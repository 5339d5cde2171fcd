package report

import (
	"bytes"
	"errors"
	"fmt"
	"image"
	"image/color"
	"math"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"sync"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"
)

// This file holds the drawing primitives of the reports: the palette, the
// raster maps, line panels and the conversion of a gonum/plot canvas into
// SVG that can sit inline in an HTML page. They know nothing of runs, so the
// compare and sweep pages draw with them too.

// cividis is the cividis colour map, 256 steps from dark blue to yellow,
// as 0xRRGGBB: a sequential map whose lightness rises steadily and which
// reads the same for viewers with the common colour-vision deficiencies.
// Source: Nuñez, Anderton & Renslow, "Optimizing colormaps with consideration
// for color vision deficiency to enable accurate interpretation of scientific
// data", PLoS ONE 13(7): e0199239 (2018); the table as distributed with
// matplotlib 3.6 (_cm_listed.py, _cividis_data), rounded to 8 bits.
var cividis = [256]uint32{
	0x00224e, 0x00234f, 0x002451, 0x002553, 0x002554, 0x002656, 0x002758, 0x002859,
	0x00285b, 0x00295d, 0x002a5f, 0x002a61, 0x002b62, 0x002c64, 0x002c66, 0x002d68,
	0x002e6a, 0x002e6c, 0x002f6d, 0x00306f, 0x003070, 0x003170, 0x003171, 0x013271,
	0x053371, 0x083370, 0x0c3470, 0x0f3570, 0x123570, 0x143670, 0x163770, 0x18376f,
	0x1a386f, 0x1c396f, 0x1e3a6f, 0x203a6f, 0x213b6e, 0x233c6e, 0x243c6e, 0x263d6e,
	0x273e6e, 0x293f6e, 0x2a3f6d, 0x2b406d, 0x2d416d, 0x2e416d, 0x2f426d, 0x31436d,
	0x32436d, 0x33446d, 0x34456c, 0x35456c, 0x36466c, 0x38476c, 0x39486c, 0x3a486c,
	0x3b496c, 0x3c4a6c, 0x3d4a6c, 0x3e4b6c, 0x3f4c6c, 0x404c6c, 0x414d6c, 0x424e6c,
	0x434e6c, 0x444f6c, 0x45506c, 0x46506c, 0x47516c, 0x48526c, 0x49526c, 0x4a536c,
	0x4b546c, 0x4c546c, 0x4d556c, 0x4e566c, 0x4f566c, 0x50576c, 0x51586d, 0x52586d,
	0x53596d, 0x545a6d, 0x555a6d, 0x565b6d, 0x575c6d, 0x585c6d, 0x595d6e, 0x5a5e6e,
	0x5b5e6e, 0x5c5f6e, 0x5d606e, 0x5e616e, 0x5f616f, 0x60626f, 0x61636f, 0x62636f,
	0x636470, 0x646570, 0x656570, 0x666670, 0x676771, 0x686771, 0x696871, 0x6a6972,
	0x6b6972, 0x6c6a72, 0x6d6b73, 0x6e6b73, 0x6f6c73, 0x706d74, 0x716e74, 0x726e75,
	0x736f75, 0x747075, 0x757076, 0x767176, 0x777277, 0x787377, 0x797377, 0x7a7478,
	0x7b7578, 0x7c7578, 0x7d7679, 0x7e7779, 0x7f7879, 0x807879, 0x81797a, 0x827a7a,
	0x837b7a, 0x847b7a, 0x857c7a, 0x867d7a, 0x877e7a, 0x887e7a, 0x897f7a, 0x8a807a,
	0x8b817a, 0x8c817a, 0x8d827a, 0x8e8379, 0x8f8479, 0x908579, 0x918579, 0x928679,
	0x938779, 0x948879, 0x958978, 0x968978, 0x978a78, 0x988b78, 0x998c78, 0x9a8c77,
	0x9b8d77, 0x9c8e77, 0x9d8f77, 0x9e9076, 0x9f9176, 0xa09176, 0xa19275, 0xa29375,
	0xa39475, 0xa49574, 0xa59674, 0xa69673, 0xa79773, 0xa89873, 0xa99972, 0xaa9a72,
	0xab9b71, 0xac9c71, 0xad9c70, 0xae9d70, 0xaf9e6f, 0xb09f6f, 0xb1a06e, 0xb2a16e,
	0xb3a26d, 0xb4a26d, 0xb5a36c, 0xb6a46c, 0xb7a56b, 0xb8a66a, 0xb9a76a, 0xbaa869,
	0xbba968, 0xbcaa68, 0xbdab67, 0xbeac66, 0xbfad66, 0xc0ad65, 0xc1ae64, 0xc2af64,
	0xc3b063, 0xc4b162, 0xc5b261, 0xc6b361, 0xc7b460, 0xc8b55f, 0xc9b65e, 0xcab75d,
	0xcbb85d, 0xccb95c, 0xcdba5b, 0xceba5a, 0xcfbb59, 0xd0bc58, 0xd1bd57, 0xd2be56,
	0xd3bf55, 0xd4c054, 0xd6c153, 0xd7c252, 0xd8c351, 0xd9c450, 0xdac54f, 0xdbc64e,
	0xdcc74d, 0xddc84c, 0xdec94b, 0xdfca4a, 0xe0cb48, 0xe1cc47, 0xe2cd46, 0xe3ce45,
	0xe5cf44, 0xe6d042, 0xe7d141, 0xe8d240, 0xe9d33e, 0xead43d, 0xebd53b, 0xecd63a,
	0xedd739, 0xeed837, 0xefd936, 0xf1da34, 0xf2db32, 0xf3dc31, 0xf4dd2f, 0xf5de2d,
	0xf6df2c, 0xf7e02a, 0xf8e128, 0xfae226, 0xfbe324, 0xfce422, 0xfde520, 0xfee71d,
	0xfee81a, 0xfee91a, 0xfeea1b, 0xfeeb1d, 0xfeec1e, 0xfeed1f, 0xfeee21, 0xfeef22,
}

// mapSteps is the number of colours of a map; the last palette index
// (mapSteps) is reserved for cells without a value.
const mapSteps = 255

// noValueColor fills cells without a value on a map (layers that do not
// cure, sweep runs without the quantity): white, which no step of cividis
// comes near (its lightest step is a saturated yellow), and the figures
// hatch such areas as well (hatch), so that "no value" is not read as a
// value of the scale, in colour or in a grey print.
var noValueColor = color.RGBA{0xff, 0xff, 0xff, 0xff}

// mapPalette is cividis resampled to mapSteps colours plus noValueColor.
var mapPalette = func() color.Palette {
	p := make(color.Palette, mapSteps+1)
	for i := range mapSteps {
		c := cividis[(i*255+(mapSteps-1)/2)/(mapSteps-1)]
		p[i] = color.RGBA{uint8(c >> 16), uint8(c >> 8), uint8(c), 0xff}
	}
	p[mapSteps] = noValueColor
	return p
}()

// mapIndex returns the palette index of v on the scale [lo, hi].
func mapIndex(v, lo, hi float64) uint8 {
	if math.IsNaN(v) {
		return mapSteps
	}
	x := math.Round((v - lo) / (hi - lo) * (mapSteps - 1))
	return uint8(min(max(x, 0), mapSteps-1))
}

// Okabe–Ito colours for lines, in the order they are handed out (yellow,
// too light on white, left out). Source: Okabe & Ito, "Color Universal
// Design (CUD): how to make figures and presentations that are friendly to
// colorblind people" (2008), the eight-colour set.
var lineColors = []color.RGBA{
	{0x00, 0x72, 0xb2, 0xff}, // blue
	{0xd5, 0x5e, 0x00, 0xff}, // vermillion
	{0x00, 0x9e, 0x73, 0xff}, // bluish green
	{0xcc, 0x79, 0xa7, 0xff}, // reddish purple
	{0xe6, 0x9f, 0x00, 0xff}, // orange
	{0x56, 0xb4, 0xe9, 0xff}, // sky blue
}

// lineColor returns the k-th line colour, and a dash pattern once the
// colours have all been used.
func lineColor(k int) (color.Color, []vg.Length) {
	c := lineColors[k%len(lineColors)]
	if k >= len(lineColors) {
		return c, []vg.Length{vg.Points(5), vg.Points(2)}
	}
	return c, nil
}

// The neutral colours of the figures, the same as the page's (see
// pageTemplate): ink for text, axes and reference lines, a softer ink for
// secondary lines and hatching, a light grid.
var (
	ink      = color.RGBA{0x1c, 0x1c, 0x1a, 0xff}
	inkSoft  = color.RGBA{0x4f, 0x4d, 0x47, 0xff}
	gridGrey = color.RGBA{0xe3, 0xe0, 0xd8, 0xff}
	white    = color.RGBA{0xff, 0xff, 0xff, 0xff}
	halo     = color.NRGBA{0xff, 0xff, 0xff, 0xd0} // not premultiplied: translucent white
)

// dashStyle is a dash pattern of the figures with the word the captions
// use for it; dashWord checks that the word fits the pattern.
type dashStyle struct {
	Word string
	Dash []vg.Length // on, off, on, off ... in points; nil for a solid line
}

// The dash patterns of the figures.
var (
	solidLine   = dashStyle{"solid", nil}
	dashedLine  = dashStyle{"dashed", []vg.Length{vg.Points(5), vg.Points(3)}}
	faceDashed  = dashStyle{"dashed", []vg.Length{vg.Points(3), vg.Points(2)}} // layer faces on a map
	dottedLine  = dashStyle{"dotted", []vg.Length{vg.Points(1.5), vg.Points(2.5)}}
	faceDotted  = dashStyle{"dotted", []vg.Length{vg.Points(1), vg.Points(2)}} // layer faces on a line panel
	dashDotLine = dashStyle{"dash-dot", []vg.Length{vg.Points(6), vg.Points(2), vg.Points(1.5), vg.Points(2)}}
)

// dashWord names a dash pattern as a reader sees it: "solid" without
// dashes, "dotted" when every stroke is at most 1.5 pt long, "dashed" when
// every stroke is at least 3 pt, "dash-dot" when long and short strokes
// alternate, "" otherwise.
func dashWord(d []vg.Length) string {
	if len(d) == 0 {
		return "solid"
	}
	short, long := 0, 0
	for i := 0; i < len(d); i += 2 {
		switch {
		case d[i] <= vg.Points(1.5):
			short++
		case d[i] >= vg.Points(3):
			long++
		default:
			return ""
		}
	}
	switch {
	case long == 0:
		return "dotted"
	case short == 0:
		return "dashed"
	}
	return "dash-dot"
}

// hatchSpacing is the distance between the lines of a hatched area.
const hatchSpacing = 4.5

// hatch draws thin diagonal lines (rising to the right, hatchSpacing
// apart) across the rectangle r of c, clipped to r: the mark of an area
// without a value. It returns the number of lines drawn.
func hatch(c draw.Canvas, r vg.Rectangle) int {
	w, h := r.Max.X-r.Min.X, r.Max.Y-r.Min.Y
	if w <= 0 || h <= 0 {
		return 0
	}
	sty := draw.LineStyle{Color: inkSoft, Width: vg.Points(0.45)}
	n := 0
	// Lines x − y = k for k from −h to w, in coordinates relative to r.Min.
	for k := -h + vg.Points(hatchSpacing)/2; k < w; k += vg.Points(hatchSpacing) {
		x0, y0 := k, vg.Length(0)
		if x0 < 0 {
			x0, y0 = 0, -k
		}
		x1, y1 := k+h, h
		if x1 > w {
			x1, y1 = w, w-k
		}
		c.StrokeLine2(sty, r.Min.X+x0, r.Min.Y+y0, r.Min.X+x1, r.Min.Y+y1)
		n++
	}
	return n
}

// hatchedBand is a plotter that hatches the data rectangle [X0, X1] ×
// [Y0, Y1]; it counts the lines drawn (for tests).
type hatchedBand struct {
	X0, X1, Y0, Y1 float64
	lines          int
}

// Plot implements plot.Plotter.
func (b *hatchedBand) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	xa, xb, ya, yb := trX(b.X0), trX(b.X1), trY(b.Y0), trY(b.Y1)
	b.lines = hatch(c, vg.Rectangle{Min: vg.Point{X: min(xa, xb), Y: min(ya, yb)}, Max: vg.Point{X: max(xa, xb), Y: max(ya, yb)}})
}

// Type sizes of the plots, in points.
const (
	tickSize   = 8.5
	labelSize  = 9.5
	legendSize = 9
	tagSize    = 8
)

// sans returns the Liberation Sans face of the given size; it has the
// metrics of Arial and Helvetica, which the SVG names after it (fixSVG).
func sans(size vg.Length) font.Font {
	return font.Font{Typeface: "Liberation", Variant: "Sans", Size: size}
}

func textStyle(size vg.Length) text.Style {
	return text.Style{Color: ink, Font: sans(size), Handler: plot.DefaultTextHandler,
		XAlign: draw.XLeft, YAlign: draw.YBottom}
}

// newPlot returns an empty plot in the house style with its axis labels
// (which carry their units, "time (min)").
func newPlot(xLabel, yLabel string) *plot.Plot {
	p := plot.New()
	for _, ax := range []*plot.Axis{&p.X, &p.Y} {
		ax.Label.TextStyle.Font = sans(labelSize)
		ax.Label.TextStyle.Color = ink
		ax.Tick.Label.Font = sans(tickSize)
		ax.Tick.Label.Color = ink
		ax.LineStyle.Color = inkSoft
		ax.Tick.LineStyle.Color = inkSoft
		ax.Padding = 0
		ax.Tick.Marker = niceTicks{6}
	}
	p.X.Label.Text, p.Y.Label.Text = xLabel, yLabel
	p.X.Label.Padding = vg.Points(2)
	p.Y.Label.Padding = vg.Points(3)
	p.Title.TextStyle.Font = sans(labelSize)
	p.Legend.TextStyle.Font = sans(legendSize)
	return p
}

// newLegend returns an empty legend in the house style.
func newLegend() plot.Legend {
	l := plot.NewLegend()
	l.TextStyle.Font = sans(legendSize)
	l.TextStyle.Color = ink
	l.Top, l.Left = true, true
	l.ThumbnailWidth = vg.Points(22)
	l.Padding = vg.Points(3)
	return l
}

// invertDepth makes the y axis of p a depth axis: 0 (the top face) at the
// top, the bottom face at the bottom.
func invertDepth(p *plot.Plot, thickness float64) {
	p.Y.Scale = plot.InvertedScale{Normalizer: plot.LinearScale{}}
	p.Y.Min, p.Y.Max = 0, thickness
}

// addGrid adds light grid lines behind the data.
func addGrid(p *plot.Plot) {
	g := plotter.NewGrid()
	g.Vertical.Color, g.Horizontal.Color = gridGrey, gridGrey
	g.Vertical.Width, g.Horizontal.Width = vg.Points(0.5), vg.Points(0.5)
	p.Add(g)
}

// series is one line of a line panel.
type series struct {
	Name  string // legend text; "" for none
	X, Y  []float64
	Color color.Color
	Width vg.Length
	Dash  []vg.Length
	Halo  bool // draw a white band under the line (on maps)
}

// addSeries adds s to p as one or more plotter.Lines, split where X or Y is
// NaN, and returns a line to show in a legend (nil when s has no point).
func addSeries(p *plot.Plot, s series) (*plotter.Line, error) {
	w := s.Width
	if w == 0 {
		w = vg.Points(1.25)
	}
	var first *plotter.Line
	var run plotter.XYs
	flush := func() error {
		if len(run) == 0 {
			return nil
		}
		if s.Halo {
			h, err := plotter.NewLine(run)
			if err != nil {
				return err
			}
			h.Color, h.Width = halo, w+vg.Points(1.8)
			p.Add(h)
		}
		l, err := plotter.NewLine(run)
		if err != nil {
			return err
		}
		l.Color, l.Width, l.Dashes = s.Color, w, s.Dash
		p.Add(l)
		if first == nil {
			first = l
		}
		run = nil
		return nil
	}
	for i := range s.X {
		x, y := s.X[i], s.Y[i]
		if math.IsNaN(x) || math.IsNaN(y) || math.IsInf(x, 0) || math.IsInf(y, 0) {
			if err := flush(); err != nil {
				return nil, err
			}
			continue
		}
		run = append(run, plotter.XY{X: x, Y: y})
	}
	if err := flush(); err != nil {
		return nil, err
	}
	return first, nil
}

// rasterMap is a plotter that draws an image over a data rectangle. Unlike
// plotter.Image it works on an inverted axis and hands the image to the
// canvas as it is (a paletted image stays paletted in the PNG).
type rasterMap struct {
	img            image.Image
	x0, x1, y0, y1 float64 // data rectangle; row 0 of img is drawn at y0
}

// Plot implements plot.Plotter.
func (m *rasterMap) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	xa, xb := trX(m.x0), trX(m.x1)
	ya, yb := trY(m.y0), trY(m.y1)
	if ya < yb {
		// Row 0 must be drawn at y0; the canvas draws row 0 on top.
		panic("report: rasterMap needs row 0 at the top of the canvas (use an inverted y axis)")
	}
	c.DrawImage(vg.Rectangle{Min: vg.Point{X: min(xa, xb), Y: yb}, Max: vg.Point{X: max(xa, xb), Y: ya}}, m.img)
}

// DataRange implements plot.DataRanger.
func (m *rasterMap) DataRange() (xmin, xmax, ymin, ymax float64) {
	return min(m.x0, m.x1), max(m.x0, m.x1), min(m.y0, m.y1), max(m.y0, m.y1)
}

// tag is a plotter that writes a short text on a white box at a data point,
// for labels drawn over a map or next to a line.
type tag struct {
	X, Y   float64
	Text   string
	XAlign text.XAlignment // draw.XLeft, XCenter, XRight
	YAlign text.YAlignment
	DX, DY vg.Length // offset from the point
	// MaxHeight, when > 0, drops the tag when its box would be taller than
	// this many data units of y (a layer too thin to be labelled).
	MaxHeight float64
}

// Plot implements plot.Plotter.
func (t *tag) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	sty := textStyle(tagSize)
	sty.XAlign, sty.YAlign = t.XAlign, t.YAlign
	pt := vg.Point{X: trX(t.X) + t.DX, Y: trY(t.Y) + t.DY}
	r := sty.Rectangle(t.Text)
	pad := vg.Points(1.5)
	box := vg.Rectangle{Min: pt.Add(r.Min).Sub(vg.Point{X: pad, Y: pad}), Max: pt.Add(r.Max).Add(vg.Point{X: pad, Y: pad})}
	if t.MaxHeight > 0 && math.Abs(float64(trY(t.Y+t.MaxHeight)-trY(t.Y))) < float64(box.Size().Y)+2 {
		return
	}
	c.FillPolygon(halo, []vg.Point{box.Min, {X: box.Max.X, Y: box.Min.Y}, box.Max, {X: box.Min.X, Y: box.Max.Y}})
	c.FillText(sty, pt, t.Text)
}

// marker is a plotter that draws a ring at a data point.
type marker struct{ X, Y float64 }

// Plot implements plot.Plotter.
func (m *marker) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	pt := vg.Point{X: trX(m.X), Y: trY(m.Y)}
	c.DrawGlyphNoClip(draw.GlyphStyle{Color: white, Radius: vg.Points(4.2), Shape: draw.RingGlyph{}}, pt)
	c.DrawGlyphNoClip(draw.GlyphStyle{Color: ink, Radius: vg.Points(3.2), Shape: draw.RingGlyph{}}, pt)
}

// mapGrid gives the pixel grid of a depth–time map.
//
// Rows: the stack is cut into equal rows no thicker than the thinnest cell,
// base = ⌈thickness / thinnest cell⌉ rows (n rows for a uniform mesh of n
// cells), repeated kz = ⌈mapMinRows / base⌉ times (at most mapMaxRows rows in
// all); each row shows the cell that holds its centre. Columns: the nt − 1
// intervals between output times, each cut into kt = ⌈mapMinCols/(nt − 1)⌉
// columns (at most mapMaxCols in all), each column showing the values
// interpolated linearly in time at its centre. So a uniform mesh gives
// kz·n rows and kt·(nt − 1) columns.
func mapGrid(nTimes int, faces []float64) (cols, rows int) {
	n := len(faces) - 1
	thin := math.Inf(1)
	for i := range n {
		thin = min(thin, faces[i+1]-faces[i])
	}
	base := max(1, int(math.Ceil(faces[n]/thin-1e-6)))
	rows = base * max(1, (mapMinRows+base-1)/base)
	if rows > mapMaxRows {
		rows = mapMaxRows
	}
	iv := max(1, nTimes-1)
	cols = iv * max(1, (mapMinCols+iv-1)/iv)
	if cols > mapMaxCols {
		cols = mapMaxCols
	}
	return cols, rows
}

// Limits of the map resolution, in pixels.
const (
	mapMinRows, mapMaxRows = 240, 1200
	mapMinCols, mapMaxCols = 400, 1600
)

// mapImage resamples v[time][cell] onto the grid of mapGrid, coloured on the
// scale [lo, hi] (row 0 is the top face, column 0 the first output time).
func mapImage(times, faces []float64, v [][]float64, lo, hi float64) *image.Paletted {
	cols, rows := mapGrid(len(times), faces)
	img := image.NewPaletted(image.Rect(0, 0, cols, rows), mapPalette)
	n := len(faces) - 1
	thick := faces[n]
	cellOf := make([]int, rows)
	for r := range rows {
		z := (float64(r) + 0.5) * thick / float64(rows)
		i := sort.SearchFloat64s(faces, z) - 1 // faces[i] < z ≤ faces[i+1]
		cellOf[r] = min(max(i, 0), n-1)
	}
	t0, t1 := times[0], times[len(times)-1]
	for c := range cols {
		k, w := 0, 0.0
		if len(times) > 1 {
			t := t0 + (float64(c)+0.5)*(t1-t0)/float64(cols)
			k = min(max(sort.SearchFloat64s(times, t)-1, 0), len(times)-2)
			w = (t - times[k]) / (times[k+1] - times[k])
		}
		for r := range rows {
			i := cellOf[r]
			x := v[k][i]
			if w > 0 {
				x = (1-w)*x + w*v[k+1][i]
			}
			img.Pix[r*img.Stride+c] = mapIndex(x, lo, hi)
		}
	}
	return img
}

// colorBar draws the scale of a map in the strip c beside it, aligned with
// the map's data area da: the bar, its ticks and labels, and the label of
// the quantity with its unit.
func colorBar(c draw.Canvas, da draw.Canvas, lo, hi float64, label string) {
	barW := vg.Points(10)
	x0 := c.Min.X + vg.Points(10)
	bar := image.NewPaletted(image.Rect(0, 0, 1, mapSteps), mapPalette)
	for r := range mapSteps {
		bar.Pix[r] = uint8(mapSteps - 1 - r)
	}
	c.DrawImage(vg.Rectangle{Min: vg.Point{X: x0, Y: da.Min.Y}, Max: vg.Point{X: x0 + barW, Y: da.Max.Y}}, bar)
	edge := draw.LineStyle{Color: inkSoft, Width: vg.Points(0.5)}
	c.StrokeLines(edge, []vg.Point{{X: x0, Y: da.Min.Y}, {X: x0 + barW, Y: da.Min.Y}, {X: x0 + barW, Y: da.Max.Y}, {X: x0, Y: da.Max.Y}, {X: x0, Y: da.Min.Y}})
	sty := textStyle(tickSize)
	sty.YAlign = draw.YCenter
	widest := vg.Length(0)
	for _, tk := range (niceTicks{6}).Ticks(lo, hi) {
		if tk.Label == "" || tk.Value < lo || tk.Value > hi {
			continue
		}
		y := da.Min.Y + (da.Max.Y-da.Min.Y)*vg.Length((tk.Value-lo)/(hi-lo))
		c.StrokeLine2(edge, x0+barW, y, x0+barW+vg.Points(3), y)
		c.FillText(sty, vg.Point{X: x0 + barW + vg.Points(4.5), Y: y}, tk.Label)
		widest = max(widest, sty.Width(tk.Label))
	}
	// Read bottom to top, like the label of a y axis; rotated by +90°, the
	// top of the text faces left, so YTop puts it right of x.
	ls := textStyle(labelSize)
	ls.Rotation = math.Pi / 2
	ls.XAlign, ls.YAlign = draw.XCenter, draw.YTop
	c.FillText(ls, vg.Point{X: x0 + barW + vg.Points(8) + widest, Y: (da.Min.Y + da.Max.Y) / 2}, label)
}

// colorBarWidth is the width of the strip that colorBar needs.
const colorBarWidth = 62

// svgFigure draws a figure of the given size (in points) with drawFn and
// returns it as an SVG element for an HTML page (see fixSVG). A panic in the
// drawing code becomes an error.
func svgFigure(w, h vg.Length, label string, drawFn func(dc draw.Canvas) error) (svg string, err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("drawing %q: %v", label, r)
		}
	}()
	cv := vgsvg.NewWith(vgsvg.UseWH(w, h))
	if err := drawFn(draw.New(cv)); err != nil {
		return "", err
	}
	var b bytes.Buffer
	if _, err := cv.WriteTo(&b); err != nil {
		return "", err
	}
	return fixSVG(b.String(), label)
}

var svgOpen = sync.OnceValue(func() *regexp.Regexp {
	return regexp.MustCompile(`(?s)^<svg width="[^"]*" height="[^"]*" viewBox="0 0 ([0-9.e+-]+) ([0-9.e+-]+)"[^>]*>`)
})

// fixSVG turns the document that vgsvg writes into an element to inline in
// HTML:
//   - the XML prolog and comment go; the root gets the viewBox, a natural
//     size in CSS pixels (1 pt = 4/3 px), role="img" and an aria-label;
//   - embedded images are PNG (vgsvg labels them image/jpg) and fill their
//     rectangle (vgsvg leaves the default preserveAspectRatio, which would
//     letterbox a map); xlink:href becomes the SVG 2 href, so no xlink
//     namespace is needed;
//   - text names Liberation Sans first and then the fonts with the same
//     metrics (Arimo, Arial, Helvetica), so labels keep the widths they
//     were laid out with.
//
// It returns an error when vgsvg's output is not as expected (a new
// version), rather than a page that renders wrongly.
func fixSVG(s, label string) (string, error) {
	i := strings.Index(s, "<svg")
	if i < 0 {
		return "", errors.New("vgsvg wrote no <svg> element")
	}
	s = s[i:]
	m := svgOpen().FindStringSubmatchIndex(s)
	if m == nil {
		return "", errors.New("vgsvg wrote an <svg> element of unexpected form")
	}
	vw, vh := s[m[2]:m[3]], s[m[4]:m[5]]
	var fw, fh float64
	fmt.Sscan(vw, &fw)
	fmt.Sscan(vh, &fh)
	open := fmt.Sprintf(`<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 %s %s" width="%.0f" height="%.0f" role="img" aria-label="%s">`,
		vw, vh, fw*4/3, fh*4/3, xmlEscape(label))
	s = open + s[m[1]:]
	const vgImage = `xlink:href="data:image/jpg;base64,`
	s = strings.ReplaceAll(s, vgImage, `preserveAspectRatio="none" href="data:image/png;base64,`)
	s = strings.ReplaceAll(s, "font-family:Liberation Sans;", "font-family:'Liberation Sans',Arimo,Arial,Helvetica,sans-serif;")
	if strings.Contains(s, "xlink:") || strings.Contains(s, "Liberation Serif") {
		return "", errors.New("vgsvg output not as expected (xlink or serif text left)")
	}
	return strings.TrimSpace(s), nil
}

func xmlEscape(s string) string {
	var b strings.Builder
	for _, r := range s {
		switch r {
		case '&':
			b.WriteString("&amp;")
		case '<':
			b.WriteString("&lt;")
		case '>':
			b.WriteString("&gt;")
		case '"':
			b.WriteString("&quot;")
		default:
			b.WriteRune(r)
		}
	}
	return b.String()
}

// niceTicks places about n major ticks at steps of 1, 2, 2.5 or 5 times a
// power of ten, labelled with as few decimals as the step needs ("50", not
// "50.00"), and unlabelled minor ticks between them.
type niceTicks struct{ n int }

// Ticks implements plot.Ticker.
func (nt niceTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(hi > lo) || math.IsInf(hi-lo, 0) {
		return []plot.Tick{{Value: lo, Label: strconv.FormatFloat(lo, 'g', 4, 64)}}
	}
	raw := (hi - lo) / float64(max(nt.n, 2))
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	step, minors := 10*mag, 5
	for _, m := range []struct {
		f float64
		n int
	}{{1, 5}, {2, 4}, {2.5, 5}, {5, 5}} {
		if m.f*mag >= raw*(1-1e-9) {
			step, minors = m.f*mag, m.n
			break
		}
	}
	dec := 0
	for dec < 12 {
		x := step * math.Pow10(dec)
		if math.Abs(x-math.Round(x)) < 1e-6*x {
			break
		}
		dec++
	}
	var out []plot.Tick
	minor := step / float64(minors)
	tol := 1e-9 * (hi - lo)
	for k := math.Ceil((lo - tol) / minor); ; k++ {
		v := k * minor
		if v > hi+tol {
			break
		}
		tk := plot.Tick{Value: v}
		if r := math.Mod(math.Abs(k), float64(minors)); r == 0 {
			v = math.Round(v/step) * step
			tk.Value = v
			tk.Label = strconv.FormatFloat(v, 'f', dec, 64)
			if tk.Label[0] == '-' && strings.Trim(tk.Label, "-0.") == "" {
				tk.Label = tk.Label[1:]
			}
		}
		out = append(out, tk)
	}
	return out
}

// timeScale is the unit of the time axes of a report.
type timeScale struct {
	div  float64 // seconds per unit
	unit string
}

// timeScaleFor picks seconds up to 3 min, minutes up to 2 h, hours beyond.
func timeScaleFor(end float64) timeScale {
	switch {
	case end <= 180:
		return timeScale{1, "s"}
	case end <= 7200:
		return timeScale{60, "min"}
	}
	return timeScale{3600, "h"}
}

func (ts timeScale) of(t []float64) []float64 {
	out := make([]float64, len(t))
	for i, v := range t {
		out[i] = v / ts.div
	}
	return out
}

// niceRange widens [lo, hi] by a fraction of its span on each side, and to
// a span of at least minSpan around its middle.
func niceRange(lo, hi, pad, minSpan float64) (float64, float64) {
	if hi-lo < minSpan {
		mid := (lo + hi) / 2
		lo, hi = mid-minSpan/2, mid+minSpan/2
	}
	d := (hi - lo) * pad
	return lo - d, hi + d
}
