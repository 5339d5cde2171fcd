package physics

import "math"

//go:generate go run ./internal/fastmathgen/genfastmath -o fastmath_tables.go

// This file holds fexp and flog, table-driven replacements for math.Exp and
// math.Log in the cure-rate hot loop. Both are pure Go (no assembly, no
// unsafe), never allocate, and read only the constant tables expTable and
// logTable of fastmath_tables.go, generated in 256-bit arithmetic by
// `go generate` (package physics/internal/fastmathgen) and checked bit for
// bit against the same recomputation by TestFastmathTables.

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
// 1/m, picked by fastmathgen.LogTable (go generate) so that r = m·invc_j − 1 is
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
