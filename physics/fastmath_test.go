package physics

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"

	"cureslab/physics/internal/fastmathgen"
)

// ---- 256-bit reference routines (independent of the code under test) ----

// The 256-bit arithmetic, ln 2, ln x and the table generators live in
// package fastmathgen, which also writes fastmath_tables.go (go generate).
const fmPrec = fastmathgen.Prec

var (
	fmNew   = fastmathgen.New
	fmConst = fastmathgen.Const
	fmF64   = fastmathgen.F64
	// fmLn2 is ln 2 = 2·atanh(1/3).
	// Source: analytic identity, (1 + 1/3)/(1 − 1/3) = 2.
	fmLn2          = fastmathgen.Ln2
	fmRefLog       = fastmathgen.Log
	fmRoundToGrid  = fastmathgen.RoundToGrid
	logInterval    = fastmathgen.LogInterval
	logFeasible    = fastmathgen.LogFeasible
	formatExpTable = fastmathgen.FormatExpTable
	formatLogTable = fastmathgen.FormatLogTable
)

// fmRefExp returns e^x: n = round(x/ln2), s = x − n·ln2 (|s| ≤ 0.35), e^s by
// its Taylor series summed until a term is below 2^-(fmPrec+16) (s^k/k!
// with |s| ≤ 0.35 needs about 45 terms), then scaled by 2^n.
func fmRefExp(x float64) *big.Float {
	n := math.Round(x / math.Ln2)
	s := fmNew().Sub(fmConst(x), fmNew().Mul(fmConst(n), fmLn2))
	sum := fmConst(1)
	term := fmConst(1)
	tiny := fmNew().SetMantExp(fmConst(1), -(fmPrec + 16))
	for k := 1; ; k++ {
		term.Mul(term, s)
		term.Quo(term, fmConst(float64(k)))
		sum.Add(sum, term)
		if term.Sign() == 0 || fmNew().Abs(term).Cmp(tiny) < 0 {
			break
		}
	}
	return sum.SetMantExp(sum, int(n))
}

// fmUlpErr returns |got − want| in units of the last place of want: ulp(w) =
// 2^(⌊log2|w|⌋ − 52) for normal w and 2^-1074 below 2^-1022. want must be
// finite and nonzero or zero; got must be finite.
func fmUlpErr(got float64, want *big.Float) float64 {
	d := fmNew().Sub(fmConst(got), want)
	d.Abs(d)
	if d.Sign() == 0 {
		return 0
	}
	exp := -1074
	if want.Sign() != 0 {
		// want = mant·2^MantExp, mant in [0.5, 1): binade exponent MantExp − 1.
		exp = max(want.MantExp(nil)-1-52, -1074)
	}
	q, _ := d.SetMantExp(d, -exp).Float64()
	return q
}

// TestFastmathReference checks the reference routines themselves.
func TestFastmathReference(t *testing.T) {
	digits := func(v *big.Float) string { return v.Text('f', 60) }
	cases := []struct {
		name string
		got  *big.Float
		want string
	}{
		// Source: ln 2 and e to 60 decimals, OEIS A002162 and A001113
		// (from memory; each also agrees with the other routine below).
		{"ln 2", fmLn2, "0.693147180559945309417232121458176568075500134360255254120680"},
		{"e", fmRefExp(1), "2.718281828459045235360287471352662497757247093699959574966968"},
	}
	for _, c := range cases {
		// 60 decimals is ~199 bits: compare the first 58.
		if g := digits(c.got); g[:60] != c.want[:60] {
			t.Errorf("%s = %s, want %s", c.name, g, c.want)
		}
	}
	// Source: analytic identities ln(e^x) = x and e^(ln 2) = 2, to 2^-240.
	tol := fmNew().SetMantExp(fmConst(1), -240)
	for _, x := range []float64{-744.4, -100.5, -1e-5, 0.3, 1, 42.125, 709.7} {
		d := fmNew().Sub(fmRefLog(fmRefExp(x)), fmConst(x))
		if d.Abs(d).Cmp(fmNew().Mul(tol, fmConst(math.Max(1, math.Abs(x))))) > 0 {
			t.Errorf("ln(e^%v) − %v = %s", x, x, d.Text('g', 5))
		}
	}
}

// ---- the generated tables must equal their recomputation ----

// genExpTable and genLogTable recompute the tables of fastmath_tables.go
// in physics' own types.
func genExpTable() (tab [expN]expEntry) {
	for j, e := range fastmathgen.ExpTable() {
		tab[j] = expEntry{hiBits: e.HiBits, tail: e.Tail}
	}
	return tab
}

func genLogTable() (tab [logN]logEntry, rmaxAll float64, err error) {
	gen, rmaxAll, err := fastmathgen.LogTable()
	for j, e := range gen {
		tab[j] = logEntry{invc: e.Invc, lhi: e.Lhi, llo: e.Llo}
	}
	return tab, rmaxAll, err
}

// toGenExp and toGenLog convert physics' tables for the generator's
// formatter (the failure message prints the correct table).
func toGenExp(tab [expN]expEntry) (out [fastmathgen.ExpN]fastmathgen.ExpEntry) {
	for j, e := range tab {
		out[j] = fastmathgen.ExpEntry{HiBits: e.hiBits, Tail: e.tail}
	}
	return out
}

func toGenLog(tab [logN]logEntry) (out [fastmathgen.LogN]fastmathgen.LogEntry) {
	for j, e := range tab {
		out[j] = fastmathgen.LogEntry{Invc: e.invc, Lhi: e.lhi, Llo: e.llo}
	}
	return out
}

func TestFastmathTables(t *testing.T) {
	// Reduction constants. Source: analytic, from the 256-bit ln 2 above.
	step := fmNew().Quo(fmLn2, fmConst(expN))
	if got, want := float64(expStepHi), fmRoundToGrid(step, 42); got != want {
		t.Errorf("expStepHi = %x, want %x", got, want)
	}
	if got, want := float64(expStepLo), fmF64(fmNew().Sub(step, fmConst(expStepHi))); got != want {
		t.Errorf("expStepLo = %x, want %x", got, want)
	}
	if got, want := float64(expInvStep), fmF64(fmNew().Quo(fmConst(expN), fmLn2)); got != want {
		t.Errorf("expInvStep = %x, want %x", got, want)
	}
	if got, want := float64(ln2Hi), fmRoundToGrid(fmLn2, 42); got != want {
		t.Errorf("ln2Hi = %x, want %x", got, want)
	}
	if got, want := float64(ln2Lo), fmF64(fmNew().Sub(fmLn2, fmConst(ln2Hi))); got != want {
		t.Errorf("ln2Lo = %x, want %x", got, want)
	}
	if got, want := uint64(logOffBits), math.Float64bits(1-0x1p-10-153*0x1p-9); got != want {
		t.Errorf("logOffBits = %#x, want %#x", got, want)
	}
	// The generator builds its tables for the same sizes and offset.
	if expN != fastmathgen.ExpN || logN != fastmathgen.LogN || logOffBits != fastmathgen.LogOffBits {
		t.Errorf("expN, logN, logOffBits = %d, %d, %#x; the generator uses %d, %d, %#x",
			expN, logN, uint64(logOffBits), fastmathgen.ExpN, fastmathgen.LogN, uint64(fastmathgen.LogOffBits))
	}
	// The interval containing 1 must be centred on 1 in bit space.
	if a, b := logInterval(153); !(a == 1-0x1p-10 && b == 1+0x1p-9) {
		t.Errorf("interval 153 = [%v, %v), want [1 − 2^-10, 1 + 2^-9)", a, b)
	}

	if want := genExpTable(); want != expTable {
		t.Errorf("expTable differs from its 256-bit recomputation (run go generate ./physics); correct table:\n%s", formatExpTable(toGenExp(want)))
	}
	want, rmax, err := genLogTable()
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("log table: max |r| = %.6g = 2^%.3f", rmax, math.Log2(rmax))
	// flog's doc comment: |r| < 0.00403 …
	if rmax >= 0.00403 {
		t.Errorf("max |r| over the log table = %v, want < 0.00403", rmax)
	}
	// … and the Taylor truncation error |r|^8/8/(1 − |r|) of ln(1 + r)
	// stays below 1/64 ulp of the smallest |ln x| the entry can return:
	// min |ln m| on the interval at k = 0, and ln2 − ln(2·logOff) > 0.336
	// for k ≠ 0. On the interval around 1, where ln x ≈ r, the bound is
	// relative: |r|^7/8/(1 − |r|) ≤ 2^-6·2^-53.
	worst := 0.0
	for j := range logN {
		a, b := logInterval(j)
		_, rj := logFeasible(a, b, want[j].invc)
		trunc := math.Pow(rj, 8) / 8 / (1 - rj)
		var ratio float64
		if a <= 1 && 1 < b {
			ratio = trunc / rj / 0x1p-53
		} else {
			minRes := min(math.Abs(math.Log(a)), math.Abs(math.Log(b)), 0.336)
			ratio = trunc / fmUlpOf(minRes)
		}
		worst = max(worst, ratio)
		if ratio > 1.0/64 {
			t.Errorf("log entry %d: truncation %.3g = %.3g ulp of its smallest result, want ≤ 1/64", j, trunc, ratio)
		}
	}
	t.Logf("log table: worst truncation error %.3g ulp", worst)
	if want != logTable {
		t.Errorf("logTable differs from its 256-bit recomputation (run go generate ./physics); correct table:\n%s", formatLogTable(toGenLog(want)))
	}
	// Independent of the generator's choice: every entry as it stands must
	// satisfy the exactness and Fast2Sum conditions flog relies on.
	for j := range logN {
		a, b := logInterval(j)
		if ok, _ := logFeasible(a, b, logTable[j].invc); !ok {
			t.Errorf("logTable[%d].invc = %v infeasible on [%v, %v)", j, logTable[j].invc, a, b)
		}
		if n := logTable[j].invc * 256; n != math.Trunc(n) || n >= 512 {
			t.Errorf("logTable[%d].invc = %v is not a 9-bit multiple of 2^-8", j, logTable[j].invc)
		}
	}
}

// fmUlpOf returns the spacing of doubles in the binade of v > 0 (normal).
func fmUlpOf(v float64) float64 {
	_, e := math.Frexp(v) // v = f·2^e, f in [0.5, 1)
	return math.Ldexp(1, e-1-52)
}

// ---- accuracy against the 256-bit reference ----

// fmStat collects the largest error of one point set.
type fmStat struct {
	n     int
	max   float64
	worst float64 // argument of the largest error
}

func (s *fmStat) add(x, err float64) {
	s.n++
	if err > s.max {
		s.max, s.worst = err, x
	}
}

func TestFexpAccuracy(t *testing.T) {
	rng := rand.New(rand.NewPCG(1989, 144))
	uniform := func(lo, hi float64) float64 { return lo + (hi-lo)*rng.Float64() }
	sets := []struct {
		name string
		n    int
		gen  func(i int) float64
	}{
		{"[-745.2, 710]", 3000, func(int) float64 { return uniform(-745.2, 710) }},
		{"[-40, 5] (Arrhenius)", 1000, func(int) float64 { return uniform(-40, 5) }},
		// Subnormal results, where the budget is 0.77 ulp of 2^-1074 and is
		// nearly reached just below 2^-1022.
		{"[-745.14, -708.39]", 400, func(int) float64 { return uniform(-745.14, -708.39) }},
		{"|x| in [2^-60, 2^-1]", 300, func(int) float64 {
			return math.Copysign(math.Exp2(uniform(-60, -1)), uniform(-1, 1))
		}},
		// Table boundaries: x near (k + ½)·ln2/64, where k changes.
		{"k boundaries", 600, func(int) float64 {
			k := math.Round(uniform(-65000, 65000))
			x := (k + 0.5) * math.Ln2 / expN
			return math.Float64frombits(math.Float64bits(x) + uint64(rng.IntN(9)) - 4)
		}},
		// Endpoints of the fast path and the overflow and underflow thresholds.
		{"thresholds", 0, nil},
	}
	edges := []float64{
		expFastMax, -expFastMax, math.Nextafter(expFastMax, 800), math.Nextafter(-expFastMax, -800),
		expOverflow, math.Nextafter(expOverflow, 0), 709, 708.5,
		// Source: ln(2^-1022) = −708.396418532264…, smallest normal result.
		-708.3964185322641, -708.3964185322642, -708.4, -709, -740, -745,
		// Source: ln(2^-1074) = −744.440071921381…, ln(2^-1075) = −745.133219101941…
		-744.4400719213812, -745.1332191019411, -745.13321910194,
	}
	var normal, sub fmStat
	// check returns the error of fexp(x) in ulps, or −1 for an infinite
	// reference (then fexp must return +Inf).
	check := func(set string, x float64) float64 {
		got := fexp(x)
		ref := fmRefExp(x)
		want, _ := ref.Float64()
		switch {
		case math.IsInf(want, 1):
			if !math.IsInf(got, 1) {
				t.Errorf("%s: fexp(%v) = %v, want +Inf", set, x, got)
			}
			return -1
		case math.IsInf(got, 0) || math.IsNaN(got):
			t.Errorf("%s: fexp(%v) = %v, want %v", set, x, got, want)
			return -1
		}
		err := fmUlpErr(got, ref)
		isNormal := ref.Cmp(fmConst(0x1p-1022)) >= 0
		if isNormal {
			normal.add(x, err)
		} else {
			sub.add(x, err)
		}
		// Source: the a priori error budgets in fexp's doc comment.
		if isNormal && err > 0.53 || err > 0.77 {
			t.Errorf("%s: fexp(%v) = %v, want %v (error %.3f ulp)", set, x, got, want, err)
		}
		return err
	}
	for _, s := range sets {
		var st fmStat
		if s.gen == nil {
			for _, x := range edges {
				st.add(x, check(s.name, x))
			}
		}
		for i := range s.n {
			x := s.gen(i)
			st.add(x, check(s.name, x))
		}
		t.Logf("fexp %-22s max error %.4f ulp over %d points (at x = %v)", s.name+":", st.max, st.n, st.worst)
	}
	t.Logf("fexp: max error %.4f ulp over %d normal results (at x = %v)", normal.max, normal.n, normal.worst)
	t.Logf("fexp: max error %.4f ulp of 2^-1074 over %d subnormal results (at x = %v)", sub.max, sub.n, sub.worst)
}

func TestFlogAccuracy(t *testing.T) {
	rng := rand.New(rand.NewPCG(1990, 378))
	uniform := func(lo, hi float64) float64 { return lo + (hi-lo)*rng.Float64() }
	sets := []struct {
		name string
		n    int
		gen  func() float64
	}{
		{"(1e-300, 1e300) log-uniform", 2000, func() float64 { return math.Pow(10, uniform(-300, 300)) }},
		{"subnormal", 200, func() float64 { return math.Float64frombits(1 + rng.Uint64N(1<<52-1)) }},
		{"(1e-12, 1) log-uniform", 2000, func() float64 { return math.Pow(10, uniform(-12, 0)) }},
		{"(0, 1) uniform", 1000, func() float64 { return rng.Float64() }},
		{"1 − 2^-u, u in [1, 53]", 500, func() float64 { return 1 - math.Exp2(-uniform(1, 53)) }},
		{"1 + 2^-u, u in [1, 52]", 500, func() float64 { return 1 + math.Exp2(-uniform(1, 52)) }},
		// Interval edges of the table, in every binade: m at 2^-1074·2^j·…
		// Interval edges of the table (m = logOff·… + j steps), in binades
		// 2^-1021 … 2^1023, each ±4 ulps.
		{"table edges", 1000, func() float64 {
			j := uint64(rng.IntN(logN + 1))
			k := uint64(rng.IntN(2045)) - 1021 // wraps: adds k·2^52 mod 2^64
			return math.Float64frombits(logOffBits + j<<44 + k<<52 + uint64(rng.IntN(9)) - 4)
		}},
	}
	for _, s := range sets {
		var st fmStat
		for range s.n {
			x := s.gen()
			if !(x > 0) || math.IsInf(x, 0) || x == 1 {
				continue
			}
			got := flog(x)
			err := fmUlpErr(got, fmRefLog(fmConst(x)))
			st.add(x, err)
			// Source: the a priori bound in flog's doc comment.
			if err > 0.52 {
				t.Errorf("%s: flog(%v) = %v, error %.3f ulp", s.name, x, got, err)
			}
		}
		t.Logf("flog %-30s max error %.4f ulp over %d points (at x = %v)", s.name+":", st.max, st.n, st.worst)
	}
	// No loss near 1. For the double x nearest 1 − 1e-10, u = 1 − x is
	// exact (Sterbenz) and, Source: analytic, Mercator series,
	// ln x = −u − u²/2 − u³/3 − …, where u³/3 ≈ 3e-31 is 3e-21 of the
	// result: −(u + u·u/2) is within 1 ulp of ln x.
	x := 1 - 1e-10
	u := 1 - x
	if got, want := flog(x), -(u + u*u/2); fmUlpDist(got, want) > 1 || math.Abs(got-want) > 2.3e-16*math.Abs(want) {
		t.Errorf("flog(1 − 1e-10) = %v, want %v", got, want)
	}
	ref := fmRefLog(fmConst(x))
	if err := fmUlpErr(flog(x), ref); err > 0.5 {
		t.Errorf("flog(1 − 1e-10) = %v, reference %v (error %.3f ulp, want correctly rounded)", flog(x), fmF64(ref), err)
	}
}

// ---- agreement with the standard library ----

// fmUlpDist returns the number of doubles between a and b (0 if equal), via
// the ordered integer image of their bit patterns.
func fmUlpDist(a, b float64) uint64 {
	ord := func(v float64) int64 {
		u := int64(math.Float64bits(v))
		if u < 0 {
			u = math.MinInt64 - u // negative: reverse the order
		}
		return u
	}
	d := ord(a) - ord(b)
	if d < 0 {
		d = -d
	}
	return uint64(d)
}

// fmCompareStd compares f with the standard library's g on n points of each
// generator and prints the fraction of bit-identical results. Both should
// lie within 1 ulp of the exact value, so they should differ by at most
// 1 ulp. Where they differ by more (or one overflows and the other does
// not), the 256-bit reference ref decides: f must then be within budget
// ulps (its a priori bound), and the point is counted as an error of the
// standard library. On amd64, Go's assembly math.Exp errs by up to
// 1.6 ulp and returns +Inf for x in about (709.47, 709.78], where e^x is
// still finite; those points land here.
func fmCompareStd(t *testing.T, name string, f, g func(float64) float64, ref func(float64) *big.Float,
	budget float64, gens []fmGen, n int) {
	t.Helper()
	for _, gen := range gens {
		same, near, stdBad, stdWorst := 0, 0, 0, 0.0
		for range n {
			x := gen.f()
			a, b := f(x), g(x)
			switch d := fmUlpDist(a, b); {
			case a == b || math.IsNaN(a) && math.IsNaN(b):
				same++
			case d == 1:
				near++
			default:
				r := ref(x)
				if math.IsInf(a, 0) || fmUlpErr(a, r) > budget {
					t.Errorf("%s(%v) = %v, standard library %v, %d ulps apart; reference %v",
						name, x, a, b, d, fmF64(r))
					continue
				}
				stdBad++
				if !math.IsInf(b, 0) {
					stdWorst = max(stdWorst, fmUlpErr(b, r))
				}
			}
		}
		t.Logf("%s %-28s %d points: %.3f%% bit-identical to the standard library, %.3f%% 1 ulp apart",
			name, gen.name, n, 100*float64(same)/float64(n), 100*float64(near)/float64(n))
		if stdBad > 0 {
			t.Logf("%s %-28s %d points > 1 ulp apart, all the standard library's error (reference: "+
				"%s within %.2f ulp; standard library off by up to %.3f ulp or overflowing)",
				name, "", stdBad, name, budget, stdWorst)
		}
	}
}

type fmGen struct {
	name string
	f    func() float64
}

func TestFexpVsStdlib(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 14))
	fmCompareStd(t, "fexp", fexp, math.Exp, fmRefExp, 0.53, []fmGen{
		{"[-745.2, 710] uniform:", func() float64 { return -745.2 + 1455.2*rng.Float64() }},
		{"[-40, 5] uniform:", func() float64 { return -40 + 45*rng.Float64() }},
	}, 500_000)
}

func TestFlogVsStdlib(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 92))
	refLogF := func(x float64) *big.Float { return fmRefLog(fmConst(x)) }
	fmCompareStd(t, "flog", flog, math.Log, refLogF, 0.52, []fmGen{
		{"(1e-300, 1e300) log-uniform:", func() float64 { return math.Pow(10, -300+600*rng.Float64()) }},
		{"(1e-6, 1) uniform:", func() float64 { return 1e-6 + (1-1e-6)*rng.Float64() }},
		{"1 ± 2^-u, u in [1, 52]:", func() float64 {
			return 1 + math.Copysign(math.Exp2(-1-51*rng.Float64()), rng.Float64()-0.5)
		}},
	}, 333_334)
}

// ---- special cases ----

func TestFexpSpecial(t *testing.T) {
	// Source: IEEE 754-2019 §9.2 (exp) and the math.Exp documentation;
	// e^(±tiny) rounds to 1 for |x| < 2^-54 (analytic).
	cases := []struct{ x, want float64 }{
		{math.NaN(), math.NaN()},
		{math.Inf(1), math.Inf(1)},
		{math.Inf(-1), 0},
		{0, 1},
		{math.Copysign(0, -1), 1},
		{0x1p-60, 1},
		{-0x1p-60, 1},
		{math.SmallestNonzeroFloat64, 1},
		{710, math.Inf(1)},
		{math.Nextafter(expOverflow, 1000), math.Inf(1)},
		{1e300, math.Inf(1)},
		{math.MaxFloat64, math.Inf(1)},
		{-746, 0},
		{-1e300, 0},
		{-math.MaxFloat64, 0},
		// Source: 256-bit fmRefExp: e^−744.4400719213812 = 4.9406564584126839e-324
		// (nearest double 2^-1074) and e^−745.1332191019413 =
		// 2.4703282292059161e-324 < 2^-1075 = 2.4703282292062327e-324 (rounds to 0).
		{-744.4400719213812, math.SmallestNonzeroFloat64},
		{-745.1332191019413, 0},
	}
	for _, c := range cases {
		got := fexp(c.x)
		if !(got == c.want || math.IsNaN(got) && math.IsNaN(c.want)) {
			t.Errorf("fexp(%v) = %v, want %v", c.x, got, c.want)
		}
		if std := math.Exp(c.x); !(got == std || math.IsNaN(got) && math.IsNaN(std)) {
			t.Errorf("fexp(%v) = %v, math.Exp gives %v", c.x, got, std)
		}
	}
	// Finite just below overflow. Source: 256-bit fmRefExp: e^709.782712893383973
	// = 1.79769313486227321784e308 = MaxFloat64·(1 − 2.4e-14); the nearest
	// double is 1.7976931348622732e308 (fexp, within 0.53 ulp, returns it or
	// a neighbour).
	if got := fexp(expOverflow); fmUlpDist(got, 1.7976931348622732e308) > 1 {
		t.Errorf("fexp(%v) = %v, want 1.7976931348622732e308", float64(expOverflow), got)
	}
}

func TestFlogSpecial(t *testing.T) {
	// Source: IEEE 754-2019 §9.2 (log) and the math.Log documentation.
	cases := []struct{ x, want float64 }{
		{math.NaN(), math.NaN()},
		{math.Inf(1), math.Inf(1)},
		{math.Inf(-1), math.NaN()},
		{0, math.Inf(-1)},
		{math.Copysign(0, -1), math.Inf(-1)},
		{-1, math.NaN()},
		{-math.SmallestNonzeroFloat64, math.NaN()},
		{1, 0},
		// Source: ln 2^k = k·ln 2, ln 2 = 0.693147180559945309417232121458…
		// (from memory; equal to the 256-bit fmLn2 above): −1074·ln 2 =
		// −744.440071921381262…, −1022·ln 2 = −708.396418532264106…,
		// 1023·ln 2 = 709.089565712824051…; ln(math.E) = 1 − 5.3e-17 for the
		// double math.E, which rounds to 1. All rounded to nearest double.
		{math.SmallestNonzeroFloat64, -744.4400719213812},
		{0x1p-1022, -708.3964185322641},
		{0x1p1023, 709.0895657128241},
		{2, math.Ln2},
		{math.E, 1},
	}
	for _, c := range cases {
		got := flog(c.x)
		if !(got == c.want || math.IsNaN(got) && math.IsNaN(c.want)) {
			t.Errorf("flog(%v) = %v, want %v", c.x, got, c.want)
		}
		// Go's amd64 assembly math.Log does not normalise subnormal
		// arguments (math.Log(5e-324) = −709.09, not −744.44), so the
		// standard library is compared on the other cases only.
		if c.x != 0 && math.Abs(c.x) < 0x1p-1022 {
			continue
		}
		if std := math.Log(c.x); !(got == std || math.IsNaN(got) && math.IsNaN(std)) {
			t.Errorf("flog(%v) = %v, math.Log gives %v", c.x, got, std)
		}
	}
	if got := flog(1); math.Signbit(got) {
		t.Errorf("flog(1) = %v, want +0", got)
	}
}

// ---- monotonicity at the table boundaries ----

// TestFexpMonotone walks 64 consecutive doubles on each side of the points
// (k + ½)·ln2/64, where the rounded k (and so the table entry) changes,
// for k over the whole fast range and both slow ranges.
func TestFexpMonotone(t *testing.T) {
	for k := -68_800; k <= 65_540; k += 37 {
		c := (float64(k) + 0.5) * math.Ln2 / expN
		x := c
		for range 64 {
			x = math.Nextafter(x, math.Inf(-1))
		}
		prev := fexp(x)
		for range 128 {
			x = math.Nextafter(x, math.Inf(1))
			y := fexp(x)
			if y < prev {
				t.Fatalf("fexp not monotone: fexp(%v) = %v < fexp(previous double) = %v", x, y, prev)
			}
			prev = y
		}
	}
}

// TestFlogMonotone does the same across flog's 256 table-interval edges
// in a spread of binades, and across powers of two.
func TestFlogMonotone(t *testing.T) {
	for _, k := range []int64{-1074, -1030, -1021, -600, -40, -1, 0, 1, 30, 700, 1022} {
		for j := uint64(0); j <= logN; j++ {
			base := logOffBits + j<<44
			if k == -1074 || k == -1030 { // subnormal edge at 2^k·m
				base = math.Float64bits(math.Ldexp(math.Float64frombits(base), int(k)))
			} else {
				base += uint64(k) << 52
			}
			prev := flog(math.Float64frombits(base - 64))
			for i := base - 63; i <= base+64; i++ {
				y := flog(math.Float64frombits(i))
				if y < prev {
					t.Fatalf("flog not monotone at %v: %v < %v", math.Float64frombits(i), y, prev)
				}
				prev = y
			}
		}
	}
}

// ---- cost ----

func TestFastmathNoAlloc(t *testing.T) {
	var sink float64
	if n := testing.AllocsPerRun(100, func() { sink += fexp(-12.5) + fexp(800) + flog(0.3) + flog(4e-320) }); n != 0 {
		t.Errorf("fexp/flog allocate: %v allocs per run", n)
	}
	_ = sink
}

// fmBenchArgs returns 1024 arguments in [lo, hi], uniform, fixed seed.
func fmBenchArgs(lo, hi float64) []float64 {
	rng := rand.New(rand.NewPCG(7, 7))
	xs := make([]float64, 1024)
	for i := range xs {
		xs[i] = lo + (hi-lo)*rng.Float64()
	}
	return xs
}

var fmSink float64

func fmBench(b *testing.B, f func(float64) float64, xs []float64) {
	b.ReportAllocs()
	s := 0.0
	for b.Loop() {
		for _, x := range xs {
			s += f(x)
		}
	}
	fmSink = s
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*len(xs)), "ns/call")
}

// Exponent arguments −E/(RT) + n·ln(1 − α) of the cure laws lie in
// about [−40, 5]; log arguments α and 1 − α in (1e-6, 1).
func BenchmarkFexp(b *testing.B)    { fmBench(b, fexp, fmBenchArgs(-40, 5)) }
func BenchmarkMathExp(b *testing.B) { fmBench(b, math.Exp, fmBenchArgs(-40, 5)) }
func BenchmarkFlog(b *testing.B)    { fmBench(b, flog, fmBenchArgs(1e-6, 1)) }
func BenchmarkMathLog(b *testing.B) { fmBench(b, math.Log, fmBenchArgs(1e-6, 1)) }

// BenchmarkMathLog1p computes ln(1 − α) as the kinetics does today,
// math.Log1p(−α), over the same α.
func BenchmarkMathLog1p(b *testing.B) {
	fmBench(b, func(a float64) float64 { return math.Log1p(-a) }, fmBenchArgs(1e-6, 1))
}
