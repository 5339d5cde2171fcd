package physics

import "math"

// Thermal runaway of a reacting slab in the Frank-Kamenetskii
// approximation: the steady excess temperature θ = E (T − T0)/(R T0²) over
// the surroundings T0 obeys
//
//	θ″ + δ e^θ = 0,   δ = E/(R T0²) · q̇0 · ℓ²/k,
//
// with q̇0 the heat release per volume at T0 (W/m³), ℓ the length scale and
// x = z/ℓ. A face exchanging heat with surroundings at T0 through a
// conductance h (W/(m²·K)) has −θ′ = Bi·θ along its outward normal, with
// Bi = hℓ/k; Bi = +Inf holds the face at T0 and Bi = 0 insulates it. A
// steady state exists only for δ ≤ δ_c; above it the temperature runs away
// (as long as the reactant lasts).
//
// Every solution of the equation is θ = θm − 2 ln cosh(A (x − xm)) with
// δ e^θm = 2A² (substitute: θ″ = −2A² sech², e^θ = e^θm sech²), hottest θm
// at xm. The face conditions fix θm and xm for each A, and δ_c is the
// largest δ(A) = 2A² e^{−θm(A)} over A > 0 (the turning point of the branch
// of steady states).

// FKCritical is the critical state of a slab in the Frank-Kamenetskii
// approximation.
type FKCritical struct {
	// Delta is δ_c with the length scale of the function that returned it.
	Delta float64
	// Theta is the hottest excess θm = E (T − T0)/(R T0²) at criticality.
	Theta float64
	// Hottest is where the hottest point lies at criticality, as a
	// fraction of the length scale from the face the function names.
	Hottest float64
}

// CriticalFKSymmetric returns the critical Frank-Kamenetskii state of a
// slab of half-width a whose two faces exchange heat with the same
// surroundings at Biot number bi = h·a/k (length scale a; Hottest is 0, the
// mid-plane). The same numbers hold for a slab of thickness a with one face
// insulated and the other at Biot number h·a/k (the insulated face is the
// mid-plane of the symmetric slab of twice the thickness).
//
// With θ = θm − 2 ln cosh(A x) and −θ′(1) = Bi θ(1),
//
//	δ(A) = 2A² exp(−2A tanh(A)/Bi) / cosh²(A),
//
// the relation given for finite Biot numbers by Frank-Kamenetskii
// (Diffusion and Heat Transfer in Chemical Kinetics, 2nd ed., 1969, chapter
// on thermal explosion; from memory as to the chapter) and tabulated in
// Bowes (Self-Heating: Evaluating and Controlling the Hazards, 1984; from
// memory). Its maximum lies where d ln δ/dA = 0,
//
//	1/A − tanh A − (tanh A + A sech² A)/Bi = 0,
//
// whose left side falls strictly from +∞ at A → 0 to below zero at
// A tanh A = 1 (the root for Bi = ∞); it is found by bisection in ln A, to
// full precision. Limits: Bi → ∞ gives δ_c = 0.8784576797 at A tanh A = 1
// (walls held at T0; Frank-Kamenetskii); Bi → 0 gives Semenov's lumped
// δ_c = Bi/e.
//
// Preconditions: bi ≥ 0 (+Inf allowed); bi = 0 (no heat leaves) gives
// δ_c = 0, and NaN gives NaN. Cost: about 200 evaluations of tanh.
func CriticalFKSymmetric(bi float64) FKCritical {
	switch {
	case math.IsNaN(bi) || bi < 0:
		return FKCritical{Delta: math.NaN(), Theta: math.NaN(), Hottest: math.NaN()}
	case bi == 0:
		return FKCritical{Delta: 0, Theta: math.Inf(1)}
	}
	slope := func(A float64) float64 {
		th := math.Tanh(A)
		s := 1/A - th
		if !math.IsInf(bi, 1) {
			c := 1 / math.Cosh(A)
			s -= (th + A*c*c) / bi
		}
		return s
	}
	// Bracket in ln A: the root lies below the Bi = ∞ root 1.19967864 and
	// near √(Bi/2) for small Bi; widen downward until the slope is positive.
	hi := 1.2
	lo := 0.5 * math.Sqrt(min(bi, 1)/2)
	for slope(lo) <= 0 {
		lo /= 4
	}
	for slope(hi) > 0 { // only for Bi = ∞ rounding; A tanh A = 1 at 1.1997
		hi *= 1.01
	}
	llo, lhi := math.Log(lo), math.Log(hi)
	for range 200 {
		mid := 0.5 * (llo + lhi)
		if mid == llo || mid == lhi {
			break
		}
		if slope(math.Exp(mid)) > 0 {
			llo = mid
		} else {
			lhi = mid
		}
	}
	A := math.Exp(0.5 * (llo + lhi))
	theta := 2 * logCosh(A)
	if !math.IsInf(bi, 1) {
		theta += 2 * A * math.Tanh(A) / bi
	}
	return FKCritical{Delta: 2 * A * A * math.Exp(-theta), Theta: theta, Hottest: 0}
}

// CriticalFK returns the critical Frank-Kamenetskii state of a slab of
// thickness L (the length scale: x = z/L in [0, 1], δ = E/(R T0²)·q̇0·L²/k)
// whose face x = 0 has Biot number bi0 = h0·L/k and face x = 1 has bi1 =
// h1·L/k, both with surroundings at T0 (+Inf: held at T0; 0: insulated).
// Hottest is measured from face x = 0. For equal Biot numbers it equals
// CriticalFKSymmetric(bi/2) with δ_c four times larger (half-width L/2).
//
// With θ = θm − 2 ln cosh(A (x − xm)) the face conditions θ′(0) = bi0·θ(0)
// and −θ′(1) = bi1·θ(1) read
//
//	θm = g0(xm) = g1(1 − xm),   gi(s) = 2A·tanh(A s)/bi_i + 2 ln cosh(A s),
//
// both increasing in their argument, so for each A a bisection in xm ∈ [0, 1]
// finds the unique hottest point (xm = 0 when face 0 is insulated, 1 when
// face 1 is), and δ(A) = 2A² e^{−θm}. δ_c = max δ(A): a scan of ln A on a
// grid of 40 points per decade brackets the maximum, which golden-section
// search then refines (δ is flat at its maximum, so δ_c comes out to
// about 1e-14 relative while A is good to about 1e-7). This is the
// closed-form family of steady solutions of the symmetric case
// (CriticalFKSymmetric) made to meet unequal faces; the turning point is
// found on the family directly, with no ODE integration.
//
// Preconditions: bi0, bi1 ≥ 0 (+Inf allowed). Both 0 (no heat leaves)
// gives δ_c = 0; a negative or NaN Biot number gives NaN. Cost: about
// 2 000 evaluations of the face functions (a few tens of microseconds).
func CriticalFK(bi0, bi1 float64) FKCritical {
	nan := FKCritical{Delta: math.NaN(), Theta: math.NaN(), Hottest: math.NaN()}
	if math.IsNaN(bi0) || math.IsNaN(bi1) || bi0 < 0 || bi1 < 0 {
		return nan
	}
	if bi0 == 0 && bi1 == 0 {
		return FKCritical{Delta: 0, Theta: math.Inf(1)}
	}
	// g is θm as face condition i gives it, for the hottest point at
	// distance s from the face.
	g := func(A, s, bi float64) float64 {
		v := 2 * logCosh(A*s)
		if !math.IsInf(bi, 1) {
			v += 2 * A * math.Tanh(A*s) / bi
		}
		return v
	}
	// state returns θm and xm for parameter A.
	state := func(A float64) (theta, xm float64) {
		switch {
		case bi0 == 0:
			return g(A, 1, bi1), 0
		case bi1 == 0:
			return g(A, 1, bi0), 1
		}
		lo, hi := 0.0, 1.0
		for range 100 {
			mid := 0.5 * (lo + hi)
			if mid == lo || mid == hi {
				break
			}
			if g(A, mid, bi0)-g(A, 1-mid, bi1) < 0 {
				lo = mid
			} else {
				hi = mid
			}
		}
		xm = 0.5 * (lo + hi)
		return 0.5 * (g(A, xm, bi0) + g(A, 1-xm, bi1)), xm
	}
	lnDelta := func(lnA float64) float64 {
		theta, _ := state(math.Exp(lnA))
		return math.Ln2 + 2*lnA - theta
	}
	// The maximum lies near A ≈ √(bi0 + bi1) for small Biot numbers and
	// below A ≈ 2.4·2 for faces held at T0 (A/2 · tanh(A/2) = 1 when both
	// are); scan ln A from well below the first to well above the second.
	s := min(bi0+bi1, 1)
	a, b := math.Log(1e-3*math.Sqrt(s)), math.Log(20.0)
	const perDecade = 40
	n := int(math.Ceil((b-a)/math.Ln10*perDecade)) + 1
	step := (b - a) / float64(n-1)
	best, bestK := math.Inf(-1), 0
	for k := range n {
		if v := lnDelta(a + float64(k)*step); v > best {
			best, bestK = v, k
		}
	}
	lo := a + float64(max(bestK-1, 0))*step
	hi := a + float64(min(bestK+1, n-1))*step
	// Golden-section search for the maximum of ln δ on [lo, hi].
	const invPhi = 0.6180339887498949
	x1, x2 := hi-invPhi*(hi-lo), lo+invPhi*(hi-lo)
	f1, f2 := lnDelta(x1), lnDelta(x2)
	for range 80 {
		if f1 < f2 {
			lo, x1, f1 = x1, x2, f2
			x2 = lo + invPhi*(hi-lo)
			f2 = lnDelta(x2)
		} else {
			hi, x2, f2 = x2, x1, f1
			x1 = hi - invPhi*(hi-lo)
			f1 = lnDelta(x1)
		}
	}
	lnA := 0.5 * (lo + hi)
	if f := lnDelta(lnA); f < best {
		lnA = a + float64(bestK)*step
	}
	A := math.Exp(lnA)
	theta, xm := state(A)
	return FKCritical{Delta: 2 * A * A * math.Exp(-theta), Theta: theta, Hottest: xm}
}

// logCosh returns ln cosh y without overflow: |y| + ln(1 + e^{−2|y|}) − ln 2.
func logCosh(y float64) float64 {
	y = math.Abs(y)
	return y + math.Log1p(math.Exp(-2*y)) - math.Ln2
}
