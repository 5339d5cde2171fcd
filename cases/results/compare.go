package results

import (
	"cureslab/cases"
	"cureslab/cases/internal/num"
	"cureslab/cases/outdir"
	"cureslab/solver"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strconv"
	"strings"
	"text/tabwriter"
)

// CompareFile is the table Compare writes into its output directory.
const CompareFile = "compare.csv"

// CompareHeader is the header row of compare.csv: the case (its output
// subdirectory), then summary.json fields, gel_front_spread_s =
// gel_time_last_s − gel_time_first_s, and control_max_error_K (empty for a
// case without closed-loop volumetric heating).
var CompareHeader = append([]string{"case", "title", "status"}, compareKeys...)

// compareKeys are the quantities of compare.csv, keys of Vocabulary (and
// GelFrontSpread), in their order.
var compareKeys = []string{"peak_temperature_C", "peak_depth_mm", "overshoot_K",
	"max_spread_K", "min_final_cure", "min_final_cure_depth_mm", "time_to_min_cure_s", "gel_time_first_s",
	"gel_time_last_s", GelFrontSpread.Key, "conservation_residual", "control_max_error_K"}

// Compared is one case of a comparison.
type Compared struct {
	Name string // output subdirectory under the comparison's directory
	Case *cases.Case
	// Ran reports that the case ran (perhaps stopping early: see the
	// summary's status) and Summary holds its values; false when it could
	// not start or was not started.
	Ran     bool
	Summary Summary
	// Result is the solver's result; nil when the case did not run. A run
	// whose snapshots were streamed to its files (package simulate) keeps
	// none in memory (Result.Snapshots nil): its fields are read back from
	// Dir.
	Result *solver.Result
	// Dir is the run's output directory; "" when it wrote none.
	Dir string
	// Err says what went wrong: the run could not start, its outputs could
	// not be written, or it was not started (interrupted).
	Err error
	// ReportNotDrawn reports that a report page was asked for but not
	// drawn because the context was cancelled first (Ctrl-C or SIGTERM,
	// during the run or while drawing): the run's other files are written
	// all the same, and an older page is not left beside them.
	ReportNotDrawn bool
}

// CompareNames returns the output subdirectory of each case: the base name
// of its file without the extension ("oven" for cases/oven.toml), made
// unique with a suffix -2, -3, ... in order when two cases share a name.
func CompareNames(cs []*cases.Case) []string {
	names := make([]string, len(cs))
	used := map[string]bool{}
	for _, n := range CompareKind.Names {
		used[n] = true
	}
	for i, c := range cs {
		base := strings.TrimSuffix(filepath.Base(c.File), filepath.Ext(c.File))
		if base == "" || base == "." || base == string(filepath.Separator) {
			base = "case"
		}
		name := base
		for k := 2; used[name]; k++ {
			name = fmt.Sprintf("%s-%d", base, k)
		}
		used[name] = true
		names[i] = name
	}
	return names
}

// StageComparison writes compare.csv into set, a comparison's output set
// (CompareKind; it goes in place at the set's Commit): the header
// CompareHeader, then one row per case in the order of rows, with the
// values of summary.json as written there (null is an empty cell). A case
// that did not run has only its name, title and status.
func StageComparison(set *outdir.Set, rows []Compared) error {
	return set.Stage(CompareFile, func(w io.Writer) error {
		cw := csv.NewWriter(w)
		if err := cw.Write(CompareHeader); err != nil {
			return err
		}
		for _, r := range rows {
			if err := cw.Write(compareRow(r)); err != nil {
				return err
			}
		}
		cw.Flush()
		return cw.Error()
	})
}

// CompareRowOf returns the row of compare.csv of a case that ran, named
// name, with summary s: what a comparison wrote for it, so that a folder
// read back can be matched to its row value for value.
func CompareRowOf(name string, s Summary) []string {
	return compareRow(Compared{Name: name, Ran: true, Summary: s})
}

// compareRow formats one row of compare.csv.
func compareRow(r Compared) []string {
	s := r.Summary
	row := []string{r.Name, s.Title, s.Status}
	if !r.Ran {
		return append(row, make([]string, len(CompareHeader)-len(row))...)
	}
	for _, k := range compareKeys {
		row = append(row, cmpNum(Float(Term(k).Value(&s))))
	}
	return row
}

// gelFrontSpread returns gel_time_last_s − gel_time_first_s, NaN when
// either is.
func gelFrontSpread(s Summary) Float {
	return Float(num.Round6(float64(s.GelTimeLastS) - float64(s.GelTimeFirstS)))
}

// cmpNum writes an already rounded summary value as the shortest decimal;
// NaN and ±Inf (null) give "".
func cmpNum(f Float) string {
	v := float64(f)
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return ""
	}
	return strconv.FormatFloat(v, 'f', -1, 64)
}

// ComparisonRows returns the table that the terminal (PrintComparison),
// the comparison page and the README show for cases side by side: a head
// row (an empty cell, then each case's name) and one row per quantity, its
// label from Vocabulary and one cell per case ("-" for a case that did not
// run, whose status says why: failed, or not-run): status, peak temperature, its depth and time, overshoot, largest
// spread, least final cure and its depth, mean final cure, time to
// min_cure, first and last gel time, gel front spread, lowest final Tg,
// sensor off its program, end time and conservation residual.
func ComparisonRows(rows []Compared) [][]string {
	head := []string{""}
	for _, r := range rows {
		head = append(head, r.Name)
	}
	out := [][]string{head}
	line := func(label string, f func(r Compared) string) {
		row := []string{label}
		for _, r := range rows {
			v := "-"
			if r.Ran {
				v = f(r)
			}
			row = append(row, v)
		}
		out = append(out, row)
	}
	quantity := func(key string, format func(float64) string) {
		line(Label(key), func(r Compared) string { return format(Term(key).Value(&r.Summary)) })
	}
	status := []string{"status"}
	for _, r := range rows {
		status = append(status, r.Summary.Status)
	}
	out = append(out, status)
	quantity("peak_temperature_C", num.TextC)
	quantity("peak_depth_mm", num.TextMM)
	quantity("peak_time_s", num.TextTime)
	quantity("overshoot_K", func(v float64) string {
		if math.IsNaN(v) {
			return "n/a"
		}
		return fmt.Sprintf("%+.1f K", v)
	})
	quantity("max_spread_K", num.TextK)
	quantity("min_final_cure", num.TextCure)
	quantity("min_final_cure_depth_mm", num.TextMM)
	quantity("mean_final_cure", num.TextCure)
	line(Label("time_to_min_cure_s"), func(r Compared) string {
		switch {
		case r.Summary.TimeToMinCureS.Known():
			return num.TextTime(float64(r.Summary.TimeToMinCureS))
		case minCureSet(r.Summary) && r.Summary.MinFinalCure.Known() && r.Summary.Status == StatusInterrupted:
			return "not reached (interrupted)"
		case minCureSet(r.Summary) && r.Summary.MinFinalCure.Known():
			return "not reached by the end"
		}
		return "n/a"
	})
	quantity("gel_time_first_s", num.TextTime)
	quantity("gel_time_last_s", num.TextTime)
	quantity(GelFrontSpread.Key, num.TextTime)
	quantity("min_final_glass_transition_C", num.TextC)
	line(Label("control_max_error_K"), func(r Compared) string {
		if r.Summary.ControlMaxErrorK == nil {
			return "no control"
		}
		return fmt.Sprintf("%.2f K at most", float64(*r.Summary.ControlMaxErrorK))
	})
	quantity("end_time_s", num.TextTime)
	quantity("conservation_residual", func(v float64) string { return strconv.FormatFloat(v, 'g', 2, 64) })
	return out
}

// PrintComparison writes the cases side by side for a terminal: their
// titles, the table of ComparisonRows, and a line for each case that did
// not run.
func PrintComparison(w io.Writer, rows []Compared) error {
	var b strings.Builder
	for _, r := range rows {
		fmt.Fprintf(&b, "  %s: %s\n", r.Name, r.Summary.Title)
	}
	tw := tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
	for _, row := range ComparisonRows(rows) {
		fmt.Fprintf(tw, "  %s\n", strings.Join(row, "\t"))
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	for _, r := range rows {
		if r.Err != nil {
			fmt.Fprintf(&b, "%s: %v\n", r.Name, r.Err)
		}
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// comparisonMarkdown writes the table of ComparisonRows as a Markdown
// table (the README shows the demo's).
func comparisonMarkdown(w io.Writer, rows []Compared) error {
	var b strings.Builder
	for i, row := range ComparisonRows(rows) {
		cells := make([]string, len(row))
		for j, c := range row {
			cells[j] = strings.ReplaceAll(c, "|", "\\|")
		}
		fmt.Fprintf(&b, "| %s |\n", strings.Join(cells, " | "))
		if i == 0 {
			b.WriteString("|" + strings.Repeat("---|", len(row)) + "\n")
		}
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// ControlError returns the largest |program(t) − T_sensor(t)|, in K, over
// the snapshots of r (the output times, t = 0 included) of a case under
// closed-loop volumetric heating, reading the sensor from the probe at its
// depth (Load adds one when the case has none there). The controller samples
// more often than the snapshots; this is the deviation a reader of
// probes.csv sees.
//
// It is NaN when c is not under control, when no probe lies at the sensor
// (a case not made by Load), or when r has no snapshot. Cost: one pass over
// the snapshots.
func ControlError(c *cases.Case, r *solver.Result) float64 {
	ct := newControlTrack(c)
	for i := range r.Snapshots {
		ct.add(&r.Snapshots[i])
	}
	return ct.value()
}

// controlTrack accumulates ControlError over the snapshots of a run as
// they come, in constant memory.
type controlTrack struct {
	at    func(t float64) float64 // the control program, K; nil when not controlled
	k     int                     // the probe at the sensor
	worst float64
	seen  bool
}

func newControlTrack(c *cases.Case) controlTrack {
	p := c.Problem
	if !cases.Controlled(p) {
		return controlTrack{}
	}
	ctl := p.Volumetric.Control
	k := cases.SensorProbe(p.Probes, ctl.Sensor)
	if k < 0 {
		return controlTrack{}
	}
	return controlTrack{at: ctl.Program.At, k: k}
}

func (ct *controlTrack) add(s *solver.Snapshot) {
	if ct.at == nil {
		return
	}
	ct.seen = true
	ct.worst = max(ct.worst, math.Abs(ct.at(s.Time)-num.At(s.ProbeT, ct.k)))
}

// value is ControlError of the snapshots added: NaN when not controlled or
// when none was added.
func (ct *controlTrack) value() float64 {
	if !ct.seen {
		return math.NaN()
	}
	return ct.worst
}
