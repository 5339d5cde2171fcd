// Package fastmathgen computes the tables of the table-driven e^x and ln x
// of package physics (fexp and flog, physics/fastmath.go) in 256-bit
// arithmetic, and writes them as the Go source of
// physics/fastmath_tables.go. `go generate ./physics` runs it through the
// command genfastmath; physics' tests use the same routines to check the
// committed tables bit for bit and as the reference of their accuracy
// tests.
//
// Every routine is deterministic: math/big at Prec bits, no floating-point
// library calls on the table values, so the output is the same on every
// machine.
package fastmathgen

import (
	"bytes"
	"fmt"
	"go/format"
	"math"
	"math/big"
	"strconv"
)

// Prec is the working precision, in bits. It exceeds the 200 bits asked of
// the reference so that the cancellation in x − n·ln2 (|n| ≤ 1076, 11
// bits) still leaves more than 240 correct bits.
const Prec = 256

// Table sizes and the start of flog's reduction range; package physics
// declares the same constants (expN, logN, logOffBits) and its tests check
// that they agree.
const (
	ExpN = 64 // entries of the exp table: 2^(j/64), j = 0 … 63
	LogN = 256
	// LogOffBits is the bit pattern of logOff = 1 − 2^-10 − 153·2^-9 =
	// 0.7001953125, the lower end of the reduced argument of flog.
	LogOffBits = 0x3fe6680000000000
)

// New returns a zero big.Float of precision Prec.
func New() *big.Float { return new(big.Float).SetPrec(Prec) }

// Const returns v at precision Prec.
func Const(v float64) *big.Float { return New().SetFloat64(v) }

// F64 returns v rounded to the nearest double.
func F64(v *big.Float) float64 {
	f, _ := v.Float64()
	return f
}

// Atanh returns atanh z = z + z³/3 + z⁵/5 + … for |z| ≤ 0.2, summed until a
// term falls below 2^-(Prec+16) (the series converges by a factor z² ≤ 0.04
// per term). Cost: about Prec/4.6 terms.
func Atanh(z *big.Float) *big.Float {
	z2 := New().Mul(z, z)
	pow := New().Set(z)
	sum := New()
	tiny := New().SetMantExp(Const(1), -(Prec + 16))
	for n := 1; ; n += 2 {
		term := New().Quo(pow, Const(float64(n)))
		sum.Add(sum, term)
		if term.Sign() == 0 || New().Abs(term).Cmp(tiny) < 0 {
			return sum
		}
		pow.Mul(pow, z2)
	}
}

// Ln2 is ln 2 = 2·atanh(1/3) (analytic identity: (1 + 1/3)/(1 − 1/3) = 2).
var Ln2 = New().Mul(Const(2), Atanh(New().Quo(Const(1), Const(3))))

// Log returns ln v for v > 0: v = 2^e·f with f in [√½, √2), then
// ln v = e·ln2 + 2·atanh((f − 1)/(f + 1)), |(f−1)/(f+1)| ≤ 0.172.
func Log(v *big.Float) *big.Float {
	f := New()
	e := v.MantExp(f) // f in [0.5, 1)
	if f.Cmp(Const(math.Sqrt2/2)) < 0 {
		f.Mul(f, Const(2))
		e--
	}
	z := New().Quo(New().Sub(f, Const(1)), New().Add(f, Const(1)))
	out := New().Mul(Const(2), Atanh(z))
	return out.Add(out, New().Mul(Const(float64(e)), Ln2))
}

// RoundToGrid returns v rounded to the nearest multiple of 2^-e (ties away
// from zero), as a double; it panics when the result does not fit in 53
// bits.
func RoundToGrid(v *big.Float, e int) float64 {
	t := New().SetMantExp(v, e)
	t.Add(t, Const(math.Copysign(0.5, float64(t.Sign()))))
	i, _ := t.Int(nil) // truncates toward zero
	f, acc := New().SetMantExp(New().SetInt(i), -e).Float64()
	if acc != big.Exact {
		panic("fastmathgen.RoundToGrid: not representable")
	}
	return f
}

// ExpEntry is one entry of the exp table: 2^(j/64) = hi·(1 + Tail), hi the
// double nearest to 2^(j/64), stored as its bits.
type ExpEntry struct {
	HiBits uint64
	Tail   float64
}

// ExpTable returns 2^(j/64) as hi (the double nearest) and tail
// ((2^(j/64) − hi)/hi, rounded), from 2^(j/64) = √√√√√√(2^j): six square
// roots, each correctly rounded at Prec bits.
func ExpTable() (tab [ExpN]ExpEntry) {
	for j := range ExpN {
		v := New().SetMantExp(Const(1), j)
		for range 6 {
			v.Sqrt(v)
		}
		hi, _ := v.Float64()
		tail := New().Sub(v, Const(hi))
		tail.Quo(tail, Const(hi))
		tab[j].HiBits = math.Float64bits(hi)
		tab[j].Tail, _ = tail.Float64()
	}
	return tab
}

// LogEntry is one entry of the log table: Invc = n/256 and
// −ln(Invc) = Lhi + Llo, Lhi a multiple of 2^-42.
type LogEntry struct {
	Invc, Lhi, Llo float64
}

// LogInterval returns the bounds [a, b) of the reduced argument m served by
// log table entry j.
func LogInterval(j int) (a, b float64) {
	return math.Float64frombits(LogOffBits + uint64(j)<<44),
		math.Float64frombits(LogOffBits + uint64(j+1)<<44)
}

// logRange returns the exact extreme values of r = m·invc − 1 over
// m in [a, b] (r is increasing in m).
func logRange(a, b, invc float64) (lo, hi float64) {
	rlo := New().Sub(New().Mul(Const(a), Const(invc)), Const(1))
	rhi := New().Sub(New().Mul(Const(b), Const(invc)), Const(1))
	return F64(rlo), F64(rhi)
}

// LogFeasible reports whether invc serves interval [a, b) and returns
// max |r| over it. Conditions:
//   - r = m·invc − 1 is a double. With invc a multiple of 2^-8, r is a
//     multiple of ulp(m)·2^-8, so it fits in 53 bits when |r| ≤ 2^-8 for
//     m < 1 (ulp 2^-53) and |r| ≤ 2^-7 for m ≥ 1 (ulp 2^-52);
//   - at k = 0 the Fast2Sum w + r is valid: invc = 1 (w = 0) or
//     |r| ≤ |ln invc| = |lhi| (to within 2^-43).
func LogFeasible(a, b, invc float64) (ok bool, rmax float64) {
	rlo, rhi := logRange(a, b, invc) // r is increasing in m
	rmax = max(math.Abs(rlo), math.Abs(rhi))
	switch {
	case b <= 1:
		ok = rmax <= 0x1p-8
	case a >= 1:
		ok = rmax <= 0x1p-7
	default: // a < 1 < b: r(1) = invc − 1 splits the two parts
		ok = max(math.Abs(rlo), math.Abs(invc-1)) <= 0x1p-8 &&
			max(math.Abs(rhi), math.Abs(invc-1)) <= 0x1p-7
	}
	if ok && invc != 1 {
		ok = rmax <= math.Abs(F64(Log(Const(invc))))
	}
	return ok, rmax
}

// LogTable builds flog's table: for each interval the multiple of 2^-8
// nearest the interval's best reciprocal that passes LogFeasible with the
// smallest max |r| (1 on the interval containing 1), and −ln(invc) split
// as lhi (multiple of 2^-42) + llo. It also returns max |r| over all
// entries.
func LogTable() (tab [LogN]LogEntry, rmaxAll float64, err error) {
	for j := range LogN {
		a, b := LogInterval(j)
		best, bestR := 0.0, math.Inf(1)
		if a <= 1 && 1 < b {
			best = 1
			_, bestR = LogFeasible(a, b, 1)
		} else {
			c := math.Round(2 * 256 / (a + b))
			for n := c - 3; n <= c+3; n++ {
				if ok, r := LogFeasible(a, b, n/256); ok && r < bestR {
					best, bestR = n/256, r
				}
			}
		}
		if best == 0 {
			return tab, 0, fmt.Errorf("interval %d [%v, %v): no feasible invc", j, a, b)
		}
		lc := Log(Const(best))
		lc.Neg(lc)
		lhi := RoundToGrid(lc, 42)
		tab[j] = LogEntry{Invc: best, Lhi: lhi, Llo: F64(New().Sub(lc, Const(lhi)))}
		rmaxAll = max(rmaxAll, bestR)
	}
	return tab, rmaxAll, nil
}

// Hex writes v as a Go hexadecimal float literal, "0" for zero.
func Hex(v float64) string {
	if v == 0 {
		return "0"
	}
	return strconv.FormatFloat(v, 'x', -1, 64)
}

// FormatExpTable writes tab as the Go declaration of physics' expTable.
func FormatExpTable(tab [ExpN]ExpEntry) string {
	var b bytes.Buffer
	b.WriteString("var expTable = [expN]expEntry{\n")
	for j, e := range tab {
		fmt.Fprintf(&b, "\t{%#016x, %v}, // 2^(%d/64)\n", e.HiBits, Hex(e.Tail), j)
	}
	b.WriteString("}\n")
	return b.String()
}

// FormatLogTable writes tab as the Go declaration of physics' logTable.
func FormatLogTable(tab [LogN]LogEntry) string {
	var b bytes.Buffer
	b.WriteString("var logTable = [logN]logEntry{\n")
	for j, e := range tab {
		a, _ := LogInterval(j)
		fmt.Fprintf(&b, "\t{%v, %v, %v}, // m ≥ %.6f\n", Hex(e.Invc), Hex(e.Lhi), Hex(e.Llo), a)
	}
	b.WriteString("}\n")
	return b.String()
}

// Source returns the gofmt-formatted Go source of physics/fastmath_tables.go.
func Source() ([]byte, error) {
	logTab, _, err := LogTable()
	if err != nil {
		return nil, err
	}
	var b bytes.Buffer
	b.WriteString(`// Code generated by genfastmath (physics/internal/fastmathgen); DO NOT EDIT.

package physics

// expTable[j] holds 2^(j/64) = hi·(1 + tail): six correctly rounded 256-bit
// square roots of 2^j (fastmathgen.ExpTable), checked bit for bit by
// TestFastmathTables.
`)
	b.WriteString(FormatExpTable(ExpTable()))
	b.WriteString(`
// logTable[j] serves m with bit pattern in [logOffBits + j·2^44,
// logOffBits + (j+1)·2^44): intervals of width 2^-9 below 1 and 2^-8
// above. invc is chosen as described at flog and −ln invc comes from a
// 256-bit series (fastmathgen.LogTable); checked bit for bit by
// TestFastmathTables.
`)
	b.WriteString(FormatLogTable(logTab))
	return format.Source(b.Bytes())
}
