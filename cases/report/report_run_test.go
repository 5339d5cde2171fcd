package report

import (
	"cureslab/cases/results"
	"testing"
)

// The banner of an interrupted run says it once: "The run was interrupted
// (Ctrl-C or SIGTERM); the outputs hold ...", as summary.json's message has
// it, not "interrupted: interrupted".
func TestRunAlertInterrupted(t *testing.T) {
	d := &runData{Summary: results.Summary{Status: results.StatusInterrupted,
		Message: "interrupted (Ctrl-C or SIGTERM); the outputs hold the state up to t = 8200.000 s (2.28 h)"}}
	got := runAlerts(d)
	want := "The run was interrupted (Ctrl-C or SIGTERM); the outputs hold the state up to t = 8200.000 s (2.28 h). The criteria are not judged."
	if len(got) != 1 || got[0] != want {
		t.Errorf("alerts %q, want [%q]", got, want)
	}
}
