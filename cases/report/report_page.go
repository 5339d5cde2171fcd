package report

import (
	"bytes"
	"context"
	"cureslab/cases/check"
	"cureslab/cases/internal/num"
	"fmt"
	"html/template"
	"io"
	"strings"
	"sync"
	"time"
)

// page is one self-contained HTML report: a header, an optional alert,
// sections of tables and figures, and at the foot the cautions that apply
// to what the page shows (Scope).
// The run report fills it now; the compare and sweep reports fill it with
// their own sections.
type page struct {
	Title    string
	Kind     string // "run report", "comparison", "sweep"
	Drawn    string // time stamp
	Status   string // "" or a status word shown as a badge
	StatusOK bool
	Alerts   []string // shown in a framed box under the title (failed criteria, runaway)
	Sections []section
	// Scope selects the cautions at the foot of the page (check.Cautions).
	Scope    check.CautionScope
	Cautions []string
}

// section is a heading with a short text and its content (a table or a
// figure as trusted HTML built by this package).
type section struct {
	ID      string
	Heading string
	Intro   string
	Body    template.HTML
}

// renderPage writes p as one HTML document, unless ctx is done: then it
// returns ctx.Err() and writes nothing.
//
// Every page is drawn this way: its figures are drawn one after the other,
// ctx checked before each (each takes a fraction of a second: the maps are
// capped in pixels), and the page is assembled in memory and written in
// one go by the caller (staged in an output set, or a temporary file
// renamed into place), so an interrupted drawing leaves no page at all.
func renderPage(ctx context.Context, w io.Writer, p *page) error {
	if err := ctx.Err(); err != nil {
		return err
	}
	p.Cautions = check.Cautions(p.Scope)
	return pageTemplate().Execute(w, p)
}

// drawPage runs render, which draws a page into the writer it is given,
// and returns the page; or, as soon as ctx is done, returns ctx.Err()
// without waiting for it.
//
// Method: render runs on its own goroutine into a buffer of its own. It
// checks ctx before each figure (renderPage), but one figure of a large
// run (a thousand probes over thousands of output times) can keep gonum
// busy for seconds; so drawPage does not wait for it: the figure is left
// to finish in the background and its page is thrown away (render stops
// at its next check of ctx). Nothing reaches a file until the page is
// whole, so an interrupted page leaves nothing behind, and the command
// returns within moments of Ctrl-C. A panic in render becomes an error.
func drawPage(ctx context.Context, render func(w io.Writer) error) ([]byte, error) {
	type drawn struct {
		b   []byte
		err error
	}
	done := make(chan drawn, 1)
	go func() {
		var b bytes.Buffer
		defer func() {
			if r := recover(); r != nil {
				done <- drawn{nil, fmt.Errorf("drawing the page: %v", r)}
			}
		}()
		err := render(&b)
		done <- drawn{b.Bytes(), err}
	}()
	select {
	case d := <-done:
		return d.b, d.err
	case <-ctx.Done():
		return nil, ctx.Err()
	}
}

// stamp formats the time a report is drawn: UTC, to the minute.
func stamp(t time.Time) string { return t.UTC().Format("2006-01-02 15:04 UTC") }

// pageTemplate is the shell of every report. The look is our own, chosen
// for print and for readers with a colour-vision deficiency:
//
//   - Type: the text in a serif face for long reading on paper (Charter,
//     then the common serifs with the same role), headings, tables and
//     figure text in the sans face the plots are drawn with (Liberation
//     Sans and the faces with its metrics), so that a table's numbers read
//     like the axis labels next to it; figures in tables are tabular.
//   - Colour: a warm off-black ink (#1c1c1a, 17:1 on white) and a warm grey
//     (#4f4d47, 8.4:1) for secondary text, warm grey rules (#a09c92) dark
//     enough to survive a laser printer, a paper tint (#f4f1ea) behind table
//     heads; headings in a deep teal (#00565f, 8.4:1). Passed checks in
//     blue (#0b5394, 7.8:1), failed ones in dark vermillion (#a83200,
//     6.7:1, bold, on #fbeae0): blue against orange-red is the pair that
//     the common colour-vision deficiencies keep apart (Okabe & Ito, Color
//     Universal Design, 2008), and every result also carries a symbol and
//     a word (✓ pass, ✗ FAILED), so a grey print loses nothing.
//
// Contrast ratios are WCAG 2.x relative-luminance ratios against white
// (TestPaletteContrast). No script, no external resource.
var pageTemplate = sync.OnceValue(func() *template.Template {
	return template.Must(template.New("page").Parse(`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="generator" content="cureslab">
<title>{{.Title}} · cureslab {{.Kind}}</title>
<style>
:root { --ink:#1c1c1a; --soft:#4f4d47; --rule:#a09c92; --paper:#f4f1ea; --head:#00565f;
  --pass:#0b5394; --fail:#a83200; --failbg:#fbeae0;
  --text: Charter, "Bitstream Charter", "Sitka Text", Cambria, "Noto Serif", "Liberation Serif", "DejaVu Serif", Georgia, serif;
  --label: "Liberation Sans", Arimo, Arial, Helvetica, sans-serif; }
* { box-sizing: border-box; }
body { margin: 0; color: var(--ink); background: #fff; font: 16px/1.5 var(--text); }
main { max-width: 960px; margin: 0 auto; padding: 20px 32px 40px; }
header { border-bottom: 3px double var(--ink); padding-bottom: 8px; margin-bottom: 16px; }
h1 { font: 700 1.6em/1.2 var(--text); margin: 0 0 6px; }
h2 { font: 700 .95em/1.3 var(--label); text-transform: uppercase; letter-spacing: .06em; color: var(--head);
  margin: 30px 0 8px; padding-top: 6px; border-top: 1px solid var(--rule); }
header + section h2 { border-top: 0; padding-top: 0; }
.meta { color: var(--soft); font: .88em/1.4 var(--label); }
.badge { display: inline-block; padding: 0 8px; font-weight: 700; margin-right: 8px; border: 1.5px solid currentColor; }
.badge.ok { color: var(--pass); }
.badge.bad { color: var(--fail); background: var(--failbg); }
.alert { border-left: 6px solid var(--fail); background: var(--failbg); color: var(--fail); padding: 8px 14px;
  margin: 14px 0 4px; font: 700 .95em/1.45 var(--label); }
.alert p { margin: 2px 0; }
p.intro { margin: 0 0 10px; color: var(--soft); max-width: 46em; }
.wide { overflow-x: auto; max-width: 100%; }
table { border-collapse: collapse; margin: 6px 0 4px; font: .88em/1.4 var(--label); font-variant-numeric: tabular-nums; }
th, td { text-align: left; padding: 3px 16px 3px 0; vertical-align: top; }
thead th { background: var(--paper); border-bottom: 1.5px solid var(--ink); padding: 4px 16px 4px 6px; font-weight: 700; }
thead th:not(:first-child) { padding-left: 0; }
tbody td { border-bottom: 1px dotted var(--rule); }
tbody td:first-child { padding-left: 6px; }
tr.fail td { color: var(--fail); font-weight: 700; background: var(--failbg); }
td.pass { color: var(--pass); font-weight: 700; }
td.fail { color: var(--fail); font-weight: 700; background: var(--failbg); }
.cols { display: flex; flex-wrap: wrap; gap: 8px 40px; }
figure { margin: 8px 0 0; }
figure svg { display: block; width: 100%; height: auto; }
figcaption { color: var(--soft); font-size: .9em; margin-top: 4px; max-width: 50em; }
footer { margin-top: 34px; border-top: 3px double var(--ink); padding-top: 8px; font-size: .9em; }
footer strong { font: 700 .95em var(--label); text-transform: uppercase; letter-spacing: .06em; color: var(--head); }
footer ul { margin: 4px 0 8px; padding-left: 1.2em; }
@media print { body { font-size: 10.5pt; } main { max-width: none; padding: 0; }
  .wide { overflow: visible; } figure, table { break-inside: avoid; } h2 { break-after: avoid; } }
</style>
</head>
<body>
<main>
<header>
<h1>{{.Title}}</h1>
<div class="meta">{{if .Status}}<span class="badge {{if .StatusOK}}ok{{else}}bad{{end}}">{{.Status}}</span>{{end}}cureslab {{.Kind}} · drawn {{.Drawn}}</div>
{{if .Alerts}}<div class="alert" role="alert">{{range .Alerts}}<p>{{.}}</p>{{end}}</div>{{end}}
</header>
{{range .Sections}}<section{{if .ID}} id="{{.ID}}"{{end}}>
<h2>{{.Heading}}</h2>
{{if .Intro}}<p class="intro">{{.Intro}}</p>
{{end}}{{.Body}}
</section>
{{end}}<footer>
<strong>Cautions</strong>
<ul>{{range .Cautions}}
<li>{{.}}</li>{{end}}
</ul>
</footer>
</main>
</body>
</html>
`))
})

// tableHTML builds a table with a header row; a row whose first cell starts
// with "!" is marked failed, and so is any other cell that starts with "!"
// (the "!" is dropped). A cell that ends with passMark is marked passed.
// Cells are escaped.
func tableHTML(head []string, rows [][]string, numeric map[int]bool) template.HTML {
	var b strings.Builder
	b.WriteString("<div class=\"wide\"><table>\n<thead><tr>") // a table wider than the page scrolls on its own
	for _, h := range head {
		b.WriteString("<th>" + template.HTMLEscapeString(h) + "</th>")
	}
	b.WriteString("</tr></thead>\n<tbody>\n")
	for _, r := range rows {
		fail := len(r) > 0 && strings.HasPrefix(r[0], "!")
		if fail {
			b.WriteString(`<tr class="fail">`)
		} else {
			b.WriteString("<tr>")
		}
		for i, c := range r {
			if i == 0 && fail {
				c = c[1:]
			}
			cls := ""
			if numeric[i] {
				cls = ` class="num"`
			}
			if !fail && strings.HasSuffix(c, passMark) {
				cls = ` class="pass"`
			}
			if !fail && i > 0 && strings.HasPrefix(c, "!") {
				c, cls = c[1:], ` class="fail"`
			}
			b.WriteString("<td" + cls + ">" + template.HTMLEscapeString(c) + "</td>")
		}
		b.WriteString("</tr>\n")
	}
	b.WriteString("</tbody>\n</table></div>\n")
	return template.HTML(b.String())
}

// The words of a criterion's result: a symbol as well as the word, so the
// result does not rest on colour alone.
const (
	passMark = "✓ pass"
	failMark = "✗ FAILED"
)

// figureHTML wraps an inline SVG and its caption.
func figureHTML(svg, caption string) template.HTML {
	return template.HTML("<figure>\n" + svg + "\n<figcaption>" + template.HTMLEscapeString(caption) + "</figcaption>\n</figure>\n")
}

// Number formats of the report (internal/num, shared with the terminal).
func fmtC(v float64) string    { return num.TextC(v) }    // a temperature, °C
func fmtMM(v float64) string   { return num.TextMM(v) }   // a depth, mm
func fmtCure(v float64) string { return num.TextCure(v) } // a degree of cure
func fmtTime(v float64) string { return num.TextTime(v) } // a time given in s
