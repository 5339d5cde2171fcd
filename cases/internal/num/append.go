package num

import (
	"math"
	"strconv"
)

// pow10u holds 10^d for the decimals AppendFixed formats with integers.
var pow10u = [...]uint64{1, 10, 100, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9}

// fixedFastMax[d] bounds |v| for AppendFixed's integer path at d decimals:
// 2^(50 − ⌈d·log2 10⌉), so that the doubles near v are spaced less than a
// quarter of 10^-d apart (and |v|·10^d < 2^50).
var fixedFastMax = [...]float64{0x1p50, 0x1p46, 0x1p43, 0x1p40, 0x1p36, 0x1p33, 0x1p30, 0x1p26, 0x1p23, 0x1p20}

// AppendFixed appends Fixed(v, decimals) to b without allocating: v
// rounded to decimals (≤ 9) decimals, as the shortest decimal that reads
// back as the rounded value; nothing for NaN, "0" for ±0.
//
// Method: n = round(v·10^d) is the integer Round divides by 10^d, and
// for |v| < fixedFastMax[d] the shortest decimal of n/10^d is n written
// with d decimals, trailing zeros dropped: n/10^d is the double nearest to
// that decimal, and no other decimal of at most d decimals lies within the
// double's rounding interval (narrower than 10^-d), so none is shorter.
// Larger values go through strconv.AppendFloat. Tested against Fixed.
// Cost: one multiplication, one rounding, one integer division.
func AppendFixed(b []byte, v float64, decimals int) []byte {
	if math.IsNaN(v) {
		return b
	}
	if decimals < 0 || decimals >= len(pow10u) || !(math.Abs(v) < fixedFastMax[decimals]) {
		return strconv.AppendFloat(b, Round(v, decimals), 'f', -1, 64)
	}
	n := math.Round(v * float64(pow10u[decimals]))
	if n == 0 {
		return append(b, '0')
	}
	if n < 0 {
		b = append(b, '-')
		n = -n
	}
	u := uint64(n)
	b = strconv.AppendUint(b, u/pow10u[decimals], 10)
	frac := u % pow10u[decimals]
	if frac == 0 {
		return b
	}
	b = append(b, '.')
	var digits [9]byte
	d := decimals
	for i := d - 1; i >= 0; i-- {
		digits[i] = byte('0' + frac%10)
		frac /= 10
	}
	for d > 0 && digits[d-1] == '0' {
		d--
	}
	return append(b, digits[:d]...)
}

// AppendSig appends Sig(v): 9 significant digits, trailing zeros
// dropped; nothing for NaN, "0" for ±0.
func AppendSig(b []byte, v float64) []byte {
	if math.IsNaN(v) {
		return b
	}
	if v == 0 {
		return append(b, '0')
	}
	return strconv.AppendFloat(b, v, 'g', 9, 64)
}

// AppendTime appends a time in s as the shortest decimal that reads back
// as the same float64 (strconv's 'g' format with the shortest precision):
// 120, 5725.5, 1e-06. Times are not rounded: two output times a
// microsecond apart, or a run that ends at 1 µs, stay distinct in the
// files. Nothing for NaN, "0" for ±0.
func AppendTime(b []byte, t float64) []byte {
	switch {
	case math.IsNaN(t):
		return b
	case t == 0:
		return append(b, '0')
	}
	return strconv.AppendFloat(b, t, 'g', -1, 64)
}
