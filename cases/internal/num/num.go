package num

import (
	"math"
	"strconv"
)

func HumanTime(t float64) string {
	switch a := math.Abs(t); {
	case a < 120:
		return strconv.FormatFloat(t, 'g', 3, 64) + " s"
	case a < 7200:
		return strconv.FormatFloat(t/60, 'f', 1, 64) + " min"
	}
	return strconv.FormatFloat(t/3600, 'f', 2, 64) + " h"
}

// Celsius converts K to °C rounded to 1e-6 K; NaN stays NaN.
func Celsius(T float64) float64 { return Round6(KtoC(T)) }

// millimetres converts m to mm rounded to 1e-9 mm; NaN stays NaN.
func MM(z float64) float64 { return Round(z*1e3, 9) }

func Round6(v float64) float64 { return Round(v, 6) }

// roundTo rounds v to the given number of decimals; NaN and ±Inf pass
// through and −0 becomes 0.
//
// Method: round(v·10^d) is an integer, and dividing it by the exact power of
// ten 10^d (d ≤ 22) gives the float64 nearest to the decimal, whose shortest
// representation is that decimal. A value too large to scale is returned as
// it is (it is already beyond the precision asked for).
func Round(v float64, decimals int) float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return v
	}
	scale := math.Pow10(decimals)
	if math.IsInf(v*scale, 0) {
		return v
	}
	x := math.Round(v*scale) / scale
	if x == 0 {
		return 0
	}
	return x
}

// RoundSig rounds v to 9 significant digits; NaN and ±Inf pass through.
func RoundSig(v float64) float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) || v == 0 {
		return v
	}
	x, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', 9, 64), 64)
	return x
}

// FormatDepth formats a depth given in metres as the shortest exact decimal
// of the depth in millimetres, after rounding to 1e-9 mm so that the binary
// noise of the unit conversion does not show: 6.35e-3 m gives "6.35", 0 gives
// "0", 17.4625e-3 m gives "17.4625". It names the probe columns of
// probes.csv (T_6.35mm_C) and fills depth_mm of fields.csv.
func FormatDepth(depth float64) string { return Fixed(depth*1e3, 9) }

// fmtFixed rounds v to the given number of decimals (roundTo) and writes the
// shortest decimal that reads back as the rounded value; NaN gives "" and −0
// gives "0".
func Fixed(v float64, decimals int) string {
	if math.IsNaN(v) {
		return ""
	}
	return strconv.FormatFloat(Round(v, decimals), 'f', -1, 64)
}

// Sig writes v with 9 significant digits, trailing zeros dropped; NaN
// gives "" and −0 gives "0".
func Sig(v float64) string {
	if math.IsNaN(v) {
		return ""
	}
	if v == 0 {
		return "0"
	}
	return strconv.FormatFloat(v, 'g', 9, 64)
}

// At returns s[i], or NaN when s is too short (a snapshot without that
// quantity).
func At(s []float64, i int) float64 {
	if i < len(s) {
		return s[i]
	}
	return math.NaN()
}

// kelvinToC converts an absolute temperature from K to °C.
func KtoC(T float64) float64 { return T - 273.15 }

// G formats v with up to 6 significant digits, no trailing zeros.
func G(v float64) string {
	if v == 0 {
		return "0"
	}
	return strconv.FormatFloat(v, 'g', 6, 64)
}
