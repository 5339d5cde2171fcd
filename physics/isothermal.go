package physics

import "math"

// MaxIsothermalTime is the longest time, in seconds (about 32 000 years),
// that IsothermalTime reports; a longer time means the cure practically
// never gets there (a diffusion-limited or frozen reaction) and is reported
// as +Inf.
const MaxIsothermalTime = 1e12

// isoTol is the relative accuracy asked of each quadrature in α.
const isoTol = 1e-12

// endWidth is the width 1 − α of the end piece [1 − endWidth, 1] that
// IsothermalTime integrates in closed form when the target is full cure.
// 2⁻²⁷ ≈ 7.5e-9 makes 1 − endWidth exact in float64.
const endWidth = 1.0 / (1 << 27)

// IsothermalTime returns the time, in seconds, for the cure to go from a0 to
// target at the constant temperature T (K):
//
//	t = ∫_{a0}^{target} dα / r(T, α),
//
// where r is the rate of c with the diffusion factor applied (Cure.Rate); at
// fixed T the rate depends on α alone, so the time is a quadrature in α.
//
// Method: adaptive tanh-sinh (double-exponential) quadrature on [a0, target]
// (Takahasi & Mori, Publ. RIMS Kyoto Univ. 9:721, 1974), each piece refined
// by halving the step until two levels agree to a relative 1e-12 (or to the
// rounding noise of the nodes, see Accuracy), and split in two when it does
// not within 1025 points. The nodes cluster at both ends, which absorbs the
// steep 1/r of a slow start (α^m with k1 ≈ 0) and of a diffusion-limited
// finish. For target = 1 the rate vanishes at the end as (1 − α)^p; the last
// w = 2⁻²⁷ of cure is integrated in closed form with the local exponent
// p = log₂[r(1 − w)/r(1 − w/2)] measured there, which is exact for the n-th
// order law. The time is finite only if p < 1 (for the built-in laws, n < 1);
// p ≥ 1 − 1e-6 gives +Inf.
//
// Accuracy: a relative error below 1e-12 + 1e-16/(1 − target) against the
// closed forms of the n-th order (n = 0 … 2.2) and autocatalytic (k1 = 0,
// m = n = 1) laws, checked in the tests; the second term is the float64
// resolution of α near full cure (1 − α is known only to 1.1e-16), which
// limits any method that calls Rate(T, α). Measured: about 1e-15 up to
// target = 0.999, 1e-10 at 1 − 1e-7. The closed-form end piece of a time to
// full cure is exact for the n-th order law and otherwise off by a relative
// 1e-8 or so times the logarithmic slope of the other factors of r.
//
// Special cases: a0 is clamped to [0, 1]; target ≤ a0 gives 0; target > 1
// gives +Inf. If the rate is zero (or negative) at a0 or anywhere on the way
// — a fixed point such as α = 0 with k1 = 0, an Arrhenius factor that
// underflows, a diffusion factor that underflows — the result is +Inf, as it
// is for any time above MaxIsothermalTime. NaN arguments give NaN.
//
// Cost: typically 100 to 600 evaluations of the rate (about 20 µs).
func (c *Cure) IsothermalTime(T, a0, target float64) float64 {
	if math.IsNaN(T) || math.IsNaN(a0) || math.IsNaN(target) {
		return math.NaN()
	}
	a0 = min(max(a0, 0), 1)
	switch {
	case target <= a0:
		return 0
	case target > 1:
		return math.Inf(1)
	}
	if r, _, _ := c.Rate(T, a0); !(r > 0) {
		return math.Inf(1)
	}
	b, end := target, 0.0
	if target == 1 {
		b = max(1-endWidth, a0)
		w := 1 - b // exact
		r, _, _ := c.Rate(T, b)
		r2, _, _ := c.Rate(T, 1-w/2)
		if !(r > 0 && r2 > 0) {
			return math.Inf(1)
		}
		p := math.Log(r/r2) / math.Ln2 // r ∝ (1 − α)^p near α = 1
		if p >= 1-1e-6 {
			return math.Inf(1)
		}
		end = w / ((1 - p) * r)
	}
	var t float64
	if b > a0 {
		t = c.timeBetween(T, a0, b)
	}
	t += end
	if !(t <= MaxIsothermalTime) {
		return math.Inf(1)
	}
	return t
}

// timeBetween returns ∫_a^b dα/r(T, α) for 0 ≤ a < b < 1, +Inf if the rate is
// not positive at some node.
func (c *Cure) timeBetween(T, a, b float64) float64 {
	q := tsQuad{c: c, T: T, budget: tsBudget}
	return q.integrate(a, b, isoTol, 0, 0)
}

// Tanh-sinh settings: trapezoid steps h = 2⁻ˡ for levels l = 0 … tsMaxLevel
// over t in [−tsTmax, tsTmax], where the nodes come within about 1e-37 of the
// ends relative to the interval; at least tsMinLevel levels before accepting;
// at most tsMaxDepth bisections of an interval, and at most tsBudget rate
// evaluations per quadrature, after which the best estimates are accepted.
const (
	tsTmax     = 4
	tsMinLevel = 3
	tsMaxLevel = 7
	tsMaxDepth = 40
	tsBudget   = 200000
)

// tsQuad integrates 1/r(T, α) over α by adaptive tanh-sinh quadrature.
type tsQuad struct {
	c      *Cure
	T      float64
	budget int // rate evaluations left
}

// f returns 1/r at α = x and an estimate of its rounding noise: α is a
// float64, so 1 − α is known only to ulp(α)/2, which perturbs 1/r by a
// relative |∂r/∂α / r|·ulp(α)/2. Close to full cure this noise, not the
// quadrature, limits the accuracy.
func (q *tsQuad) f(x float64) (v, noise float64) {
	q.budget--
	r, _, drda := q.c.Rate(q.T, x)
	if !(r > 0) {
		return math.Inf(1), 0
	}
	v = 1 / r
	ulp := math.Nextafter(x, 2) - x
	return v, v * (math.Abs(drda/r)*ulp/2 + 4e-16)
}

// integrate returns the integral over [a, b], accepting an estimate when two
// successive levels differ by at most max(rel·|I|, abs) plus twice the
// rounding noise of the sum, and bisecting the interval otherwise. The result
// is +Inf if the integrand is infinite at a node. Nodes are placed from the
// nearer end, so nodes close to an end resolve distances far below the
// spacing of floating-point numbers near that end.
func (q *tsQuad) integrate(a, b, rel, abs float64, depth int) float64 {
	c := 0.5 * (b - a)
	var sum, noise float64
	// add adds the nodes a + d and b − d at t > 0.
	add := func(t float64) {
		u := math.Pi / 2 * math.Sinh(t)
		e := math.Exp(-2 * u)
		d := c * 2 * e / (1 + e)                                          // distance to the end, c·(1 − tanh u)
		w := c * math.Pi / 2 * math.Cosh(t) * 4 * e / ((1 + e) * (1 + e)) // c·(π/2)·cosh t / cosh² u
		if w == 0 {
			return
		}
		v1, n1 := q.f(a + d)
		v2, n2 := q.f(b - d)
		sum += w * (v1 + v2)
		noise += w * (n1 + n2)
	}
	// Level 0: h = 1.
	v, n := q.f(a + c)
	sum, noise = c*math.Pi/2*v, c*math.Pi/2*n
	for t := 1.0; t <= tsTmax; t++ {
		add(t)
	}
	prev := sum
	if math.IsInf(prev, 0) || math.IsNaN(prev) {
		return math.Inf(1)
	}
	h := 1.0
	for level := 1; level <= tsMaxLevel; level++ {
		h /= 2
		for k := 1; float64(k)*h <= tsTmax; k += 2 {
			add(float64(k) * h)
		}
		est := h * sum
		if math.IsInf(est, 0) || math.IsNaN(est) {
			return math.Inf(1)
		}
		if level >= tsMinLevel && math.Abs(est-prev) <= max(rel*math.Abs(est), abs)+2*h*noise {
			return est
		}
		prev = est
	}
	if depth >= tsMaxDepth || q.budget <= 0 {
		return prev
	}
	m := a + c
	abs = max(abs, rel*math.Abs(prev)) / 2
	return q.integrate(a, m, rel, abs, depth+1) + q.integrate(m, b, rel, abs, depth+1)
}

// IsothermalCure returns the degree of cure reached after time t (s) at the
// constant temperature T (K), starting from a0: the solution α(t) of
//
//	dα/dt = r(T, α),   α(0) = a0,
//
// with r the rate of c including the diffusion factor.
//
// Method: α(t) is the root of G(α) = t, where G(α) = ∫_{a0}^{α} dα'/r is the
// time of IsothermalTime. The root is found by Newton's method with a
// bisection safeguard (Press et al., Numerical Recipes, 3rd ed., §9.4,
// "rtsafe") in the variable s = −ln(1 − α), in which G is linear for the
// first-order law and no step can pass α = 1; a step at most doubles s, so G
// is never evaluated absurdly close to full cure. Each new G is a quadrature
// (as in IsothermalTime) from the lower end of the bracket.
//
// Accuracy: the time residual G(α) − t is driven below a relative 1e-12 and
// one last Newton step is taken, so the error in α is about 1e-12·r(T, α)·t
// plus the quadrature error; against the closed forms of the tests it is
// below 1e-15.
//
// Special cases: a0 is clamped to [0, 1]; t ≤ 0 gives a0; a rate that is
// zero at a0 (a fixed point) gives a0; a time at or past the time to full
// cure gives 1. NaN arguments give NaN.
//
// Cost: typically 5 to 40 quadratures (about 0.2 ms).
func (c *Cure) IsothermalCure(T, a0, t float64) float64 {
	if math.IsNaN(T) || math.IsNaN(a0) || math.IsNaN(t) {
		return math.NaN()
	}
	a0 = min(max(a0, 0), 1)
	if !(t > 0) || a0 >= 1 {
		return a0
	}
	r0, _, _ := c.Rate(T, a0)
	if !(r0 > 0) {
		return a0
	}
	if t >= c.IsothermalTime(T, a0, 1) {
		return 1
	}
	// Invariant: G(lo) < t ≤ G(hi), in s = −ln(1 − α); hi may be +Inf.
	const sTop = 53 * math.Ln2 // s of 1 − 2⁻⁵³, the largest float64 below 1
	s0 := -math.Log1p(-a0)
	lo, glo := s0, 0.0
	hi := math.Inf(1)
	x, gx, rx := a0, 0.0, r0 // current point α, G(α), r(α)
	sx := s0
	for range 200 {
		// Newton step in s: dG/ds = (1 − α)/r.
		sn := sx + (t-gx)*rx*math.Exp(sx)
		if !(sn > lo && sn < hi) {
			if math.IsInf(hi, 1) {
				sn = 2*lo + 1
			} else {
				sn = lo + 0.5*(hi-lo)
			}
		}
		// Never more than double s (square 1 − α) in one step: G grows
		// steeply toward α = 1 and is costly and noisy to integrate there.
		sn = min(sn, lo+max(2, lo), sTop)
		if sn <= lo { // lo = sTop and G(1 − 2⁻⁵³) < t: α rounds to 1
			return 1
		}
		xn := -math.Expm1(-sn)
		// G from the lower bracket end, where G < t is accurate; the upper
		// end's G may be far larger than t and only bounds the root.
		gn := glo + c.timeBetween(T, -math.Expm1(-lo), xn)
		rn, _, _ := c.Rate(T, xn)
		if gn < t {
			lo, glo = sn, gn
		} else {
			hi = sn
		}
		x, gx, rx, sx = xn, gn, rn, sn
		if math.Abs(gn-t) <= 1e-12*t || hi-lo <= 4e-16*hi && !math.IsInf(hi, 1) {
			break
		}
	}
	if math.IsInf(gx, 1) || !(rx > 0) {
		return x
	}
	return min(max(x+(t-gx)*rx, -math.Expm1(-lo)), -math.Expm1(-hi))
}

// CureAlong returns the degree of cure reached at time t (s) by material
// whose temperature follows the schedule T from time 0, starting from cure
// a0: the solution of
//
//	dα/dt = r(T(t), α),   α(0) = a0,
//
// with no lag behind the schedule and no heat of its own (a screening
// estimate, not a simulation).
//
// Method: piecewise isothermal. A constant piece of T is one IsothermalCure;
// a ramp is cut into pieces of at most ΔT = 0.25 K, each run by
// IsothermalCure at its mid temperature (the midpoint rule on the rate
// constant: a relative error of about (E ΔT/(R T²))²/24 in the time
// integral, 2.4e-5 for E/(R T²) = 0.1/K).
//
// Special cases: t ≤ 0 gives a0; a0 is clamped to [0, 1]; NaN gives NaN.
// Cost: one IsothermalCure (about 0.2 ms) per hold and per 0.25 K of ramp.
func (c *Cure) CureAlong(T *Schedule, a0, t float64) float64 {
	if math.IsNaN(a0) || math.IsNaN(t) {
		return math.NaN()
	}
	a := min(max(a0, 0), 1)
	bt, _ := T.Points()
	now := 0.0
	// Pieces: before the first point, between points, after the last.
	for i := 0; i <= len(bt) && now < t && a < 1; i++ {
		end := t
		if i < len(bt) {
			end = min(t, bt[i])
		}
		if end <= now {
			continue
		}
		v0, v1 := T.At(now), T.At(end)
		pieces := max(1, int(math.Ceil(math.Abs(v1-v0)/0.25)))
		dt := (end - now) / float64(pieces)
		for k := range pieces {
			mid := now + (float64(k)+0.5)*dt
			a = c.IsothermalCure(T.At(mid), a, dt)
		}
		now = end
	}
	return a
}
