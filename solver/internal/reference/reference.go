package reference

import (
	"fmt"
	"math"
)

// seriesTolerance bounds the neglected tail of the Fourier series.
const seriesTolerance = 1e-13

// PlaneWallEigen returns the first n roots ζ1 < ζ2 < … of
//
//	ζ tan ζ = Bi,   ζn ∈ ((n−1)π, (n−1)π + π/2),
//
// the eigenvalues of a plane wall of half-thickness L with convection on both
// faces, Bi = hL/k.
//
// Method: with ζ = (n−1)π + u the equation becomes
// f(u) = ((n−1)π + u)·sin u − Bi·cos u = 0, which is smooth and strictly
// increasing on [0, π/2] with f(0) = −Bi < 0 < f(π/2); it is solved by Newton's
// method safeguarded by bisection on that bracket, to a few ulp.
//
// Reference: Carslaw & Jaeger, Conduction of Heat in Solids, 2nd ed. (1959),
// §3.11; Incropera et al., Fundamentals of Heat and Mass Transfer, §5.5.1
// (eq. 5.39c; equation numbers of Incropera from memory).
//
// Bi must be ≥ 0 (it may be +Inf, giving ζn = (n − ½)π; Bi = 0 gives
// ζn = (n−1)π) and n ≥ 0; otherwise PlaneWallEigen panics. Cost: a few
// iterations per root.
func PlaneWallEigen(Bi float64, n int) []float64 {
	if !(Bi >= 0) || n < 0 {
		panic(fmt.Sprintf("reference: PlaneWallEigen(%g, %d): need Bi ≥ 0 and n ≥ 0", Bi, n))
	}
	z := make([]float64, n)
	for i := range z {
		z[i] = float64(i)*math.Pi + planeWallShift(Bi, i)
	}
	return z
}

// planeWallShift returns u = ζ − iπ of root i (0-based) of ζ tan ζ = Bi,
// u ∈ [0, π/2].
func planeWallShift(Bi float64, i int) float64 {
	const half = math.Pi / 2
	a := float64(i) * math.Pi
	switch {
	case Bi == 0:
		return 0
	case math.IsInf(Bi, 1):
		return half
	}
	// Starting guess: u ≈ √(Bi/(1 + Bi/(π/2)²)) for the first root (exact as
	// Bi → 0 and Bi → ∞), u ≈ atan(Bi/(a + π/4)) for the others.
	var u float64
	if i == 0 {
		u = math.Sqrt(Bi / (1 + Bi/(half*half)))
	} else {
		u = math.Atan(Bi / (a + half/2))
	}
	lo, hi := 0.0, half
	for range 200 {
		s, c := math.Sincos(u)
		f := (a+u)*s - Bi*c
		switch {
		case f == 0:
			return u
		case f < 0:
			lo = u
		default:
			hi = u
		}
		df := s + (a+u)*c + Bi*s
		next := u - f/df
		if !(next > lo && next < hi) {
			next = lo + (hi-lo)/2
		}
		if math.Abs(next-u) <= 2e-16*next || hi-lo <= 2e-16*hi {
			return next
		}
		u = next
	}
	return u
}

// PlaneWallCoefficient returns the Fourier coefficient of the plane-wall
// series for the eigenvalue ζ (a root of ζ tan ζ = Bi):
//
//	Cn = 4 sin ζn / (2ζn + sin 2ζn).
//
// Reference: Incropera et al. §5.5.1 (eq. 5.39b, from memory).
// ζ must be ≥ 0; ζ → 0 gives the limit 1. Cost: O(1).
func PlaneWallCoefficient(zeta float64) float64 {
	if !(zeta >= 0) {
		panic(fmt.Sprintf("reference: PlaneWallCoefficient(%g): ζ must be ≥ 0", zeta))
	}
	if zeta < 1e-4 {
		// 4 sin ζ/(2ζ + sin 2ζ) = 1 + ζ²/6 + O(ζ⁴).
		return 1 + zeta*zeta/6
	}
	return 4 * math.Sin(zeta) / (2*zeta + math.Sin(2*zeta))
}

// PlaneWall returns the dimensionless temperature of a plane wall of
// half-thickness L, initially uniform at Ti, whose two faces exchange heat
// with a fluid at T∞ through a coefficient h:
//
//	θ* = (T − T∞)/(Ti − T∞) = Σ_{n≥1} Cn exp(−ζn² Fo) cos(ζn x*),
//
// Bi = hL/k, Fo = αt/L², x* = x/L measured from the mid-plane (|x*| ≤ 1),
// with ζn and Cn as in PlaneWallEigen and PlaneWallCoefficient.
//
// Method: the full series, summed until the neglected tail is below 1e-13
// (the tail is bounded by |Cn| < 1 for n ≥ 2 and
// Σ_{n>N} exp(−(nπ)²Fo) ≤ erfc(Nπ√Fo)/(2√(πFo))).
//
// Reference: Carslaw & Jaeger (1959) §3.11; Incropera et al. §5.5.1
// (eq. 5.39a, from memory).
//
// Preconditions: Bi ≥ 0 (+Inf allowed: fixed face temperature), Fo ≥ 0,
// |x*| ≤ 1; otherwise PlaneWall panics. Fo = 0 or Bi = 0 returns 1.
// Cost: about 2/√Fo + 5 terms.
func PlaneWall(Bi, Fo, xStar float64) float64 {
	if !(Bi >= 0) || !(Fo >= 0) || !(math.Abs(xStar) <= 1) || math.IsInf(Fo, 0) {
		panic(fmt.Sprintf("reference: PlaneWall(%g, %g, %g): need Bi ≥ 0, finite Fo ≥ 0, |x*| ≤ 1", Bi, Fo, xStar))
	}
	return planeWallSeries(Bi, Fo, func(z, c float64) float64 { return c * math.Cos(z*xStar) })
}

// PlaneWallMean returns the thickness-averaged dimensionless temperature of
// the wall of PlaneWall:
//
//	θ̄* = Σ_{n≥1} Cn (sin ζn / ζn) exp(−ζn² Fo),
//
// so that the heat exchanged up to Fo is Q/Q0 = 1 − θ̄*.
//
// Reference: Incropera et al. §5.5.3 (the one-term form of Q/Q0 is its
// first term; section number from memory). Preconditions and cost as
// PlaneWall.
func PlaneWallMean(Bi, Fo float64) float64 {
	if !(Bi >= 0) || !(Fo >= 0) || math.IsInf(Fo, 0) {
		panic(fmt.Sprintf("reference: PlaneWallMean(%g, %g): need Bi ≥ 0, finite Fo ≥ 0", Bi, Fo))
	}
	return planeWallSeries(Bi, Fo, func(z, c float64) float64 {
		if z < 1e-8 {
			return c
		}
		return c * math.Sin(z) / z
	})
}

// planeWallSeries sums Σ exp(−ζn² Fo)·g(ζn, Cn).
func planeWallSeries(Bi, Fo float64, g func(z, c float64) float64) float64 {
	if Bi == 0 || Fo == 0 {
		return 1
	}
	sum := 0.0
	for i := 0; ; i++ {
		u := planeWallShift(Bi, i)
		z := float64(i)*math.Pi + u
		// sin ζ = ±sin u and sin 2ζ = sin 2u: computed from u to keep the
		// coefficient accurate for large n.
		c := 4 * math.Sin(u) / (2*z + math.Sin(2*u))
		if i%2 == 1 {
			c = -c
		}
		if i == 0 {
			c = PlaneWallCoefficient(z)
		}
		sum += math.Exp(-z*z*Fo) * g(z, c)
		if i >= 1 && math.Erfc(float64(i)*math.Pi*math.Sqrt(Fo))/(2*math.Sqrt(math.Pi*Fo)) < seriesTolerance {
			return sum
		}
	}
}

// SemiInfiniteStep returns the dimensionless temperature of a semi-infinite
// solid, initially at Ti, whose surface is held at Ts from t = 0:
//
//	θ = (T − Ts)/(Ti − Ts) = erf(x / (2√(αt))).
//
// The surface heat flux is k(Ts − Ti)/√(παt).
//
// Reference: Carslaw & Jaeger (1959) §2.4; Incropera et al. §5.7 case 1.
// Preconditions: x ≥ 0, t ≥ 0, α > 0; otherwise it panics. t = 0 returns 1
// (0 at x = 0). Cost: one erf.
func SemiInfiniteStep(x, t, alpha float64) float64 {
	if !(x >= 0) || !(t >= 0) || !(alpha > 0) {
		panic(fmt.Sprintf("reference: SemiInfiniteStep(%g, %g, %g): need x ≥ 0, t ≥ 0, α > 0", x, t, alpha))
	}
	if x == 0 {
		return 0
	}
	if t == 0 {
		return 1
	}
	return math.Erf(x / (2 * math.Sqrt(alpha*t)))
}

// SemiInfiniteConvection returns the dimensionless temperature of a
// semi-infinite solid, initially at Ti, whose surface exchanges heat from
// t = 0 with a fluid at T∞ through a coefficient h:
//
//	(T − Ti)/(T∞ − Ti) = erfc(η) − exp(hx/k + h²αt/k²)·erfc(η + h√(αt)/k),
//	η = x/(2√(αt)).
//
// Method: with β = h√(αt)/k the exponent is (η+β)² − η², so the second term is
// exp(−η²)·erfcx(η+β), erfcx(z) = exp(z²)·erfc(z) (scaled complementary error
// function, asymptotic series for z ≥ 26), which cannot overflow.
//
// Reference: Carslaw & Jaeger (1959) §2.7; Nellis & Klein, Heat
// Transfer (2009), Table 3-2; Incropera et al. §5.7 case 3.
// Preconditions: x ≥ 0, t ≥ 0, α > 0, h ≥ 0 (+Inf: fixed surface), k > 0;
// otherwise it panics. t = 0 returns 0. Cost: two erfc.
func SemiInfiniteConvection(x, t, alpha, h, k float64) float64 {
	if !(x >= 0) || !(t >= 0) || !(alpha > 0) || !(h >= 0) || !(k > 0) {
		panic(fmt.Sprintf("reference: SemiInfiniteConvection(%g, %g, %g, %g, %g): need x, t, h ≥ 0 and α, k > 0", x, t, alpha, h, k))
	}
	if t == 0 || h == 0 {
		return 0
	}
	s := math.Sqrt(alpha * t)
	eta := x / (2 * s)
	beta := h * s / k
	return math.Erfc(eta) - math.Exp(-eta*eta)*erfcx(eta+beta)
}

// erfcx returns exp(z²)·erfc(z) for z ≥ 0. Below 26 it multiplies the two
// factors (relative error about z²·ε); from 26 on it uses the asymptotic
// series 1/(z√π)·Σ (−1)^m (2m−1)!!/(2z²)^m, whose terms fall below 1e-17
// within a dozen terms there (Abramowitz & Stegun 7.1.23).
func erfcx(z float64) float64 {
	if z < 26 {
		return math.Exp(z*z) * math.Erfc(z)
	}
	return erfcxAsymptotic(z)
}

// erfcxAsymptotic is the asymptotic series of erfcx, for z ≥ 26.
func erfcxAsymptotic(z float64) float64 {
	if math.IsInf(z, 1) {
		return 0
	}
	r := 1 / (2 * z * z)
	sum, term := 1.0, 1.0
	for m := 1; m < 40; m++ {
		term *= -float64(2*m-1) * r
		sum += term
		if math.Abs(term) < 1e-17 {
			break
		}
	}
	return sum / (z * math.SqrtPi)
}

// NthOrderCure returns the degree of cure of the isothermal n-th order law
// dα/dt = k(1 − α)^n from α(0) = 0:
//
//	α = 1 − [1 − (1 − n)·k·t]^{1/(1−n)}   (n ≠ 1),   α = 1 − exp(−k·t)   (n = 1).
//
// Method: evaluated as −expm1(log1p(−(1−n)kt)/(1−n)), which is accurate for n
// near 1 and small kt. For n < 1 the cure is complete (α = 1) from
// t = 1/((1 − n)k) on.
//
// Reference: analytic (separation of variables).
// Preconditions: k ≥ 0, n ≥ 0, t ≥ 0; otherwise it panics. Cost: O(1).
func NthOrderCure(k, n, t float64) float64 {
	if !(k >= 0) || !(n >= 0) || !(t >= 0) {
		panic(fmt.Sprintf("reference: NthOrderCure(%g, %g, %g): need k, n, t ≥ 0", k, n, t))
	}
	if n == 1 {
		return -math.Expm1(-k * t)
	}
	x := (1 - n) * k * t
	if x >= 1 {
		return 1
	}
	return -math.Expm1(math.Log1p(-x) / (1 - n))
}

// LogisticCure returns the degree of cure of the autocatalytic law
// dα/dt = k·α·(1 − α) (Kamal–Sourour with k1 = 0, m = n = 1) from α(0) = α0:
//
//	α = α0·e^{kt} / (1 − α0 + α0·e^{kt}),
//
// evaluated as 1/(1 + (1 − α0)/α0 · e^{−kt}), which cannot overflow.
//
// Reference: analytic (the Kamal–Sourour law with k1 = 0, m = n = 1; Kamal & Sourour, Polym. Eng. Sci. 13:59, 1973). α = 0 is a fixed point, so α0 = 0
// returns 0. Preconditions: k ≥ 0, α0 ∈ [0, 1], t ≥ 0; otherwise it panics.
// Cost: O(1).
func LogisticCure(k, a0, t float64) float64 {
	if !(k >= 0) || !(a0 >= 0 && a0 <= 1) || !(t >= 0) {
		panic(fmt.Sprintf("reference: LogisticCure(%g, %g, %g): need k, t ≥ 0 and α0 in [0, 1]", k, a0, t))
	}
	if a0 == 0 {
		return 0
	}
	return 1 / (1 + (1-a0)/a0*math.Exp(-k*t))
}

// FrankKamenetskiiSlabCritical returns the critical Frank-Kamenetskii
// parameter δc of a slab and the critical centre excess θm,c. The steady
// problem d²θ/dx² + δ e^θ = 0, θ(±1) = 0 has the solutions
//
//	θ(x) = θm − 2 ln cosh(τx),   θm = 2 ln cosh τ,   δ = 2τ²/cosh²τ,
//
// and δ(τ) is largest where τ tanh τ = 1 (τc ≈ 1.19968), giving
// δc ≈ 0.878458 and θm,c ≈ 1.18684.
//
// Method: Newton's method on τ tanh τ = 1 from τ = 1.2.
// Reference: Frank-Kamenetskii, Diffusion and Heat Exchange in Chemical
// Kinetics (1969), ch. VII; Boddington, Gray & Wake, Proc. R. Soc. A 357
// (1977). Cost: a few iterations.
func FrankKamenetskiiSlabCritical() (delta, thetaCentre float64) {
	tau := fkCriticalTau()
	c := math.Cosh(tau)
	return 2 * tau * tau / (c * c), 2 * math.Log(c)
}

func fkCriticalTau() float64 {
	tau := 1.2
	for range 50 {
		t := math.Tanh(tau)
		f := tau*t - 1
		df := t + tau*(1-t*t)
		step := f / df
		tau -= step
		if math.Abs(step) <= 1e-16*tau {
			break
		}
	}
	return tau
}

// FrankKamenetskiiSlab returns the centre excess temperature θ(0) of the
// lower (stable) branch of steady solutions of the slab problem of
// FrankKamenetskiiSlabCritical, with θ = E(T − T0)/(R T0²), lengths scaled by
// the half-width a and
//
//	δ = (E/(R T0²))·(Q ρ A a²/k)·exp(−E/(R T0)).
//
// It returns ok = false (and NaN) when δ exceeds δc: no steady state exists,
// the slab runs away.
//
// Method: solves 2τ²/cosh²τ = δ for τ ∈ [0, τc], where the left side is
// increasing, by Newton's method on ln(2τ²) − 2 ln cosh τ = ln δ safeguarded by
// bisection; θ(0) = 2 ln cosh τ.
// Reference: as FrankKamenetskiiSlabCritical. Valid for high activation
// energy and negligible reactant consumption. Preconditions: δ ≥ 0, else it
// panics. Cost: a few iterations.
func FrankKamenetskiiSlab(delta float64) (thetaCentre float64, ok bool) {
	if !(delta >= 0) {
		panic(fmt.Sprintf("reference: FrankKamenetskiiSlab(%g): need δ ≥ 0", delta))
	}
	if delta == 0 {
		return 0, true
	}
	tc := fkCriticalTau()
	dc, tmc := FrankKamenetskiiSlabCritical()
	switch {
	case delta > dc:
		return math.NaN(), false
	case delta == dc:
		return tmc, true
	}
	// g(τ) = ln(2τ²) − 2 ln cosh τ − ln δ, increasing on (0, τc).
	lnd := math.Log(delta)
	lo, hi := 0.0, tc
	tau := min(math.Sqrt(delta/2), tc/2)
	for range 200 {
		g := math.Log(2*tau*tau) - 2*math.Log(math.Cosh(tau)) - lnd
		if g < 0 {
			lo = tau
		} else {
			hi = tau
		}
		dg := 2/tau - 2*math.Tanh(tau)
		next := tau - g/dg
		if !(next > lo && next < hi) {
			next = lo + (hi-lo)/2
		}
		if math.Abs(next-tau) <= 2e-16*next {
			tau = next
			break
		}
		tau = next
	}
	// 2 ln cosh τ = 2 log1p(2 sinh²(τ/2)), accurate for small τ.
	sh := math.Sinh(tau / 2)
	return 2 * math.Log1p(2*sh*sh), true
}
