package results

import (
	"bytes"
	"cureslab/cases"
	"cureslab/cases/internal/num"
	"cureslab/solver"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"text/tabwriter"
)

// The statuses of a run as written in summary.json (README, Case file reference).
const (
	StatusOK             = "ok"
	StatusCriteriaFailed = "criteria-failed"
	StatusRunaway        = "runaway"
	StatusFailed         = "failed"
	StatusInterrupted    = "interrupted"
	// StatusNotRun is the status in compare.csv of a case that was never
	// started (Ctrl-C or SIGTERM came before its turn); no summary.json
	// ever holds it.
	StatusNotRun = "not-run"
)

// Names of the acceptance criteria, as written in [criteria].
const (
	CriterionMinCure        = "min_cure"
	CriterionMaxTemperature = "max_temperature"
	CriterionMaxSpread      = "max_spread"
	// CriterionShareMet is the criterion that run --uncertain adds: the
	// share of samples that met every criterion must reach [uncertainty]
	// share.
	CriterionShareMet      = "uncertainty_share"
	CriterionMinFlowWindow = "min_flow_window"
)

// Verdict is the judgement of one acceptance criterion. Value and Limit are
// in the units of the summary: dimensionless for min_cure, °C for
// max_temperature, K for max_spread. Value is NaN when the quantity does not
// exist in the case (max_spread or min_cure without a curing layer); such a
// criterion holds vacuously.
//
// Unjudged marks a criterion of a run that was interrupted: its value is
// what the run had reached, which says nothing about the finished part, so
// it is neither passed nor failed (Pass false, null in summary.json).
type Verdict struct {
	Name         string
	Value, Limit float64
	Pass         bool
	Unjudged     bool
}

// Judge returns the verdicts of the criteria that c sets, in the order
// min_cure, max_temperature, max_spread, min_flow_window:
//
//	min_cure:        min final cure over curing cells ≥ limit
//	max_temperature: peak cell temperature           ≤ limit
//	max_spread:      largest spread in curing layers ≤ limit
//	min_flow_window: flow window (s)                 ≥ limit
//
// The comparison is made in SI units on the solver's values, before any
// rounding for display. A run that stopped early is judged on what it
// reached (its status, not the verdicts, decides the outcome then), except
// an interrupted run, whose criteria are not judged (Unjudged).
func Judge(c *cases.Case, r *solver.Result) []Verdict {
	cr := c.Criteria
	s := r.Summary
	var out []Verdict
	if !math.IsNaN(cr.MinCure) {
		out = append(out, Verdict{Name: CriterionMinCure, Value: num.RoundSig(s.MinFinalCure), Limit: cr.MinCure,
			Pass: math.IsNaN(s.MinFinalCure) || s.MinFinalCure >= cr.MinCure})
	}
	if !math.IsNaN(cr.MaxTemperature) {
		out = append(out, Verdict{Name: CriterionMaxTemperature, Value: num.Celsius(s.PeakTemperature), Limit: num.Celsius(cr.MaxTemperature),
			Pass: math.IsNaN(s.PeakTemperature) || s.PeakTemperature <= cr.MaxTemperature})
	}
	if !math.IsNaN(cr.MaxSpread) {
		out = append(out, Verdict{Name: CriterionMaxSpread, Value: num.Round6(s.MaxSpread), Limit: num.Round6(cr.MaxSpread),
			Pass: math.IsNaN(s.MaxSpread) || s.MaxSpread <= cr.MaxSpread})
	}
	if cr.MinFlowWindow > 0 {
		out = append(out, Verdict{Name: CriterionMinFlowWindow, Value: num.Round6(s.FlowWindow), Limit: num.Round6(cr.MinFlowWindow),
			Pass: math.IsNaN(s.FlowWindow) || s.FlowWindow >= cr.MinFlowWindow})
	}
	if r.Status == solver.Interrupted {
		for i := range out {
			out[i].Pass, out[i].Unjudged = false, true
		}
	}
	return out
}

// StatusOf returns the status of a run as written in summary.json: "runaway"
// or "failed" when the solver stopped early, else "criteria-failed" when a
// verdict fails, else "ok".
func StatusOf(r *solver.Result, verdicts []Verdict) string {
	switch r.Status {
	case solver.Runaway:
		return StatusRunaway
	case solver.Failed:
		return StatusFailed
	case solver.Interrupted:
		return StatusInterrupted
	}
	for _, v := range verdicts {
		if !v.Pass {
			return StatusCriteriaFailed
		}
	}
	return StatusOK
}

// Float is a float64 that is written to JSON as null when it is NaN or
// infinite (not applicable, never happened) and read back from null as NaN.
type Float float64

// MarshalJSON implements json.Marshaler.
func (f Float) MarshalJSON() ([]byte, error) {
	v := float64(f)
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return []byte("null"), nil
	}
	return json.Marshal(v)
}

// Known reports whether f holds a value: neither NaN nor infinite (JSON
// null: not applicable, never happened).
func (f Float) Known() bool { return !math.IsNaN(float64(f)) && !math.IsInf(float64(f), 0) }

// UnmarshalJSON implements json.Unmarshaler.
func (f *Float) UnmarshalJSON(b []byte) error {
	if string(bytes.TrimSpace(b)) == "null" {
		*f = Float(math.NaN())
		return nil
	}
	var v float64
	if err := json.Unmarshal(b, &v); err != nil {
		return err
	}
	*f = Float(v)
	return nil
}

// Verdicts is the list of criteria of a summary. In JSON it is one object
// keyed by criterion name, in the order min_cure, max_temperature,
// max_spread, each entry {"value": v, "limit": l, "pass": true|false}; a
// value that does not exist is null, and a case without criteria gives {}.
type Verdicts []Verdict

type verdictJSON struct {
	Value Float `json:"value"`
	Limit Float `json:"limit"`
	Pass  *bool `json:"pass"` // null: not judged
}

// MarshalJSON implements json.Marshaler.
func (vs Verdicts) MarshalJSON() ([]byte, error) {
	return marshalOrdered(len(vs), func(i int) (string, any) {
		v := vs[i]
		pass := &v.Pass
		if v.Unjudged {
			pass = nil
		}
		return v.Name, verdictJSON{Float(v.Value), Float(v.Limit), pass}
	})
}

// UnmarshalJSON implements json.Unmarshaler, keeping the order of the keys.
func (vs *Verdicts) UnmarshalJSON(b []byte) error {
	var out Verdicts
	isNull, err := unmarshalOrdered(b, "criteria", func(name string, dec *json.Decoder) error {
		var e verdictJSON
		if err := dec.Decode(&e); err != nil {
			return err
		}
		out = append(out, Verdict{Name: name, Value: float64(e.Value), Limit: float64(e.Limit), Pass: e.Pass != nil && *e.Pass, Unjudged: e.Pass == nil})
		return nil
	})
	if err != nil || isNull {
		*vs = nil
		return err
	}
	*vs = out
	return nil
}

// Summary is the content of summary.json (README, Case file reference): temperatures in °C,
// temperature differences in K, times in s, depths in mm. A Float that does
// not apply is NaN (null in JSON). Values are rounded like the CSV files
// (1e-6 for °C, K and s, 1e-9 mm for depths, 9 significant digits for
// dimensionless values).
//
// Beyond the fields of the README's Case file reference it carries end_time_s (the time the run reached, which is
// less than the case's end after a runaway or failure), message (why the
// run stopped early; omitted when it ran to the end) and, under closed-loop
// volumetric heating only, control_max_error_K (ControlError), and
// gel_point, the degree of cure at gelation of each curing layer by name
// (omitted without curing layers; the report draws the gel front from it).
type Summary struct {
	Title            string `json:"title"`
	Status           string `json:"status"`
	PeakTemperatureC Float  `json:"peak_temperature_C"`
	PeakTimeS        Float  `json:"peak_time_s"`
	PeakDepthMM      Float  `json:"peak_depth_mm"`
	OvershootK       Float  `json:"overshoot_K"`
	// OvershootNote says why overshoot_K is null; omitted otherwise.
	OvershootNote            string      `json:"overshoot_note,omitempty"`
	HottestDrivingC          Float       `json:"hottest_driving_temperature_C"`
	HeatingLagK              Float       `json:"heating_lag_K"`
	HeatingLagTimeS          Float       `json:"heating_lag_time_s"`
	HeatingLagDepthMM        Float       `json:"heating_lag_depth_mm"`
	CoolingLagK              Float       `json:"cooling_lag_K"`
	CoolingLagTimeS          Float       `json:"cooling_lag_time_s"`
	CoolingLagDepthMM        Float       `json:"cooling_lag_depth_mm"`
	MaxSpreadK               Float       `json:"max_spread_K"`
	LayerSpreadK             layerValues `json:"layer_spread_K"`
	MinFinalCure             Float       `json:"min_final_cure"`
	MinFinalCureDepthMM      Float       `json:"min_final_cure_depth_mm"`
	MeanFinalCure            Float       `json:"mean_final_cure"`
	TimeToMinCureS           Float       `json:"time_to_min_cure_s"`
	GelTimeFirstS            Float       `json:"gel_time_first_s"`
	GelTimeLastS             Float       `json:"gel_time_last_s"`
	MinFinalGlassTransitionC Float       `json:"min_final_glass_transition_C"`
	ConservationResidual     Float       `json:"conservation_residual"`
	// EstimatedError is set by run --verify only; omitted otherwise.
	EstimatedError *EstimatedError `json:"estimated_error,omitempty"`
	Steps          int             `json:"steps"`
	Criteria       Verdicts        `json:"criteria"`
	EndTimeS       Float           `json:"end_time_s"`
	Message        string          `json:"message,omitempty"`
	// ControlMaxErrorK is set only under closed-loop volumetric heating
	// (see ControlError); omitted otherwise.
	ControlMaxErrorK *Float `json:"control_max_error_K,omitempty"`
	// ControlSensorDepthMM is the depth of the controlled temperature,
	// set with ControlMaxErrorK; the report marks the probe there.
	ControlSensorDepthMM *Float `json:"control_sensor_depth_mm,omitempty"`
	// GelPoint is the gel point of each curing layer, by layer name.
	GelPoint map[string]float64 `json:"gel_point,omitempty"`
	// The viscosity fields are set only when a layer has a viscosity law
	// (cases.Viscous); omitted otherwise. MinViscosityPaS is the lowest
	// viscosity of any cell at any time, with when and where; FlowWindowS
	// the shortest, over the cells with a viscosity law, of the time spent
	// below FlowViscosityPaS before gel.
	MinViscosityPaS     *Float `json:"min_viscosity_Pa_s,omitempty"`
	MinViscosityTimeS   *Float `json:"min_viscosity_time_s,omitempty"`
	MinViscosityDepthMM *Float `json:"min_viscosity_depth_mm,omitempty"`
	FlowWindowS         *Float `json:"flow_window_s,omitempty"`
	FlowViscosityPaS    *Float `json:"flow_viscosity_Pa_s,omitempty"`
}

// Summarize returns the summary of a run of c: the solver's summary in the
// units of summary.json, the verdicts of c's criteria (Judge) and the
// status (StatusOf). time_to_min_cure_s is null when c sets no min_cure.
func Summarize(c *cases.Case, r *solver.Result) Summary {
	return summarize(c, r, ControlError(c, r))
}

// summarize is Summarize with the control error (ControlError) given, so
// that a run whose snapshots were streamed (runWriter) is summarised from
// what was accumulated as they passed.
func summarize(c *cases.Case, r *solver.Result, controlError float64) Summary {
	s := r.Summary
	v := Judge(c, r)
	out := Summary{
		Title:                    c.Title,
		Status:                   StatusOf(r, v),
		PeakTemperatureC:         Float(num.Celsius(s.PeakTemperature)),
		PeakTimeS:                Float(num.Round6(s.PeakTime)),
		PeakDepthMM:              Float(num.MM(s.PeakDepth)),
		OvershootK:               Float(num.Round6(s.Overshoot)),
		OvershootNote:            overshootNote(c),
		HottestDrivingC:          Float(num.Celsius(s.HottestDriving)),
		HeatingLagK:              Float(num.Round6(s.HeatingLag)),
		HeatingLagTimeS:          Float(num.Round6(s.HeatingLagTime)),
		HeatingLagDepthMM:        Float(num.MM(s.HeatingLagDepth)),
		CoolingLagK:              Float(num.Round6(s.CoolingLag)),
		CoolingLagTimeS:          Float(num.Round6(s.CoolingLagTime)),
		CoolingLagDepthMM:        Float(num.MM(s.CoolingLagDepth)),
		MaxSpreadK:               Float(num.Round6(s.MaxSpread)),
		MinFinalCure:             Float(num.RoundSig(s.MinFinalCure)),
		MinFinalCureDepthMM:      Float(num.MM(s.MinFinalCureDepth)),
		MeanFinalCure:            Float(num.RoundSig(s.MeanFinalCure)),
		TimeToMinCureS:           Float(math.NaN()),
		GelTimeFirstS:            Float(num.Round6(s.GelTimeFirst)),
		GelTimeLastS:             Float(num.Round6(s.GelTimeLast)),
		MinFinalGlassTransitionC: Float(num.Celsius(s.MinFinalGlass)),
		ConservationResidual:     Float(num.RoundSig(s.ConservationResidual)),
		Steps:                    s.Steps,
		Criteria:                 Verdicts(v),
		EndTimeS:                 Float(num.Round6(r.EndTime)),
	}
	if out.Criteria == nil {
		out.Criteria = Verdicts{}
	}
	out.LayerSpreadK = layerValues{}
	for j, l := range c.Problem.Mesh.Layers {
		if j < len(s.LayerSpread) {
			out.LayerSpreadK = append(out.LayerSpreadK, layerValue{l.Name, num.Round6(s.LayerSpread[j])})
		}
	}
	if !math.IsNaN(c.Criteria.MinCure) {
		out.TimeToMinCureS = Float(num.Round6(s.TimeToMinCure))
	}
	for j, l := range c.Problem.Mesh.Layers {
		if j >= len(c.Problem.Materials) || c.Problem.Materials[j] == nil {
			continue
		}
		if cu := c.Problem.Materials[j].Cure; cu != nil {
			if out.GelPoint == nil {
				out.GelPoint = map[string]float64{}
			}
			out.GelPoint[l.Name] = cu.GelPoint
		}
	}
	if cases.Controlled(c.Problem) {
		e := Float(num.Round6(controlError))
		out.ControlMaxErrorK = &e
		z := Float(num.MM(c.Problem.Volumetric.Control.Sensor))
		out.ControlSensorDepthMM = &z
	}
	if cases.Viscous(c.Problem) {
		f := func(v float64) *Float { x := Float(v); return &x }
		flow := c.Problem.FlowViscosity
		if flow == 0 {
			flow = solver.DefaultFlowViscosity
		}
		out.MinViscosityPaS = f(num.RoundSig(s.MinViscosity))
		out.MinViscosityTimeS = f(num.Round6(s.MinViscosityTime))
		out.MinViscosityDepthMM = f(num.MM(s.MinViscosityDepth))
		out.FlowWindowS = f(num.Round6(s.FlowWindow))
		out.FlowViscosityPaS = f(num.RoundSig(flow))
	}
	if r.Status != solver.OK {
		msg := "the run stopped early"
		if r.Err != nil {
			msg = r.Err.Error()
		}
		if r.Status == solver.Interrupted {
			msg = "interrupted (Ctrl-C or SIGTERM)"
		}
		out.Message = fmt.Sprintf("%s; the outputs hold the state up to t = %s s (%s)", msg, num.Fixed(r.EndTime, 3), num.HumanTime(r.EndTime))
	}
	return out
}

// SummaryRow is one line of a summary as the terminal and the report show
// it: a label of Vocabulary (or "status", "stopped") and the value with its
// unit and, where it helps, where and when.
type SummaryRow struct{ Label, Value string }

// SummaryRows returns the lines of s that the terminal (PrintSummary) and
// the report's summary table both show, in this order: status, peak
// temperature (with its depth and time), overshoot, largest spread, least
// final cure (with its depth), mean final cure, time to min_cure, first and
// last gel time, lowest final Tg, sensor off its program, energy balance
// error, steps, end time, and why the run stopped early. A quantity that
// does not apply to the case is left out.
func SummaryRows(s Summary) []SummaryRow {
	var rows []SummaryRow
	add := func(key, v string) { rows = append(rows, SummaryRow{Label(key), v}) }
	rows = append(rows, SummaryRow{"status", s.Status})
	add("peak_temperature_C", fmt.Sprintf("%s at %s, t = %s", num.TextC(float64(s.PeakTemperatureC)), num.TextMM(float64(s.PeakDepthMM)), num.TextTime(float64(s.PeakTimeS))))
	add("overshoot_K", overshootWords(s))
	if w := lagWords(true, s.HeatingLagK, s.HeatingLagTimeS, s.HeatingLagDepthMM); w != "" {
		add("heating_lag_K", w)
	}
	if w := lagWords(false, s.CoolingLagK, s.CoolingLagTimeS, s.CoolingLagDepthMM); w != "" {
		add("cooling_lag_K", w)
	}
	if s.MaxSpreadK.Known() {
		add("max_spread_K", num.TextK(float64(s.MaxSpreadK))+" across the curing layers")
	}
	if len(s.LayerSpreadK) > 0 {
		add("layer_spread_K", layerSpreadWords(s.LayerSpreadK))
	}
	if s.MinFinalCure.Known() {
		add("min_final_cure", num.TextCure(float64(s.MinFinalCure))+" at "+num.TextMM(float64(s.MinFinalCureDepthMM)))
		add("mean_final_cure", num.TextCure(float64(s.MeanFinalCure)))
		// What was not reached is said against the time the run reached.
		by := "by the end of the run, t = " + num.TextTime(float64(s.EndTimeS))
		if s.Status == StatusInterrupted {
			by = "by t = " + num.TextTime(float64(s.EndTimeS)) + ", when the run was interrupted"
		}
		if s.TimeToMinCureS.Known() {
			add("time_to_min_cure_s", num.TextTime(float64(s.TimeToMinCureS)))
		} else if minCureSet(s) {
			add("time_to_min_cure_s", "not reached "+by)
		}
		first, last := "no cell gels "+by, "no cell gels "+by
		if s.GelTimeFirstS.Known() {
			first = num.TextTime(float64(s.GelTimeFirstS))
			last = "some cells do not gel " + by
		}
		if s.GelTimeLastS.Known() {
			last = num.TextTime(float64(s.GelTimeLastS))
		}
		add("gel_time_first_s", first)
		add("gel_time_last_s", last)
		if s.MinFinalGlassTransitionC.Known() {
			add("min_final_glass_transition_C", num.TextC(float64(s.MinFinalGlassTransitionC)))
		}
	}
	if s.ControlMaxErrorK != nil && s.ControlMaxErrorK.Known() {
		add("control_max_error_K", fmt.Sprintf("%.2f K at most", float64(*s.ControlMaxErrorK)))
	}
	if s.MinViscosityPaS != nil && s.MinViscosityPaS.Known() {
		add("min_viscosity_Pa_s", fmt.Sprintf("%s Pa·s at %s, t = %s", strconv.FormatFloat(float64(*s.MinViscosityPaS), 'g', 3, 64),
			num.TextMM(optional(s.MinViscosityDepthMM)), num.TextTime(optional(s.MinViscosityTimeS))))
	}
	if s.FlowWindowS != nil && s.FlowWindowS.Known() {
		add("flow_window_s", fmt.Sprintf("%s below %s Pa·s before gel (the shortest over the resin's cells)",
			num.TextTime(float64(*s.FlowWindowS)), strconv.FormatFloat(optional(s.FlowViscosityPaS), 'g', 4, 64)))
	}
	add("conservation_residual", residualWords(s.ConservationResidual, s.EstimatedError != nil))
	if e := s.EstimatedError; e != nil {
		line, warn := e.Words()
		add("estimated_error", line)
		for _, w := range warn {
			rows = append(rows, SummaryRow{"WARNING", w})
		}
	}
	add("steps", strconv.Itoa(s.Steps))
	add("end_time_s", num.TextTime(float64(s.EndTimeS)))
	return rows
}

// minCureSet reports whether the summary judges a min_cure criterion.
func minCureSet(s Summary) bool {
	for _, v := range s.Criteria {
		if v.Name == CriterionMinCure {
			return true
		}
	}
	return false
}

// PrintSummary writes a short table of s for a terminal: the lines of
// SummaryRows, the criteria, and then one line per failed criterion, such as
//
//	FAILED min_cure: 0.82 at 11.3 mm < 0.9
//
// and, after a runaway or a failure, a line saying so.
func PrintSummary(w io.Writer, s Summary) error {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	row := func(k, format string, a ...any) { fmt.Fprintf(tw, "  %s\t"+format+"\n", append([]any{k}, a...)...) }
	if s.Title != "" {
		fmt.Fprintf(tw, "%s\n", s.Title)
	}
	for _, r := range SummaryRows(s) {
		row(r.Label, "%s", r.Value)
	}
	for _, v := range s.Criteria {
		res := "pass"
		switch {
		case v.Unjudged:
			res = "not judged (interrupted)"
		case !v.Pass:
			res = "FAILED"
		}
		op := map[string]string{CriterionMinCure: ">=", CriterionShareMet: ">=", CriterionMinFlowWindow: ">="}[v.Name]
		if op == "" {
			op = "<="
		}
		val, lim := FormatValueLimit(v.Value, v.Limit)
		u := criterionUnit(v.Name)
		if u != "" {
			u = " " + u
		}
		row("criterion "+v.Name, "%s %s %s%s  %s", val, op, lim, u, res)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	var b strings.Builder
	for _, v := range s.Criteria {
		if v.Pass || v.Unjudged {
			continue
		}
		val, lim := FormatValueLimit(v.Value, v.Limit)
		u := criterionUnit(v.Name)
		if u != "" {
			u = " " + u
		}
		switch v.Name {
		case CriterionMinCure:
			fmt.Fprintf(&b, "FAILED %s: %s at %s mm < %s\n", v.Name, val, depthText(s.MinFinalCureDepthMM), lim)
		case CriterionShareMet:
			fmt.Fprintf(&b, "FAILED %s: every criterion met in %.1f %% of the samples < %.1f %% required\n", v.Name, 100*v.Value, 100*v.Limit)
		case CriterionMaxTemperature:
			fmt.Fprintf(&b, "FAILED %s: %s%s at %s mm, t = %s > %s%s\n", v.Name, val, u, depthText(s.PeakDepthMM), timeText(s.PeakTimeS), lim, u)
		case CriterionMinFlowWindow:
			fmt.Fprintf(&b, "FAILED %s: %s%s < %s%s\n", v.Name, val, u, lim, u)
		default:
			fmt.Fprintf(&b, "FAILED %s: %s%s > %s%s\n", v.Name, val, u, lim, u)
		}
	}
	switch s.Status {
	case StatusRunaway:
		fmt.Fprintf(&b, "RUNAWAY: %s\n", s.Message)
	case StatusFailed:
		fmt.Fprintf(&b, "FAILED run: %s\n", s.Message)
	case StatusInterrupted:
		fmt.Fprintf(&b, "INTERRUPTED: the outputs hold the state up to t = %s s; the criteria are not judged\n", num.Fixed(float64(s.EndTimeS), 6))
	}
	_, err := io.WriteString(w, b.String())
	return err
}

func criterionUnit(name string) string {
	switch name {
	case CriterionMaxTemperature:
		return "°C"
	case CriterionMaxSpread:
		return "K"
	case CriterionMinFlowWindow:
		return "s"
	}
	return ""
}

// FormatValueLimit formats a criterion's value v and limit l with 4
// significant digits, or with every digit needed when that would make them
// look equal; a NaN value reads "n/a".
func FormatValueLimit(v, l float64) (string, string) {
	if math.IsNaN(v) {
		return "n/a", strconv.FormatFloat(l, 'g', 4, 64)
	}
	a, b := strconv.FormatFloat(v, 'g', 4, 64), strconv.FormatFloat(l, 'g', 4, 64)
	if a == b && v != l {
		a, b = strconv.FormatFloat(v, 'g', -1, 64), strconv.FormatFloat(l, 'g', -1, 64)
	}
	return a, b
}

// depthText formats a depth in mm with 4 significant digits, "n/a" when
// unknown.
func depthText(f Float) string {
	if !f.Known() {
		return "n/a"
	}
	return strconv.FormatFloat(float64(f), 'g', 4, 64)
}

// timeText formats a time in s for reading: seconds below 2 min, minutes
// below 2 h, hours above.
func timeText(f Float) string {
	if !f.Known() {
		return "n/a"
	}
	return num.HumanTime(float64(f))
}
