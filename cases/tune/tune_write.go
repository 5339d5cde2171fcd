package tune

import (
	"cureslab/cases"
	"cureslab/cases/internal/num"
	"cureslab/cases/internal/textout"
	"cureslab/cases/results"
	"cureslab/cases/tomltext"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"
	"text/tabwriter"
)

// Files of `tune`.
const (
	TunedFile = "tuned.toml" // the recommended [schedules.NAME] block
	TuneFile  = "tune.csv"   // every evaluated candidate
)

// block writes the [schedules.NAME] block of candidate b as TOML.
func (t *tuner) block(b *Candidate) string {
	_, vals := t.shown(b.x)
	tr := t.tree(vals)
	s, _ := tr["schedules"].(map[string]any)
	p, _ := s[t.prog].(map[string]any)
	var w strings.Builder
	fmt.Fprintf(&w, "[schedules.%s]\n", tomlKey(t.prog))
	if v, ok := p["start"]; ok {
		fmt.Fprintf(&w, "start = %s\n", tomlValue(v))
	}
	switch {
	case p["segments"] != nil:
		segs, _ := p["segments"].([]any)
		w.WriteString("segments = [\n")
		for _, sv := range segs {
			seg, _ := sv.(map[string]any)
			var parts []string
			for _, k := range []string{"ramp", "to", "hold"} {
				if v, ok := seg[k]; ok {
					parts = append(parts, k+" = "+tomlValue(v))
				}
			}
			fmt.Fprintf(&w, "  { %s },\n", strings.Join(parts, ", "))
		}
		w.WriteString("]\n")
	case p["points"] != nil:
		pts, _ := p["points"].([]any)
		w.WriteString("points = [\n")
		for _, pv := range pts {
			fmt.Fprintf(&w, "  %s,\n", tomlValue(pv))
		}
		w.WriteString("]\n")
	}
	return w.String()
}

// tomlKey quotes a key that is not a bare TOML key.
func tomlKey(k string) string {
	for i := 0; i < len(k); i++ {
		if !tomltext.IsBare(k[i]) {
			return strconv.Quote(k)
		}
	}
	if k == "" {
		return `""`
	}
	return k
}

// tomlValue writes a decoded TOML value (string, number, boolean, array).
func tomlValue(v any) string {
	switch x := v.(type) {
	case string:
		return strconv.Quote(x)
	case int64:
		return strconv.FormatInt(x, 10)
	case float64:
		s := strconv.FormatFloat(x, 'g', -1, 64)
		if !strings.ContainsAny(s, ".eEn") { // keep it a float: 2 -> 2.0
			s += ".0"
		}
		return s
	case bool:
		return strconv.FormatBool(x)
	case []any:
		parts := make([]string, len(x))
		for i, e := range x {
			parts[i] = tomlValue(e)
		}
		return "[" + strings.Join(parts, ", ") + "]"
	}
	return strconv.Quote(fmt.Sprint(v))
}

// Write writes the outcome of Tune into dir, creating it if needed:
// tune.csv, one row per evaluated candidate (candidate, phase, the free
// values as they went into the case, cycle_time_s, time_end_s, for each
// criterion of the case its value and margin — min_cure, min_cure_margin,
// max_temperature_C, max_temperature_margin_K, max_spread_K,
// max_spread_margin_K — then share_met, feasible, status, error), and, when
// a feasible program was found, tuned.toml: the [schedules.NAME] block
// ready to paste, headed by comments with its cycle time and margins. With
// --robust the values and margins are those met by the required share of
// samples. Each file is written atomically.
func Write(dir string, r *Result) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	if err := textout.WriteFileAtomic(dir, TuneFile, func(w io.Writer) error { return writeTuneCSV(w, r) }); err != nil {
		return fmt.Errorf("writing %s: %w", TuneFile, err)
	}
	if r.Best == nil {
		return nil
	}
	if err := textout.WriteFileAtomic(dir, TunedFile, func(w io.Writer) error {
		_, err := io.WriteString(w, tunedText(r))
		return err
	}); err != nil {
		return fmt.Errorf("writing %s: %w", TunedFile, err)
	}
	return nil
}

// tunedText is the content of tuned.toml.
func tunedText(r *Result) string {
	var b strings.Builder
	if r.Interrupted {
		b.WriteString("# INTERRUPTED: the search was stopped (Ctrl-C or SIGTERM) before it finished.\n")
		b.WriteString("# This is the best program found so far, not the answer: run tune again.\n")
	}
	b.WriteString("# Recommended by cureslab tune: the shortest program found that meets every\n")
	fmt.Fprintf(&b, "# criterion of %s. A simulation is no substitute for a qualified trial.\n", r.File)
	fmt.Fprintf(&b, "# Cycle time %s", num.Duration(r.Best.Cycle))
	if r.Own != nil && !math.IsNaN(r.Own.Cycle) {
		fmt.Fprintf(&b, "; the case's own program: %s", num.HumanTime(r.Own.Cycle))
	}
	b.WriteString(".\n")
	if r.Robust > 0 {
		fmt.Fprintf(&b, "# Robust: every criterion met in %.1f %% of %d samples of [uncertainty] (required %.1f %%).\n",
			100*r.Best.ShareMet, r.Robust, 100*r.Share)
	}
	if r.Robust > 0 {
		fmt.Fprintf(&b, "# %s.\n", robustValuesText(r))
	}
	for _, m := range r.Best.Criteria {
		fmt.Fprintf(&b, "# %s: %s (limit %s, margin %s)\n", m.Name, marginValue(m.Name, m.Value), marginValue(m.Name, m.Limit), marginText(m))
	}
	if !math.IsNaN(r.EndOffset) {
		fmt.Fprintf(&b, "# The case sets time.end: set it to %s s (the program's end + %s s).\n",
			num.SecondsUp(r.Best.Cycle+r.EndOffset), num.Seconds(r.EndOffset))
	}
	b.WriteString(r.Block)
	return b.String()
}

// marginValue writes a criterion value in its unit.
func marginValue(name string, v float64) string {
	if math.IsNaN(v) {
		return "n/a"
	}
	switch name {
	case results.CriterionMinCure:
		return strconv.FormatFloat(v, 'f', 4, 64)
	case results.CriterionMaxTemperature:
		return strconv.FormatFloat(v, 'f', 2, 64) + " °C"
	}
	return strconv.FormatFloat(v, 'f', 2, 64) + " K"
}

// marginText writes a margin with its sign and unit.
func marginText(m Margin) string {
	if math.IsInf(m.Margin, -1) {
		return "none (runaway or failed)"
	}
	if math.IsInf(m.Margin, 1) {
		return "n/a"
	}
	if m.Name == results.CriterionMinCure {
		if math.Abs(m.Margin) < 1e-3 && m.Margin != 0 {
			return fmt.Sprintf("%+.2g", m.Margin)
		}
		return fmt.Sprintf("%+.4f", m.Margin)
	}
	s := strconv.FormatFloat(m.Margin, 'f', 2, 64) + " K"
	if m.Margin >= 0 {
		s = "+" + s
	}
	return s
}

// csvNames are the column names of each criterion's value and margin.
var csvNames = map[string][2]string{
	results.CriterionMinCure:        {"min_cure", "min_cure_margin"},
	results.CriterionMaxTemperature: {"max_temperature_C", "max_temperature_margin_K"},
	results.CriterionMaxSpread:      {"max_spread_K", "max_spread_margin_K"},
}

func writeTuneCSV(w io.Writer, r *Result) error {
	h := []string{"candidate", "phase"}
	for _, fv := range r.Free {
		h = append(h, fv.Key)
	}
	h = append(h, "cycle_time_s", "time_end_s")
	var crit []string
	if r.Own != nil {
		for _, m := range r.Own.Criteria {
			crit = append(crit, m.Name)
			n := csvNames[m.Name]
			h = append(h, n[0], n[1])
		}
	}
	h = append(h, "share_met", "feasible", "status", "error")
	cw := csv.NewWriter(w)
	cw.Write(h)
	num := func(x float64) string {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return ""
		}
		return strconv.FormatFloat(num.RoundSig(x), 'g', -1, 64)
	}
	for _, c := range r.Candidates {
		rec := []string{strconv.Itoa(c.Index), c.Phase}
		rec = append(rec, c.Values...)
		end := ""
		if !math.IsNaN(c.Cycle) {
			end = num(c.End)
		}
		rec = append(rec, num(c.Cycle), end)
		for j := range crit {
			if j < len(c.Criteria) {
				rec = append(rec, num(c.Criteria[j].Value), num(c.Criteria[j].Margin))
			} else {
				rec = append(rec, "", "")
			}
		}
		rec = append(rec, num(c.ShareMet), strconv.FormatBool(c.Feasible), c.Status, cases.OneLine(c.Err))
		cw.Write(rec)
	}
	cw.Flush()
	return cw.Error()
}

// Print writes the outcome of Tune for a terminal: the free values (the
// case's and the tuned), the cycle time and the saving against the case's
// own program, each criterion's value and margin, and the limiting
// criterion; or, when nothing met the criteria, the candidate that came
// closest.
func Print(w io.Writer, r *Result) error {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	mode := "nominal case"
	if r.Robust > 0 {
		mode = fmt.Sprintf("robust: criteria must hold in at least %.0f %% of %d samples of [uncertainty]", 100*r.Share, r.Robust)
	}
	fmt.Fprintf(tw, "tune %s, program %s (%s): %d candidates, %d runs, seed %d\n",
		r.File, r.Program, mode, len(r.Candidates), r.Runs, r.Seed)
	show := r.Best
	if show == nil {
		show = r.Closest
	}
	fmt.Fprintf(tw, "  free value\trange\tcase\ttuned\t\n")
	for j, fv := range r.Free {
		tuned := "n/a"
		if show != nil {
			tuned = show.Values[j]
		}
		note := ""
		for _, k := range r.AtBound {
			if k == fv.Key {
				note = "at its bound"
			}
		}
		fmt.Fprintf(tw, "  %s\t%s .. %s\t%s\t%s\t%s\n", fv.Key, fv.From, fv.To, fv.Case, tuned, note)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	if r.Best == nil {
		fmt.Fprintf(w, "NO PROGRAM in the ranges meets every criterion")
		if r.Robust > 0 {
			fmt.Fprintf(w, " in %.0f %% of the samples", 100*r.Share)
		}
		fmt.Fprintln(w, ".")
		if r.Closest != nil {
			fmt.Fprintf(w, "closest (shown above as tuned): cycle %s\n", cycleText(r.Closest.Cycle))
			printMargins(w, r.Closest)
		}
		return nil
	}
	fmt.Fprintf(w, "cycle time %s", cycleText(r.Best.Cycle))
	if o := r.Own; o != nil && !math.IsNaN(o.Cycle) {
		save := o.Cycle - r.Best.Cycle
		if save >= 0 {
			fmt.Fprintf(w, " against %s for the case's own program: saving %s (%.1f %%)", num.HumanTime(o.Cycle),
				num.HumanTime(save), 100*save/o.Cycle)
		} else {
			fmt.Fprintf(w, ", %s (%.1f %%) longer than the case's own program (%s)", num.HumanTime(-save),
				-100*save/o.Cycle, num.HumanTime(o.Cycle))
		}
		if !o.Feasible {
			fmt.Fprintf(w, "; the case's own program does not meet the criteria")
			if r.Robust > 0 {
				fmt.Fprintf(w, " in %.0f %% of the samples (only in %.0f %%)", 100*r.Share, 100*o.ShareMet)
			}
		}
	}
	fmt.Fprintln(w)
	if r.Robust > 0 {
		fmt.Fprintf(w, "%s:\n", robustValuesText(r))
	}
	printMargins(w, r.Best)
	if len(r.Limiting) > 0 {
		at := ""
		if r.Robust > 0 {
			at = fmt.Sprintf(" in the sample at the required share, %s", marginValue(r.Best.Critical.Name, r.Best.Critical.Value))
		}
		first := fmt.Sprintf("%s (margin %s%s)", r.Best.Critical.Name, marginText(r.Best.Critical), at)
		if r.Active {
			parts := []string{first}
			for _, name := range r.Limiting[1:] {
				for _, m := range r.Best.Criteria {
					if m.Name == name {
						parts = append(parts, fmt.Sprintf("%s (margin %s)", name, marginText(m)))
					}
				}
			}
			fmt.Fprintf(w, "limiting criterion: %s\n", strings.Join(parts, ", "))
		} else {
			fmt.Fprintf(w, "no criterion is at its limit (closest: %s)", first)
			if len(r.AtBound) > 0 {
				fmt.Fprintf(w, ": the ranges limit the program (%s)", strings.Join(r.AtBound, ", "))
			}
			fmt.Fprintln(w)
		}
	}
	if !math.IsNaN(r.EndOffset) {
		fmt.Fprintf(w, "the case sets time.end: with this program set it to %s s\n", num.SecondsUp(r.Best.Cycle+r.EndOffset))
	}
	return nil
}

// robustValuesText says what a criterion's value means under --robust:
// each criterion on its own, the value that the required number of samples
// meet or better (the aggregate in evaluate).
func robustValuesText(r *Result) string {
	need := int(math.Ceil(r.Share*float64(r.Robust) - 1e-9))
	return fmt.Sprintf("each criterion's value is the one that %d of the %d samples meet or better (taken criterion by criterion)", need, r.Robust)
}

func cycleText(c float64) string {
	if math.IsNaN(c) {
		return "n/a"
	}
	return num.Duration(c)
}

func printMargins(w io.Writer, c *Candidate) {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	for _, m := range c.Criteria {
		op := "<="
		if m.Name == results.CriterionMinCure {
			op = ">="
		}
		fmt.Fprintf(tw, "  criterion %s\t%s\t%s %s\tmargin %s\n", m.Name, marginValue(m.Name, m.Value), op, marginValue(m.Name, m.Limit), marginText(m))
	}
	tw.Flush()
}
