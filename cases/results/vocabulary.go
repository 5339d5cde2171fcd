package results

import (
	"math"
	"strconv"
	"strings"

	"cureslab/cases/internal/num"
)

// Quantity names one figure of a run's summary once, for every place it
// appears: its key in summary.json and in the CSV tables (a sweep's
// summary.csv, compare.csv, uncertainty.csv), the label the terminal, the
// report pages and the README print beside it, its unit, and what it is.
// A new summary field gets its line in Vocabulary and nowhere else.
type Quantity struct {
	Key   string // summary.json and CSV key: "peak_temperature_C"
	Label string // terminal, report and README label: "peak temperature"
	Unit  string // "°C", "K", "s", "mm", or "" for a number without unit
	Means string // what the number is, one sentence (README "Summary fields")
	// Value reads the quantity from a summary; NaN when it does not apply.
	Value func(s *Summary) float64
}

// Vocabulary lists the numbers of a run's summary in the order of
// summary.json. Terminal, report, CSV headers and README take their names
// from here (TestVocabularyEverywhere); every number of summary.json has its
// line (TestVocabularyComplete).
var Vocabulary = []Quantity{
	{"peak_temperature_C", "peak temperature", "°C",
		"the highest temperature of any cell at any time (read between steps too)",
		func(s *Summary) float64 { return float64(s.PeakTemperatureC) }},
	{"peak_time_s", "time of the peak", "s", "when the peak temperature was reached",
		func(s *Summary) float64 { return float64(s.PeakTimeS) }},
	{"peak_depth_mm", "depth of the peak", "mm", "where the peak temperature was reached (depth 0 is the top face)",
		func(s *Summary) float64 { return float64(s.PeakDepthMM) }},
	{"overshoot_K", "overshoot", "K",
		"the largest excess of any cell over the hottest temperature any driver (air, platen or control program) has reached so far; negative when the part never passes it",
		func(s *Summary) float64 { return float64(s.OvershootK) }},
	{"hottest_driving_temperature_C", "hottest driving temperature", "°C", "the hottest temperature any driver reached over the run",
		func(s *Summary) float64 { return float64(s.HottestDrivingC) }},
	{"heating_lag_K", "heating lag", "K",
		"the largest amount by which any cell stays below the hottest driving temperature while the drivers rise or hold",
		func(s *Summary) float64 { return float64(s.HeatingLagK) }},
	{"heating_lag_time_s", "time of the heating lag", "s", "when the heating lag was largest",
		func(s *Summary) float64 { return float64(s.HeatingLagTimeS) }},
	{"heating_lag_depth_mm", "depth of the heating lag", "mm", "where the heating lag was largest (the coldest cell)",
		func(s *Summary) float64 { return float64(s.HeatingLagDepthMM) }},
	{"cooling_lag_K", "cooling lag", "K",
		"the largest amount by which any cell stays above the hottest driving temperature while the drivers fall",
		func(s *Summary) float64 { return float64(s.CoolingLagK) }},
	{"cooling_lag_time_s", "time of the cooling lag", "s", "when the cooling lag was largest",
		func(s *Summary) float64 { return float64(s.CoolingLagTimeS) }},
	{"cooling_lag_depth_mm", "depth of the cooling lag", "mm", "where the cooling lag was largest (the hottest cell)",
		func(s *Summary) float64 { return float64(s.CoolingLagDepthMM) }},
	{"max_spread_K", "largest spread", "K",
		"the largest difference between the hottest and the coldest cell of the curing layers at one time",
		func(s *Summary) float64 { return float64(s.MaxSpreadK) }},
	{"layer_spread_K", "layer spread", "K",
		"for every layer, the largest difference between its hottest and coldest cell at one time (an object by layer; as one number, the largest of them)",
		func(s *Summary) float64 { return s.LayerSpreadK.Max() }},
	{"min_final_cure", "least final cure", "", "the lowest degree of cure of any curing cell at the end",
		func(s *Summary) float64 { return float64(s.MinFinalCure) }},
	{"min_final_cure_depth_mm", "depth of the least final cure", "mm", "where the least final cure is",
		func(s *Summary) float64 { return float64(s.MinFinalCureDepthMM) }},
	{"mean_final_cure", "mean final cure", "", "the degree of cure at the end, averaged over the thickness of the curing layers",
		func(s *Summary) float64 { return float64(s.MeanFinalCure) }},
	{"time_to_min_cure_s", "time to min_cure", "s", "when every curing cell had reached criteria.min_cure (empty without that criterion or if never)",
		func(s *Summary) float64 { return float64(s.TimeToMinCureS) }},
	{"gel_time_first_s", "first gel time", "s", "when the first curing cell reached its gel point",
		func(s *Summary) float64 { return float64(s.GelTimeFirstS) }},
	{"gel_time_last_s", "last gel time", "s", "when the last curing cell reached its gel point (empty if one never did)",
		func(s *Summary) float64 { return float64(s.GelTimeLastS) }},
	{"min_final_glass_transition_C", "lowest final Tg", "°C", "the lowest glass transition temperature of any curing cell at the end",
		func(s *Summary) float64 { return float64(s.MinFinalGlassTransitionC) }},
	{"control_max_error_K", "sensor off its program", "K",
		"under closed-loop volumetric heating, the largest difference between the sensor and its program at the output times",
		func(s *Summary) float64 { return optional(s.ControlMaxErrorK) }},
	{"min_viscosity_Pa_s", "least viscosity", "Pa·s",
		"where a layer has a viscosity law, the lowest viscosity of its resin in any cell at any time (read between steps too)",
		func(s *Summary) float64 { return optional(s.MinViscosityPaS) }},
	{"min_viscosity_time_s", "time of the least viscosity", "s", "when the least viscosity was reached",
		func(s *Summary) float64 { return optional(s.MinViscosityTimeS) }},
	{"min_viscosity_depth_mm", "depth of the least viscosity", "mm", "where the least viscosity was reached",
		func(s *Summary) float64 { return optional(s.MinViscosityDepthMM) }},
	{"flow_window_s", "flow window", "s",
		"the shortest, over the cells with a viscosity law, of the time spent below flow_viscosity_Pa_s before gel: how long the thickest-flowing part of the resin can wet, level or consolidate",
		func(s *Summary) float64 { return optional(s.FlowWindowS) }},
	{"flow_viscosity_Pa_s", "flow threshold", "Pa·s", "the viscosity below which the resin counts as flowing (criteria.flow_viscosity, default 100 Pa·s)",
		func(s *Summary) float64 { return optional(s.FlowViscosityPaS) }},
	{"control_sensor_depth_mm", "sensor depth", "mm", "under closed-loop volumetric heating, the depth of the controlled temperature",
		func(s *Summary) float64 { return optional(s.ControlSensorDepthMM) }},
	{"conservation_residual", "conservation residual", "",
		"the relative imbalance of the run's energy ledger (heat in + reaction heat against the change in stored heat): it proves the bookkeeping, not the accuracy",
		func(s *Summary) float64 { return float64(s.ConservationResidual) }},
	{"estimated_error", "estimated error", "K",
		"with run --verify, the peak temperature of this run minus that of a run at tolerances ten times tighter (the object also holds the least final cure and the time to min_cure)",
		func(s *Summary) float64 {
			if s.EstimatedError == nil {
				return math.NaN()
			}
			return float64(s.EstimatedError.PeakTemperatureK)
		}},
	{"steps", "steps", "", "the number of time steps taken",
		func(s *Summary) float64 { return float64(s.Steps) }},
	{"end_time_s", "end time", "s", "the time the run reached (before the case's end after a runaway or failure)",
		func(s *Summary) float64 { return float64(s.EndTimeS) }},
}

// GelFrontSpread names the spread of the gel front that compare adds:
// the last gel time less the first.
var GelFrontSpread = Quantity{"gel_front_spread_s", "gel front spread", "s",
	"the last gel time less the first: how long the gel front takes to cross the curing layers",
	func(s *Summary) float64 { return float64(gelFrontSpread(*s)) }}

// optional reads a summary value that is absent in some runs.
func optional(f *Float) float64 {
	if f == nil {
		return math.NaN()
	}
	return float64(*f)
}

// Term returns the quantity of Vocabulary (or GelFrontSpread) with the
// given key. An unknown key is a programming error: it panics.
func Term(key string) Quantity {
	for _, q := range Vocabulary {
		if q.Key == key {
			return q
		}
	}
	if key == GelFrontSpread.Key {
		return GelFrontSpread
	}
	panic("results: no quantity " + key + " in Vocabulary")
}

// Label returns the label of the quantity with the given key (Term).
func Label(key string) string { return Term(key).Label }

// Heading returns the label of the quantity with the given key with its
// unit in brackets, as axes and table heads write it: "peak temperature
// (°C)", "least final cure (–)".
func Heading(key string) string {
	q := Term(key)
	u := q.Unit
	if u == "" {
		u = "–"
	}
	return q.Label + " (" + u + ")"
}

// Format writes a value of q for reading, in its unit: temperatures and
// temperature differences to 0.1, depths to 4 significant digits, times in
// s, min or h (num.HumanTime), degrees of cure to 0.001, whole counts as integers, other numbers to 3
// significant digits; NaN is "n/a".
func (q Quantity) Format(v float64) string {
	switch {
	case math.IsNaN(v) || math.IsInf(v, 0):
		return "n/a"
	case q.Unit == "°C":
		return num.TextC(v)
	case q.Unit == "K":
		return num.TextK(v)
	case q.Unit == "mm":
		return num.TextMM(v)
	case q.Unit == "s":
		return num.HumanTime(v)
	case strings.HasSuffix(q.Key, "_cure"):
		return num.TextCure(v)
	case v == math.Trunc(v) && math.Abs(v) < 1e15:
		return strconv.FormatFloat(v, 'f', 0, 64)
	}
	return strconv.FormatFloat(v, 'g', 3, 64)
}
