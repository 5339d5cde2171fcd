package report

import (
	"cureslab/cases"
	"cureslab/cases/internal/num"
	"html/template"
	"io"
	"math"
	"strconv"
	"strings"
	"sync"
	"time"
)

// page is one self-contained HTML report: a header, an optional alert,
// sections of tables and figures, and the cautions (cases.Cautions) at the foot.
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

// renderPage writes p as one HTML document.
func renderPage(w io.Writer, p *page) error {
	p.Cautions = cases.Cautions()
	return pageTemplate().Execute(w, p)
}

// stamp formats the time a report is drawn: UTC, to the minute.
func stamp(t time.Time) string { return t.UTC().Format("2006-01-02 15:04 UTC") }

// pageTemplate is the shell of every report. The style is our own: a
// neutral system-font page, one accent colour, failed checks in bold with a
// symbol as well as colour. No script, no external resource.
var pageTemplate = sync.OnceValue(func() *template.Template {
	return template.Must(template.New("page").Parse(`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="generator" content="cureslab">
<title>{{.Title}} · cureslab {{.Kind}}</title>
<style>
:root { --ink:#1f2328; --soft:#57606a; --rule:#d0d7de; --pale:#f6f8fa; --accent:#2b4c7e;
  --fail:#a40e26; --failbg:#fff0f1; --pass:#1a5e36; }
* { box-sizing: border-box; }
body { margin: 0; color: var(--ink); background: #fff;
  font: 15px/1.45 system-ui, -apple-system, "Segoe UI", Roboto, "Helvetica Neue", Arial, "Liberation Sans", sans-serif; }
main { max-width: 980px; margin: 0 auto; padding: 24px 28px 40px; }
header { border-bottom: 3px solid var(--accent); padding-bottom: 10px; margin-bottom: 18px; }
h1 { font-size: 1.55em; line-height: 1.25; margin: 0 0 6px; }
h2 { font-size: 1.15em; margin: 30px 0 6px; color: var(--accent); }
.meta { color: var(--soft); font-size: .9em; }
.badge { display: inline-block; padding: 1px 9px; border-radius: 3px; font-weight: 600; font-size: .9em;
  border: 1px solid currentColor; margin-right: 8px; }
.badge.ok { color: var(--pass); }
.badge.bad { color: #fff; background: var(--fail); border-color: var(--fail); }
.alert { border: 2px solid var(--fail); background: var(--failbg); color: var(--fail); padding: 10px 14px;
  margin: 14px 0 4px; font-weight: 600; }
.alert p { margin: 2px 0; }
p.intro { margin: 0 0 10px; color: var(--soft); max-width: 48em; }
table { border-collapse: collapse; margin: 6px 0 4px; font-size: .93em; }
th, td { text-align: left; padding: 4px 14px 4px 0; border-bottom: 1px solid var(--rule); vertical-align: top; }
th { color: var(--soft); font-weight: 600; }
td.num { font-variant-numeric: tabular-nums; }
tr.fail td { color: var(--fail); font-weight: 700; background: var(--failbg); }
td.pass { color: var(--pass); font-weight: 600; }
td.fail { color: var(--fail); font-weight: 700; background: var(--failbg); }
.cols { display: flex; flex-wrap: wrap; gap: 8px 48px; }
figure { margin: 8px 0 0; }
figure svg { display: block; width: 100%; height: auto; }
figcaption { color: var(--soft); font-size: .88em; margin-top: 4px; max-width: 52em; }
footer { margin-top: 36px; border-top: 1px solid var(--rule); padding-top: 10px; font-size: .86em; color: var(--soft); }
footer ul { margin: 4px 0 8px; padding-left: 1.2em; }
@media print { main { max-width: none; padding: 0; } figure, table { break-inside: avoid; } h2 { break-after: avoid; } }
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
	b.WriteString("<table>\n<thead><tr>")
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
	b.WriteString("</tbody>\n</table>\n")
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

// Number formats of the report.
func fmtC(v float64) string { // a temperature, °C
	if math.IsNaN(v) {
		return "n/a"
	}
	return strconv.FormatFloat(v, 'f', 1, 64) + " °C"
}

func fmtK(v float64) string { // a temperature difference, K
	if math.IsNaN(v) {
		return "n/a"
	}
	return strconv.FormatFloat(v, 'f', 1, 64) + " K"
}

func fmtMM(v float64) string {
	if math.IsNaN(v) {
		return "n/a"
	}
	return strconv.FormatFloat(v, 'g', 4, 64) + " mm"
}

func fmtCure(v float64) string {
	if math.IsNaN(v) {
		return "n/a"
	}
	return strconv.FormatFloat(v, 'f', 3, 64)
}

func fmtTime(v float64) string {
	if math.IsNaN(v) {
		return "n/a"
	}
	return num.HumanTime(v)
}
