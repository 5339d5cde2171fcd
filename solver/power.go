package solver

import (
	"math"

	"cureslab/physics"
)

// power fills lv.P, lv.PA and lv.PT with the absorbed power density at
// temperatures T and cure A and its derivatives.
//
// Uniform field: P = 2π f ε0 ε″ E² (physics.PowerDensity) with E² = u·E_max².
// Attenuated field: the power surviving to depth z is exp(−∫₀ᶻ dz′/D_p),
// D_p from each cell's ε′ and current ε″ (physics.PenetrationDepth); each
// cell absorbs its exact share, P_i = P_0,i e^{−τ_i} (1 − e^{−w_i/D_i}) D_i/w_i
// with τ_i the optical depth above it, which is second-order accurate and
// conserves the power that enters. A shield absorbs nothing and blocks the
// field beyond it. ∂P/∂α is kept for the cell's own ε″ only: the attenuation
// of the cells above enters the residual exactly but not the Jacobian.
func (s *stepper) power(lv *level, T, A []float64) {
	v, n := s.vol, s.n
	if s.wave != nil {
		s.standingPower(lv, T, A)
		return
	}
	unit := physics.PowerDensity(v.Frequency, 1, 1) * s.u * v.Field * v.Field
	uniform := v.Attenuation == physics.Uniform
	// Per cell: the power and its derivatives before attenuation, and the
	// optical depth w/D_p through the cell (0 when transparent, +Inf for a
	// shield, which also absorbs nothing).
	for i, d := range s.diel[:n] {
		lv.P[i], lv.PA[i], lv.PT[i] = 0, 0, 0
		switch {
		case d == nil:
			s.tauCell[i] = 0
		case d.Shield:
			s.tauCell[i] = math.Inf(1)
		default:
			eps2, dT, dA := d.Loss(T[i], A[i])
			lv.P[i], lv.PT[i], lv.PA[i] = unit*eps2, unit*dT, unit*dA
			if !uniform {
				s.tauCell[i] = s.w[i] / physics.PenetrationDepth(v.Frequency, d.Permittivity, eps2)
			}
		}
	}
	if uniform {
		// A shield in a uniform field blocks nothing around it; it only
		// absorbs nothing.
		return
	}
	// tauTop[i]: optical depth from the top face to the top of cell i;
	// tauBot[i]: from the bottom face to the bottom of cell i.
	acc := 0.0
	for i := range n {
		s.tauTop[i] = acc
		acc += s.tauCell[i]
	}
	acc = 0
	for i := n - 1; i >= 0; i-- {
		s.tauBot[i] = acc
		acc += s.tauCell[i]
	}
	for i := range n {
		if lv.P[i] == 0 && lv.PA[i] == 0 && lv.PT[i] == 0 {
			continue
		}
		ti := s.tauCell[i]
		share := 1.0 // (1 − e^{−τ_cell})/τ_cell, the cell-average of the decay
		if ti > 1e-8 {
			share = -math.Expm1(-ti) / ti
		}
		var f float64
		switch v.Attenuation {
		case physics.FromTop:
			f = physics.Exp(-s.tauTop[i])
		case physics.FromBottom:
			f = physics.Exp(-s.tauBot[i])
		default:
			f = 0.5 * (physics.Exp(-s.tauTop[i]) + physics.Exp(-s.tauBot[i]))
		}
		lv.P[i] *= f * share
		lv.PA[i] *= f * share
		lv.PT[i] *= f * share
	}
}

// standingPower is power for a standing wave: with the field held (the
// factors K of the last field computation, refreshField),
//
//	P_i = u S ε″_i(T_i, α_i) K_i,
//
// so ∂P/∂T and ∂P/∂α follow the cell's own loss factor at the held field.
// They are exact for the step's equations, in which the field is held; the
// field's own dependence on the loss factors (a cell's cure changes what
// reaches the cells below it) enters at the next step's start, through
// refreshField, and never the Jacobian.
func (s *stepper) standingPower(lv *level, T, A []float64) {
	unit := s.u * s.vol.IncidentPower
	K := s.fieldK[:s.n]
	for i, d := range s.diel[:s.n] {
		lv.P[i], lv.PA[i], lv.PT[i] = 0, 0, 0
		if d == nil || K[i] == 0 {
			continue
		}
		eps2, dT, dA := d.Loss(T[i], A[i])
		c := unit * K[i]
		lv.P[i], lv.PT[i], lv.PA[i] = c*eps2, c*dT, c*dA
	}
}

// fieldTolerance is the relative change of a cell's loss factor since the
// last field computation above which the field is computed again.
const fieldTolerance = 1e-6

// refreshField computes the standing wave's field again when the loss
// factor of any cell at the accepted state (s.T, s.A) differs from the one
// of the last computation by more than fieldTolerance (relative), and
// reports whether it did. The permittivity ε′ is constant per material, so
// the loss factors decide. Cost: one loss-factor evaluation per cell, and,
// when the field changes, one physics.Wave.Absorb: O(cells · frequencies).
func (s *stepper) refreshField() bool {
	eps := s.tauCell[:s.n] // scratch
	changed := !s.fieldSet
	for i, d := range s.diel[:s.n] {
		eps[i] = 0
		if d == nil || d.Shield {
			continue
		}
		e2, _, _ := d.Loss(s.T[i], s.A[i])
		eps[i] = max(e2, 0)
		if math.Abs(eps[i]-s.fieldEps[i]) > fieldTolerance*s.fieldEps[i] {
			changed = true
		}
	}
	if !changed {
		return false
	}
	for i := range s.slabs {
		s.slabs[i].Loss = eps[i]
	}
	copy(s.fieldEps, eps)
	s.wave.Absorb(s.fieldK, s.slabs, s.vol.Incident)
	s.fieldSet = true
	s.fieldRuns++
	return true
}
