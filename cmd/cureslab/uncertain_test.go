package main

import (
	"encoding/json"

	"cureslab/cases/report"
	"cureslab/cases/results"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestRunUncertain(t *testing.T) {
	chdir(t)
	writeExample(t, "tile-on-spreader", "tile.toml")
	// Without [uncertainty]: refused before anything is written.
	if code, _, errs := cl(t, "run", "tile.toml", "--uncertain", "3", "-o", "none"); code != exitUsage || !strings.Contains(errs, "[uncertainty]") {
		t.Errorf("no [uncertainty]: exit %d, stderr %q; want 2 and a hint", code, errs)
	}
	if _, err := os.Stat("none"); !os.IsNotExist(err) {
		t.Errorf("the output directory was created for a refused run: %v", err)
	}

	text, err := os.ReadFile("tile.toml")
	if err != nil {
		t.Fatal(err)
	}
	text = append(text, "\n[uncertainty]\n\"top.h\" = \"±20 %\"\n"...)
	if err := os.WriteFile("tile-u.toml", text, 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errs := cl(t, "run", "tile-u.toml", "--uncertain", "4", "--seed", "3", "--no-report", "-o", "u")
	if code != exitOK {
		t.Fatalf("exit %d\nstdout:\n%s\nstderr:\n%s", code, out, errs)
	}
	b, err := os.ReadFile(filepath.Join("u", "uncertainty.csv"))
	if err != nil {
		t.Fatal(err)
	}
	// One header and one row per sample.
	if rows := strings.Count(strings.TrimSpace(string(b)), "\n") + 1; rows != 5 {
		t.Errorf("uncertainty.csv has %d lines, want 5:\n%s", rows, b)
	}
	var m map[string]json.RawMessage
	b, err = os.ReadFile(filepath.Join("u", "summary.json"))
	if err == nil {
		err = json.Unmarshal(b, &m)
	}
	if err != nil {
		t.Fatal(err)
	}
	if _, ok := m["uncertainty"]; !ok {
		t.Errorf("summary.json lacks the uncertainty object:\n%s", b)
	}
}

// TestRunUncertainVerdict: when fewer samples than [uncertainty] share meet
// the criteria, the terminal, summary.json, the report and the exit status
// all say that a criterion failed (uncertainty_share), even though the
// nominal run met every criterion.
func TestRunUncertainVerdict(t *testing.T) {
	chdir(t)
	// The oven potting meets its criteria nominally; its [uncertainty]
	// (film coefficients ±20 %, E2 ±0.3 kJ/mol) puts some of 8 samples
	// under min_cure, short of the 95 % required.
	writeExample(t, "thick-potting-oven", "pot.toml")
	code, out, errs := cl(t, "run", "pot.toml", "--uncertain", "8", "-o", "u")
	s := readSummary(t, "u")
	nominalOK := true
	var share *results.Verdict
	for i, v := range s.Criteria {
		if v.Name == results.CriterionShareMet {
			share = &s.Criteria[i]
		} else if !v.Pass {
			nominalOK = false
		}
	}
	if share == nil || !nominalOK {
		t.Fatalf("criteria %+v: want the nominal ones met and an uncertainty_share verdict", s.Criteria)
	}
	if share.Pass {
		t.Fatalf("every sample met the criteria (share %v): the test case no longer exercises a failing share", share.Value)
	}
	if code != exitCriteria || s.Status != results.StatusCriteriaFailed {
		t.Errorf("exit %d, summary.json status %q; want 1 and criteria-failed\n%s%s", code, s.Status, out, errs)
	}
	if !strings.Contains(out, "  status                       criteria-failed\n") || !strings.Contains(out, "FAILED uncertainty_share:") {
		t.Errorf("the terminal does not say criteria-failed:\n%s", out)
	}
	page, err := os.ReadFile(filepath.Join("u", report.ReportFile))
	if err != nil || !strings.Contains(string(page), "uncertainty_share FAILED") {
		t.Errorf("the report does not show the failed share (%v)", err)
	}
}
