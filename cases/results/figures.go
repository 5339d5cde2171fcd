package results

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"strconv"
	"strings"

	"cureslab/cases"
	"cureslab/cases/internal/num"
	"cureslab/solver"
)

// The wording of the figures that compare the part with what drives it,
// and of the accuracy figures: the terminal (PrintSummary) and the report
// print the same sentences from these functions.

// layerValue is one layer's entry of a per-layer summary object.
type layerValue struct {
	Layer string
	Value float64
}

// layerValues is a per-layer summary value: in JSON an object keyed by
// layer name in the stack's order (top first), null values for NaN.
type layerValues []layerValue

// MarshalJSON implements json.Marshaler.
func (lv layerValues) MarshalJSON() ([]byte, error) {
	return marshalOrdered(len(lv), func(i int) (string, any) { return lv[i].Layer, Float(lv[i].Value) })
}

// Max returns the largest value, NaN without any.
func (lv layerValues) Max() float64 {
	m := math.NaN()
	for _, v := range lv {
		if !math.IsNaN(v.Value) && !(v.Value <= m) {
			m = v.Value
		}
	}
	return m
}

// UnmarshalJSON implements json.Unmarshaler, keeping the order of the keys.
func (lv *layerValues) UnmarshalJSON(b []byte) error {
	var out layerValues
	isNull, err := unmarshalOrdered(b, "layer values", func(name string, dec *json.Decoder) error {
		var f Float
		if err := dec.Decode(&f); err != nil {
			return err
		}
		out = append(out, layerValue{name, float64(f)})
		return nil
	})
	if err != nil || isNull {
		*lv = nil
		return err
	}
	*lv = out
	return nil
}

// EstimatedError is the estimated_error object of summary.json, written by
// run --verify: each headline figure of the run minus the same figure of a
// second run at tolerances solver.VerifyFactor times tighter (the mesh
// unchanged), with the tolerances of that second run.
type EstimatedError struct {
	PeakTemperatureK     Float `json:"peak_temperature_K"`
	MinFinalCure         Float `json:"min_final_cure"`
	TimeToMinCureS       Float `json:"time_to_min_cure_s"`
	TemperatureTolerance Float `json:"temperature_tolerance_K"`
	CureTolerance        Float `json:"cure_tolerance"`
	// Note says why there is no estimate (the second run did not finish);
	// omitted otherwise.
	Note string `json:"note,omitempty"`
}

// Thresholds above which run --verify warns that the figures depend on the
// step tolerances.
const (
	VerifyPeakLimit = 0.5   // K
	verifyCureLimit = 0.005 // degree of cure
)

// NewEstimatedError returns the estimated_error of a run of c (summary run)
// from a second run at tolerances solver.VerifyFactor times tighter
// (summary tighter), rounded like summary.json.
func NewEstimatedError(c *cases.Case, run, tighter solver.Summary) *EstimatedError {
	e := solver.EstimateError(run, tighter)
	q := solver.Tightened(c.Problem)
	out := &EstimatedError{
		PeakTemperatureK:     Float(num.Round6(e.PeakTemperature)),
		MinFinalCure:         Float(num.RoundSig(e.MinFinalCure)),
		TimeToMinCureS:       Float(math.NaN()),
		TemperatureTolerance: Float(num.RoundSig(q.TemperatureTolerance)),
		CureTolerance:        Float(num.RoundSig(q.CureTolerance)),
	}
	if !math.IsNaN(c.Criteria.MinCure) {
		out.TimeToMinCureS = Float(num.Round6(e.TimeToMinCure))
	}
	return out
}

// NoEstimate is the estimated_error of a run of c whose second run did not
// finish: null figures and why.
func NoEstimate(c *cases.Case, why string) *EstimatedError {
	q := solver.Tightened(c.Problem)
	nan := Float(math.NaN())
	return &EstimatedError{PeakTemperatureK: nan, MinFinalCure: nan, TimeToMinCureS: nan,
		TemperatureTolerance: Float(num.RoundSig(q.TemperatureTolerance)), CureTolerance: Float(num.RoundSig(q.CureTolerance)),
		Note: "no estimate: the run at tolerances ten times tighter did not finish (" + why + ")"}
}

// Words returns the line that says the estimate, and the warnings it
// raises (none when the figures barely move).
func (e *EstimatedError) Words() (line string, warnings []string) {
	if e.Note != "" {
		return e.Note, []string{e.Note}
	}
	parts := []string{fmt.Sprintf("peak temperature %+.2g K", float64(e.PeakTemperatureK))}
	if e.MinFinalCure.Known() {
		parts = append(parts, fmt.Sprintf("least final cure %+.2g", float64(e.MinFinalCure)))
	}
	if e.TimeToMinCureS.Known() {
		parts = append(parts, "time to min_cure "+signedTime(float64(e.TimeToMinCureS)))
	}
	line = fmt.Sprintf("%s (this run minus a run at tolerances %d times tighter: %s K, cure %s; the mesh is not refined)",
		strings.Join(parts, ", "), solver.VerifyFactor, g6(float64(e.TemperatureTolerance)), g6(float64(e.CureTolerance)))
	if v := float64(e.PeakTemperatureK); math.Abs(v) > VerifyPeakLimit {
		warnings = append(warnings, fmt.Sprintf("the peak temperature moved %.2g K (more than %g K) at tolerances %d times tighter: tighten [time] temperature_tolerance and cure_tolerance and run again.",
			math.Abs(v), VerifyPeakLimit, solver.VerifyFactor))
	}
	if v := float64(e.MinFinalCure); math.Abs(v) > verifyCureLimit {
		warnings = append(warnings, fmt.Sprintf("the least final cure moved %.2g (more than %g) at tolerances %d times tighter: tighten [time] cure_tolerance and temperature_tolerance and run again.",
			math.Abs(v), verifyCureLimit, solver.VerifyFactor))
	}
	return line, warnings
}

func signedTime(t float64) string {
	if t < 0 {
		return "-" + num.HumanTime(-t)
	}
	return "+" + num.HumanTime(t)
}

// Why overshoot_K is null (overshoot_note in summary.json).
const (
	noteUncontrolled = "volumetric heating without control: no program sets the part's temperature (the air only takes heat away), so there is nothing to overshoot"
	noteNoDriver     = "nothing drives the case: no convective face, held face or control program (an imposed flux sets no temperature, and its air only takes heat away)"
)

// overshootNote returns why the overshoot of a run of c is null, "" when
// it is not.
func overshootNote(c *cases.Case) string {
	if len(solver.Drivers(c.Problem)) > 0 {
		return ""
	}
	if c.Problem.Volumetric != nil {
		return noteUncontrolled
	}
	return noteNoDriver
}

// overshootWords says the overshoot of s: "+41.5 K above the hottest
// driving temperature so far", "none: peak 2.4 K below the hottest driving
// temperature", or why there is none to say.
func overshootWords(s Summary) string {
	ov := float64(s.OvershootK)
	switch {
	case !s.OvershootK.Known():
		if s.OvershootNote != "" {
			return "n/a: " + s.OvershootNote
		}
		return "n/a"
	case ov >= 0.05:
		return fmt.Sprintf("%+.1f K above the hottest driving temperature so far", ov)
	}
	below := float64(s.HottestDrivingC) - float64(s.PeakTemperatureC)
	if !(below >= 0.05) {
		return "none: the peak reaches the hottest driving temperature but never passes it"
	}
	return fmt.Sprintf("none: peak %.1f K below the hottest driving temperature", below)
}

// lagWords says a heating or cooling lag (heating true: the coldest cell
// below the hottest driving temperature while it rises or holds; false: the
// hottest cell above it while it falls), "" when there is none.
func lagWords(heating bool, k, t, depth Float) string {
	if !k.Known() {
		return ""
	}
	what := "the hottest cell above the hottest driving temperature while it falls"
	if heating {
		what = "the coldest cell below the hottest driving temperature while it rises or holds"
	}
	return fmt.Sprintf("%.1f K at %s mm, t = %s (%s)", float64(k), depthText(depth), timeText(t), what)
}

// layerSpreadWords says the spread inside every layer.
func layerSpreadWords(lv layerValues) string {
	parts := make([]string, 0, len(lv))
	for _, v := range lv {
		parts = append(parts, v.Layer+" "+strconv.FormatFloat(v.Value, 'f', 1, 64)+" K")
	}
	return strings.Join(parts, ", ") + " (hottest minus coldest inside each layer, largest over the run)"
}

// residualWords says the conservation residual and, once, what it proves;
// verified says whether an estimated error follows it.
func residualWords(r Float, verified bool) string {
	hint := "; run --verify for an error estimate"
	if verified {
		hint = ""
	}
	return fmt.Sprintf("%.2g (energy ledger, relative: proves the bookkeeping, not the accuracy%s)", float64(r), hint)
}

// g6 formats v with up to 6 significant digits, no trailing zeros.
func g6(v float64) string { return strconv.FormatFloat(v, 'g', 6, 64) }

// marshalOrdered writes a JSON object of n entries in order; entry i has
// the key and value that at returns.
func marshalOrdered(n int, at func(i int) (string, any)) ([]byte, error) {
	var b bytes.Buffer
	b.WriteByte('{')
	for i := range n {
		if i > 0 {
			b.WriteByte(',')
		}
		key, val := at(i)
		k, err := json.Marshal(key)
		if err != nil {
			return nil, err
		}
		e, err := json.Marshal(val)
		if err != nil {
			return nil, err
		}
		b.Write(k)
		b.WriteByte(':')
		b.Write(e)
	}
	b.WriteByte('}')
	return b.Bytes(), nil
}

// unmarshalOrdered reads a JSON object key by key in order, handing each
// key and the decoder positioned at its value to each; it reports whether
// the input was null. what names the object in errors.
func unmarshalOrdered(b []byte, what string, each func(key string, dec *json.Decoder) error) (isNull bool, err error) {
	dec := json.NewDecoder(bytes.NewReader(b))
	tok, err := dec.Token()
	if err != nil {
		return false, err
	}
	if tok == nil {
		return true, nil
	}
	if d, ok := tok.(json.Delim); !ok || d != '{' {
		return false, fmt.Errorf("%s: want an object, got %v", what, tok)
	}
	for dec.More() {
		tok, err := dec.Token()
		if err != nil {
			return false, err
		}
		name, _ := tok.(string)
		if err := each(name, dec); err != nil {
			return false, fmt.Errorf("%s.%s: %w", what, name, err)
		}
	}
	return false, nil
}
