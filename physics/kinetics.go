package physics

import "math"

// GasConstant is the molar gas constant R in J/(mol·K) (CODATA 2018, exact).
const GasConstant = 8.314462618

// Kinetics is a cure-rate law dα/dt = r(T, α) before any diffusion factor.
// A new model is one type that satisfies this interface (see DEVELOPERS.md).
type Kinetics interface {
	// Rate returns r(T, α) in 1/s and its partial derivatives with respect
	// to T (1/(s·K)) and α (1/s), at absolute temperature T and cure α in
	// [0, 1]. At α = 1 every rate and derivative must be zero.
	Rate(T, a float64) (r, drdT, drda float64)
	// Name is the model's name as written in a case file.
	Name() string
}

// Arrhenius returns the rate constant
//
//	k = A·exp(−E/(R·T))
//
// and its derivative dk/dT = k·E/(R·T²). A in 1/s, E in J/mol, T in K.
func Arrhenius(A, E, T float64) (k, dkdT float64) {
	k = A * fexp(-E/(GasConstant*T))
	return k, k * E / (GasConstant * T * T)
}

// powDeriv returns x^p and d(x^p)/dx for x in [0, 1] and p ≥ 0, with the
// convention 0^0 = 1. For p < 1 the derivative is infinite at x = 0; below
// x = slopeFloor it is reported as the value at slopeFloor instead. The
// value itself is exact; only the derivative (which enters Newton's
// Jacobian, never a residual) is capped, so iterations converge to the
// exact solution.
func powDeriv(x, p float64) (v, d float64) {
	switch {
	case p == 0:
		return 1, 0
	case p == 1:
		return x, 1
	case x <= 0:
		if p < 1 {
			return 0, p * math.Pow(slopeFloor, p-1)
		}
		return 0, 0
	}
	v = math.Pow(x, p)
	if p < 1 && x < slopeFloor {
		return v, p * math.Pow(slopeFloor, p-1)
	}
	return v, p * v / x
}

// slopeFloor is where powDeriv starts capping the derivative of x^p, p < 1.
const slopeFloor = 1e-10

// NthOrder is the n-th order law
//
//	dα/dt = k(T)·(1 − α)^n,   k = A·exp(−E/(R·T)).
//
// Isothermal closed form: α = 1 − [1 − (1 − n)·k·t]^{1/(1−n)} for n ≠ 1 and
// α = 1 − exp(−k·t) for n = 1.
type NthOrder struct {
	A float64 // pre-exponential factor, 1/s
	E float64 // activation energy, J/mol
	N float64 // reaction order, ≥ 0
}

// Name implements Kinetics.
func (NthOrder) Name() string { return "nth-order" }

// Rate implements Kinetics.
func (m NthOrder) Rate(T, a float64) (r, drdT, drda float64) {
	if a >= 1 {
		return 0, 0, 0
	}
	if a >= 0 {
		// k (1−α)^n as one exponential of a sum of logarithms.
		rt := GasConstant * T
		r = m.A * fexp(-m.E/rt+m.N*flog(1-a))
		return r, r * m.E / (rt * T), -m.N * r / (1 - a)
	}
	k, dk := Arrhenius(m.A, m.E, T)
	f, df := powDeriv(1-a, m.N)
	return k * f, dk * f, -k * df
}

// Autocatalytic is the Kamal–Sourour law
//
//	dα/dt = (k1 + k2·α^m)·(1 − α)^n,   ki = Ai·exp(−Ei/(R·T)),
//
// Kamal & Sourour, Polym. Eng. Sci. 13:59 (1973). With k1 = 0 the state
// α = 0 does not react: start such a resin from a small initial cure.
type Autocatalytic struct {
	A1, E1 float64 // 1/s, J/mol
	A2, E2 float64 // 1/s, J/mol
	M, N   float64 // orders, ≥ 0
}

// Name implements Kinetics.
func (Autocatalytic) Name() string { return "autocatalytic" }

// Rate implements Kinetics.
func (m Autocatalytic) Rate(T, a float64) (r, drdT, drda float64) {
	if a >= 1 {
		return 0, 0, 0
	}
	if a > slopeFloor {
		// Interior: two exponentials and two logarithms in all,
		//	r = A1 e^{−E1/RT} (1−α)^n + A2 e^{−E2/RT} α^m (1−α)^n,
		// each term one exp of a sum of logarithms.
		// One division serves 1/T, another both 1/α and 1/(1−α).
		iT := 1 / T
		inv := iT * (1 / GasConstant)
		l1 := flog(1 - a)
		t1 := m.A1 * fexp(-m.E1*inv+m.N*l1)
		t2 := m.A2 * fexp(-m.E2*inv+m.M*flog(a)+m.N*l1)
		r = t1 + t2
		q := 1 / (a * (1 - a))
		return r, (t1*m.E1 + t2*m.E2) * inv * iT, t2*m.M*(1-a)*q - m.N*r*a*q
	}
	a = max(a, 0)
	k1, dk1 := Arrhenius(m.A1, m.E1, T)
	k2, dk2 := Arrhenius(m.A2, m.E2, T)
	g, dg := powDeriv(a, m.M)
	f, df := powDeriv(1-a, m.N)
	c := k1 + k2*g
	return c * f, (dk1 + dk2*g) * f, k2*dg*f - c*df
}

// Diffusion is the Chern–Poehlein diffusion factor that slows the reaction
// as the resin vitrifies:
//
//	f_d = 1 / (1 + exp(C·(α − αc(T)))),   αc(T) = Alpha0 + AlphaT·T,
//
// Chern & Poehlein, Polym. Eng. Sci. 27:788 (1987). T in K.
type Diffusion struct {
	C      float64 // dimensionless
	Alpha0 float64 // dimensionless
	AlphaT float64 // 1/K
}

// Factor returns f_d and its partial derivatives with respect to T and α.
func (d *Diffusion) Factor(T, a float64) (f, dfdT, dfda float64) {
	x := d.C * (a - d.Alpha0 - d.AlphaT*T)
	if x > 700 {
		return 0, 0, 0
	}
	e := fexp(x)
	f = 1 / (1 + e)
	s := -f * f * e // df/dx
	return f, s * (-d.C * d.AlphaT), s * d.C
}

// DiBenedetto is the DiBenedetto relation between glass transition and cure
// in the Pascault–Williams form
//
//	(Tg − Tg0)/(Tg∞ − Tg0) = λα / (1 − (1 − λ)α),
//
// Pascault & Williams, J. Polym. Sci. B 28:85 (1990). Temperatures in K,
// 0 < λ ≤ 1.
type DiBenedetto struct {
	Tg0    float64 // glass transition of the uncured resin, K
	TgFull float64 // glass transition at full cure, K
	Lambda float64 // λ, dimensionless
}

// Tg returns the glass transition temperature at cure α.
func (d *DiBenedetto) Tg(a float64) float64 {
	return d.Tg0 + (d.TgFull-d.Tg0)*d.Lambda*a/(1-(1-d.Lambda)*a)
}

// CureAt returns the degree of cure whose glass transition is Tg, the
// inverse relation α = (Tg − Tg0)/(λ(Tg∞ − Tg) + (Tg − Tg0)), clamped to
// [0, 1] outside [Tg0, Tg∞].
func (d *DiBenedetto) CureAt(Tg float64) float64 {
	switch {
	case Tg <= d.Tg0:
		return 0
	case Tg >= d.TgFull:
		return 1
	}
	return (Tg - d.Tg0) / (d.Lambda*(d.TgFull-Tg) + (Tg - d.Tg0))
}

// DefaultGelPoint is the Flory–Stockmayer gel point of a stoichiometric
// diepoxide with a tetrafunctional diamine, p_c = 1/√((fA − 1)(fB − 1)) =
// 1/√3 ≈ 0.577 (Flory, Principles of Polymer Chemistry, 1953, ch. IX).
var DefaultGelPoint = 1 / math.Sqrt(3)

// Cure is the curing behaviour of a resin-bearing material.
type Cure struct {
	Model         Kinetics
	Diffusion     *Diffusion   // optional
	Glass         *DiBenedetto // optional
	TotalHeat     float64      // heat released by full cure per mass of resin, J/kg
	ResinFraction float64      // mass fraction of reacting resin, (0, 1]
	GelPoint      float64      // degree of cure at gelation, (0, 1)
	// GelPointDefaulted says that GelPoint is DefaultGelPoint because the
	// input gave none (an assumption about the chemistry, not data).
	GelPointDefaulted bool
}

// Rate returns dα/dt at (T, α) with the diffusion factor applied, and its
// partial derivatives. α is clamped to [0, 1]; the rate is zero at α = 1.
func (c *Cure) Rate(T, a float64) (r, drdT, drda float64) {
	a = min(max(a, 0), 1)
	// The built-in laws are called directly (no interface dispatch in the
	// solver's innermost loop); any other Kinetics through the interface.
	switch m := c.Model.(type) {
	case Autocatalytic:
		r, drdT, drda = m.Rate(T, a)
	case NthOrder:
		r, drdT, drda = m.Rate(T, a)
	case LeeLoosSpringer:
		r, drdT, drda = m.Rate(T, a)
	case *Isoconversional:
		r, drdT, drda = m.Rate(T, a)
	default:
		r, drdT, drda = c.Model.Rate(T, a)
	}
	if c.Diffusion != nil {
		f, fT, fa := c.Diffusion.Factor(T, a)
		r, drdT, drda = r*f, drdT*f+r*fT, drda*f+r*fa
	}
	return r, drdT, drda
}

// End returns the degree of cure past which the rate is zero: the last row
// of an isoconversional table, 1 for every other law. A time stepper holds
// a cell that reaches it there (the trapezoidal rule has no solution across
// a rate that drops to zero in a jump).
func (c *Cure) End() float64 {
	if e, ok := c.Model.(interface{ End() float64 }); ok {
		return min(e.End(), 1)
	}
	return 1
}

// HeatPerMass returns the reaction heat per mass of material for full cure,
// ResinFraction·TotalHeat, in J/kg.
func (c *Cure) HeatPerMass() float64 { return c.ResinFraction * c.TotalHeat }
