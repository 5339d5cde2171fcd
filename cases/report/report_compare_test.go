package report

import (
	"bytes"
	"context"
	"cureslab/cases/results"
	"strings"
	"testing"
)

// comparedRows returns a comparison of two runs of the report's case, one
// meeting max_temperature and one failing it, and a third case that did
// not run with the given status.
func comparedRows(t *testing.T, notRun string) []results.Compared {
	t.Helper()
	c1, r1 := runReportCase(t, "150 C")
	c2, r2 := runReportCase(t, "40 C")
	return []results.Compared{
		{Name: "cool-limit", Case: c1, Ran: true, Result: r1, Summary: results.Summarize(c1, r1)},
		{Name: "tight-limit", Case: c2, Ran: true, Result: r2, Summary: results.Summarize(c2, r2)},
		{Name: "never-ran", Case: c2, Summary: results.Summary{Title: c2.Title, Status: notRun}},
	}
}

func TestWriteCompareReport(t *testing.T) {
	fixedClock(t)
	rows := comparedRows(t, results.StatusFailed)
	var b bytes.Buffer
	if err := CompareReport(context.Background(), &b, rows, "."); err != nil {
		t.Fatal(err)
	}
	page := b.String()
	figs := svgs(page)
	if len(figs) != 2 {
		t.Fatalf("%d figures, want 2 (histories, final profiles)", len(figs))
	}
	var texts []string
	for _, s := range figs {
		texts = append(texts, svgTexts(t, s)...)
	}
	for _, want := range []string{"time (min)", "temperature (°C)", "degree of cure (–)", "depth (mm)", "cool-limit", "tight-limit"} {
		found := false
		for _, s := range texts {
			found = found || s == want
		}
		if !found {
			t.Errorf("no text %q in the figures", want)
		}
	}
	for _, want := range []string{
		"<th>cool-limit</th><th>tight-limit</th><th>never-ran</th>",
		`<td>criterion max_temperature</td>`,
		`✓ pass</td><td class="fail">`,
		"tight-limit: ✗ max_temperature FAILED",
		"✗ never-ran did not run.",
		"<td>did not run</td>",
	} {
		if !strings.Contains(page, want) {
			t.Errorf("comparison page lacks %q", want)
		}
	}
	if err := CompareReport(context.Background(), &b, nil, "."); err == nil {
		t.Error("an empty comparison accepted")
	}
}
