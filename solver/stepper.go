package solver

import (
	"math"

	"cureslab/physics"
)

// level holds everything evaluated at one time level for one state (T, α):
// conduction balances with their derivatives, reaction rates, capacities and
// face fluxes. The stepper keeps two: the accepted ("old") level and the
// Newton iterate ("new").
type level struct {
	t float64

	down []float64 // heat flux across each face in the +z direction, W/m², len n+1
	R    []float64 // half-cell conduction resistance w/(2k), m²K/W
	dR   []float64 // ∂R/∂T
	D    []float64 // net conduction into each cell, W/m²: down[i] − down[i+1]
	dDl  []float64 // ∂D_i/∂T_{i−1}
	dDd  []float64 // ∂D_i/∂T_i
	dDu  []float64 // ∂D_i/∂T_{i+1}

	r, rT, rA    []float64 // cure rate and its partial derivatives (0 where inert)
	cp, cpT, cpA []float64 // specific heat and its partial derivatives

	tfTop, tfBot float64 // outer face temperatures, K
}

func newLevel(n int) *level {
	buf := make([]float64, 15*n+1)
	take := func(m int) []float64 { s := buf[:m:m]; buf = buf[m:]; return s }
	return &level{
		down: take(n + 1), R: take(n), dR: take(n), D: take(n), dDl: take(n), dDd: take(n), dDu: take(n),
		r: take(n), rT: take(n), rA: take(n), cp: take(n), cpT: take(n), cpA: take(n),
	}
}

// stepper integrates one Problem. It owns every buffer it uses; after
// construction, a step allocates nothing.
type stepper struct {
	p *Problem
	n int

	// Per-cell constants.
	w    []float64           // width, m
	rho  []float64           // density, kg/m³
	mat  []*physics.Material // material
	cure []*physics.Cure     // nil where the cell does not cure
	heat []float64           // ρ · resin fraction · total heat, J/m³ (0 where inert)
	rc   []float64           // contact resistance at the face above each cell, m²K/W

	// Accepted state and its level.
	t    float64
	T, A []float64
	old  *level

	// Newton iterate and its level.
	Tn, An []float64
	cur    *level

	// Tridiagonal system and elimination scratch.
	lo, di, up, rhs, cp []float64
	jTa, jaT, jaa, gA   []float64

	// History of accepted states for the predictor and the error estimate:
	// histT[0] is the newest. histLen counts the valid entries.
	histT   [3][]float64
	histA   [3][]float64
	histTim [3]float64
	histLen int
	// Predictor output.
	predT, predA []float64

	curing bool // any cell cures
}

func newStepper(p *Problem) *stepper {
	m := p.Mesh
	n := m.Cells()
	s := &stepper{p: p, n: n}
	f := func() []float64 { return make([]float64, n) }
	s.w, s.rho, s.heat, s.rc = f(), f(), f(), f()
	s.mat = make([]*physics.Material, n)
	s.cure = make([]*physics.Cure, n)
	for i := range n {
		mt := p.Materials[m.Owner[i]]
		s.w[i] = m.Widths[i]
		s.rho[i] = mt.Density
		s.mat[i] = mt
		if mt.Cure != nil {
			s.cure[i] = mt.Cure
			s.heat[i] = mt.Density * mt.Cure.HeatPerMass()
			s.curing = true
		}
	}
	for j := 1; j < len(m.Layers); j++ {
		s.rc[m.First[j]] = m.Layers[j].ContactResistance
	}
	s.T, s.A, s.Tn, s.An = f(), f(), f(), f()
	s.lo, s.di, s.up, s.rhs, s.cp = f(), f(), f(), f(), f()
	s.jTa, s.jaT, s.jaa, s.gA = f(), f(), f(), f()
	for k := range 3 {
		s.histT[k], s.histA[k] = f(), f()
	}
	s.predT, s.predA = f(), f()
	s.old, s.cur = newLevel(n), newLevel(n)
	return s
}

// eval fills lv with everything at time t and state (T, A).
func (s *stepper) eval(lv *level, t float64, T, A []float64) {
	n := s.n
	lv.t = t
	for i := range n {
		mt := s.mat[i]
		k, kT, _ := mt.Conductivity.At(T[i], A[i])
		lv.R[i] = s.w[i] / (2 * k)
		lv.dR[i] = -s.w[i] / (2 * k * k) * kT
		lv.cp[i], lv.cpT[i], lv.cpA[i] = mt.SpecificHeat.At(T[i], A[i])
		if c := s.cure[i]; c != nil {
			lv.r[i], lv.rT[i], lv.rA[i] = c.Rate(T[i], A[i])
		}
		lv.dDl[i], lv.dDd[i], lv.dDu[i] = 0, 0, 0
	}
	// Internal faces: conductance g from the two half-cells in series plus
	// any contact resistance; the downward flux d = g (T_a − T_b) has the
	// exact derivatives (with ∂g/∂T = −g² ∂R/∂T)
	//	∂d/∂T_a =  g − d g ∂R_a/∂T_a,   ∂d/∂T_b = −g − d g ∂R_b/∂T_b.
	for f := 1; f < n; f++ {
		a, b := f-1, f
		g := 1 / (lv.R[a] + s.rc[f] + lv.R[b])
		d := g * (T[a] - T[b])
		lv.down[f] = d
		da := g - d*g*lv.dR[a]
		db := -g - d*g*lv.dR[b]
		// D_a −= d ; D_b += d
		lv.dDd[a] -= da
		lv.dDu[a] = -db
		lv.dDd[b] += db
		lv.dDl[b] = da
	}
	q, dq, tf := s.p.Top.HeatIn(t, T[0], lv.R[0])
	lv.down[0], lv.tfTop = q, tf
	lv.dDd[0] += dq
	q, dq, tf = s.p.Bottom.HeatIn(t, T[n-1], lv.R[n-1])
	lv.down[n], lv.tfBot = -q, tf
	lv.dDd[n-1] += dq
	for i := range n {
		lv.D[i] = lv.down[i] - lv.down[i+1]
	}
}

// stepOutcome says how a step attempt ended.
type stepOutcome int

const (
	stepOK         stepOutcome = iota
	stepNoConverge             // Newton did not converge, or the elimination broke down
)

// Newton settings. The residual tolerances are far below any accuracy
// target so that the energy ledger balances to round-off.
const (
	maxNewton  = 10
	newtonTolT = 1e-10 // K, residual scaled by the cell's heat capacity
	newtonTolA = 1e-12 // degree of cure
	minJaa     = 0.05  // smallest ∂G/∂α allowed in the elimination
)

// solve runs Newton's method for one step of size h with weight theta from
// the accepted state (s.T, s.A, s.old) to time s.t+h, starting from the
// predictor in (s.Tn, s.An). On success s.cur holds the converged level.
func (s *stepper) solve(h, theta float64) (stepOutcome, int) {
	n := s.n
	T0, A0, o := s.T, s.A, s.old
	T, A, v := s.Tn, s.An, s.cur
	tn := s.t + h
	for it := 0; ; it++ {
		s.eval(v, tn, T, A)
		maxF, maxG := 0.0, 0.0
		for i := range n {
			m := s.rho[i] * s.w[i] / h
			cs := 0.5 * (o.cp[i] + v.cp[i])
			dT := T[i] - T0[i]
			F := m*cs*dT - theta*v.D[i] - (1-theta)*o.D[i] - s.heat[i]*s.w[i]*(A[i]-A0[i])/h
			s.lo[i] = -theta * v.dDl[i]
			s.up[i] = -theta * v.dDu[i]
			s.di[i] = m*(cs+0.5*v.cpT[i]*dT) - theta*v.dDd[i]
			s.rhs[i] = -F
			maxF = max(maxF, math.Abs(F)/(m*cs))
			if s.cure[i] == nil {
				continue
			}
			G := A[i] - A0[i] - h*(theta*v.r[i]+(1-theta)*o.r[i])
			if A[i] >= 1 && G <= 0 {
				// The step would carry the cell past full cure: α = 1 stands
				// (the rate is zero there) and the cell's cure is not an
				// unknown of this iteration.
				s.jaT[i], s.jaa[i], s.gA[i] = 0, 1, 0
				continue
			}
			maxG = max(maxG, math.Abs(G))
			jTa := m*0.5*v.cpA[i]*dT - s.heat[i]*s.w[i]/h
			jaT := -h * theta * v.rT[i]
			jaa := 1 - h*theta*v.rA[i]
			if jaa < minJaa {
				return stepNoConverge, it
			}
			s.di[i] -= jTa * jaT / jaa
			s.rhs[i] += jTa * G / jaa
			s.jaT[i], s.jaa[i], s.gA[i] = jaT, jaa, G
		}
		if math.IsNaN(maxF) || math.IsNaN(maxG) {
			return stepNoConverge, it
		}
		if maxF <= newtonTolT && maxG <= newtonTolA {
			return stepOK, it
		}
		if it == maxNewton {
			return stepNoConverge, it
		}
		if !thomas(s.lo, s.di, s.up, s.rhs, s.cp) {
			return stepNoConverge, it
		}
		dTmax, dAmax, Tmax := 0.0, 0.0, 0.0
		for i := range n {
			dT := s.rhs[i]
			T[i] += dT
			dTmax = max(dTmax, math.Abs(dT))
			Tmax = max(Tmax, math.Abs(T[i]))
			if s.cure[i] == nil {
				continue
			}
			dA := (-s.gA[i] - s.jaT[i]*dT) / s.jaa[i]
			a := min(max(A[i]+dA, 0), 1)
			dAmax = max(dAmax, math.Abs(a-A[i]))
			A[i] = a
		}
		if math.IsNaN(dTmax) || math.IsInf(dTmax, 0) {
			return stepNoConverge, it
		}
		if dTmax <= 1e-13*Tmax && dAmax <= 1e-14 {
			// Converged to round-off: the residual cannot fall further.
			s.eval(v, tn, T, A)
			return stepOK, it + 1
		}
	}
}

// thomas solves the tridiagonal system with sub-diagonal lo (lo[0] unused),
// diagonal di and super-diagonal up (up[n−1] unused), overwriting rhs with
// the solution; c is scratch. The Thomas algorithm without pivoting is stable
// for the diagonally dominant matrices of implicit conduction (Golub & Van
// Loan, Matrix Computations, 4th ed., §4.3). It reports false on a zero pivot.
// O(n), no allocation.
func thomas(lo, di, up, rhs, c []float64) bool {
	n := len(di)
	b := di[0]
	if b == 0 {
		return false
	}
	c[0] = up[0] / b
	rhs[0] /= b
	for i := 1; i < n; i++ {
		b = di[i] - lo[i]*c[i-1]
		if b == 0 {
			return false
		}
		if i < n-1 {
			c[i] = up[i] / b
		}
		rhs[i] = (rhs[i] - lo[i]*rhs[i-1]) / b
	}
	for i := n - 2; i >= 0; i-- {
		rhs[i] -= c[i] * rhs[i+1]
	}
	return true
}

// predict fills (predT, predA) with the polynomial extrapolation of the
// history to time t: constant, linear or quadratic with 1, 2 or 3 points.
func (s *stepper) predict(t float64) {
	switch s.histLen {
	case 1:
		copy(s.predT, s.histT[0])
		copy(s.predA, s.histA[0])
	case 2:
		t0, t1 := s.histTim[0], s.histTim[1]
		l0 := (t - t1) / (t0 - t1)
		l1 := 1 - l0
		for i := range s.n {
			s.predT[i] = l0*s.histT[0][i] + l1*s.histT[1][i]
			s.predA[i] = l0*s.histA[0][i] + l1*s.histA[1][i]
		}
	default:
		t0, t1, t2 := s.histTim[0], s.histTim[1], s.histTim[2]
		l0 := (t - t1) * (t - t2) / ((t0 - t1) * (t0 - t2))
		l1 := (t - t0) * (t - t2) / ((t1 - t0) * (t1 - t2))
		l2 := (t - t0) * (t - t1) / ((t2 - t0) * (t2 - t1))
		for i := range s.n {
			s.predT[i] = l0*s.histT[0][i] + l1*s.histT[1][i] + l2*s.histT[2][i]
			s.predA[i] = l0*s.histA[0][i] + l1*s.histA[1][i] + l2*s.histA[2][i]
		}
	}
	for i := range s.n {
		s.predA[i] = min(max(s.predA[i], s.A[i]), 1) // cure never decreases
	}
}

// errorRatio estimates the local error of the step just solved, relative to
// the tolerances (≤ 1 means acceptable), from the difference between the
// corrector (Tn, An) and the predictor. With three history points and
// Crank–Nicolson, the quadratic predictor's error is y”'/6·h(h+h1)(h+h1+h2)
// and the trapezoidal rule's local error is h³y”'/12, so
//
//	LTE ≈ |y_C − y_P| · h² / (2 (h+h1)(h+h1+h2)).
//
// With two points (the implicit Euler start-up), the linear predictor's
// error is y”/2·h(h+h1) against implicit Euler's h²y”/2, so
// LTE ≈ |y_C − y_P| · h/(h+h1). With one point there is no estimate (0).
// The second return value is the order p of the error in h (LTE ∝ h^p).
func (s *stepper) errorRatio(h float64, cn bool) (ratio, order float64) {
	var fac float64
	switch {
	case s.histLen >= 3 && cn:
		h1 := s.histTim[0] - s.histTim[1]
		h2 := s.histTim[1] - s.histTim[2]
		fac, order = h*h/(2*(h+h1)*(h+h1+h2)), 3
	case s.histLen >= 2:
		h1 := s.histTim[0] - s.histTim[1]
		fac, order = h/(h+h1), 2
		if cn {
			order = 3
		}
	default:
		return 0, 2
	}
	tolT, tolA := s.p.TemperatureTolerance, s.p.CureTolerance
	worst := 0.0
	for i := range s.n {
		worst = max(worst, math.Abs(s.Tn[i]-s.predT[i])/tolT)
		if s.cure[i] != nil {
			worst = max(worst, math.Abs(s.An[i]-s.predA[i])/tolA)
		}
	}
	return worst * fac, order
}

// pushHistory records the newly accepted state (s.t, s.T, s.A).
func (s *stepper) pushHistory() {
	s.histT[2], s.histT[1], s.histT[0] = s.histT[1], s.histT[0], s.histT[2]
	s.histA[2], s.histA[1], s.histA[0] = s.histA[1], s.histA[0], s.histA[2]
	s.histTim[2], s.histTim[1] = s.histTim[1], s.histTim[0]
	copy(s.histT[0], s.T)
	copy(s.histA[0], s.A)
	s.histTim[0] = s.t
	s.histLen = min(s.histLen+1, 3)
}
