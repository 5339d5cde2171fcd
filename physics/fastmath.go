package physics

import "math"

// This file holds fexp and flog, table-driven replacements for math.Exp and
// math.Log in the cure-rate hot loop. Both are pure Go (no assembly, no
// unsafe), never allocate, and read only the constant tables below, which
// are written once as literals and checked bit for bit against a 256-bit
// recomputation by TestFastmathTables.

// Constants of fexp. The step is ln2/expN; expStepHi is ln2/64 rounded to
// a multiple of 2^-42 (36 significant bits), so k·expStepHi is exact for
// |k| < 2^17 (|x| ≤ 746 gives |k| ≤ 68 900), and expStepLo is the rest,
// ln2/64 − expStepHi, rounded to double (both checked by TestFastmathTables).
const (
	expN       = 64
	expInvStep = 0x1.71547652b82fep+06 // 64/ln2, rounded
	expStepHi  = 0x1.62e42fefap-07     // ln2/64 to 36 bits
	expStepLo  = 0x1.cf79abc9e3b3ap-46 // ln2/64 − expStepHi
	// expShift = 1.5·2^52: adding it rounds x·64/ln2 to the nearest
	// integer k and leaves k in the low mantissa bits.
	expShift = 0x1.8p52
	// expFastMax bounds the fast path: for |x| ≤ 707 the result and
	// every intermediate are normal doubles (2^-1021 < e^x < 2^1021).
	expFastMax = 707
	// expOverflow is the largest double x with e^x below math.MaxFloat64
	// (ln MaxFloat64 = 709.782712893383996732…, 256-bit reference in
	// fastmath_test.go); e^x of the next double rounds to +Inf. Same
	// constant as Overflow in the Go source of math.Exp (exp.go).
	expOverflow = 7.09782712893383973096e+02
	// Below expUnderflow e^x < 2^-1076 < ½·2^-1074, which rounds to 0.
	expUnderflow = -746
)

// Taylor coefficients 1/n! of e^r − 1 = r + r²/2! + … + r⁶/6!.
// Source: the exponential series; truncation bound in the fexp comment.
const (
	expC2 = 1.0 / 2
	expC3 = 1.0 / 6
	expC4 = 1.0 / 24
	expC5 = 1.0 / 120
	expC6 = 1.0 / 720
)

// expEntry holds 2^(j/64) as a double hi (stored as its bits, ready for
// exponent arithmetic) and the relative tail (2^(j/64) − hi)/hi.
type expEntry struct {
	hiBits uint64
	tail   float64
}

// Exp returns e^x for the solver's loops outside this package: the
// table-driven fexp below (Tang's method), within 0.53 ulp of the exact
// value for every double x, with math.Exp's special cases; about 4 ns
// against 7 ns for math.Exp on the development machine.
func Exp(x float64) float64 { return fexp(x) }

// fexp returns e^x for any double x.
//
//	e^x = 2^m · 2^(j/64) · e^r,   k = round(64x/ln2) = 64m + j,
//	r = x − k·ln2/64,  0 ≤ j < 64,  |r| ≤ ln2/128·(1 + 2^-35) < 0.0054153.
//
// Method: table-driven reduction after Tang, with 64 table entries. k is
// found with the 1.5·2^52 shifter (the product x·64/ln2 is rounded, which
// moves |r| past ln2/128 by at most 2^-35 of it). r = (x − k·S_hi) − k·S_lo,
// S_hi + S_lo = ln2/64: k·S_hi is exact (S_hi has 36 bits, |k| < 2^17) and
// so is x − k·S_hi (Sterbenz's lemma), so r carries one rounding. 2^(j/64)
// comes from the table as hi·(1 + tail), and e^r − 1 = p(r) is the degree-6
// Taylor polynomial (coefficients 1/n!), truncation error
// ≤ |r|^7/7!·1.01 < 2^-65 for |r| < 0.0054153. The result is
// s + s·(tail + p(r)), s = 2^m·hi formed by adding m to the exponent bits
// of hi, so only the last addition rounds at full size.
//
// Error budget for normal results, in ulps of the result: 0.5 for the
// final rounding; at most about 0.006 each for the rounding of r, of p(r),
// of tail + p, of s·(tail + p), and for the dropped product tail·p
// (each ≤ 2^-60.4 relative, and a relative error ε is at most ε·2^53 ulp);
// 0.0003 for truncation: 0.53 ulp in all. A subnormal result is y·2^m
// with y that normal intermediate (error ≤ 0.53 ulp of y, which is at most
// half the subnormal spacing 2^-1074 once scaled) rounded once more:
// ≤ 0.77 ulp of 2^-1074. If the compiler fuses a·b + c into an FMA (Go
// allows it; GOAMD64=v3, arm64), every step stays exact or gets more
// accurate, and the budget holds.
//
// Accuracy measured by TestFexpAccuracy against a 256-bit reference on
// ~5 300 points over [−745.2, 710]: max 0.502 ulp for normal results
// (0.505 when built with GOAMD64=v3) and 0.506 ulp of 2^-1074 for subnormal
// ones. A one-off run on 10^5 further points gave max 0.508 ulp on
// [−40, 5] and 0.743 ulp of 2^-1074 at x = −709.06.
//
// Reference: P. T. P. Tang, "Table-driven implementation of the exponential
// function in IEEE floating-point arithmetic", ACM TOMS 15(2):144–157,
// 1989 (the reduction x = (32m + j)·ln2/32 + r and the reconstruction
// 2^m·(S_j + S_j·p(r)) with a leading/trailing pair S_j; there N = 32 and a
// degree-5 minimax p, from memory).
//
// Special cases: fexp(NaN) = NaN, fexp(+Inf) = +Inf, fexp(−Inf) = 0,
// fexp(x) = +Inf for x > 709.782712893383973 (overflow), as math.Exp.
// Subnormal results (−745.13 < x < −708.40) are produced, with one final
// rounding; e^x ≤ 2^-1075 gives 0. NaN and |x| > 707 take a slower branch
// (expSlow). Go's amd64 assembly math.Exp differs from both the exact value
// and fexp in two places (TestFexpVsStdlib): it errs by up to 1.7 ulp, and
// it returns +Inf for x in about (709.47, 709.78], where e^x is finite.
//
// Cost: no allocation, no division, one 16-byte table read, 21
// floating-point operations on the fast path; about 3.9 ns against 7.3 ns
// for math.Exp here (BenchmarkFexp).
func fexp(x float64) float64 {
	if !(math.Abs(x) <= expFastMax) {
		return expSlow(x)
	}
	kd := x*expInvStep + expShift
	k := math.Float64bits(kd) - math.Float64bits(expShift) // k mod 2^64
	kd -= expShift
	r := (x - kd*expStepHi) - kd*expStepLo
	e := &expTable[k%expN]
	// s = 2^m·hi, m = floor(k/64): add m to the exponent field of hi.
	s := math.Float64frombits(e.hiBits + uint64(int64(k)>>6)<<52)
	r2 := r * r
	p := r + r2*(expC2+r*expC3+r2*(expC4+r*expC5+r2*expC6))
	return s + s*(e.tail+p)
}

// expSlow is fexp outside the fast range: NaN, overflow, underflow, and
// results whose scale 2^m is not a normal double.
func expSlow(x float64) float64 {
	switch {
	case x != x:
		return x
	case x > expOverflow:
		return math.Inf(1)
	case x < expUnderflow:
		return 0
	}
	kd := x*expInvStep + expShift
	k := int64(math.Float64bits(kd) - math.Float64bits(expShift))
	kd -= expShift
	r := (x - kd*expStepHi) - kd*expStepLo
	e := &expTable[k&(expN-1)]
	hi := math.Float64frombits(e.hiBits)
	r2 := r * r
	p := r + r2*(expC2+r*expC3+r2*(expC4+r*expC5+r2*expC6))
	y := hi + hi*(e.tail+p) // in [0.99, 2.02): normal
	m := k >> 6             // floor(k/64), in [−1077, 1024]
	if m > 0 {
		// y·2^(m−1) is exact; the doubling rounds (to +Inf if it must).
		return y * expPow2(m-1) * 2
	}
	// y·2^(m+1000) is exact and normal; the second product rounds once
	// into the subnormal range.
	return y * expPow2(m+1000) * 0x1p-1000
}

// expPow2 returns 2^n for n in [−1022, 1023].
func expPow2(n int64) float64 {
	return math.Float64frombits(uint64(n+1023) << 52)
}

// Constants of flog. x = 2^k·m with m in [logOff, 2·logOff), logOff =
// 1 − 2^-10 − 153·2^-9 = 0.7001953125, chosen so that 1 lies in the middle
// of table interval 153 (in bit space), [1 − 2^-10, 1 + 2^-9), whose
// centre value is exactly 1. ln2Hi is ln 2 rounded to a multiple of 2^-42,
// so k·ln2Hi (|k| ≤ 1074) and k·ln2Hi + logEntry.lhi are exact; ln2Lo is
// ln 2 − ln2Hi rounded to double (checked by TestFastmathTables).
const (
	logN       = 256
	logOffBits = 0x3fe6680000000000 // math.Float64bits(0.7001953125)
	ln2Hi      = 0x1.62e42fefa38p-01
	ln2Lo      = 0x1.ef35793c7673p-45
	// logMaskLow clears the low 9 bits of m: mh = m with 44 significant
	// bits, so mh·invc (invc has ≤ 9 bits) is exact.
	logMaskLow = 1<<9 - 1
)

// Taylor coefficients (−1)^(n+1)/n of ln(1+r) = r − r²/2 + … + r⁷/7.
// Source: the logarithmic (Mercator) series; truncation bound in the flog
// comment.
const (
	logC2 = -1.0 / 2
	logC3 = 1.0 / 3
	logC4 = -1.0 / 4
	logC5 = 1.0 / 5
	logC6 = -1.0 / 6
	logC7 = 1.0 / 7
)

// logEntry holds, for one interval of m, invc = n/256 (a reciprocal of the
// interval's centre rounded to the 2^-8 grid) and −ln(invc) = lhi + llo,
// with lhi a multiple of 2^-42.
type logEntry struct {
	invc, lhi, llo float64
}

// flog returns the natural logarithm ln x.
//
//	ln x = k·ln2 − ln(invc_j) + ln(1 + r),   r = m·invc_j − 1,
//	x = 2^k·m,  m in [0.7002, 1.4004),  |r| < 0.00403 (2^-7.95).
//
// Method: table-driven reduction after Tang. The top 8 bits of m above
// logOff select one of 256 intervals j; invc_j is a multiple of 2^-8 near
// 1/m, picked by genLogTable (fastmath_test.go) so that r = m·invc_j − 1 is
// exactly a double. r is computed without rounding error as
// (m_h·invc − 1) + m_l·invc, m = m_h + m_l with m_h the top 44 bits of m:
// both products are exact, the first difference is exact by Sterbenz's
// lemma, and the sum is exact because r fits in 53 bits. ln(1 + r) is the
// degree-7 Taylor polynomial, truncation error ≤ |r|^8/8·1.005 < 2^-66,
// which is ≤ 0.0031 ulp of the smallest result any entry can return
// (checked per entry by TestFastmathTables). The large terms are summed
// exactly: w = k·ln2Hi + lhi is exact (both multiples of 2^-42, |w| < 2^10)
// and hi + lo = w + r by Fast2Sum, valid because |w| ≥ 0.33 > |r| for
// k ≠ 0 and, for k = 0, |r| ≤ |lhi| or lhi = 0 (checked for every entry);
// only hi + (lo + k·ln2Lo + llo + tail) rounds at full size. On the
// interval around 1, invc = 1 and lhi = 0, so r = x − 1 exactly and the
// relative accuracy holds as x → 1: flog(1 − 1e-10) is correctly rounded.
//
// Error budget, in ulps of the result: 0.5 for the final rounding, 0.0031
// for truncation, and under 0.01 for the rounding of the tail polynomial
// and of the small-term sum (each a few 2^-53 of a term at most 2^-8 of the
// result): 0.52 ulp. Holds with or without FMA contraction.
//
// Accuracy measured by TestFlogAccuracy against a 256-bit reference on
// ~7 000 points (log-uniform over (1e-300, 1e300), subnormals, (1e-12, 1)
// log-uniform, (0, 1), 1 ± 2^-u, table edges): max 0.4999 ulp overall and
// on (1e-12, 1), 0.5000 next to 1. A one-off run on 3·10^5 further points
// gave max 0.5000 over (1e-300, 1e300) and (1e-12, 1), and 0.503 ulp at
// x = 0.99861 (1 ± 2^-u).
//
// Reference: P. T. P. Tang, "Table-driven implementation of the logarithm
// function in IEEE floating-point arithmetic", ACM TOMS 16(4):378–400,
// 1990 (the reduction x = 2^k(F + f), ln x = k·ln2 + ln F + ln(1 + f/F)
// with tabulated ln F as a leading/trailing pair). Here f/F is replaced by
// the exact m·invc − 1, which needs no division.
//
// Special cases, as math.Log: flog(+Inf) = +Inf, flog(0) = −Inf,
// flog(x < 0) = NaN, flog(NaN) = NaN. Subnormal x are scaled by 2^52 and
// get the same accuracy (Go's amd64 assembly math.Log does not normalise
// them: math.Log(5e-324) = −709.09 instead of −744.44). These cases cost
// one extra, normally untaken, branch.
//
// Precondition for ln(1 − α): flog(1 − α) sees 1 − α already rounded, an
// absolute error of up to 2^-54 (relative 2^-54/α in the logarithm for
// small α); math.Log1p(−α) does not have it. Inside an exponent such as
// −E/(RT) + n·ln(1 − α) that is far below one ulp of the sum.
//
// Cost: no allocation, no division, one 24-byte table read, 28
// floating-point operations; about 4.4 ns against 8.1 ns for math.Log and
// 9.4 ns for math.Log1p here (BenchmarkFlog; 2-core amd64, noisy: runs
// sharing a core with other work measured up to 7.4 ns).
func flog(x float64) float64 {
	ix := math.Float64bits(x)
	var kAdj int64
	// One unsigned compare catches 0, subnormals, negatives, +Inf and NaN.
	if ix-0x0010000000000000 >= 0x7ff0000000000000-0x0010000000000000 {
		switch {
		case x != x || x == math.Inf(1):
			return x
		case x < 0:
			return math.NaN()
		case x == 0:
			return math.Inf(-1)
		}
		ix = math.Float64bits(x * 0x1p52) // subnormal: scale to normal
		kAdj = -52
	}
	tmp := ix - logOffBits
	k := int64(tmp) >> 52
	mBits := ix - uint64(k)<<52
	e := &logTable[(tmp>>44)%logN]
	m := math.Float64frombits(mBits)
	mh := math.Float64frombits(mBits &^ logMaskLow)
	r := (mh*e.invc - 1) + (m-mh)*e.invc
	kf := float64(k + kAdj)
	w := kf*ln2Hi + e.lhi
	hi := w + r
	lo := (w - hi) + r
	r2 := r * r
	tail := r2 * (logC2 + r*logC3 + r2*(logC4+r*logC5+r2*(logC6+r*logC7)))
	return hi + (lo + (kf*ln2Lo + e.llo) + tail)
}

// expTable[j] holds 2^(j/64) = hi·(1 + tail).
// Source: generated by genExpTable in fastmath_test.go (six correctly
// rounded 256-bit square roots of 2^j), checked bit for bit by
// TestFastmathTables.
var expTable = [expN]expEntry{
	{0x3ff0000000000000, 0},                      // 2^(0/64)
	{0x3ff02c9a3e778061, -0x1.160139cd8dc5dp-56}, // 2^(1/64)
	{0x3ff059b0d3158574, 0x1.cd2523567f613p-55},  // 2^(2/64)
	{0x3ff0874518759bc8, 0x1.0f74e61e6c861p-57},  // 2^(3/64)
	{0x3ff0b5586cf9890f, 0x1.79aa65d837b6dp-54},  // 2^(4/64)
	{0x3ff0e3ec32d3d1a2, 0x1.ebe3d702f9cd1p-60},  // 2^(5/64)
	{0x3ff11301d0125b51, -0x1.556522a2fbd0ep-54}, // 2^(6/64)
	{0x3ff1429aaea92de0, -0x1.1c923b9d5f416p-54}, // 2^(7/64)
	{0x3ff172b83c7d517b, -0x1.01b15eaa59348p-55}, // 2^(8/64)
	{0x3ff1a35beb6fcb75, 0x1.b898c3f1353bfp-55},  // 2^(9/64)
	{0x3ff1d4873168b9aa, 0x1.aecf73e3a2f6p-54},   // 2^(10/64)
	{0x3ff2063b88628cd6, 0x1.a6f4144a6c38dp-55},  // 2^(11/64)
	{0x3ff2387a6e756238, 0x1.68efde3a8a894p-54},  // 2^(12/64)
	{0x3ff26b4565e27cdd, 0x1.0472b981fe7f2p-55},  // 2^(13/64)
	{0x3ff29e9df51fdee1, 0x1.2f7e16d09ab31p-55},  // 2^(14/64)
	{0x3ff2d285a6e4030b, 0x1.b3782720c0ab4p-55},  // 2^(15/64)
	{0x3ff306fe0a31b715, 0x1.34d754db0abb6p-55},  // 2^(16/64)
	{0x3ff33c08b26416ff, 0x1.fdd395dd3f84ap-55},  // 2^(17/64)
	{0x3ff371a7373aa9cb, -0x1.24aedcc4b5068p-54}, // 2^(18/64)
	{0x3ff3a7db34e59ff7, -0x1.1d1e83e9436d2p-56}, // 2^(19/64)
	{0x3ff3dea64c123422, 0x1.59f48a72a4c6dp-55},  // 2^(20/64)
	{0x3ff4160a21f72e2a, -0x1.8a78f4817895bp-58}, // 2^(21/64)
	{0x3ff44e086061892d, 0x1.363ed60c2ac11p-59},  // 2^(22/64)
	{0x3ff486a2b5c13cd0, 0x1.ecce1daa10379p-57},  // 2^(23/64)
	{0x3ff4bfdad5362a27, 0x1.690cebb7aafbp-56},   // 2^(24/64)
	{0x3ff4f9b2769d2ca7, -0x1.f94340071a38ep-55}, // 2^(25/64)
	{0x3ff5342b569d4f82, -0x1.8dec6bd0f385fp-56}, // 2^(26/64)
	{0x3ff56f4736b527da, 0x1.3350518fdd78ep-54},  // 2^(27/64)
	{0x3ff5ab07dd485429, 0x1.063e1e21c5409p-54},  // 2^(28/64)
	{0x3ff5e76f15ad2148, 0x1.432e62b64c035p-54},  // 2^(29/64)
	{0x3ff6247eb03a5585, -0x1.c33c53bef4da8p-55}, // 2^(30/64)
	{0x3ff6623882552225, -0x1.3cedd78565858p-54}, // 2^(31/64)
	{0x3ff6a09e667f3bcd, -0x1.3b3efbf5e2228p-54}, // 2^(32/64)
	{0x3ff6dfb23c651a2f, -0x1.367efb86da9eep-57}, // 2^(33/64)
	{0x3ff71f75e8ec5f74, -0x1.81f647e5a3ecfp-56}, // 2^(34/64)
	{0x3ff75feb564267c9, -0x1.619321e55e68ap-55}, // 2^(35/64)
	{0x3ff7a11473eb0187, -0x1.b32dcb94da51dp-56}, // 2^(36/64)
	{0x3ff7e2f336cf4e62, 0x1.5ebe1abd66c55p-57},  // 2^(37/64)
	{0x3ff82589994cce13, -0x1.369b6f13b3734p-54}, // 2^(38/64)
	{0x3ff868d99b4492ed, -0x1.4d450d872576ep-54}, // 2^(39/64)
	{0x3ff8ace5422aa0db, 0x1.db72fc1f0eab4p-55},  // 2^(40/64)
	{0x3ff8f1ae99157736, 0x1.bf68359f35f44p-56},  // 2^(41/64)
	{0x3ff93737b0cdc5e5, -0x1.da9b88b6c1e29p-58}, // 2^(42/64)
	{0x3ff97d829fde4e50, -0x1.2434322f4f9aap-54}, // 2^(43/64)
	{0x3ff9c49182a3f090, 0x1.1affc2b91ce27p-56},  // 2^(44/64)
	{0x3ffa0c667b5de565, -0x1.7c50422622263p-55}, // 2^(45/64)
	{0x3ffa5503b23e255d, -0x1.1bbd1d3bcbb15p-54}, // 2^(46/64)
	{0x3ffa9e6b5579fdbf, 0x1.469846e735ab3p-55},  // 2^(47/64)
	{0x3ffae89f995ad3ad, 0x1.c1a7792cb3387p-55},  // 2^(48/64)
	{0x3ffb33a2b84f15fb, -0x1.5c3d956dcaebap-58}, // 2^(49/64)
	{0x3ffb7f76f2fb5e47, -0x1.8d6f438ad9334p-57}, // 2^(50/64)
	{0x3ffbcc1e904bc1d2, 0x1.4ffd70a5fddcdp-56},  // 2^(51/64)
	{0x3ffc199bdd85529c, 0x1.36eae30af0cb3p-56},  // 2^(52/64)
	{0x3ffc67f12e57d14b, 0x1.4e08fd10959acp-55},  // 2^(53/64)
	{0x3ffcb720dcef9069, 0x1.76b2c6c921968p-57},  // 2^(54/64)
	{0x3ffd072d4a07897c, -0x1.fad5d3ffffa6fp-55}, // 2^(55/64)
	{0x3ffd5818dcfba487, 0x1.4a385a63d07a7p-56},  // 2^(56/64)
	{0x3ffda9e603db3285, 0x1.e5a50d5c192acp-55},  // 2^(57/64)
	{0x3ffdfc97337b9b5f, -0x1.2d52107b43e1fp-55}, // 2^(58/64)
	{0x3ffe502ee78b3ff6, 0x1.4b604603a88d3p-56},  // 2^(59/64)
	{0x3ffea4afa2a490da, -0x1.ff7128fd391fp-55},  // 2^(60/64)
	{0x3ffefa1bee615a27, 0x1.ec3bc41aa2008p-55},  // 2^(61/64)
	{0x3fff50765b6e4540, 0x1.a64a931d185eep-55},  // 2^(62/64)
	{0x3fffa7c1819e90d8, 0x1.7893b4d91cd9dp-56},  // 2^(63/64)
}

// logTable[j] serves m with bit pattern in [logOffBits + j·2^44,
// logOffBits + (j+1)·2^44): intervals of width 2^-9 below 1 and 2^-8
// above. Source: generated by genLogTable in fastmath_test.go (invc choice
// as described at flog, −ln invc from a 256-bit series), checked bit for
// bit by TestFastmathTables.
var logTable = [logN]logEntry{
	{0x1.6dp+00, -0x1.6b3bb22359p-02, -0x1.0f6257a933268p-44}, // m ≥ 0.700195
	{0x1.6cp+00, -0x1.686c81e9b1p-02, -0x1.2bb110af84054p-44}, // m ≥ 0.702148
	{0x1.6bp+00, -0x1.659b57303ep-02, -0x1.f281db0af8efcp-46}, // m ≥ 0.704102
	{0x1.6ap+00, -0x1.62c82f2b9cp-02, -0x1.e54bdbd7c8a98p-44}, // m ≥ 0.706055
	{0x1.69p+00, -0x1.5ff3070a79p-02, -0x1.e9e439f105039p-45}, // m ≥ 0.708008
	{0x1.68p+00, -0x1.5d1bdbf581p-02, 0x1.8d6bdc9c7c238p-44},  // m ≥ 0.709961
	{0x1.67p+00, -0x1.5a42ab0f4dp-02, 0x1.e63af2df7ba69p-50},  // m ≥ 0.711914
	{0x1.66p+00, -0x1.5767717456p-02, 0x1.64ead9524d7cap-44},  // m ≥ 0.713867
	{0x1.65p+00, -0x1.548a2c3addp-02, -0x1.3167e63081cf7p-45}, // m ≥ 0.715820
	{0x1.64p+00, -0x1.51aad872ep-02, 0x1.f4bd8db0a7cc1p-44},   // m ≥ 0.717773
	{0x1.63p+00, -0x1.4ec97326p-02, -0x1.34d7aaf04d104p-45},   // m ≥ 0.719727
	{0x1.62p+00, -0x1.4be5f95778p-02, 0x1.d7c92cd9ad824p-44},  // m ≥ 0.721680
	{0x1.61p+00, -0x1.4900680401p-02, 0x1.8bccffe1a0f8cp-44},  // m ≥ 0.723633
	{0x1.6p+00, -0x1.4618bc21c6p-02, 0x1.3d82f484c84ccp-46},   // m ≥ 0.725586
	{0x1.5fp+00, -0x1.432ef2a04fp-02, 0x1.fb129931715adp-44},  // m ≥ 0.727539
	{0x1.5ep+00, -0x1.404308686ap-02, -0x1.f8ef43049f7d3p-44}, // m ≥ 0.729492
	{0x1.5ep+00, -0x1.404308686ap-02, -0x1.f8ef43049f7d3p-44}, // m ≥ 0.731445
	{0x1.5dp+00, -0x1.3d54fa5c1fp-02, -0x1.c3e1cd9a395e3p-44}, // m ≥ 0.733398
	{0x1.5cp+00, -0x1.3a64c55694p-02, -0x1.7a71cbcd735dp-44},  // m ≥ 0.735352
	{0x1.5bp+00, -0x1.3772662bfep-02, 0x1.e9436ac53b023p-44},  // m ≥ 0.737305
	{0x1.5ap+00, -0x1.347dd9a988p-02, 0x1.5594dd4c58092p-45},  // m ≥ 0.739258
	{0x1.59p+00, -0x1.31871c9544p-02, -0x1.84fab94cecfd9p-46}, // m ≥ 0.741211
	{0x1.58p+00, -0x1.2e8e2bae12p-02, 0x1.67b1e99b72bd8p-45},  // m ≥ 0.743164
	{0x1.57p+00, -0x1.2b9303ab8ap-02, 0x1.6db12d6bfb0a5p-45},  // m ≥ 0.745117
	{0x1.56p+00, -0x1.2895a13de8p-02, -0x1.a8d7ad24c13fp-44},  // m ≥ 0.747070
	{0x1.55p+00, -0x1.2596010df7p-02, -0x1.8e7bc224ea3e3p-44}, // m ≥ 0.749023
	{0x1.54p+00, -0x1.22941fbcf8p-02, 0x1.a6976f5eb0963p-44},  // m ≥ 0.750977
	{0x1.54p+00, -0x1.22941fbcf8p-02, 0x1.a6976f5eb0963p-44},  // m ≥ 0.752930
	{0x1.53p+00, -0x1.1f8ff9e48ap-02, -0x1.7946c040cbe77p-45}, // m ≥ 0.754883
	{0x1.52p+00, -0x1.1c898c169ap-02, 0x1.81410e5c62affp-44},  // m ≥ 0.756836
	{0x1.51p+00, -0x1.1980d2dd42p-02, -0x1.b7b3a7a361c9ap-45}, // m ≥ 0.758789
	{0x1.5p+00, -0x1.1675cababap-02, -0x1.8380e731f55c4p-44},  // m ≥ 0.760742
	{0x1.4fp+00, -0x1.136870293bp-02, 0x1.d3e8499d67123p-44},  // m ≥ 0.762695
	{0x1.4ep+00, -0x1.1058bf9ae5p-02, 0x1.4ab9d817d52cdp-44},  // m ≥ 0.764648
	{0x1.4ep+00, -0x1.1058bf9ae5p-02, 0x1.4ab9d817d52cdp-44},  // m ≥ 0.766602
	{0x1.4dp+00, -0x1.0d46b579abp-02, -0x1.d2c81f640e1e6p-44}, // m ≥ 0.768555
	{0x1.4cp+00, -0x1.0a324e2739p-02, -0x1.c6bee7ef4030ep-47}, // m ≥ 0.770508
	{0x1.4bp+00, -0x1.071b85fcd6p-02, 0x1.bcb8ba3e01a11p-44},  // m ≥ 0.772461
	{0x1.4ap+00, -0x1.0402594b4dp-02, -0x1.036b89ef42d7fp-48}, // m ≥ 0.774414
	{0x1.49p+00, -0x1.00e6c45ad5p-02, -0x1.cc68d52e01203p-50}, // m ≥ 0.776367
	{0x1.49p+00, -0x1.00e6c45ad5p-02, -0x1.cc68d52e01203p-50}, // m ≥ 0.778320
	{0x1.48p+00, -0x1.fb9186d5e4p-03, 0x1.d572aab993c87p-47},  // m ≥ 0.780273
	{0x1.47p+00, -0x1.f550a564b8p-03, 0x1.323e3a09202fep-45},  // m ≥ 0.782227
	{0x1.46p+00, -0x1.ef0adcbdc6p-03, 0x1.b26b79c86af24p-45},  // m ≥ 0.784180
	{0x1.45p+00, -0x1.e8c0252aa6p-03, 0x1.6805b80e8e6ffp-45},  // m ≥ 0.786133
	{0x1.44p+00, -0x1.e27076e2bp-03, 0x1.a342c2af0003cp-44},   // m ≥ 0.788086
	{0x1.44p+00, -0x1.e27076e2bp-03, 0x1.a342c2af0003cp-44},   // m ≥ 0.790039
	{0x1.43p+00, -0x1.dc1bca0abep-03, -0x1.8fac1a628ccc6p-44}, // m ≥ 0.791992
	{0x1.42p+00, -0x1.d5c216b4fcp-03, 0x1.1ba91bbca681bp-45},  // m ≥ 0.793945
	{0x1.41p+00, -0x1.cf6354e09cp-03, -0x1.771239a07d55bp-45}, // m ≥ 0.795898
	{0x1.4p+00, -0x1.c8ff7c79aap-03, 0x1.7794f689f8434p-45},   // m ≥ 0.797852
	{0x1.4p+00, -0x1.c8ff7c79aap-03, 0x1.7794f689f8434p-45},   // m ≥ 0.799805
	{0x1.3fp+00, -0x1.c2968558c2p-03, 0x1.cfd73dee38a4p-45},   // m ≥ 0.801758
	{0x1.3ep+00, -0x1.bc286742d8p-03, -0x1.9ac53f39d121cp-44}, // m ≥ 0.803711
	{0x1.3dp+00, -0x1.b5b519e8fcp-03, 0x1.4b722ec011f31p-44},  // m ≥ 0.805664
	{0x1.3dp+00, -0x1.b5b519e8fcp-03, 0x1.4b722ec011f31p-44},  // m ≥ 0.807617
	{0x1.3cp+00, -0x1.af3c94e80cp-03, 0x1.a4e633fcd9066p-52},  // m ≥ 0.809570
	{0x1.3bp+00, -0x1.a8becfc882p-03, -0x1.e3185cf21b9cfp-44}, // m ≥ 0.811523
	{0x1.3ap+00, -0x1.a23bc1fe2cp-03, 0x1.539cd91dc9f0bp-44},  // m ≥ 0.813477
	{0x1.3ap+00, -0x1.a23bc1fe2cp-03, 0x1.539cd91dc9f0bp-44},  // m ≥ 0.815430
	{0x1.39p+00, -0x1.9bb362e7ep-03, 0x1.1f2a8a1ce0ffcp-45},   // m ≥ 0.817383
	{0x1.38p+00, -0x1.9525a9cf46p-03, 0x1.297137d9f158fp-44},  // m ≥ 0.819336
	{0x1.37p+00, -0x1.8e928de886p-03, -0x1.a8154b13d72d5p-44}, // m ≥ 0.821289
	{0x1.37p+00, -0x1.8e928de886p-03, -0x1.a8154b13d72d5p-44}, // m ≥ 0.823242
	{0x1.36p+00, -0x1.87fa06520cp-03, -0x1.22120401202fcp-44}, // m ≥ 0.825195
	{0x1.35p+00, -0x1.815c0a1436p-03, 0x1.02a52f9201ce8p-44},  // m ≥ 0.827148
	{0x1.34p+00, -0x1.7ab890210ep-03, 0x1.bdb9072534a58p-45},  // m ≥ 0.829102
	{0x1.34p+00, -0x1.7ab890210ep-03, 0x1.bdb9072534a58p-45},  // m ≥ 0.831055
	{0x1.33p+00, -0x1.740f8f5404p-03, 0x1.0b66c99018aa1p-44},  // m ≥ 0.833008
	{0x1.32p+00, -0x1.6d60fe719ep-03, 0x1.bc6e557134767p-44},  // m ≥ 0.834961
	{0x1.32p+00, -0x1.6d60fe719ep-03, 0x1.bc6e557134767p-44},  // m ≥ 0.836914
	{0x1.31p+00, -0x1.66acd4272ap-03, -0x1.aa1bdbfc6c785p-44}, // m ≥ 0.838867
	{0x1.3p+00, -0x1.5ff3070a7ap-03, 0x1.8586f183bebf2p-44},   // m ≥ 0.840820
	{0x1.2fp+00, -0x1.59338d9982p-03, -0x1.0ba68b7555d4ap-48}, // m ≥ 0.842773
	{0x1.2fp+00, -0x1.59338d9982p-03, -0x1.0ba68b7555d4ap-48}, // m ≥ 0.844727
	{0x1.2ep+00, -0x1.526e5e3a1cp-03, 0x1.790ba37fc5238p-44},  // m ≥ 0.846680
	{0x1.2dp+00, -0x1.4ba36f39a6p-03, 0x1.4354bb3f219e5p-44},  // m ≥ 0.848633
	{0x1.2dp+00, -0x1.4ba36f39a6p-03, 0x1.4354bb3f219e5p-44},  // m ≥ 0.850586
	{0x1.2cp+00, -0x1.44d2b6ccb8p-03, 0x1.70cc16135783cp-46},  // m ≥ 0.852539
	{0x1.2bp+00, -0x1.3dfc2b0eccp-03, -0x1.8a72a62b8c13fp-45}, // m ≥ 0.854492
	{0x1.2bp+00, -0x1.3dfc2b0eccp-03, -0x1.8a72a62b8c13fp-45}, // m ≥ 0.856445
	{0x1.2ap+00, -0x1.371fc201e8p-03, -0x1.ee8779b2d8abcp-44}, // m ≥ 0.858398
	{0x1.29p+00, -0x1.303d718e48p-03, 0x1.680b5ce3ecb05p-50},  // m ≥ 0.860352
	{0x1.29p+00, -0x1.303d718e48p-03, 0x1.680b5ce3ecb05p-50},  // m ≥ 0.862305
	{0x1.28p+00, -0x1.29552f82p-03, 0x1.5b967f4471dfcp-44},    // m ≥ 0.864258
	{0x1.27p+00, -0x1.2266f190a6p-03, 0x1.4d20ab840e7f6p-45},  // m ≥ 0.866211
	{0x1.27p+00, -0x1.2266f190a6p-03, 0x1.4d20ab840e7f6p-45},  // m ≥ 0.868164
	{0x1.26p+00, -0x1.1b72ad52f6p-03, -0x1.e80a41811a396p-45}, // m ≥ 0.870117
	{0x1.25p+00, -0x1.1478584674p-03, -0x1.563451027c75p-46},  // m ≥ 0.872070
	{0x1.25p+00, -0x1.1478584674p-03, -0x1.563451027c75p-46},  // m ≥ 0.874023
	{0x1.24p+00, -0x1.0d77e7cd08p-03, -0x1.cb2cd2ee2f482p-44}, // m ≥ 0.875977
	{0x1.23p+00, -0x1.0671512ca6p-03, 0x1.a47579cdc0a3dp-45},  // m ≥ 0.877930
	{0x1.23p+00, -0x1.0671512ca6p-03, 0x1.a47579cdc0a3dp-45},  // m ≥ 0.879883
	{0x1.22p+00, -0x1.fec9131dcp-04, 0x1.54555d1ae6607p-44},   // m ≥ 0.881836
	{0x1.21p+00, -0x1.f0a30c0118p-04, 0x1.d599e83368e91p-44},  // m ≥ 0.883789
	{0x1.21p+00, -0x1.f0a30c0118p-04, 0x1.d599e83368e91p-44},  // m ≥ 0.885742
	{0x1.2p+00, -0x1.e27076e2bp-04, 0x1.a342c2af0003cp-45},    // m ≥ 0.887695
	{0x1.1fp+00, -0x1.d4313d66ccp-04, 0x1.9454379135713p-45},  // m ≥ 0.889648
	{0x1.1fp+00, -0x1.d4313d66ccp-04, 0x1.9454379135713p-45},  // m ≥ 0.891602
	{0x1.1ep+00, -0x1.c5e548f5bcp-04, -0x1.d0c57585fbe06p-46}, // m ≥ 0.893555
	{0x1.1ep+00, -0x1.c5e548f5bcp-04, -0x1.d0c57585fbe06p-46}, // m ≥ 0.895508
	{0x1.1dp+00, -0x1.b78c82bb1p-04, 0x1.25ef7bc3987e7p-44},   // m ≥ 0.897461
	{0x1.1cp+00, -0x1.a926d3a4acp-04, -0x1.563650bd22a9cp-44}, // m ≥ 0.899414
	{0x1.1cp+00, -0x1.a926d3a4acp-04, -0x1.563650bd22a9cp-44}, // m ≥ 0.901367
	{0x1.1bp+00, -0x1.9ab4246204p-04, 0x1.8a64826787061p-45},  // m ≥ 0.903320
	{0x1.1ap+00, -0x1.8c345d6318p-04, -0x1.b20f5acb42a66p-44}, // m ≥ 0.905273
	{0x1.1ap+00, -0x1.8c345d6318p-04, -0x1.b20f5acb42a66p-44}, // m ≥ 0.907227
	{0x1.19p+00, -0x1.7da766d7bp-04, -0x1.2cc844480c89bp-44},  // m ≥ 0.909180
	{0x1.19p+00, -0x1.7da766d7bp-04, -0x1.2cc844480c89bp-44},  // m ≥ 0.911133
	{0x1.18p+00, -0x1.6f0d28ae58p-04, 0x1.4b4641b664613p-44},  // m ≥ 0.913086
	{0x1.17p+00, -0x1.60658a9374p-04, -0x1.0c3b1dee9c4f8p-44}, // m ≥ 0.915039
	{0x1.17p+00, -0x1.60658a9374p-04, -0x1.0c3b1dee9c4f8p-44}, // m ≥ 0.916992
	{0x1.16p+00, -0x1.51b073f06p-04, -0x1.83f69278e686ap-44},  // m ≥ 0.918945
	{0x1.16p+00, -0x1.51b073f06p-04, -0x1.83f69278e686ap-44},  // m ≥ 0.920898
	{0x1.15p+00, -0x1.42edcbea64p-04, -0x1.bc0eeea7c9acdp-46}, // m ≥ 0.922852
	{0x1.15p+00, -0x1.42edcbea64p-04, -0x1.bc0eeea7c9acdp-46}, // m ≥ 0.924805
	{0x1.14p+00, -0x1.341d7961bcp-04, -0x1.1d0929983761p-44},  // m ≥ 0.926758
	{0x1.13p+00, -0x1.253f62f0ap-04, -0x1.416f8fb69a701p-44},  // m ≥ 0.928711
	{0x1.13p+00, -0x1.253f62f0ap-04, -0x1.416f8fb69a701p-44},  // m ≥ 0.930664
	{0x1.12p+00, -0x1.16536eea38p-04, 0x1.47c5e768fa309p-46},  // m ≥ 0.932617
	{0x1.12p+00, -0x1.16536eea38p-04, 0x1.47c5e768fa309p-46},  // m ≥ 0.934570
	{0x1.11p+00, -0x1.075983599p-04, 0x1.b8ecfe4b59987p-44},   // m ≥ 0.936523
	{0x1.1p+00, -0x1.f0a30c0118p-05, 0x1.d599e83368e91p-45},   // m ≥ 0.938477
	{0x1.1p+00, -0x1.f0a30c0118p-05, 0x1.d599e83368e91p-45},   // m ≥ 0.940430
	{0x1.0fp+00, -0x1.d276b8adbp-05, -0x1.6a423c78a64bp-46},   // m ≥ 0.942383
	{0x1.0fp+00, -0x1.d276b8adbp-05, -0x1.6a423c78a64bp-46},   // m ≥ 0.944336
	{0x1.0ep+00, -0x1.b42dd71198p-05, 0x1.c827ae5d6704cp-46},  // m ≥ 0.946289
	{0x1.0ep+00, -0x1.b42dd71198p-05, 0x1.c827ae5d6704cp-46},  // m ≥ 0.948242
	{0x1.0dp+00, -0x1.95c830ec9p-05, 0x1.c148297c5feb8p-45},   // m ≥ 0.950195
	{0x1.0dp+00, -0x1.95c830ec9p-05, 0x1.c148297c5feb8p-45},   // m ≥ 0.952148
	{0x1.0cp+00, -0x1.77458f633p-05, 0x1.181dce586af09p-44},   // m ≥ 0.954102
	{0x1.0bp+00, -0x1.58a5bafc9p-05, 0x1.b2b739570ad39p-45},   // m ≥ 0.956055
	{0x1.0bp+00, -0x1.58a5bafc9p-05, 0x1.b2b739570ad39p-45},   // m ≥ 0.958008
	{0x1.0ap+00, -0x1.39e87b9fe8p-05, -0x1.eafd480ad9015p-44}, // m ≥ 0.959961
	{0x1.0ap+00, -0x1.39e87b9fe8p-05, -0x1.eafd480ad9015p-44}, // m ≥ 0.961914
	{0x1.09p+00, -0x1.1b0d98924p-05, 0x1.3401e9ae889bbp-44},   // m ≥ 0.963867
	{0x1.09p+00, -0x1.1b0d98924p-05, 0x1.3401e9ae889bbp-44},   // m ≥ 0.965820
	{0x1.08p+00, -0x1.f829b0e78p-06, -0x1.980267c7e09e4p-45},  // m ≥ 0.967773
	{0x1.08p+00, -0x1.f829b0e78p-06, -0x1.980267c7e09e4p-45},  // m ≥ 0.969727
	{0x1.07p+00, -0x1.b9fc027bp-06, 0x1.b9a010ae6922ap-44},    // m ≥ 0.971680
	{0x1.07p+00, -0x1.b9fc027bp-06, 0x1.b9a010ae6922ap-44},    // m ≥ 0.973633
	{0x1.06p+00, -0x1.7b91b07d6p-06, 0x1.3b955b602ace4p-44},   // m ≥ 0.975586
	{0x1.06p+00, -0x1.7b91b07d6p-06, 0x1.3b955b602ace4p-44},   // m ≥ 0.977539
	{0x1.05p+00, -0x1.3cea44347p-06, 0x1.6a2c432d6a40bp-44},   // m ≥ 0.979492
	{0x1.05p+00, -0x1.3cea44347p-06, 0x1.6a2c432d6a40bp-44},   // m ≥ 0.981445
	{0x1.04p+00, -0x1.fc0a8b0fcp-07, -0x1.f1e7cf6d3a69cp-50},  // m ≥ 0.983398
	{0x1.04p+00, -0x1.fc0a8b0fcp-07, -0x1.f1e7cf6d3a69cp-50},  // m ≥ 0.985352
	{0x1.03p+00, -0x1.7dc475f82p-07, 0x1.eb1245b5da1f5p-44},   // m ≥ 0.987305
	{0x1.03p+00, -0x1.7dc475f82p-07, 0x1.eb1245b5da1f5p-44},   // m ≥ 0.989258
	{0x1.02p+00, -0x1.fe02a6b1p-08, -0x1.9e23f0dda40e4p-46},   // m ≥ 0.991211
	{0x1.02p+00, -0x1.fe02a6b1p-08, -0x1.9e23f0dda40e4p-46},   // m ≥ 0.993164
	{0x1.01p+00, -0x1.ff00aa2bp-09, -0x1.0bc04a086b56ap-45},   // m ≥ 0.995117
	{0x1.01p+00, -0x1.ff00aa2bp-09, -0x1.0bc04a086b56ap-45},   // m ≥ 0.997070
	{0x1p+00, 0, 0}, // m ≥ 0.999023
	{0x1.fep-01, 0x1.008055958p-08, 0x1.166afcb31c67bp-45},   // m ≥ 1.001953
	{0x1.fcp-01, 0x1.010157588p-07, 0x1.bce251998b506p-44},   // m ≥ 1.005859
	{0x1.fap-01, 0x1.82448a388p-07, 0x1.4554412c584ep-44},    // m ≥ 1.009766
	{0x1.f8p-01, 0x1.020565893p-06, 0x1.611d27c8e8417p-44},   // m ≥ 1.013672
	{0x1.f6p-01, 0x1.432a92598p-06, 0x1.98139928637fep-47},   // m ≥ 1.017578
	{0x1.f4p-01, 0x1.8492528c9p-06, -0x1.aa0ba325a0c34p-45},  // m ≥ 1.021484
	{0x1.f2p-01, 0x1.c63d2ec15p-06, -0x1.5439ce030a687p-44},  // m ≥ 1.025391
	{0x1.fp-01, 0x1.0415d89e78p-05, -0x1.dddc7f461c516p-44},  // m ≥ 1.029297
	{0x1.eep-01, 0x1.252f32f8dp-05, 0x1.83e9ae021b67bp-45},   // m ≥ 1.033203
	{0x1.ecp-01, 0x1.466aed42ep-05, -0x1.c167375bdfd28p-45},  // m ≥ 1.037109
	{0x1.eap-01, 0x1.67c94f2d48p-05, 0x1.dac20827cca0cp-44},  // m ≥ 1.041016
	{0x1.eap-01, 0x1.67c94f2d48p-05, 0x1.dac20827cca0cp-44},  // m ≥ 1.044922
	{0x1.e8p-01, 0x1.894aa149f8p-05, 0x1.9a19a8be97661p-44},  // m ≥ 1.048828
	{0x1.e6p-01, 0x1.aaef2d0fbp-05, 0x1.0fc1a353bb42ep-45},   // m ≥ 1.052734
	{0x1.e4p-01, 0x1.ccb73cddd8p-05, 0x1.965c36e09f5fep-44},  // m ≥ 1.056641
	{0x1.e2p-01, 0x1.eea31c0068p-05, 0x1.c3dd83606d891p-44},  // m ≥ 1.060547
	{0x1.ep-01, 0x1.08598b59e4p-04, -0x1.7e5dd7009902cp-46},  // m ≥ 1.064453
	{0x1.dep-01, 0x1.1973bd1464p-04, 0x1.566d154f930b3p-44},  // m ≥ 1.068359
	{0x1.dcp-01, 0x1.2aa04a447p-04, 0x1.7a48ba8b1cb41p-44},   // m ≥ 1.072266
	{0x1.dap-01, 0x1.3bdf5a7d2p-04, -0x1.19bd0ad125895p-44},  // m ≥ 1.076172
	{0x1.dap-01, 0x1.3bdf5a7d2p-04, -0x1.19bd0ad125895p-44},  // m ≥ 1.080078
	{0x1.d8p-01, 0x1.4d3115d208p-04, -0x1.53a2582f4e1efp-48}, // m ≥ 1.083984
	{0x1.d6p-01, 0x1.5e95a4d978p-04, 0x1.1cb7ce1d17171p-44},  // m ≥ 1.087891
	{0x1.d4p-01, 0x1.700d30aeacp-04, 0x1.c1e8da99ded32p-49},  // m ≥ 1.091797
	{0x1.d2p-01, 0x1.8197e2f41p-04, -0x1.c0fe460d20041p-44},  // m ≥ 1.095703
	{0x1.dp-01, 0x1.9335e5d594p-04, 0x1.3115c3abd47dap-45},   // m ≥ 1.099609
	{0x1.dp-01, 0x1.9335e5d594p-04, 0x1.3115c3abd47dap-45},   // m ≥ 1.103516
	{0x1.cep-01, 0x1.a4e7640b1cp-04, -0x1.e42b6b94407c8p-47}, // m ≥ 1.107422
	{0x1.ccp-01, 0x1.b6ac88dad4p-04, 0x1.b1bdff50225c7p-44},  // m ≥ 1.111328
	{0x1.cap-01, 0x1.c885801bc4p-04, 0x1.646d1c65aacd3p-45},  // m ≥ 1.115234
	{0x1.c8p-01, 0x1.da72763844p-04, 0x1.a89401fa71733p-46},  // m ≥ 1.119141
	{0x1.c8p-01, 0x1.da72763844p-04, 0x1.a89401fa71733p-46},  // m ≥ 1.123047
	{0x1.c6p-01, 0x1.ec739830ap-04, 0x1.11fcba80cdd1p-44},    // m ≥ 1.126953
	{0x1.c4p-01, 0x1.fe89139dbcp-04, 0x1.56594d82f7a82p-44},  // m ≥ 1.130859
	{0x1.c2p-01, 0x1.08598b59e4p-03, -0x1.7e5dd7009902cp-45}, // m ≥ 1.134766
	{0x1.cp-01, 0x1.1178e8227ep-03, 0x1.1ef78ce2d07f2p-45},   // m ≥ 1.138672
	{0x1.cp-01, 0x1.1178e8227ep-03, 0x1.1ef78ce2d07f2p-45},   // m ≥ 1.142578
	{0x1.bep-01, 0x1.1aa2b7e24p-03, -0x1.1ac38dde3b366p-44},  // m ≥ 1.146484
	{0x1.bcp-01, 0x1.23d712a49cp-03, 0x1.00d238fd3df5cp-46},  // m ≥ 1.150391
	{0x1.bap-01, 0x1.2d1610c868p-03, 0x1.39d6ccb81b4a1p-47},  // m ≥ 1.154297
	{0x1.bap-01, 0x1.2d1610c868p-03, 0x1.39d6ccb81b4a1p-47},  // m ≥ 1.158203
	{0x1.b8p-01, 0x1.365fcb015ap-03, -0x1.fd3a0afb9691bp-44}, // m ≥ 1.162109
	{0x1.b6p-01, 0x1.3fb45a5992p-03, 0x1.19713c0cae559p-44},  // m ≥ 1.166016
	{0x1.b4p-01, 0x1.4913d8333cp-03, -0x1.53e43558124c4p-44}, // m ≥ 1.169922
	{0x1.b4p-01, 0x1.4913d8333cp-03, -0x1.53e43558124c4p-44}, // m ≥ 1.173828
	{0x1.b2p-01, 0x1.527e5e4a1cp-03, -0x1.4e60b8d4b411dp-44}, // m ≥ 1.177734
	{0x1.bp-01, 0x1.5bf406b544p-03, -0x1.27023eb68981cp-46},  // m ≥ 1.181641
	{0x1.bp-01, 0x1.5bf406b544p-03, -0x1.27023eb68981cp-46},  // m ≥ 1.185547
	{0x1.aep-01, 0x1.6574ebe8c2p-03, -0x1.98c1d34f0f462p-44}, // m ≥ 1.189453
	{0x1.acp-01, 0x1.6f0128b756p-03, 0x1.577390d31ef0fp-44},  // m ≥ 1.193359
	{0x1.aap-01, 0x1.7898d85444p-03, 0x1.8e67be3dbaf3fp-44},  // m ≥ 1.197266
	{0x1.aap-01, 0x1.7898d85444p-03, 0x1.8e67be3dbaf3fp-44},  // m ≥ 1.201172
	{0x1.a8p-01, 0x1.823c16551ap-03, 0x1.e0ddb9a631e83p-46},  // m ≥ 1.205078
	{0x1.a6p-01, 0x1.8beafeb39p-03, -0x1.73d54aae92cd1p-47},  // m ≥ 1.208984
	{0x1.a6p-01, 0x1.8beafeb39p-03, -0x1.73d54aae92cd1p-47},  // m ≥ 1.212891
	{0x1.a4p-01, 0x1.95a5adcf7p-03, 0x1.7f22858a0ff6fp-47},   // m ≥ 1.216797
	{0x1.a2p-01, 0x1.9f6c40708ap-03, -0x1.337d94bcd3f43p-44}, // m ≥ 1.220703
	{0x1.a2p-01, 0x1.9f6c40708ap-03, -0x1.337d94bcd3f43p-44}, // m ≥ 1.224609
	{0x1.ap-01, 0x1.a93ed3c8aep-03, -0x1.8724350562169p-45},  // m ≥ 1.228516
	{0x1.9ep-01, 0x1.b31d8575bcp-03, 0x1.c794e562a63cbp-44},  // m ≥ 1.232422
	{0x1.9ep-01, 0x1.b31d8575bcp-03, 0x1.c794e562a63cbp-44},  // m ≥ 1.236328
	{0x1.9cp-01, 0x1.bd087383bep-03, -0x1.d4bc4595412b6p-45}, // m ≥ 1.240234
	{0x1.9ap-01, 0x1.c6ffbc6fp-03, 0x1.ee138d3a69d43p-44},    // m ≥ 1.244141
	{0x1.9ap-01, 0x1.c6ffbc6fp-03, 0x1.ee138d3a69d43p-44},    // m ≥ 1.248047
	{0x1.98p-01, 0x1.d1037f2656p-03, -0x1.84a7e75b6f6e4p-47}, // m ≥ 1.251953
	{0x1.98p-01, 0x1.d1037f2656p-03, -0x1.84a7e75b6f6e4p-47}, // m ≥ 1.255859
	{0x1.96p-01, 0x1.db13db0d48p-03, 0x1.2806a847527e6p-44},  // m ≥ 1.259766
	{0x1.94p-01, 0x1.e530effe72p-03, -0x1.fdbdbb13f7c18p-44}, // m ≥ 1.263672
	{0x1.94p-01, 0x1.e530effe72p-03, -0x1.fdbdbb13f7c18p-44}, // m ≥ 1.267578
	{0x1.92p-01, 0x1.ef5ade4ddp-03, -0x1.a211565bb8e11p-51},  // m ≥ 1.271484
	{0x1.9p-01, 0x1.f991c6cb3cp-03, -0x1.90d04cd7cc834p-44},  // m ≥ 1.275391
	{0x1.9p-01, 0x1.f991c6cb3cp-03, -0x1.90d04cd7cc834p-44},  // m ≥ 1.279297
	{0x1.8ep-01, 0x1.01eae5626cp-02, 0x1.a43dcfade85aep-44},  // m ≥ 1.283203
	{0x1.8ep-01, 0x1.01eae5626cp-02, 0x1.a43dcfade85aep-44},  // m ≥ 1.287109
	{0x1.8cp-01, 0x1.07138604d6p-02, -0x1.e76324e912b17p-44}, // m ≥ 1.291016
	{0x1.8ap-01, 0x1.0c42d67616p-02, 0x1.7188b163ceae9p-45},  // m ≥ 1.294922
	{0x1.8ap-01, 0x1.0c42d67616p-02, 0x1.7188b163ceae9p-45},  // m ≥ 1.298828
	{0x1.88p-01, 0x1.1178e8227ep-02, 0x1.1ef78ce2d07f2p-44},  // m ≥ 1.302734
	{0x1.88p-01, 0x1.1178e8227ep-02, 0x1.1ef78ce2d07f2p-44},  // m ≥ 1.306641
	{0x1.86p-01, 0x1.16b5ccbadp-02, -0x1.23299042d74bfp-44},  // m ≥ 1.310547
	{0x1.84p-01, 0x1.1bf99635a7p-02, -0x1.1ac89575c2125p-44}, // m ≥ 1.314453
	{0x1.84p-01, 0x1.1bf99635a7p-02, -0x1.1ac89575c2125p-44}, // m ≥ 1.318359
	{0x1.82p-01, 0x1.214456d0ecp-02, -0x1.caf0428b728a3p-44}, // m ≥ 1.322266
	{0x1.82p-01, 0x1.214456d0ecp-02, -0x1.caf0428b728a3p-44}, // m ≥ 1.326172
	{0x1.8p-01, 0x1.269621134ep-02, -0x1.1b61f10522625p-44},  // m ≥ 1.330078
	{0x1.8p-01, 0x1.269621134ep-02, -0x1.1b61f10522625p-44},  // m ≥ 1.333984
	{0x1.7ep-01, 0x1.2bef07cdc9p-02, 0x1.a9cfa4a5004f4p-45},  // m ≥ 1.337891
	{0x1.7ep-01, 0x1.2bef07cdc9p-02, 0x1.a9cfa4a5004f4p-45},  // m ≥ 1.341797
	{0x1.7cp-01, 0x1.314f1e1d36p-02, -0x1.8e27ad3213cb8p-45}, // m ≥ 1.345703
	{0x1.7ap-01, 0x1.36b6776be1p-02, 0x1.16ecdb0f177c8p-46},  // m ≥ 1.349609
	{0x1.7ap-01, 0x1.36b6776be1p-02, 0x1.16ecdb0f177c8p-46},  // m ≥ 1.353516
	{0x1.78p-01, 0x1.3c25277333p-02, 0x1.83b54b606bd5cp-46},  // m ≥ 1.357422
	{0x1.78p-01, 0x1.3c25277333p-02, 0x1.83b54b606bd5cp-46},  // m ≥ 1.361328
	{0x1.76p-01, 0x1.419b423d5fp-02, -0x1.ce379226de3ecp-44}, // m ≥ 1.365234
	{0x1.76p-01, 0x1.419b423d5fp-02, -0x1.ce379226de3ecp-44}, // m ≥ 1.369141
	{0x1.74p-01, 0x1.4718dc271cp-02, 0x1.06c18fb4c14c5p-44},  // m ≥ 1.373047
	{0x1.74p-01, 0x1.4718dc271cp-02, 0x1.06c18fb4c14c5p-44},  // m ≥ 1.376953
	{0x1.72p-01, 0x1.4c9e09e173p-02, -0x1.e20891b0ad8a4p-45}, // m ≥ 1.380859
	{0x1.72p-01, 0x1.4c9e09e173p-02, -0x1.e20891b0ad8a4p-45}, // m ≥ 1.384766
	{0x1.7p-01, 0x1.522ae0738ap-02, 0x1.ebe708164c759p-45},   // m ≥ 1.388672
	{0x1.7p-01, 0x1.522ae0738ap-02, 0x1.ebe708164c759p-45},   // m ≥ 1.392578
	{0x1.6ep-01, 0x1.57bf753c8dp-02, 0x1.fadedee5d40efp-46},  // m ≥ 1.396484
}
