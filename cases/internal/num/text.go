package num

import (
	"math"
	"strconv"
)

// The formats of numbers for reading (terminal, report pages, README), one
// per kind of quantity; NaN and ±Inf read "n/a".

// TextC writes a temperature in °C to 0.1: "106.5 °C".
func TextC(v float64) string {
	if !finite(v) {
		return "n/a"
	}
	return strconv.FormatFloat(v, 'f', 1, 64) + " °C"
}

// TextK writes a temperature difference in K to 0.1: "10.7 K".
func TextK(v float64) string {
	if !finite(v) {
		return "n/a"
	}
	return strconv.FormatFloat(v, 'f', 1, 64) + " K"
}

// TextMM writes a depth in mm to 4 significant digits: "11.88 mm".
func TextMM(v float64) string {
	if !finite(v) {
		return "n/a"
	}
	return strconv.FormatFloat(v, 'g', 4, 64) + " mm"
}

// TextCure writes a degree of cure to 0.001: "0.853".
func TextCure(v float64) string {
	if !finite(v) {
		return "n/a"
	}
	return strconv.FormatFloat(v, 'f', 3, 64)
}

// TextTime writes a time given in s in s, min or h (HumanTime).
func TextTime(v float64) string {
	if !finite(v) {
		return "n/a"
	}
	return HumanTime(v)
}

// Duration writes a time given in s for reading, with the seconds beside it
// from 2 min on: "95.3 s", "94.8 min (5688 s)", "6.28 h (22604 s)". A long
// time is never written with six decimals.
func Duration(t float64) string {
	if !finite(t) {
		return "n/a"
	}
	if math.Abs(t) < 120 {
		return HumanTime(t)
	}
	return HumanTime(t) + " (" + Seconds(t) + " s)"
}

// Seconds writes a time in s: whole seconds from 1000 s on, 4 significant
// digits below ("22604", "95.31").
func Seconds(t float64) string {
	if math.Abs(t) >= 1000 {
		return strconv.FormatFloat(math.Round(t), 'f', 0, 64)
	}
	return strconv.FormatFloat(t, 'g', 4, 64)
}

// SecondsUp writes a time in s rounded up to a whole second, for a value
// that must not fall short of it (a time.end at a program's end); a time
// within 1 µs above a whole second rounds down to it.
func SecondsUp(t float64) string {
	return strconv.FormatFloat(math.Ceil(t-1e-6), 'f', 0, 64)
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
