package physics

import "math"

// CastroMacosko is the Castro–Macosko viscosity of a curing resin,
//
//	η(T, α) = η0 · exp(E/(R·T)) · (α_g/(α_g − α))^(A + B·α),
//
// Castro & Macosko, AIChE J. 28:250 (1982): an Arrhenius fall with
// temperature times a rise that diverges at the gel point α_g (the
// material's Cure.GelPoint). Parameters are material-specific and come from
// rheometer data.
type CastroMacosko struct {
	Eta0 float64 // Pa·s, > 0
	E    float64 // J/mol
	A, B float64 // exponent A + B·α of the gel divergence, dimensionless
}

// LnAt returns ln η (η in Pa·s) at temperature T (K) and cure α for the gel
// point gel in (0, 1), and +Inf at or past gelation (α ≥ gel). Below α = 0
// the cure is taken as 0.
//
// Method: the logarithm of the formula, ln η0 + E/(R·T) + (A + B·α)·ln(α_g/(α_g − α)),
// which stays finite where η itself would overflow close to gel.
// Cost: two logarithms (one for η0 could be cached; it is cheap next to the
// rest of a step).
func (v *CastroMacosko) LnAt(T, a, gel float64) float64 {
	a = max(a, 0)
	if a >= gel {
		return math.Inf(1)
	}
	return math.Log(v.Eta0) + v.E/(GasConstant*T) - (v.A+v.B*a)*math.Log1p(-a/gel)
}

// At returns η in Pa·s (see LnAt): +Inf at or past gelation.
func (v *CastroMacosko) At(T, a, gel float64) float64 {
	return math.Exp(v.LnAt(T, a, gel))
}
