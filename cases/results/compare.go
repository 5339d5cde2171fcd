package results

import (
	"cureslab/cases"
	"cureslab/cases/internal/num"
	"cureslab/cases/internal/textout"
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
var CompareHeader = []string{"case", "title", "status", "peak_temperature_C", "peak_depth_mm", "overshoot_K",
	"max_spread_K", "min_final_cure", "min_final_cure_depth_mm", "time_to_min_cure_s", "gel_time_first_s",
	"gel_time_last_s", "gel_front_spread_s", "energy_balance_error", "control_max_error_K"}

// Compared is one case of a comparison.
type Compared struct {
	Name string // output subdirectory under the comparison's directory
	Case *cases.Case
	// Ran reports that the case ran (perhaps stopping early: see the
	// summary's status) and Summary holds its values; false when it could
	// not start or was not started.
	Ran     bool
	Summary Summary
	// Result is the solver's result; nil when the case did not run.
	Result *solver.Result
	// Err says what went wrong: the run could not start, its outputs could
	// not be written, or it was not started (interrupted).
	Err error
}

// CompareNames returns the output subdirectory of each case: the base name
// of its file without the extension ("oven" for cases/oven.toml), made
// unique with a suffix -2, -3, ... in order when two cases share a name.
func CompareNames(cs []*cases.Case) []string {
	names := make([]string, len(cs))
	used := map[string]bool{CompareFile: true}
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

// WriteComparison writes dir/compare.csv (WriteFileAtomic): the header
// CompareHeader, then one row per case in the order of rows, with the
// values of summary.json as written there (null is an empty cell). A case
// that did not run has only its name, title and status.
func WriteComparison(dir string, rows []Compared) error {
	return textout.WriteFileAtomic(dir, CompareFile, func(w io.Writer) error {
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

// compareRow formats one row of compare.csv.
func compareRow(r Compared) []string {
	s := r.Summary
	row := []string{r.Name, s.Title, s.Status}
	if !r.Ran {
		return append(row, make([]string, len(CompareHeader)-len(row))...)
	}
	ctl := math.NaN()
	if s.ControlMaxErrorK != nil {
		ctl = float64(*s.ControlMaxErrorK)
	}
	return append(row,
		cmpNum(s.PeakTemperatureC), cmpNum(s.PeakDepthMM), cmpNum(s.OvershootK), cmpNum(s.MaxSpreadK),
		num.Sig(float64(s.MinFinalCure)), cmpNum(s.MinFinalCureDepthMM), cmpNum(s.TimeToMinCureS),
		cmpNum(s.GelTimeFirstS), cmpNum(s.GelTimeLastS), cmpNum(gelFrontSpread(s)),
		num.Sig(float64(s.EnergyBalanceError)), cmpNum(Float(ctl)))
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

// PrintComparison writes rows side by side for a terminal: the case titles,
// then one line per quantity with one column per case (peak temperature and
// where, overshoot, spread, least final cure and where, time to min_cure,
// gel times and the gel front spread, the control error under closed-loop
// heating, the energy balance), and a line for each case that did not run.
func PrintComparison(w io.Writer, rows []Compared) error {
	var b strings.Builder
	for _, r := range rows {
		fmt.Fprintf(&b, "  %s: %s\n", r.Name, r.Summary.Title)
	}
	tw := tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
	line := func(label string, f func(r Compared) string) {
		fmt.Fprintf(tw, "  %s", label)
		for _, r := range rows {
			v := "-"
			if r.Ran {
				v = f(r)
			}
			fmt.Fprintf(tw, "\t%s", v)
		}
		fmt.Fprintln(tw)
	}
	fmt.Fprintf(tw, " ")
	for _, r := range rows {
		fmt.Fprintf(tw, "\t%s", r.Name)
	}
	fmt.Fprintln(tw)
	status := func(r Compared) string { return r.Summary.Status }
	fmt.Fprintf(tw, "  status")
	for _, r := range rows {
		fmt.Fprintf(tw, "\t%s", status(r))
	}
	fmt.Fprintln(tw)
	unit := func(f Float, format, u string) string {
		if !OutOK(f) {
			return "n/a"
		}
		return fmt.Sprintf(format, float64(f)) + u
	}
	line("peak temperature", func(r Compared) string { return outT(r.Summary.PeakTemperatureC) + " C" })
	line("  at depth", func(r Compared) string { return outDepth(r.Summary.PeakDepthMM) + " mm" })
	line("overshoot", func(r Compared) string { return unit(r.Summary.OvershootK, "%+.1f", " K") })
	line("max spread (curing layers)", func(r Compared) string { return unit(r.Summary.MaxSpreadK, "%.1f", " K") })
	line("least final cure", func(r Compared) string { return outCure(r.Summary.MinFinalCure) })
	line("  at depth", func(r Compared) string { return outDepth(r.Summary.MinFinalCureDepthMM) + " mm" })
	line("time to min_cure", func(r Compared) string {
		switch {
		case OutOK(r.Summary.TimeToMinCureS):
			return outTime(r.Summary.TimeToMinCureS)
		case r.Case != nil && !math.IsNaN(r.Case.Criteria.MinCure) && OutOK(r.Summary.MinFinalCure):
			return "never"
		}
		return "n/a"
	})
	line("gel time, first cell", func(r Compared) string { return outTime(r.Summary.GelTimeFirstS) })
	line("gel time, last cell", func(r Compared) string { return outTime(r.Summary.GelTimeLastS) })
	line("gel front spread", func(r Compared) string { return outTime(gelFrontSpread(r.Summary)) })
	line("control: sensor off program", func(r Compared) string {
		if r.Summary.ControlMaxErrorK == nil {
			return "no control"
		}
		return unit(*r.Summary.ControlMaxErrorK, "%.2f", " K at most")
	})
	line("energy balance error", func(r Compared) string { return fmt.Sprintf("%.2g", float64(r.Summary.EnergyBalanceError)) })
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
	p := c.Problem
	if !cases.Controlled(p) {
		return math.NaN()
	}
	ctl := p.Volumetric.Control
	k := cases.SensorProbe(p.Probes, ctl.Sensor)
	if k < 0 || len(r.Snapshots) == 0 {
		return math.NaN()
	}
	worst := 0.0
	for i := range r.Snapshots {
		s := &r.Snapshots[i]
		worst = max(worst, math.Abs(ctl.Program.At(s.Time)-num.At(s.ProbeT, k)))
	}
	return worst
}
