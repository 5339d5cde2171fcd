package report

import (
	"bytes"
	"context"
	"cureslab/cases"
	"cureslab/cases/check"
	"cureslab/cases/results"
	"cureslab/solver"
	"encoding/base64"
	"encoding/json"
	"encoding/xml"
	"errors"
	"image"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"
)

// reportCase is a small curing slab on a plate with a uniform mesh
// (0.25 mm cells in both layers), so that the map has one pixel row block
// per cell. maxT sets criteria.max_temperature.
func reportCase(t *testing.T, maxT string) *cases.Case {
	t.Helper()
	c, err := cases.Parse("report-test.toml", []byte(reportText(maxT)), "")
	if err != nil {
		t.Fatal(err)
	}
	return c
}

// reportText is the case file of reportCase.
func reportText(maxT string) string {
	return `title = "Report test: slab <&> plate"
[initial]
temperature = "23 C"
[time]
end = "40 min"
output_every = "4 min"
[[layer]]
name = "resin"
material = "resin-T"
thickness = "3 mm"
cells = 12
[[layer]]
name = "plate"
material = "aluminium"
thickness = "1 mm"
cells = 4
[materials.resin-T]
density = "1200 kg/m^3"
specific_heat = "1400 J/kg/K"
conductivity = "0.2 W/m/K"
[materials.resin-T.cure]
model = "nth-order"
total_heat = "300 J/g"
resin_fraction = 1.0
A1 = "2e5 1/s"
E1 = "60 kJ/mol"
n = 1.5
gel_point = 0.5
[top]
kind = "convection"
h = "25 W/m^2/K"
air = "120 C"
[bottom]
kind = "fixed"
temperature = "110 C"
[output]
probes = ["0 mm", "1.5 mm", "3.5 mm"]
[criteria]
min_cure = 0.5
max_temperature = "` + maxT + `"
`
}

func runReportCase(t *testing.T, maxT string) (*cases.Case, *solver.Result) {
	t.Helper()
	c := reportCase(t, maxT)
	r, err := solver.Run(context.Background(), c.Problem)
	if err != nil {
		t.Fatal(err)
	}
	return c, r
}

// fixedClock makes the time stamp of the reports reproducible.
func fixedClock(t *testing.T) {
	old := reportClock
	reportClock = func() time.Time { return time.Date(2030, 1, 2, 3, 4, 5, 0, time.UTC) }
	t.Cleanup(func() { reportClock = old })
}

func renderFromMemory(t *testing.T, c *cases.Case, r *solver.Result) string {
	t.Helper()
	d, err := runDataOf(c, r, results.Summarize(c, r))
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := renderRunReport(context.Background(), &b, d, reportClock()); err != nil {
		t.Fatal(err)
	}
	return b.String()
}

var svgElement = regexp.MustCompile(`(?s)<svg[ >].*?</svg>`)

func svgs(page string) []string { return svgElement.FindAllString(page, -1) }

// svgTexts returns the character data of every <text> element of svg,
// after checking that svg is well-formed XML.
func svgTexts(t *testing.T, svg string) []string {
	t.Helper()
	dec := xml.NewDecoder(strings.NewReader(svg))
	dec.Strict = true
	var texts []string
	inText := false
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("SVG is not well-formed XML: %v\n%.300s", err, svg)
		}
		switch e := tok.(type) {
		case xml.StartElement:
			inText = e.Name.Local == "text"
		case xml.CharData:
			if inText {
				texts = append(texts, strings.TrimSpace(string(e)))
			}
		case xml.EndElement:
			inText = false
		}
	}
	return texts
}

func TestReportSVGIsXML(t *testing.T) {
	c, r := runReportCase(t, "150 C")
	page := renderFromMemory(t, c, r)
	figs := svgs(page)
	// Temperature map, cure map, profiles, histories.
	if len(figs) != 4 {
		t.Fatalf("%d inline SVG figures, want 4", len(figs))
	}
	for i, s := range figs {
		svgTexts(t, s)
		if !strings.Contains(s[:200], `viewBox="0 0 `) || !strings.Contains(s[:300], `role="img"`) {
			t.Errorf("figure %d: root element lacks viewBox or role: %.300s", i, s)
		}
	}
}

func TestReportAxisLabelsCarryUnits(t *testing.T) {
	c, r := runReportCase(t, "150 C")
	page := renderFromMemory(t, c, r)
	var texts []string
	for _, s := range svgs(page) {
		texts = append(texts, svgTexts(t, s)...)
	}
	// The run lasts 40 min: time axes in minutes (timeScaleFor).
	for _, want := range []string{"time (min)", "depth (mm)", "temperature (°C)", "degree of cure (–)"} {
		found := false
		for _, s := range texts {
			found = found || s == want
		}
		if !found {
			t.Errorf("no axis label %q among the texts of the figures", want)
		}
	}
	unit := regexp.MustCompile(`\([^()]+\)$`)
	for _, s := range texts {
		for _, q := range []string{"time", "depth", "temperature", "degree of cure", "power fraction"} {
			if strings.HasPrefix(s, q) && !unit.MatchString(s) {
				t.Errorf("axis label %q has no unit in parentheses", s)
			}
		}
	}
}

// mapImages returns the images embedded in the page's figures, after
// checking that each is a PNG that fills its rectangle.
func mapImages(t *testing.T, page string) []image.Image {
	t.Helper()
	re := regexp.MustCompile(`<image [^>]*>`)
	var out []image.Image
	for _, tag := range re.FindAllString(page, -1) {
		if !strings.Contains(tag, `preserveAspectRatio="none"`) {
			t.Errorf("image does not fill its rectangle (preserveAspectRatio): %.120s", tag)
		}
		const pfx = `href="data:image/png;base64,`
		i := strings.Index(tag, pfx)
		if i < 0 {
			t.Fatalf("image is not an inline PNG: %.120s", tag)
		}
		data := tag[i+len(pfx):]
		data = data[:strings.IndexByte(data, '"')]
		raw, err := base64.StdEncoding.DecodeString(data)
		if err != nil {
			t.Fatal(err)
		}
		img, err := png.Decode(bytes.NewReader(raw))
		if err != nil {
			t.Fatal(err)
		}
		out = append(out, img)
	}
	return out
}

func TestReportMapPixels(t *testing.T) {
	c, r := runReportCase(t, "150 C")
	page := renderFromMemory(t, c, r)
	imgs := mapImages(t, page)
	// Two maps, each with its colour bar.
	if len(imgs) != 4 {
		t.Fatalf("%d images, want 4 (two maps and two colour bars)", len(imgs))
	}
	d, err := runDataOf(c, r, results.Summarize(c, r))
	if err != nil {
		t.Fatal(err)
	}
	nCells, nt := 16, len(r.Snapshots)
	// 40 min every 4 min: 11 output times (analytic).
	if nt != 11 || len(d.Centers) != nCells {
		t.Fatalf("%d output times and %d cells, want 11 and %d", nt, len(d.Centers), nCells)
	}
	// Uniform mesh: each cell gets kz rows, each output interval kt columns
	// (mapGrid).
	kz := (mapMinRows + nCells - 1) / nCells
	kt := (mapMinCols + nt - 2) / (nt - 1)
	for i, img := range []image.Image{imgs[0], imgs[2]} {
		b := img.Bounds()
		if b.Dx() != kt*(nt-1) || b.Dy() != kz*nCells {
			t.Errorf("map %d is %d×%d pixels, want %d×%d (%d intervals × %d, %d cells × %d)",
				i, b.Dx(), b.Dy(), kt*(nt-1), kz*nCells, nt-1, kt, nCells, kz)
		}
	}
	// Each pixel shows its cell and the values interpolated linearly in time
	// at the column centre, on the palette scale.
	lo, hi := valueRange(d.T...)
	for _, px := range [][2]int{{0, 0}, {kt*(nt-1) - 1, kz*nCells - 1}, {kt*3 + kt/2, kz*5 + 1}, {kt * 7, kz * 13}} {
		col, row := px[0], px[1]
		cell := row / kz
		tc := d.Times[0] + (float64(col)+0.5)*(d.Times[nt-1]-d.Times[0])/float64(kt*(nt-1))
		k := col / kt
		w := (tc - d.Times[k]) / (d.Times[k+1] - d.Times[k])
		for m, vals := range map[int][][]float64{0: d.T, 2: d.Cure} {
			v := (1-w)*vals[k][cell] + w*vals[k+1][cell]
			want := mapPalette[mapSteps]
			if !math.IsNaN(v) {
				if m == 0 {
					want = mapPalette[mapIndex(v, lo, hi)]
				} else {
					want = mapPalette[mapIndex(v, 0, 1)]
				}
			}
			if got := imgs[m].At(col, row); !sameColor(got, want) {
				t.Errorf("map %d pixel (%d, %d): cell %d at t = %g s: got %v, want %v (value %g)", m, col, row, cell, tc, got, want, v)
			}
		}
	}
	// The plate does not cure: its rows have the no-value colour on the cure map.
	if got := imgs[2].At(0, kz*nCells-1); !sameColor(got, noValueColor) {
		t.Errorf("cure map in the plate: %v, want the no-value colour", got)
	}
}

func sameColor(a, b interface{ RGBA() (r, g, b, a uint32) }) bool {
	r1, g1, b1, a1 := a.RGBA()
	r2, g2, b2, a2 := b.RGBA()
	return r1 == r2 && g1 == g2 && b1 == b2 && a1 == a2
}

func TestReportShowsFailedCriterion(t *testing.T) {
	c, r := runReportCase(t, "40 C") // the air is at 120 C: fails
	page := renderFromMemory(t, c, r)
	if s := results.Summarize(c, r); s.Status != results.StatusCriteriaFailed {
		t.Fatalf("status %q, want %q", s.Status, results.StatusCriteriaFailed)
	}
	for _, want := range []string{
		`<div class="alert" role="alert">`,
		"max_temperature FAILED:",
		`<tr class="fail"><td>max_temperature</td>`,
		failMark,
		`<span class="badge bad">✗ 1 criterion FAILED</span>`,
	} {
		if !strings.Contains(page, want) {
			t.Errorf("page of a failed run lacks %q", want)
		}
	}
	// min_cure passes and says so.
	if !strings.Contains(page, `<td>min_cure</td>`) || !strings.Contains(page, `<td class="pass">`+passMark+`</td>`) {
		t.Error("the passing criterion is not shown as passed")
	}

	c, r = runReportCase(t, "150 C")
	page = renderFromMemory(t, c, r)
	if strings.Contains(page, "FAILED") || strings.Contains(page, `class="alert"`) {
		t.Error("page of a passing run shows a failure")
	}
}

func TestReportSelfContained(t *testing.T) {
	fixedClock(t)
	c, r := runReportCase(t, "40 C")
	page := renderFromMemory(t, c, r)
	url := regexp.MustCompile(`(?i)(https?:|ftp:)//[^"'\s<>)]*`)
	for _, u := range url.FindAllString(page, -1) {
		if u != "http://www.w3.org/2000/svg" {
			t.Errorf("page refers to %s", u)
		}
	}
	for _, bad := range []string{"<script", "<link", "<iframe", "@import", "url(", "xlink:", "src="} {
		if strings.Contains(strings.ToLower(page), bad) {
			t.Errorf("page contains %q", bad)
		}
	}
	// The title is escaped, the cautions are there, the time stamp too.
	if !strings.Contains(page, "<h1>Report test: slab &lt;&amp;&gt; plate</h1>") {
		t.Error("title missing or not escaped")
	}
	for _, s := range check.Cautions(check.CautionScope{Curing: true}) {
		if !strings.Contains(page, htmlEscaped(s)) {
			t.Errorf("caution missing: %q", s)
		}
	}
	if !strings.Contains(page, "drawn 2030-01-02 03:04 UTC") {
		t.Error("no time stamp")
	}
}

// htmlEscaped escapes s as html/template does for text.
func htmlEscaped(s string) string {
	r := strings.NewReplacer("&", "&amp;", "<", "&lt;", ">", "&gt;", `"`, "&#34;", "'", "&#39;")
	return r.Replace(s)
}

// writeRunFiles runs the test case and writes its output files (and, until
// WriteRun records it, the gel point of the resin) into a temporary
// directory.
func writeRunFiles(t *testing.T, maxT string, gelPoint bool) (string, *cases.Case, *solver.Result) {
	t.Helper()
	c, r := runReportCase(t, maxT)
	dir := t.TempDir()
	if err := results.WriteRun(dir, c, r, results.Summarize(c, r)); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, results.SummaryFile)
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]json.RawMessage
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	if _, ok := m["gel_point"]; ok != gelPoint {
		if gelPoint {
			m["gel_point"] = json.RawMessage(`{"resin": 0.5}`)
		} else {
			delete(m, "gel_point")
		}
		b, _ = json.MarshalIndent(m, "", "  ")
		if err := os.WriteFile(path, b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return dir, c, r
}

func TestReportFromFilesEqualsFromMemory(t *testing.T) {
	fixedClock(t)
	for _, maxT := range []string{"40 C", "150 C"} {
		dir, c, r := writeRunFiles(t, maxT, true)
		if err := WriteReport(context.Background(), dir, c, r, results.Summarize(c, r)); err != nil {
			t.Fatal(err)
		}
		mem, err := os.ReadFile(filepath.Join(dir, ReportFile))
		if err != nil {
			t.Fatal(err)
		}
		if err := os.Remove(filepath.Join(dir, ReportFile)); err != nil {
			t.Fatal(err)
		}
		if err := RedrawReport(context.Background(), dir); err != nil {
			t.Fatal(err)
		}
		files, err := os.ReadFile(filepath.Join(dir, ReportFile))
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(mem, files) {
			i := 0
			for i < len(mem) && i < len(files) && mem[i] == files[i] {
				i++
			}
			lo := max(0, i-120)
			t.Errorf("max_temperature %s: report from the files differs from the report from memory at byte %d:\nmemory: %.240q\nfiles:  %.240q",
				maxT, i, mem[lo:], files[lo:])
		}
		if !strings.Contains(string(mem), "gel front (α = 0.5)") {
			t.Error("the gel front is not labelled on the cure map")
		}
	}
}

func TestRedrawReportWithoutGelPoint(t *testing.T) {
	fixedClock(t)
	dir, _, _ := writeRunFiles(t, "150 C", false)
	if err := RedrawReport(context.Background(), dir); err != nil {
		t.Fatal(err)
	}
	page, err := os.ReadFile(filepath.Join(dir, ReportFile))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(page), `The gel front of &#34;resin&#34; is not drawn`) || strings.Contains(string(page), "gel front (α") {
		t.Error("without a recorded gel point the page must say that the gel front is not drawn, and not draw it")
	}
}

func TestRedrawReportErrors(t *testing.T) {
	good, _, _ := writeRunFiles(t, "150 C", true)
	read := func(name string) string {
		b, err := os.ReadFile(filepath.Join(good, name))
		if err != nil {
			t.Fatal(err)
		}
		return string(b)
	}
	fields, probes, summary := read(results.FieldsFile), read(results.ProbesFile), read(results.SummaryFile)
	fieldLines := strings.SplitAfter(fields, "\n")
	replaceLine := func(s string, line int, from, to string) string {
		ls := strings.SplitAfter(s, "\n")
		ls[line-1] = strings.Replace(ls[line-1], from, to, 1)
		return strings.Join(ls, "")
	}
	badSummary := strings.Replace(summary, `"status"`, `"status" "`, 1)
	statusLine := 1 + strings.Count(badSummary[:strings.Index(badSummary, `"status"`)], "\n")
	for _, tc := range []struct {
		name   string
		file   string // file to replace ("" to remove fields.csv)
		text   string
		sent   error
		wantIn string
	}{
		{"missing fields", results.FieldsFile, "", cases.ErrFile, results.FieldsFile + ": missing"},
		{"bad number", results.FieldsFile, replaceLine(fields, 3, ",23,", ",2x3,"), ErrOutputFile, results.FieldsFile + `:3:`},
		{"wrong header", results.FieldsFile, strings.Replace(fields, "temperature_C", "temp_C", 1), ErrOutputFile, results.FieldsFile + `:1: no column "temperature_C"`},
		{"cut short", results.FieldsFile, strings.Join(fieldLines[:len(fieldLines)-3], ""), ErrOutputFile, "the last output time has 14 cells, want 16"},
		{"probe time", results.ProbesFile, replaceLine(probes, 3, "240,", "241,"), ErrOutputFile, results.ProbesFile + ":3:1: time_s: 241 s, but output time 2"},
		{"summary syntax", results.SummaryFile, badSummary, ErrOutputFile, results.SummaryFile + ":" + strconv.Itoa(statusLine) + ":"},
		{"summary type", results.SummaryFile, strings.Replace(summary, `"steps": `, `"steps": "x`, 1), ErrOutputFile, results.SummaryFile + ":"},
		{"not a summary", results.SummaryFile, `{"x": 1}`, ErrOutputFile, results.SummaryFile + ":1:1: status: missing"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			for name, text := range map[string]string{results.FieldsFile: fields, results.ProbesFile: probes, results.SummaryFile: summary} {
				if name == tc.file {
					text = tc.text
					if text == "" {
						continue
					}
				}
				if err := os.WriteFile(filepath.Join(dir, name), []byte(text), 0o644); err != nil {
					t.Fatal(err)
				}
			}
			err := RedrawReport(context.Background(), dir)
			if err == nil {
				t.Fatal("no error")
			}
			if !errors.Is(err, tc.sent) {
				t.Errorf("error %v does not wrap %v", err, tc.sent)
			}
			if !strings.Contains(err.Error(), tc.wantIn) {
				t.Errorf("error\n\t%v\nwant it to contain\n\t%s", err, tc.wantIn)
			}
			if _, err := os.Stat(filepath.Join(dir, ReportFile)); !os.IsNotExist(err) {
				t.Error("report.html written despite the error")
			}
		})
	}
}

func TestProfileTimes(t *testing.T) {
	times := []float64{0, 10, 20, 30, 40, 50, 60, 70, 80, 90, 100}
	// Nearest to 20, 40, 60, 80, 100 and to the peak at 37 (→ 40, already
	// there) or at 52 (→ 50, added): analytic.
	idx, pk := profileTimes(times, 37)
	if want := []int{2, 4, 6, 8, 10}; !equalInts(idx, want) || pk != 4 {
		t.Errorf("peak 37: got %v, %d; want %v, 4", idx, pk, want)
	}
	idx, pk = profileTimes(times, 52)
	if want := []int{2, 4, 5, 6, 8, 10}; !equalInts(idx, want) || pk != 5 {
		t.Errorf("peak 52: got %v, %d; want %v, 5", idx, pk, want)
	}
	idx, pk = profileTimes(times, math.NaN())
	if want := []int{2, 4, 6, 8, 10}; !equalInts(idx, want) || pk != -1 {
		t.Errorf("no peak: got %v, %d; want %v, -1", idx, pk, want)
	}
}

func equalInts(a, b []int) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

func TestNiceTicks(t *testing.T) {
	for _, tc := range []struct {
		lo, hi float64
		want   []string
	}{
		// Steps of 1, 2, 2.5, 5 × 10^k for about 6 ticks: analytic.
		{0, 1, []string{"0.0", "0.2", "0.4", "0.6", "0.8", "1.0"}},
		{23, 106.5, []string{"40", "60", "80", "100"}},
		{0, 4.64, []string{"0", "1", "2", "3", "4"}},
		{-0.3, 0.3, []string{"-0.3", "-0.2", "-0.1", "0.0", "0.1", "0.2", "0.3"}},
		{0, 15.6, []string{"0", "5", "10", "15"}},
	} {
		var got []string
		for _, tk := range (niceTicks{6}).Ticks(tc.lo, tc.hi) {
			if tk.Label != "" {
				got = append(got, tk.Label)
			}
		}
		if strings.Join(got, " ") != strings.Join(tc.want, " ") {
			t.Errorf("Ticks(%g, %g) labels %v, want %v", tc.lo, tc.hi, got, tc.want)
		}
	}
}

func TestFixSVGRejectsUnknownOutput(t *testing.T) {
	if _, err := fixSVG(`<svg width="1pt" height="1pt" viewBox="0 0 1 1"><image xlink:href="data:image/gif;base64,AA"/></svg>`, "x"); err == nil {
		t.Error("an image fixSVG does not know was accepted")
	}
	if _, err := fixSVG(`<p>no svg</p>`, "x"); err == nil {
		t.Error("output without <svg> accepted")
	}
}
