package results

import (
	"encoding/json"
	"fmt"
	"strings"
)

// Files of a sweep directory.
const (
	// SweepSummaryFile is the table of every run (README, Case file reference).
	SweepSummaryFile = "summary.csv"
	// SweepDefinitionFile records what the sweep is; resuming or merging
	// checks it.
	SweepDefinitionFile = "sweep.json"
	// SweepJournalFile holds the committed rows, one appended (and synced)
	// per finished run, in the order they finished.
	SweepJournalFile = "journal.csv"
	// SweepLogFile records when, where and how long each run ran.
	SweepLogFile = "sweep.log"
	// SweepRunsDir holds the output files of each run with KeepFields,
	// in RUNS/NNNNN/.
	SweepRunsDir = "runs"
)

// SweepColumns are the summary columns of summary.csv after the varied
// keys, named by the keys of Vocabulary (summary.json's), in this order.
// Criteria come next as min_cure_pass, max_temperature_pass,
// max_spread_pass, min_flow_window_pass ("true", "false", or empty when the case does not set
// the criterion), then status, error, and note (what the run changed
// beyond its values, such as a probe below a thinner stack left out; see
// cases.Case.Notes).
var SweepColumns = sweepColumns("peak_temperature_C", "peak_time_s", "peak_depth_mm", "overshoot_K",
	"heating_lag_K", "cooling_lag_K",
	"max_spread_K", "min_final_cure", "min_final_cure_depth_mm", "mean_final_cure", "time_to_min_cure_s",
	"gel_time_first_s", "gel_time_last_s", "min_final_glass_transition_C",
	"min_viscosity_Pa_s", "flow_window_s", // empty without a viscosity law
	"conservation_residual", "steps", "end_time_s")

// SweepColumnsAdded are the columns of summary.csv (and of a sweep's
// journal) that later versions added to the first layout: all three are
// empty for a case without a viscosity law and without min_flow_window,
// so the runs of an earlier journal of such a case are kept, with those
// columns empty, when the sweep is resumed.
var SweepColumnsAdded = []string{"min_viscosity_Pa_s", "flow_window_s", "min_flow_window_pass"}

// SweepColumn is one summary column of summary.csv.
type SweepColumn struct {
	Name string
	Get  func(*Summary) string // the value as summary.json writes it; "" for null
}

// sweepColumns returns the columns of the quantities with the given keys.
func sweepColumns(keys ...string) []SweepColumn {
	out := make([]SweepColumn, len(keys))
	for i, k := range keys {
		q := Term(k)
		out[i] = SweepColumn{Name: k, Get: func(s *Summary) string { return csvFloat(Float(q.Value(s))) }}
	}
	return out
}

// SweepCriteria are the criteria columns, in order.
var SweepCriteria = []string{CriterionMinCure, CriterionMaxTemperature, CriterionMaxSpread, CriterionMinFlowWindow}

// csvFloat writes a summary value as summary.json does; null is empty.
func csvFloat(f Float) string {
	b, err := f.MarshalJSON()
	if err != nil || string(b) == "null" {
		return ""
	}
	return string(b)
}

// SweepHeader is the header of summary.csv for the varied keys.
func SweepHeader(keys []string) []string {
	h := append([]string{"run"}, keys...)
	for _, c := range SweepColumns {
		h = append(h, c.Name)
	}
	for _, c := range SweepCriteria {
		h = append(h, c+"_pass")
	}
	return append(h, "status", "error", "note")
}

// SweepStatusCol returns the index of the status column of a summary.csv
// header (status, error and note end it).
func SweepStatusCol(header []string) int { return len(header) - 3 }

// SweepDef is the content of sweep.json: what defines a sweep, and nothing
// that depends on where or how it runs, so that every shard of one sweep
// writes the same bytes.
type SweepDef struct {
	Format     string    `json:"format"`
	CaseSHA256 string    `json:"case_sha256"`
	Mode       string    `json:"mode"`
	Samples    int       `json:"samples,omitempty"`
	Seed       *uint64   `json:"seed,omitempty"`
	Vary       []VaryDef `json:"vary"`
	Runs       int       `json:"runs"`
	RunsSHA256 string    `json:"runs_sha256"`
}

type VaryDef struct {
	Key    string   `json:"key"`
	Values []string `json:"values,omitempty"`
	From   string   `json:"from,omitempty"`
	To     string   `json:"to,omitempty"`
}

const SweepFormat = "cureslab-sweep-1"

// differs says how the sweep.json b differs from a (both valid), for a
// message: "the case file differs", ...
func DefDiff(a, b []byte) string {
	var x, y SweepDef
	if json.Unmarshal(a, &x) != nil || json.Unmarshal(b, &y) != nil || x.Format != y.Format {
		return "it was written in another format"
	}
	var why []string
	if x.CaseSHA256 != y.CaseSHA256 {
		why = append(why, "the case file differs")
	}
	if x.Mode != y.Mode || x.Samples != y.Samples || (x.Seed == nil) != (y.Seed == nil) || x.Seed != nil && *x.Seed != *y.Seed {
		why = append(why, "the mode, samples or seed differ")
	}
	xk, yk := make([]string, len(x.Vary)), make([]string, len(y.Vary))
	for i, v := range x.Vary {
		xk[i] = v.Key
	}
	for i, v := range y.Vary {
		yk[i] = v.Key
	}
	if strings.Join(xk, "\x00") != strings.Join(yk, "\x00") {
		why = append(why, fmt.Sprintf("the varied keys differ (%s against %s)", strings.Join(xk, ", "), strings.Join(yk, ", ")))
	} else if x.RunsSHA256 != y.RunsSHA256 || x.Runs != y.Runs {
		why = append(why, "the varied values differ")
	}
	if len(why) == 0 {
		return "its definition differs"
	}
	return strings.Join(why, "; ")
}
