package dsc

import (
	"errors"
	"math"
	"sort"

	"cureslab/physics"
)

// ErrTooFew is returned by Kissinger and OzawaFlynnWall when fewer than
// two distinct heating rates are given.
var ErrTooFew = errors.New("dsc: at least two distinct heating rates are needed")

// Estimate is an activation energy read from the slope of a straight-line
// plot against 1/T, with its standard error from the regression (NaN with
// only two points).
type Estimate struct {
	E, SE float64 // activation energy and its standard error, J/mol
	// LnA is the intercept term that goes with E, ln of a rate in 1/s: the
	// first-order pre-exponential factor for Kissinger, ln[A·f(α)] for
	// Friedman, NaN for Ozawa–Flynn–Wall.
	LnA, LnASE float64
	R2         float64 // of the straight-line fit
	N          int     // points in the plot
	// B is the final Doyle factor of Ozawa–Flynn–Wall (0 otherwise).
	B float64
}

func estimateFrom(l lineFit, scale float64) Estimate {
	return Estimate{E: -l.Slope * scale, SE: l.SlopeSE * scale, LnA: l.Intercept, LnASE: l.InterceptSE, R2: l.R2, N: l.N}
}

// distinct reports whether xs holds at least two values that differ by more
// than a relative 1e-6.
func distinct(xs []float64) bool {
	for _, x := range xs {
		if math.Abs(x-xs[0]) > 1e-6*math.Abs(xs[0]) {
			return true
		}
	}
	return false
}

// Kissinger returns the activation energy from the peak temperatures Tp (K)
// of scans at the heating rates beta (K/s):
//
//	ln(β/Tp²) = ln(A·R/E) − E/(R·Tp),
//
// a straight line in 1/Tp whose slope is −E/R (Kissinger, Anal. Chem.
// 29:1702, 1957; ASTM E698). LnA is ln A from the intercept, A =
// (E/R)·exp(intercept), in 1/s. The relation is exact for first-order
// kinetics under a linear program: at the peak of dα/dt = k(1 − α),
// d²α/dt² = 0 gives E·β/(R·Tp²) = k(Tp) for any starting temperature; for
// other laws E carries a small bias.
//
// Method: ordinary least squares (fitLine). SE = R·se(slope), NaN for two
// rates. LnASE is propagated from the intercept only.
// Errors: ErrTooFew for fewer than two distinct rates; a length mismatch
// panics. Cost O(n).
func Kissinger(beta, Tp []float64) (Estimate, error) {
	if len(beta) != len(Tp) {
		panic("dsc: Kissinger: length mismatch")
	}
	if len(beta) < 2 || !distinct(beta) {
		return Estimate{}, ErrTooFew
	}
	x := make([]float64, len(beta))
	y := make([]float64, len(beta))
	for i := range beta {
		x[i] = 1 / Tp[i]
		y[i] = math.Log(beta[i] / (Tp[i] * Tp[i]))
	}
	e := estimateFrom(fitLine(x, y), physics.GasConstant)
	e.LnA = e.LnA + math.Log(e.E/physics.GasConstant)
	return e, nil
}

// OzawaFlynnWall returns the activation energy from the temperatures T (K)
// at which scans at the heating rates beta (K/s) reach one and the same
// degree of cure:
//
//	log10 β = const − b·E/(R·T),
//
// with Doyle's factor b ≈ 0.457 (Ozawa, Bull. Chem. Soc. Japan 38:1881,
// 1965; Flynn & Wall, J. Polym. Sci. B 4:323, 1966; Doyle, J. Appl. Polym.
// Sci. 6:639, 1962).
//
// Method (ASTM E1641 style): fit log10 β against 1/T (least squares), take
// E = −R·slope/b with b = 0.457, then repeat with b = DoyleFactor(E/(R·Tm))
// at the mean 1/Tm of the points until E changes by less than 1e-9
// relatively. E1641 reads b from a table; here it is computed from the
// exact temperature integral, which removes the few-percent bias of the
// constant 0.457. SE = R·se(slope)/b (NaN for two rates); B is the final b.
// Errors: ErrTooFew for fewer than two distinct rates; a length mismatch
// panics. Cost O(n) plus a few continued fractions.
func OzawaFlynnWall(beta, T []float64) (Estimate, error) {
	if len(beta) != len(T) {
		panic("dsc: OzawaFlynnWall: length mismatch")
	}
	if len(beta) < 2 || !distinct(beta) {
		return Estimate{}, ErrTooFew
	}
	x := make([]float64, len(beta))
	y := make([]float64, len(beta))
	var mx float64
	for i := range beta {
		x[i] = 1 / T[i]
		y[i] = math.Log10(beta[i])
		mx += x[i] / float64(len(beta))
	}
	l := fitLine(x, y)
	b := 0.457
	E := -physics.GasConstant * l.Slope / b
	for range 100 {
		if !(E > 0) {
			break
		}
		b = DoyleFactor(E * mx / physics.GasConstant)
		En := -physics.GasConstant * l.Slope / b
		done := math.Abs(En-E) <= 1e-9*math.Abs(En)
		E = En
		if done {
			break
		}
	}
	return Estimate{E: E, SE: physics.GasConstant * l.SlopeSE / b, LnA: math.NaN(), LnASE: math.NaN(), R2: l.R2, N: l.N, B: b}, nil
}

// DoyleFactor returns b(x) = −d log10 p(x)/dx for the temperature integral
//
//	p(x) = ∫ₓ^∞ e^{−u}/u² du = e^{−x}/x − E₁(x),   x = E/(R·T),
//
// the slope that the Ozawa–Flynn–Wall method divides by: Doyle's linear
// approximation log10 p(x) ≈ −2.315 − 0.4567·x takes it constant (Doyle,
// J. Appl. Polym. Sci. 6:639, 1962); exactly, b(x) = 1/(ln 10·x·(1 − x·e^x·E₁(x))),
// which tends to (1 + 2/x)/ln 10 for large x.
//
// Method: E₁ by its continued fraction for x ≥ 1 (modified Lentz; Press et
// al., Numerical Recipes, 3rd ed., §6.3) and its power series below.
// Precondition x > 0; otherwise NaN. Cost: tens of operations.
func DoyleFactor(x float64) float64 {
	if !(x > 0) {
		return math.NaN()
	}
	g := x * math.Exp(x) * expint1(x)
	return 1 / (math.Ln10 * x * (1 - g))
}

// expint1 returns the exponential integral E₁(x) for x > 0.
func expint1(x float64) float64 {
	const eps = 1e-16
	if x >= 1 {
		const tiny = 1e-300
		b := x + 1
		c := 1 / tiny
		d := 1 / b
		h := d
		for i := 1; i < 1000; i++ {
			an := -float64(i * i)
			b += 2
			d = 1 / (an*d + b)
			c = b + an/c
			del := c * d
			h *= del
			if math.Abs(del-1) < eps {
				break
			}
		}
		return h * math.Exp(-x)
	}
	// E₁(x) = −γ − ln x − Σ_{k≥1} (−x)^k/(k·k!).
	const eulerGamma = 0.57721566490153286061
	sum, term := 0.0, 1.0
	for k := 1; k < 100; k++ {
		term *= -x / float64(k)
		d := term / float64(k)
		sum += d
		if math.Abs(d) < eps*math.Abs(sum) {
			break
		}
	}
	return -eulerGamma - math.Log(x) - sum
}

// Point is where a curve reaches a degree of cure: time, temperature and
// rate there.
type Point struct {
	Time, Temp float64 // s, K
	Rate       float64 // dα/dt, 1/s
}

// At returns the point where c first reaches the degree of cure a, by
// linear interpolation between samples; ok is false if it never does.
func (c *Curve) At(a float64) (p Point, ok bool) {
	for i := 1; i < len(c.Alpha); i++ {
		if c.Alpha[i] >= a {
			a0, a1 := c.Alpha[i-1], c.Alpha[i]
			f := 1.0
			if a1 > a0 {
				f = min(max((a-a0)/(a1-a0), 0), 1)
			}
			lerp := func(y []float64) float64 { return y[i-1] + f*(y[i]-y[i-1]) }
			return Point{Time: lerp(c.Time), Temp: lerp(c.Temp), Rate: lerp(c.Rate)}, true
		}
	}
	return Point{}, false
}

// IsoPoint is the isoconversional activation energy at one degree of cure.
type IsoPoint struct {
	Alpha float64
	Estimate
}

// FriedmanLevels are the degrees of cure of the Friedman table, 0.05 to
// 0.95 in steps of 0.05.
func FriedmanLevels() []float64 {
	out := make([]float64, 19)
	for i := range out {
		out[i] = float64(i+1) / 20
	}
	return out
}

// Friedman returns the isoconversional activation energy at each degree of
// cure in alphas:
//
//	ln(dα/dt)_α = ln[A·f(α)] − E_α/(R·T_α),
//
// a straight line in 1/T_α across the curves (Friedman, J. Polym. Sci. C
// 6:183, 1964). Any temperature programs may be mixed: dynamic and
// isothermal curves both give points. For a single-step law E_α is the same
// at every α.
//
// Method: for each curve, the first time α reaches the level (Curve.At),
// the temperature and the smoothed rate there; a least-squares line through
// (1/T_α, ln rate) over the curves that reach it with a positive rate. A
// level reached by fewer than two curves at distinct temperatures is left
// out. LnA is ln[A·f(α)], in ln(1/s). Cost O(levels · curves · samples).
func Friedman(curves []*Curve, alphas []float64) []IsoPoint {
	var out []IsoPoint
	for _, a := range alphas {
		var x, y []float64
		for _, c := range curves {
			p, ok := c.At(a)
			if ok && p.Rate > 0 {
				x = append(x, 1/p.Temp)
				y = append(y, math.Log(p.Rate))
			}
		}
		if len(x) < 2 || !distinct(x) {
			continue
		}
		out = append(out, IsoPoint{Alpha: a, Estimate: estimateFrom(fitLine(x, y), physics.GasConstant)})
	}
	return out
}

// OFWAt returns the Ozawa–Flynn–Wall estimate at the degree of cure a from
// the dynamic curves among curves (one point per curve that reaches a).
func OFWAt(curves []*Curve, a float64) (Estimate, error) {
	var beta, T []float64
	for _, c := range curves {
		if c.Program.Kind != Dynamic {
			continue
		}
		if p, ok := c.At(a); ok {
			beta = append(beta, c.Program.Rate)
			T = append(T, p.Temp)
		}
	}
	return OzawaFlynnWall(beta, T)
}

// distinctRates returns the heating rates of the dynamic curves grouped
// within a relative 3 % (repeat scans count once), in increasing order.
func distinctRates(curves []*Curve) []float64 {
	var rs []float64
	for _, c := range curves {
		if c.Program.Kind == Dynamic {
			rs = append(rs, c.Program.Rate)
		}
	}
	sort.Float64s(rs)
	var out []float64
	for _, r := range rs {
		if len(out) == 0 || r > 1.03*out[len(out)-1] {
			out = append(out, r)
		}
	}
	return out
}
