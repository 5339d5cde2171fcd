package report

import (
	"cureslab/cases"
	"cureslab/solver"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestWriteCompareReport(t *testing.T) {
	fixedClock(t)
	c1, r1 := runReportCase(t, "150 C")
	c2, r2 := runReportCase(t, "40 C")
	dir := t.TempDir()
	names := []string{"cool-limit", "tight-limit", "never-ran"}
	err := WriteCompareReport(dir, names, []*cases.Case{c1, c2, c2}, []*solver.Result{r1, r2, nil})
	if err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(filepath.Join(dir, CompareReportFile))
	if err != nil {
		t.Fatal(err)
	}
	page := string(b)
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
	if err := WriteCompareReport(dir, names[:1], []*cases.Case{c1, c2}, []*solver.Result{r1, r2}); err == nil {
		t.Error("mismatched lengths accepted")
	}
}
