package results

import (
	"bytes"
	"cureslab/cases"
	"cureslab/cases/internal/testkit"
	"cureslab/solver"
	"encoding/json"
	"errors"
	"math"
	"strings"
	"testing"
)

func TestFloatJSON(t *testing.T) {
	for _, tc := range []struct {
		in   float64
		want string
	}{
		{math.NaN(), "null"},
		{math.Inf(1), "null"},
		{math.Inf(-1), "null"},
		{0, "0"},
		{-12.5, "-12.5"},
		{1e-15, "1e-15"},
	} {
		b, err := json.Marshal(Float(tc.in))
		if err != nil || string(b) != tc.want {
			t.Errorf("Marshal(%v) = %s, %v; want %s", tc.in, b, err, tc.want)
		}
	}
	var f Float
	if err := json.Unmarshal([]byte("null"), &f); err != nil || !math.IsNaN(float64(f)) {
		t.Errorf("Unmarshal(null) = %v, %v; want NaN", f, err)
	}
	if err := json.Unmarshal([]byte("2.5"), &f); err != nil || f != 2.5 {
		t.Errorf("Unmarshal(2.5) = %v, %v; want 2.5", f, err)
	}
	if err := json.Unmarshal([]byte(`"x"`), &f); err == nil {
		t.Error(`Unmarshal("x") succeeded`)
	}
}

func TestSummaryJSONNulls(t *testing.T) {
	c, r := testkit.HandBuiltCase(t), testkit.HandBuiltResult()
	r.Summary.Overshoot = math.NaN() // nothing drives the case
	c.Criteria.MinCure = math.NaN()  // no min_cure: no time_to_min_cure_s
	r.Summary.TimeToMinCure = 1234
	s := Summarize(c, r)
	b, err := json.Marshal(s)
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"overshoot_K", "time_to_min_cure_s", "gel_time_last_s"} {
		if v, ok := m[k]; !ok || v != nil {
			t.Errorf("%s = %v (present %v), want null", k, v, ok)
		}
	}
	// Every key of the README's Case file reference is present.
	for _, k := range []string{"title", "status", "peak_temperature_C", "peak_time_s", "peak_depth_mm", "overshoot_K",
		"max_spread_K", "min_final_cure", "min_final_cure_depth_mm", "mean_final_cure", "time_to_min_cure_s",
		"gel_time_first_s", "gel_time_last_s", "min_final_glass_transition_C", "conservation_residual", "steps", "criteria",
		"heating_lag_K", "cooling_lag_K", "layer_spread_K", "hottest_driving_temperature_C"} {
		if _, ok := m[k]; !ok {
			t.Errorf("summary.json lacks %q", k)
		}
	}
	if _, ok := m["message"]; ok {
		t.Error("message present for a run that ended normally")
	}
	// The former name of the conservation residual is gone.
	if _, ok := m["energy_balance_error"]; ok {
		t.Error("summary.json still has energy_balance_error")
	}
	// Round trip.
	var back Summary
	if err := json.Unmarshal(b, &back); err != nil {
		t.Fatal(err)
	}
	if !math.IsNaN(float64(back.OvershootK)) || back.PeakTemperatureC != s.PeakTemperatureC || len(back.Criteria) != len(s.Criteria) {
		t.Errorf("round trip: got %+v, want %+v", back, s)
	}
	for i := range s.Criteria {
		if back.Criteria[i] != s.Criteria[i] {
			t.Errorf("criterion %d: got %+v, want %+v", i, back.Criteria[i], s.Criteria[i])
		}
	}
}

func TestVerdictsJSON(t *testing.T) {
	v := Verdicts{
		{Name: CriterionMinCure, Value: 0.82, Limit: 0.9},
		{Name: CriterionMaxTemperature, Value: 120, Limit: 140, Pass: true},
		{Name: CriterionMaxSpread, Value: math.NaN(), Limit: 15, Pass: true},
		{Name: "unjudged", Value: 0.5, Limit: 0.9, Unjudged: true},
	}
	b, err := json.Marshal(v)
	if err != nil {
		t.Fatal(err)
	}
	want := `{"min_cure":{"value":0.82,"limit":0.9,"pass":false},"max_temperature":{"value":120,"limit":140,"pass":true},"max_spread":{"value":null,"limit":15,"pass":true},"unjudged":{"value":0.5,"limit":0.9,"pass":null}}`
	if string(b) != want {
		t.Errorf("got  %s\nwant %s", b, want)
	}
	if b, _ := json.Marshal(Verdicts{}); string(b) != "{}" {
		t.Errorf("no criteria: got %s, want {}", b)
	}
	var back Verdicts
	if err := json.Unmarshal([]byte(want), &back); err != nil {
		t.Fatal(err)
	}
	if len(back) != 4 || back[0] != v[0] || back[1] != v[1] || !math.IsNaN(back[2].Value) || back[2].Name != CriterionMaxSpread || back[3] != v[3] {
		t.Errorf("round trip: got %+v", back)
	}
	if err := json.Unmarshal([]byte(`[1]`), &back); err == nil {
		t.Error("an array was accepted as criteria")
	}
}

func TestJudge(t *testing.T) {
	nan := math.NaN()
	for _, tc := range []struct {
		name string
		cr   cases.Criteria
		s    solver.Summary
		want []bool
	}{
		{"none", cases.Criteria{MinCure: nan, MaxTemperature: nan, MaxSpread: nan}, solver.Summary{}, nil},
		// A limit exactly met passes ("at least", "at most").
		{"min_cure equal", cases.Criteria{MinCure: 0.9, MaxTemperature: nan, MaxSpread: nan}, solver.Summary{MinFinalCure: 0.9}, []bool{true}},
		{"min_cure below", cases.Criteria{MinCure: 0.9, MaxTemperature: nan, MaxSpread: nan}, solver.Summary{MinFinalCure: 0.8999}, []bool{false}},
		{"max_temperature equal", cases.Criteria{MinCure: nan, MaxTemperature: 413.15, MaxSpread: nan}, solver.Summary{PeakTemperature: 413.15}, []bool{true}},
		{"max_temperature above", cases.Criteria{MinCure: nan, MaxTemperature: 413.15, MaxSpread: nan}, solver.Summary{PeakTemperature: 413.16}, []bool{false}},
		{"max_spread above", cases.Criteria{MinCure: nan, MaxTemperature: nan, MaxSpread: 15}, solver.Summary{MaxSpread: 15.001}, []bool{false}},
		// No curing layer: min_cure and max_spread hold vacuously.
		{"vacuous", cases.Criteria{MinCure: 0.9, MaxTemperature: nan, MaxSpread: 15}, solver.Summary{MinFinalCure: nan, MaxSpread: nan}, []bool{true, true}},
		{"all three", cases.Criteria{MinCure: 0.9, MaxTemperature: 413.15, MaxSpread: 15}, solver.Summary{MinFinalCure: 0.95, PeakTemperature: 420, MaxSpread: 3}, []bool{true, false, true}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			c := &cases.Case{Criteria: tc.cr}
			got := Judge(c, &solver.Result{Summary: tc.s})
			if len(got) != len(tc.want) {
				t.Fatalf("got %d verdicts %+v, want %d", len(got), got, len(tc.want))
			}
			for i := range got {
				if got[i].Pass != tc.want[i] {
					t.Errorf("verdict %+v: pass = %v, want %v", got[i], got[i].Pass, tc.want[i])
				}
			}
		})
	}
	// Units of the verdicts: °C for max_temperature.
	v := Judge(&cases.Case{Criteria: cases.Criteria{MinCure: nan, MaxTemperature: 413.15, MaxSpread: nan}}, &solver.Result{Summary: solver.Summary{PeakTemperature: 393.15000000000003}})
	if v[0].Value != 120 || v[0].Limit != 140 {
		t.Errorf("max_temperature verdict %+v, want value 120 and limit 140 (°C)", v[0])
	}
}

func TestStatusOf(t *testing.T) {
	pass, fail := []Verdict{{Pass: true}}, []Verdict{{Pass: true}, {Pass: false}}
	for _, tc := range []struct {
		st   solver.Status
		v    []Verdict
		want string
	}{
		{solver.OK, nil, "ok"},
		{solver.OK, pass, "ok"},
		{solver.OK, fail, "criteria-failed"},
		{solver.Runaway, pass, "runaway"},
		{solver.Runaway, fail, "runaway"},
		{solver.Failed, fail, "failed"},
	} {
		if got := StatusOf(&solver.Result{Status: tc.st}, tc.v); got != tc.want {
			t.Errorf("StatusOf(%v, %+v) = %q, want %q", tc.st, tc.v, got, tc.want)
		}
	}
}

func TestSummarizeEarlyStop(t *testing.T) {
	c, r := testkit.HandBuiltCase(t), testkit.HandBuiltResult()
	r.Status, r.Err, r.EndTime = solver.Runaway, errors.New("runaway at t = 4000 s"), 4000.25
	s := Summarize(c, r)
	if s.Status != StatusRunaway || !strings.Contains(s.Message, "runaway at t = 4000 s") || !strings.Contains(s.Message, "4000.25") {
		t.Errorf("status %q, message %q; want runaway with the error and the time reached", s.Status, s.Message)
	}
	var b bytes.Buffer
	if err := PrintSummary(&b, s); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), "RUNAWAY: runaway at t = 4000 s") {
		t.Errorf("PrintSummary does not say the run ran away:\n%s", b.String())
	}
}

func TestPrintSummaryGolden(t *testing.T) {
	c, r := testkit.HandBuiltCase(t), testkit.HandBuiltResult()
	s := Summarize(c, r)
	if s.Status != StatusCriteriaFailed {
		t.Fatalf("status %q, want criteria-failed", s.Status)
	}
	var b bytes.Buffer
	if err := PrintSummary(&b, s); err != nil {
		t.Fatal(err)
	}
	// One clear line per failed criterion.
	if !strings.Contains(b.String(), "FAILED min_cure: 0.82 at 4.763 mm < 0.9\n") {
		t.Errorf("no FAILED line for min_cure in\n%s", b.String())
	}
	testkit.Golden(t, "summary_print.golden", b.Bytes())
}

func TestFormatValueLimit(t *testing.T) {
	// Values that look equal at 4 digits are shown in full.
	a, b := FormatValueLimit(0.89999, 0.9)
	if a == b {
		t.Errorf("FormatValueLimit(0.89999, 0.9) = %q, %q: must differ", a, b)
	}
	if a, b := FormatValueLimit(0.82, 0.9); a != "0.82" || b != "0.9" {
		t.Errorf("FormatValueLimit(0.82, 0.9) = %q, %q", a, b)
	}
}

func TestOvershootWords(t *testing.T) {
	// The terminal and the report say these words (README, summary.json:
	// overshoot_K).
	nan := Float(math.NaN())
	for _, tc := range []struct {
		s    Summary
		want string
	}{
		{Summary{OvershootK: 41.5, HottestDrivingC: 65, PeakTemperatureC: 106.5}, "+41.5 K above the hottest driving temperature so far"},
		{Summary{OvershootK: 0, HottestDrivingC: 120, PeakTemperatureC: 117.6}, "none: peak 2.4 K below the hottest driving temperature"},
		{Summary{OvershootK: -3.2, HottestDrivingC: 120, PeakTemperatureC: 116.8}, "none: peak 3.2 K below the hottest driving temperature"},
		{Summary{OvershootK: 0.01, HottestDrivingC: 120, PeakTemperatureC: 120.01}, "none: the peak reaches the hottest driving temperature but never passes it"},
		{Summary{OvershootK: nan, HottestDrivingC: nan, OvershootNote: noteUncontrolled}, "n/a: " + noteUncontrolled},
	} {
		if got := overshootWords(tc.s); got != tc.want {
			t.Errorf("overshoot %v: %q, want %q", tc.s.OvershootK, got, tc.want)
		}
	}
}
