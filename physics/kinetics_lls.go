package physics

// DefaultSwitch is the degree of cure at which the Lee–Loos–Springer law
// passes from its first to its second regime when a case does not say
// (Lee, Loos & Springer, J. Composite Materials 16:510, 1982: α = 0.3).
const DefaultSwitch = 0.3

// LeeLoosSpringer is the two-regime law of Lee, Loos & Springer
//
//	dα/dt = (K1 + K2·α)·(1 − α)·(B − α)   for α ≤ Switch,
//	dα/dt = K3·(1 − α)                     for α > Switch,
//	Ki = Ai·exp(−Ei/(R·T)),
//
// Lee, Loos & Springer, "Heat of reaction, degree of cure, and viscosity of
// Hercules 3501-6 resin", J. Composite Materials 16:510 (1982). A2 may be
// negative (it is in the published resin), so K1 + K2·α, and with B below
// Switch also B − α, can turn negative: a rate below zero is clamped to
// zero (the reaction does not run backwards).
//
// Derivatives: exact partial derivatives of the active branch. Where the
// clamp is active (the unclamped rate ≤ 0) the rate is identically zero in
// a neighbourhood on that side, and both derivatives are reported as zero;
// at the clamp's edge the rate has a kink (one-sided slopes differ) and the
// slope of the clamped side, zero, is returned. The rate jumps at α =
// Switch unless the two branches happen to meet there; α = Switch itself
// belongs to the first regime. Newton's method in the solver copes with the
// jump because the step control shortens steps that straddle it.
//
// At α ≥ 1 the rate and both derivatives are zero (every law in this
// package stops at full cure).
type LeeLoosSpringer struct {
	A1, E1 float64 // 1/s, J/mol
	A2, E2 float64 // 1/s (may be negative), J/mol
	A3, E3 float64 // 1/s, J/mol
	B      float64 // dimensionless, > 0
	Switch float64 // degree of cure where the second regime starts, in [0, 1]
}

// Name implements Kinetics.
func (LeeLoosSpringer) Name() string { return "lee-loos-springer" }

// Rate implements Kinetics.
//
// Cost: two exponentials (first regime) or one (second), no logarithm.
func (m LeeLoosSpringer) Rate(T, a float64) (r, drdT, drda float64) {
	if a >= 1 {
		return 0, 0, 0
	}
	a = max(a, 0)
	inv := 1 / (GasConstant * T)
	if a > m.Switch {
		k3 := m.A3 * fexp(-m.E3*inv)
		r = k3 * (1 - a)
		if r <= 0 {
			return 0, 0, 0
		}
		return r, r * m.E3 * inv / T, -k3
	}
	k1 := m.A1 * fexp(-m.E1*inv)
	k2 := m.A2 * fexp(-m.E2*inv)
	c := k1 + k2*a
	g := (1 - a) * (m.B - a)
	r = c * g
	if r <= 0 {
		return 0, 0, 0
	}
	dcdT := (k1*m.E1 + k2*a*m.E2) * inv / T
	dg := 2*a - 1 - m.B // d[(1 − α)(B − α)]/dα
	return r, dcdT * g, k2*g + c*dg
}
