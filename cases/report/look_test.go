package report

import (
	"bytes"
	"context"
	"image/color"
	"math"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"

	"cureslab/cases/check"
	"cureslab/cases/results"
)

// luminance is the WCAG 2.x relative luminance of an sRGB colour
// (W3C, Web Content Accessibility Guidelines 2.1, definition of relative
// luminance).
func luminance(c color.RGBA) float64 {
	lin := func(v uint8) float64 {
		x := float64(v) / 255
		if x <= 0.04045 {
			return x / 12.92
		}
		return math.Pow((x+0.055)/1.055, 2.4)
	}
	return 0.2126*lin(c.R) + 0.7152*lin(c.G) + 0.0722*lin(c.B)
}

// contrast is the WCAG 2.x contrast ratio (L1 + 0.05)/(L2 + 0.05).
func contrast(a, b color.RGBA) float64 {
	la, lb := luminance(a), luminance(b)
	return (max(la, lb) + 0.05) / (min(la, lb) + 0.05)
}

func hexColor(t *testing.T, s string) color.RGBA {
	t.Helper()
	v, err := strconv.ParseUint(strings.TrimPrefix(s, "#"), 16, 32)
	if err != nil || len(s) != 7 {
		t.Fatalf("colour %q is not #rrggbb", s)
	}
	return color.RGBA{uint8(v >> 16), uint8(v >> 8), uint8(v), 0xff}
}

// pageStyle renders an empty page and returns its CSS custom properties.
func pageStyle(t *testing.T) (string, map[string]string) {
	t.Helper()
	var b bytes.Buffer
	if err := renderPage(context.Background(), &b, &page{Title: "style", Kind: "test"}); err != nil {
		t.Fatal(err)
	}
	vars := map[string]string{}
	root := regexp.MustCompile(`(?s):root \{(.*?)\}`).FindStringSubmatch(b.String())
	if root == nil {
		t.Fatal("no :root block in the page's style")
	}
	for _, m := range regexp.MustCompile(`--([a-z]+):\s*(#[0-9a-f]{6})`).FindAllStringSubmatch(root[1], -1) {
		vars[m[1]] = m[2]
	}
	return b.String(), vars
}

// TestPaletteContrast: every colour that carries text reads against its
// background at WCAG level AA for normal text (4.5:1) or better, the page
// uses none of the colours or the system font stack of a well-known
// code-hosting design system, and the figures' ink is the page's.
func TestPaletteContrast(t *testing.T) {
	html, v := pageStyle(t)
	white := color.RGBA{0xff, 0xff, 0xff, 0xff}
	for _, tc := range []struct {
		text, bg string
		min      float64
	}{
		// Source: WCAG 2.1, success criterion 1.4.3 (4.5:1), 1.4.6 (7:1).
		{"ink", "", 7}, {"soft", "", 7}, {"head", "", 7}, {"pass", "", 7},
		{"fail", "", 4.5}, {"fail", "failbg", 4.5}, {"ink", "paper", 7}, {"soft", "paper", 4.5},
	} {
		fg, ok := v[tc.text]
		if !ok {
			t.Fatalf("no --%s in the page's style", tc.text)
		}
		bg := white
		if tc.bg != "" {
			bg = hexColor(t, v[tc.bg])
		}
		if r := contrast(hexColor(t, fg), bg); r < tc.min {
			t.Errorf("--%s %s on %s: contrast %.2f, want at least %.1f", tc.text, fg, tc.bg, r, tc.min)
		}
	}
	// Rules must show on paper (non-text contrast, WCAG 2.1 1.4.11: 3:1 is
	// for controls; a printed hairline needs at least 2:1, common practice).
	if r := contrast(hexColor(t, v["rule"]), white); r < 2 {
		t.Errorf("--rule %s: contrast %.2f on white, too faint to print", v["rule"], r)
	}
	for _, theirs := range []string{"#1f2328", "#57606a", "#d0d7de", "#f6f8fa", "system-ui", "-apple-system", "Segoe UI"} {
		if strings.Contains(strings.ToLower(html), strings.ToLower(theirs)) {
			t.Errorf("the page's style uses %q", theirs)
		}
	}
	if got := hexColor(t, v["ink"]); got != ink {
		t.Errorf("figure ink %v, page ink %v", ink, got)
	}
	if got := hexColor(t, v["soft"]); got != inkSoft {
		t.Errorf("figure soft ink %v, page soft ink %v", inkSoft, got)
	}
	// Pass and fail differ in hue for the common colour-vision
	// deficiencies: blue against orange-red (Okabe & Ito 2008); check the
	// hue angle, not only the lightness.
	hue := func(c color.RGBA) float64 {
		r, g, b := float64(c.R), float64(c.G), float64(c.B)
		return math.Mod(math.Atan2(math.Sqrt(3)*(g-b), 2*r-g-b)*180/math.Pi+360, 360)
	}
	pass, fail := hue(hexColor(t, v["pass"])), hue(hexColor(t, v["fail"]))
	if d := math.Abs(pass - fail); min(d, 360-d) < 120 {
		t.Errorf("pass hue %.0f° and fail hue %.0f° too close", pass, fail)
	}
}

// TestNoValueIsNotOnTheScale: the colour of "no value" is no step of the
// colour map (far from every one of them), and an area without a value is
// hatched, so it reads as no value in colour and in a grey print.
func TestNoValueIsNotOnTheScale(t *testing.T) {
	nearest := math.Inf(1)
	for i := range mapSteps {
		r, g, b, _ := mapPalette[i].RGBA()
		n := noValueColor
		d := math.Sqrt(sq(float64(r>>8)-float64(n.R)) + sq(float64(g>>8)-float64(n.G)) + sq(float64(b>>8)-float64(n.B)))
		nearest = min(nearest, d)
	}
	// Common practice: two colours 40 apart in 8-bit RGB are told apart at
	// a glance.
	if nearest < 40 {
		t.Errorf("no-value colour %v is %.0f from a step of the colour map", noValueColor, nearest)
	}
	// hatch draws inside its rectangle and nowhere else.
	cv := vgimg.New(vg.Points(100), vg.Points(100))
	dc := draw.New(cv)
	dc.FillPolygon(white, []vg.Point{{X: 0, Y: 0}, {X: 100, Y: 0}, {X: 100, Y: 100}, {X: 0, Y: 100}})
	r := vg.Rectangle{Min: vg.Point{X: 20, Y: 30}, Max: vg.Point{X: 60, Y: 70}}
	if n := hatch(dc, r); n < 10 {
		t.Errorf("%d hatch lines over a 40 pt square, want at least 10", n)
	}
	img := cv.Image()
	b := img.Bounds()
	sc := float64(b.Dx()) / 100
	inside, outside := 0, 0
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			cr, cg, cb, _ := img.At(x, y).RGBA()
			if cr>>8 > 0xf0 && cg>>8 > 0xf0 && cb>>8 > 0xf0 {
				continue
			}
			// pixel centre in points, y up
			px, py := (float64(x)+0.5)/sc, 100-(float64(y)+0.5)/sc
			if px > 19 && px < 61 && py > 29 && py < 71 {
				inside++
			} else {
				outside++
			}
		}
	}
	if inside == 0 || outside != 0 {
		t.Errorf("hatch: %d dark pixels inside the rectangle, %d outside; want some and none", inside, outside)
	}
	// A sweep map cell without a value is hatched; one with a value is not.
	sd := &sweepData{Mode: "grid", Keys: []string{"a", "b"}, Values: [][]string{{"1", "2"}, {"3"}}, Runs: 2,
		Rows: []sweepRow{
			{Run: 0, Vals: []string{"1", "3"}, Num: map[string]float64{colCure: 0.9}, Pass: map[string]string{}, Status: results.StatusOK},
			{Run: 1, Vals: []string{"2", "3"}, Num: map[string]float64{}, Pass: map[string]string{}, Status: results.StatusFailed},
		}}
	_, m, err := sweepMapFigure(sd, colCure)
	if err != nil {
		t.Fatal(err)
	}
	if m.drawn != 2 || m.hatched == 0 {
		t.Errorf("sweep map: %d cells drawn, %d hatch lines; want 2 and some for the run without a value", m.drawn, m.hatched)
	}
	sd.Rows[1].Num[colCure] = 0.8
	if _, m, _ = sweepMapFigure(sd, colCure); m.hatched != 0 {
		t.Errorf("sweep map with every value: %d hatch lines, want none", m.hatched)
	}
}

func sq(x float64) float64 { return x * x }

// TestCaptionsNameTheirDashes: every dash pattern is called by the word a
// reader would use for it, and the probe-history caption names the patterns
// its driving temperatures are drawn with.
func TestCaptionsNameTheirDashes(t *testing.T) {
	for _, st := range []dashStyle{solidLine, dashedLine, faceDashed, dottedLine, faceDotted, dashDotLine} {
		if got := dashWord(st.Dash); got != st.Word {
			t.Errorf("pattern %v is %q to a reader, the captions say %q", st.Dash, got, st.Word)
		}
	}
	// Reference cases of dashWord itself.
	for _, tc := range []struct {
		d    []vg.Length
		want string
	}{
		{nil, "solid"},
		{[]vg.Length{1, 2}, "dotted"},
		{[]vg.Length{5, 3}, "dashed"},
		{[]vg.Length{6, 2, 1.5, 2}, "dash-dot"},
		{[]vg.Length{2, 2}, ""},
	} {
		if got := dashWord(tc.d); got != tc.want {
			t.Errorf("dashWord(%v) = %q, want %q", tc.d, got, tc.want)
		}
	}
	c, r := runReportCase(t, "150 C")
	d, err := runDataOf(c, r, results.Summarize(c, r))
	if err != nil {
		t.Fatal(err)
	}
	_, caption, err := historyFigure(d, timeScaleFor(d.Times[len(d.Times)-1]))
	if err != nil {
		t.Fatal(err)
	}
	for j, dv := range d.Drivers {
		st := driverStyleOf(dv.Column, j)
		if dashWord(st.Dash.Dash) != st.Dash.Word {
			t.Errorf("%s drawn %v, called %q", dv.Column, st.Dash.Dash, st.Dash.Word)
		}
		if want := driverCaption(dv, d.Summary) + " (" + st.Describe() + ")"; !strings.Contains(caption, want) {
			t.Errorf("caption %q lacks %q", caption, want)
		}
	}
	if len(d.Drivers) == 0 {
		t.Fatal("the test case has no driving temperature")
	}
}

// TestReportDrawsTheProgram: the report of a controlled run draws the
// program the controller follows (from probes.csv program_C) and marks the
// probe at the sensor, from memory and from the files alike.
func TestReportDrawsTheProgram(t *testing.T) {
	fixedClock(t)
	c, r := standingCase(t, false)
	s := results.Summarize(c, r)
	d, err := runDataOf(c, r, s)
	if err != nil {
		t.Fatal(err)
	}
	var prog []float64
	for _, dv := range d.Drivers {
		if dv.Column == results.ProgramColumn {
			prog = dv.Values
		}
	}
	if len(prog) != len(d.Times) {
		t.Fatalf("program drawn at %d of %d output times", len(prog), len(d.Times))
	}
	for k, tm := range d.Times {
		if want := c.Problem.Volumetric.Control.Program.At(tm) - 273.15; math.Abs(prog[k]-want) > 1e-6 {
			t.Errorf("program at t = %g s: %g °C, want %g", tm, prog[k], want)
		}
	}
	svg, caption, err := historyFigure(d, timeScaleFor(d.Times[len(d.Times)-1]))
	if err != nil {
		t.Fatal(err)
	}
	texts := svgTexts(t, svg)
	for _, want := range []string{"control program", "at 2 mm (sensor)"} {
		if !hasText(texts, want) {
			t.Errorf("probe histories lack %q; texts %q", want, texts)
		}
	}
	if !strings.Contains(caption, "the control program that the sensor at 2 mm follows (wide grey band)") {
		t.Errorf("caption does not name the program's band: %q", caption)
	}
}

// TestCautionsByPage: each page carries the cautions that apply to what it
// shows: the fit and TTT pages and an oven run's page no leakage caution, a
// volumetric run's page has it; a page without a curing layer has no
// self-heating caution.
func TestCautionsByPage(t *testing.T) {
	leak := htmlEscaped("leakage limits and interlock rules")
	fire := htmlEscaped("smokes or catches fire")
	c, r := runReportCase(t, "150 C")
	oven := renderFromMemory(t, c, r)
	sc, sr := standingCase(t, false)
	micro := renderFromMemory(t, sc, sr)
	for _, tc := range []struct {
		name               string
		page               string
		wantLeak, wantFire bool
	}{
		{"fit", fitPage(t, readDemo(t), "nth-order"), false, true},
		{"ttt", tttPage(t, tttTable(t, true)), false, true},
		{"oven run", oven, false, true},
		{"volumetric run", micro, true, true},
	} {
		if got := strings.Contains(tc.page, leak); got != tc.wantLeak {
			t.Errorf("%s page: leakage caution %v, want %v", tc.name, got, tc.wantLeak)
		}
		if got := strings.Contains(tc.page, fire); got != tc.wantFire {
			t.Errorf("%s page: self-heating caution %v, want %v", tc.name, got, tc.wantFire)
		}
		for _, s := range check.Cautions(check.CautionScope{}) {
			if !strings.Contains(tc.page, htmlEscaped(s)) {
				t.Errorf("%s page lacks the caution %q", tc.name, s)
			}
		}
	}
	// A page about conduction alone: no self-heating caution.
	var b bytes.Buffer
	if err := renderPage(context.Background(), &b, &page{Title: "conduction", Kind: "test"}); err != nil {
		t.Fatal(err)
	}
	if strings.Contains(b.String(), fire) || strings.Contains(b.String(), leak) {
		t.Error("a page about conduction alone carries the self-heating or the leakage caution")
	}
}
