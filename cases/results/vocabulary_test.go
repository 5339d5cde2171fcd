package results

import (
	"bytes"
	"math"
	"reflect"
	"strings"
	"testing"
)

// TestVocabularyComplete: every number of summary.json has one line in
// Vocabulary, keys and labels are unique, and each unit agrees with the
// unit its key carries (the README's rule: summary keys carry their unit
// in their name).
func TestVocabularyComplete(t *testing.T) {
	keys, labels := map[string]bool{}, map[string]bool{}
	for _, q := range append(Vocabulary, GelFrontSpread) {
		if keys[q.Key] || labels[q.Label] {
			t.Errorf("%s / %q: key or label used twice", q.Key, q.Label)
		}
		keys[q.Key], labels[q.Label] = true, true
		if q.Label == "" || q.Means == "" || q.Value == nil {
			t.Errorf("%s: label, meaning and value are required", q.Key)
		}
		want := ""
		for _, su := range [][2]string{{"_C", "°C"}, {"_K", "K"}, {"_s", "s"}, {"_mm", "mm"}, {"_Pa_s", "Pa·s"}} {
			if strings.HasSuffix(q.Key, su[0]) {
				want = su[1] // the longer suffix comes later and wins
			}
		}
		if want != "" && q.Unit != want {
			t.Errorf("%s: unit %q, its key says %q", q.Key, q.Unit, want)
		}
	}
	typ := reflect.TypeOf(Summary{})
	for i := range typ.NumField() {
		f := typ.Field(i)
		name, _, _ := strings.Cut(f.Tag.Get("json"), ",")
		switch f.Type.Kind() {
		case reflect.Float64, reflect.Int, reflect.Pointer:
			if !keys[name] {
				t.Errorf("summary.json key %s has no line in Vocabulary", name)
			}
		}
	}
}

// TestVocabularyEverywhere: the terminal summary, the comparison table and
// the CSV headers name every quantity as Vocabulary does, and nothing else.
func TestVocabularyEverywhere(t *testing.T) {
	labels := map[string]bool{"status": true}
	keys := map[string]bool{}
	for _, q := range append(Vocabulary, GelFrontSpread) {
		labels[q.Label], keys[q.Key] = true, true
	}
	nan := Float(math.NaN())
	e, z := Float(0.8), Float(12)
	s := Summary{Title: "t", Status: StatusOK, PeakTemperatureC: 100, PeakTimeS: 60, PeakDepthMM: 1, OvershootK: 3,
		MaxSpreadK: 2, MinFinalCure: 0.9, MinFinalCureDepthMM: 2, MeanFinalCure: 0.95, TimeToMinCureS: 7200,
		GelTimeFirstS: 3000, GelTimeLastS: 3100, MinFinalGlassTransitionC: 90, ConservationResidual: 1e-15,
		Steps: 10, EndTimeS: 9000, ControlMaxErrorK: &e, ControlSensorDepthMM: &z,
		Criteria: Verdicts{{Name: CriterionMinCure, Value: 0.9, Limit: 0.85, Pass: true}}}
	rows := SummaryRows(s)
	if len(rows) < 14 {
		t.Errorf("%d summary rows, want every quantity that applies", len(rows))
	}
	for _, r := range rows {
		if !labels[r.Label] {
			t.Errorf("summary row %q is not a label of Vocabulary", r.Label)
		}
	}
	var b bytes.Buffer
	if err := PrintSummary(&b, s); err != nil {
		t.Fatal(err)
	}
	for _, line := range strings.Split(b.String(), "\n")[1:] {
		if !strings.HasPrefix(line, "  ") || strings.HasPrefix(line, "  criterion ") {
			continue
		}
		label, _, _ := strings.Cut(strings.TrimSpace(line), "  ")
		if !labels[label] {
			t.Errorf("terminal line %q: %q is not a label of Vocabulary", line, label)
		}
	}
	cmp := ComparisonRows([]Compared{{Name: "a", Ran: true, Summary: s}, {Name: "b", Ran: true, Summary: Summary{Status: StatusOK,
		PeakTemperatureC: nan, PeakTimeS: nan, PeakDepthMM: nan, OvershootK: nan, MaxSpreadK: nan, MinFinalCure: nan,
		MinFinalCureDepthMM: nan, MeanFinalCure: nan, TimeToMinCureS: nan, GelTimeFirstS: nan, GelTimeLastS: nan,
		MinFinalGlassTransitionC: nan, ConservationResidual: nan, EndTimeS: nan}}})
	for _, r := range cmp[1:] {
		if !labels[r[0]] {
			t.Errorf("comparison row %q is not a label of Vocabulary", r[0])
		}
	}
	for _, h := range CompareHeader[3:] {
		if !keys[h] {
			t.Errorf("compare.csv column %s is not a key of Vocabulary", h)
		}
	}
	for _, c := range SweepColumns {
		if !keys[c.Name] {
			t.Errorf("summary.csv column %s is not a key of Vocabulary", c.Name)
		}
	}
	// The same figure reads the same on the terminal and in the comparison.
	for _, want := range []string{"100.0 °C", "3.0 K", "2.0 K", "0.900", "2.00 h", "90.0 °C", "0.80 K at most", "2.50 h"} {
		if !strings.Contains(b.String(), want) {
			t.Errorf("terminal summary lacks %q:\n%s", want, b.String())
		}
	}
}

// TestQuantityFormat: each kind of quantity is written in its unit and
// precision; a long time is never written with six decimals.
func TestQuantityFormat(t *testing.T) {
	for _, tc := range []struct {
		key  string
		v    float64
		want string
	}{
		{"peak_temperature_C", 106.54, "106.5 °C"},
		{"max_spread_K", 10.7019, "10.7 K"},
		{"peak_depth_mm", 11.875, "11.88 mm"},
		{"min_final_cure", 0.85343, "0.853"},
		{"time_to_min_cure_s", 22604.059067, "6.28 h"},
		{"gel_time_first_s", 95.3, "95.3 s"},
		{"steps", 17820, "17820"},
		{"conservation_residual", 7.44704253e-15, "7.45e-15"},
		{"peak_temperature_C", math.NaN(), "n/a"},
	} {
		if got := Term(tc.key).Format(tc.v); got != tc.want {
			t.Errorf("%s %v: %q, want %q", tc.key, tc.v, got, tc.want)
		}
	}
}
