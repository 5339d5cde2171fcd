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
	dRT  []float64 // ∂R/∂T
	dRA  []float64 // ∂R/∂α
	D    []float64 // net conduction into each cell, W/m²: down[i] − down[i+1]

	// Partial derivatives of down[f] with respect to the temperature and
	// cure of the cells above (a = f−1) and below (b = f) face f. Outer faces
	// depend on one cell only: face 0 on cell 0 (stored as b), face n on
	// cell n−1 (stored as a).
	fTa, fTb, fAa, fAb []float64

	P, PA, PT []float64 // absorbed volumetric power, W/m³, ∂P/∂α and ∂P/∂T (0 where transparent)

	r, rT, rA    []float64 // cure rate and its partial derivatives (0 where inert)
	cp, cpT, cpA []float64 // specific heat and its partial derivatives

	tfTop, tfBot float64 // outer face temperatures, K
}

func newLevel(n int, mem *carver) *level {
	buf := mem.take(19*n + 5)
	take := func(m int) []float64 { s := buf[:m:m]; buf = buf[m:]; return s }
	return &level{
		down: take(n + 1), R: take(n), dRT: take(n), dRA: take(n), D: take(n),
		fTa: take(n + 1), fTb: take(n + 1), fAa: take(n + 1), fAb: take(n + 1),
		r: take(n), rT: take(n), rA: take(n), cp: take(n), cpT: take(n), cpA: take(n),
		P: take(n), PA: take(n), PT: take(n),
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
	aEnd []float64           // cure past which the cell's rate is zero (Cure.End), 1 where inert
	// visc is the viscosity law of each cell whose material has one and
	// cures (nil elsewhere); viscous says whether any cell has one.
	visc    []*physics.CastroMacosko
	viscous bool
	heat    []float64 // ρ · resin fraction · total heat, J/m³ (0 where inert)
	rc      []float64 // contact resistance at the face above each cell, m²K/W

	// Step control and accounting.
	h       float64 // the step the controller proposes next, s
	startup int     // implicit Euler steps left
	ledger  Ledger
	tr      *tracker

	// Accepted state and its level.
	t    float64
	T, A []float64
	old  *level

	// Newton iterate and its level.
	Tn, An []float64
	cur    *level

	// Tridiagonal system and elimination scratch.
	lo, di, up, rhs, cp, inv []float64
	jaT, gA                  []float64

	// History of accepted states for the predictor and the error estimate:
	// histT[0] is the newest. histLen counts the valid entries.
	histT   [3][]float64
	histA   [3][]float64
	histTim [3]float64
	histLen int

	curing bool  // any cell cures
	store  store // the snapshots' slices

	// Property fast paths (set by classify): a cell whose conductivity or
	// specific heat does not depend on temperature has it as v0 + α·v1
	// (v1 = 0 where the cell does not cure, since α stays 0 there).
	kLin, cpLin      []bool
	k0, k1, cp0, cp1 []float64
	// kFixed (cpFixed): no cell's conductivity (specific heat) changes
	// during the run, so the levels hold those terms from the start and
	// eval skips them; gFix holds the interior face conductances then.
	kFixed, cpFixed bool
	gFix            []float64
	// linear: the heat residual is linear in T (fixed properties, no cure,
	// no volumetric heating, no radiation), so Newton's first update,
	// with its exact Jacobian, solves a step to round-off, and the
	// Jacobian depends on the step size and θ alone (see solveLinear).
	linear bool
	mc     []float64 // ρ w c_p per cell when linear, J/(m²·K)
	// The factors of the last linear Jacobian (see factor: the eliminated
	// couplings and the inverse pivots, with lo and up scaled in place), for
	// step size luH and weight luTheta.
	luC, luInv   []float64
	luH, luTheta float64

	// Volumetric heating: the absorbing cells' dielectrics (nil where
	// transparent), whether any cell shields, the controller's state.
	diel     []*physics.Dielectric
	vol      *physics.Volumetric
	u        float64 // power fraction, held between controller samples
	integral float64 // controller integral, K·s
	tauTop   []float64
	tauBot   []float64
	tauCell  []float64

	// Standing wave: the field solver and its stack (one slab per cell),
	// the field factor K of each cell from the last field computation
	// (P = u S ε″ K, both sources added), the loss factors it was computed
	// for, and how many computations the run made.
	wave      *physics.Wave
	slabs     []physics.Slab
	fieldK    []float64
	fieldEps  []float64
	fieldSet  bool
	fieldRuns int
}

// newStepper builds the stepper of p, taking its arrays from mem (nil:
// fresh allocations).
func newStepper(p *Problem, mem *carver) *stepper {
	m := p.Mesh
	n := m.Cells()
	s := &stepper{p: p, n: n}
	f := func() []float64 { return mem.take(n) }
	s.w, s.rho, s.heat, s.rc, s.aEnd = f(), f(), f(), f(), f()
	s.mat = make([]*physics.Material, n)
	s.cure = make([]*physics.Cure, n)
	s.visc = make([]*physics.CastroMacosko, n)
	for i := range n {
		mt := p.Materials[m.Owner[i]]
		s.w[i] = m.Widths[i]
		s.rho[i] = mt.Density
		s.mat[i] = mt
		s.aEnd[i] = 1
		if mt.Cure != nil {
			s.cure[i] = mt.Cure
			s.heat[i] = mt.Density * mt.Cure.HeatPerMass()
			s.aEnd[i] = mt.Cure.End()
			s.curing = true
			if mt.Viscosity != nil {
				s.visc[i] = mt.Viscosity
				s.viscous = true
			}
		}
	}
	for j := 1; j < len(m.Layers); j++ {
		s.rc[m.First[j]] = m.Layers[j].ContactResistance
	}
	if v := p.Volumetric; v != nil && (v.Field > 0 || v.Attenuation == physics.StandingWave && v.IncidentPower > 0) {
		s.vol = v
		s.u = 1 // the field is on, or, under control, ...
		if v.Control != nil {
			s.u = 0 // ... the controller starts from off.
		}
		s.diel = make([]*physics.Dielectric, n)
		for i := range n {
			s.diel[i] = p.Materials[m.Owner[i]].Dielectric
		}
		s.tauTop, s.tauBot, s.tauCell = f(), f(), f()
		if v.Attenuation == physics.StandingWave {
			s.wave = physics.NewWave(n, v.Frequencies())
			s.slabs = make([]physics.Slab, n)
			for i, d := range s.diel {
				s.slabs[i] = physics.Slab{Width: s.w[i], Permittivity: 1}
				if d != nil {
					s.slabs[i].Permittivity, s.slabs[i].Conductor = d.Permittivity, d.Shield
				}
			}
			s.fieldK, s.fieldEps = f(), f()
		}
	}
	s.T, s.A, s.Tn, s.An = f(), f(), f(), f()
	s.lo, s.di, s.up, s.rhs, s.cp, s.inv = f(), f(), f(), f(), f(), f()
	s.jaT, s.gA = f(), f()
	for k := range 3 {
		s.histT[k], s.histA[k] = f(), f()
	}
	s.old, s.cur = newLevel(n, mem), newLevel(n, mem)
	s.classify(mem)
	return s
}

// classify finds the cells whose properties need no table lookup, fills
// the levels with whatever does not change during the run, and decides
// whether the problem is linear (see the stepper's fields).
func (s *stepper) classify(mem *carver) {
	n := s.n
	f := func() []float64 { return mem.take(n) }
	s.kLin, s.cpLin = make([]bool, n), make([]bool, n)
	s.k0, s.k1, s.cp0, s.cp1 = f(), f(), f(), f()
	s.kFixed, s.cpFixed = true, true
	// linear records cell i's property b in (lin, v0, v1) and reports
	// whether it stays fixed during the run.
	linear := func(b *physics.Blend, i int, lin []bool, v0, v1 []float64) bool {
		a, slope, ok := b.Linear()
		if !ok {
			return false
		}
		if s.cure[i] == nil {
			slope = 0 // α stays 0
		}
		lin[i], v0[i], v1[i] = true, a, slope
		return slope == 0
	}
	for i, mt := range s.mat {
		s.kFixed = linear(&mt.Conductivity, i, s.kLin, s.k0, s.k1) && s.kFixed
		s.cpFixed = linear(&mt.SpecificHeat, i, s.cpLin, s.cp0, s.cp1) && s.cpFixed
	}
	if s.kFixed {
		s.gFix = f()
	}
	for _, lv := range []*level{s.old, s.cur} {
		if s.kFixed {
			for i := range n {
				lv.R[i], lv.dRT[i], lv.dRA[i] = s.w[i]/(2*s.k0[i]), 0, 0
			}
			for fc := 1; fc < n; fc++ {
				g := 1 / (lv.R[fc-1] + s.rc[fc] + lv.R[fc])
				s.gFix[fc] = g
				lv.fTa[fc], lv.fTb[fc], lv.fAa[fc], lv.fAb[fc] = g, -g, 0, 0
			}
		}
		if s.cpFixed {
			for i := range n {
				lv.cp[i], lv.cpT[i], lv.cpA[i] = s.cp0[i], 0, 0
			}
		}
	}
	s.linear = s.kFixed && s.cpFixed && !s.curing && s.vol == nil &&
		s.p.Top.Linear() && s.p.Bottom.Linear()
	if s.linear {
		s.mc, s.luC, s.luInv = f(), f(), f()
		for i := range n {
			s.mc[i] = s.rho[i] * s.w[i] * s.cp0[i]
		}
		s.luH = math.NaN() // nothing factored yet
	}
}

// eval fills lv with everything at time t and state (T, A), including the
// exact partial derivatives Newton's method needs.
func (s *stepper) eval(lv *level, t float64, T, A []float64) {
	n := s.n
	lv.t = t
	T, A = T[:n], A[:n]
	w := s.w[:n]
	R, dRT, dRA := lv.R[:n], lv.dRT[:n], lv.dRA[:n]
	if !s.kFixed {
		kLin, k0, k1 := s.kLin[:n], s.k0[:n], s.k1[:n]
		for i := range n {
			var k, kT, kA float64
			if kLin[i] {
				k, kA = k0[i]+A[i]*k1[i], k1[i]
			} else {
				k, kT, kA = s.mat[i].Conductivity.At(T[i], A[i])
			}
			ik := 1 / k
			r := 0.5 * w[i] * ik
			c := -r * ik // ∂R/∂k
			R[i], dRT[i], dRA[i] = r, c*kT, c*kA
		}
	}
	if !s.cpFixed {
		cpLin, cp0, cp1 := s.cpLin[:n], s.cp0[:n], s.cp1[:n]
		cp, cpT, cpA := lv.cp[:n], lv.cpT[:n], lv.cpA[:n]
		for i := range n {
			if cpLin[i] {
				cp[i], cpT[i], cpA[i] = cp0[i]+A[i]*cp1[i], 0, cp1[i]
			} else {
				cp[i], cpT[i], cpA[i] = s.mat[i].SpecificHeat.At(T[i], A[i])
			}
		}
	}
	if s.curing {
		r, rT, rA := lv.r[:n], lv.rT[:n], lv.rA[:n]
		for i, cu := range s.cure[:n] {
			if cu != nil {
				r[i], rT[i], rA[i] = cu.Rate(T[i], A[i])
			}
		}
	}
	// Internal faces: conductance g from the two half-cells in series plus
	// any contact resistance. The downward flux d = g (T_a − T_b) has, with
	// ∂g/∂R = −g², the derivatives
	//	∂d/∂T_a = g − d g ∂R_a/∂T_a,  ∂d/∂T_b = −g − d g ∂R_b/∂T_b,
	//	∂d/∂α_a = −d g ∂R_a/∂α_a,     ∂d/∂α_b = −d g ∂R_b/∂α_b.
	// With fixed conductivities g and the derivatives never change.
	down := lv.down[:n+1]
	if s.kFixed {
		gFix := s.gFix[:n]
		for f := 1; f < n; f++ {
			down[f] = gFix[f] * (T[f-1] - T[f])
		}
	} else {
		rc := s.rc[:n]
		fTa, fTb, fAa, fAb := lv.fTa[:n], lv.fTb[:n], lv.fAa[:n], lv.fAb[:n]
		for f := 1; f < n; f++ {
			a, b := f-1, f
			g := 1 / (R[a] + rc[f] + R[b])
			d := g * (T[a] - T[b])
			dg := d * g
			down[f] = d
			fTa[f], fTb[f] = g-dg*dRT[a], -g-dg*dRT[b]
			fAa[f], fAb[f] = -dg*dRA[a], -dg*dRA[b]
		}
	}
	// Outer faces. For every face kind ∂q/∂R = q ∂q/∂T_c (differentiate
	// the face balance implicitly), so the derivatives through R follow.
	q, dq, tf := s.p.Top.HeatIn(t, T[0], lv.R[0])
	lv.down[0], lv.tfTop = q, tf
	lv.fTa[0], lv.fAa[0] = 0, 0
	lv.fTb[0], lv.fAb[0] = dq+q*dq*lv.dRT[0], q*dq*lv.dRA[0]
	q, dq, tf = s.p.Bottom.HeatIn(t, T[n-1], lv.R[n-1])
	lv.down[n], lv.tfBot = -q, tf
	lv.fTa[n], lv.fAa[n] = -(dq + q*dq*lv.dRT[n-1]), -q*dq*lv.dRA[n-1]
	lv.fTb[n], lv.fAb[n] = 0, 0
	D := lv.D[:n]
	for i := range n {
		D[i] = down[i] - down[i+1]
	}
	if s.vol != nil {
		s.power(lv, T, A)
	}
}

// stepOutcome says how a step attempt ended.
type stepOutcome int

const (
	stepOK         stepOutcome = iota
	stepNoConverge             // Newton did not converge, or the elimination broke down
)

// Newton settings. The heat residual is scaled to kelvin by the cell's
// heat capacity; the energy ledger balances to that level, so it is kept
// far below any accuracy target. Cure residuals do not enter the ledger
// (the reaction heat is counted from the same α the heat equation uses) and
// need only be far below the cure tolerance.
const (
	maxNewton  = 10
	newtonTolT = 1e-12 // K: scaled heat residual (above its round-off floor)
	newtonTolA = 1e-10 // degree of cure: cure residual
	// An update this small means the iterate sits at the residual's
	// round-off floor (about ε·T·h/τ_cell for cells of diffusion time τ_cell).
	newtonTinyT = 1e-9  // K
	newtonTinyA = 1e-11 // degree of cure
	minJaa      = 0.05  // smallest ∂G/∂α allowed in the elimination
	eps         = 0x1p-52
)

// solve runs Newton's method for one step of size h with weight theta from
// the accepted state (s.T, s.A, s.old) to time s.t+h, starting from the
// predictor in (s.Tn, s.An). On success s.cur holds the converged level.
//
// The residuals are, per cell i of width w and with c* = ½(c_p⁰ + c_p),
//
//	F_i = ρ w c* (T_i − T_i⁰)/h − θ D_i − (1−θ) D_i⁰ − ρ w_r H w (α_i − α_i⁰)/h − w (θ P_i + (1−θ) P_i⁰)
//	G_i = α_i − α_i⁰ − h [θ r(T_i, α_i) + (1−θ) r(T_i⁰, α_i⁰)].
//
// G_i involves cell i alone, so δα_j = −s_j − p_j δT_j with
// p_j = (∂G_j/∂T_j)/(∂G_j/∂α_j) and s_j = G_j/(∂G_j/∂α_j); substituting into
// the linearised F leaves one tridiagonal system for δT. The Jacobian is
// exact except for the capped slope of α^m near α = 0 (see physics).
func (s *stepper) solve(h, theta float64) (stepOutcome, int) {
	if s.linear {
		return s.solveLinear(h, theta)
	}
	n := s.n
	T, A, v := s.Tn, s.An, s.cur
	tn := s.t + h
	pj, sj := s.jaT, s.gA // p_j and s_j of the elimination
	for it := 0; ; it++ {
		s.eval(v, tn, T, A)
		maxF, maxG, ok := s.assemble(h, theta)
		if !ok {
			return stepNoConverge, it
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
		if !factor(s.lo, s.di, s.up, s.cp, s.inv) {
			return stepNoConverge, it
		}
		substitute(s.lo, s.up, s.cp, s.inv, s.rhs)
		dTmax, dAmax := 0.0, 0.0
		for i := range n {
			dT := s.rhs[i]
			T[i] += dT
			dTmax = max(dTmax, math.Abs(dT))
			if s.cure[i] == nil {
				continue
			}
			a := min(max(A[i]-sj[i]-pj[i]*dT, 0), s.aEnd[i])
			dAmax = max(dAmax, math.Abs(a-A[i]))
			A[i] = a
		}
		if math.IsNaN(dTmax) || math.IsInf(dTmax, 0) {
			return stepNoConverge, it
		}
		if dTmax <= newtonTinyT && dAmax <= newtonTinyA {
			// Converged: the residual left after so small an update is at
			// its round-off floor (quadratic convergence).
			s.eval(v, tn, T, A)
			return stepOK, it + 1
		}
	}
}

// assemble fills the tridiagonal system of one Newton iteration (lo, di,
// up, rhs) from the iterate's level s.cur and the accepted level s.old, with
// the cure eliminated (p_j in s.jaT, s_j in s.gA), and returns the largest
// scaled heat residual and cure residual. It reports false when the
// iteration cannot go on: autocatalysis faster than the step can follow at
// a converged cure residual (see below).
func (s *stepper) assemble(h, theta float64) (maxF, maxG float64, ok bool) {
	n := s.n
	o, v := s.old, s.cur
	// Every slice at its exact length, so that the loops carry no bounds
	// checks.
	T, A, T0, A0 := s.Tn[:n], s.An[:n], s.T[:n], s.A[:n]
	pj, sj := s.jaT[:n], s.gA[:n]
	cure, aEnd := s.cure[:n], s.aEnd[:n]
	r, r0, rT, rA := v.r[:n], o.r[:n], v.rT[:n], v.rA[:n]
	// Cure rows first: p_j and s_j are needed by the neighbours' rows.
	for i := range n {
		pj[i], sj[i] = 0, 0
		if cure[i] == nil {
			continue
		}
		G := A[i] - A0[i] - h*(theta*r[i]+(1-theta)*r0[i])
		if A[i] >= aEnd[i] && G <= 0 {
			// The step would carry the cell past full cure (or past the
			// end of its law, Cure.End, where the rate drops to zero): α
			// stands at the end and the cell's cure is not an unknown of
			// this iteration. With the rate at the end taken from below,
			// G ≤ 0 there means no root below it, and past it the rate
			// is zero: the cell stops at the end within the step.
			continue
		}
		maxG = max(maxG, math.Abs(G))
		ja := 1 - h*theta*rA[i]
		if ja < minJaa {
			// Autocatalysis faster than the step can follow (the
			// trapezoidal rule is unstable for growth with hθ ∂r/∂α ≥ 1).
			// Far from the solution (α^m with m < 1 is infinitely steep
			// at α = 0) the slope only misleads, so bound it; at the
			// solution itself it means the step is too long.
			if maxG <= newtonTolA {
				return maxF, maxG, false
			}
			ja = minJaa
		}
		ij := 1 / ja
		pj[i], sj[i] = -h*theta*rT[i]*ij, G*ij
	}
	invh := 1 / h
	rho, w, heat := s.rho[:n], s.w[:n], s.heat[:n]
	cp0, cp, cpT, cpA := o.cp[:n], v.cp[:n], v.cpT[:n], v.cpA[:n]
	D, D0 := v.D[:n], o.D[:n]
	P, P0, PT, PA := v.P[:n], o.P[:n], v.PT[:n], v.PA[:n]
	fTa, fTb, fAa, fAb := v.fTa[:n+1], v.fTb[:n+1], v.fAa[:n+1], v.fAb[:n+1]
	lo, di, up, rhs := s.lo[:n], s.di[:n], s.up[:n], s.rhs[:n]
	for i := range n {
		m := rho[i] * w[i] * invh
		hw := heat[i] * w[i] * invh
		cs := 0.5 * (cp0[i] + cp[i])
		dT := T[i] - T0[i]
		F := m*cs*dT - theta*D[i] - (1-theta)*D0[i] - hw*(A[i]-A0[i]) -
			w[i]*(theta*P[i]+(1-theta)*P0[i])
		// D_i = down_i − down_{i+1}: face i has cell i below it (b),
		// face i+1 has cell i above it (a).
		dDT := fTb[i] - fTa[i+1]
		// The residual, scaled to kelvin by m c*, cannot fall below
		// its round-off floor, about ε|T| (1 + θ|∂D/∂T|/(m c*)).
		mc := m * cs
		if e := math.Abs(F) - 4*eps*math.Abs(T[i])*(mc+theta*math.Abs(dDT)); e > maxF*mc || F != F {
			maxF = e / mc
		}
		dDA := fAb[i] - fAa[i+1]
		fT := m*(cs+0.5*cpT[i]*dT) - theta*dDT - theta*w[i]*PT[i]
		fA := m*0.5*cpA[i]*dT - hw - theta*dDA - theta*w[i]*PA[i]
		di[i] = fT - fA*pj[i]
		rhs[i] = -F + fA*sj[i]
	}
	// Couplings through the faces: ∂F_i/∂(T, α)_{i−1} through face i and
	// ∂F_i/∂(T, α)_{i+1} through face i+1.
	for i := 1; i < n; i++ {
		lT, lA := -theta*fTa[i], -theta*fAa[i]
		lo[i] = lT - lA*pj[i-1]
		rhs[i] += lA * sj[i-1]
		uT, uA := theta*fTb[i], theta*fAb[i]
		up[i-1] = uT - uA*pj[i]
		rhs[i-1] += uA * sj[i]
	}
	return maxF, maxG, true
}

// solveLinear takes one step of size h with weight θ for a linear problem
// (s.linear). The residual of the heat equation is affine in T with a
// Jacobian J that depends on h and θ alone (fixed properties and linear
// faces), so a single Newton update from the accepted state T⁰ is exact:
//
//	J δ = −F(T⁰),  −F_i(T⁰) = D_i⁰ + θ (D_i(T⁰, t+h) − D_i⁰),
//
// where D(T⁰, t+h) differs from D⁰ only through the outer faces (their
// air, set point or flux at the new time). J is factored once per
// distinct (h, θ) and the factors reused while the step size repeats (most
// steps land on equally spaced output times). The new level is then
// evaluated once. It cannot fail short of a non-finite result.
func (s *stepper) solveLinear(h, theta float64) (stepOutcome, int) {
	n := s.n
	o, v := s.old, s.cur
	T0, T := s.T, s.Tn
	tn := s.t + h
	invh := 1 / h
	if h != s.luH || theta != s.luTheta {
		// Rows as in solve with c* = c_p, no cure and no power:
		// diagonal m c_p − θ ∂D_i/∂T_i, off-diagonals −θ fTa_i and θ fTb_{i+1}.
		for i := range n {
			s.di[i] = s.mc[i]*invh - theta*(o.fTb[i]-o.fTa[i+1])
			s.lo[i] = -theta * o.fTa[i]
			s.up[i] = 0
			if i < n-1 {
				s.up[i] = theta * o.fTb[i+1]
			}
		}
		if !factor(s.lo, s.di, s.up, s.luC, s.luInv) {
			s.luH = math.NaN()
			return stepNoConverge, 0
		}
		s.luH, s.luTheta = h, theta
	}
	for i := range n {
		s.rhs[i] = o.D[i]
	}
	// The outer faces at the new time with the old temperatures: the top
	// flux enters D_0 as down[0] = q, the bottom one D_{n−1} as
	// −down[n] = q.
	q, _, _ := s.p.Top.HeatIn(tn, T0[0], o.R[0])
	s.rhs[0] += theta * (q - o.down[0])
	q, _, _ = s.p.Bottom.HeatIn(tn, T0[n-1], o.R[n-1])
	s.rhs[n-1] += theta * (q + o.down[n])
	substitute(s.lo, s.up, s.luC, s.luInv, s.rhs)
	for i := range n {
		T[i] = T0[i] + s.rhs[i]
		if T[i]-T[i] != 0 { // NaN or ±Inf
			return stepNoConverge, 0
		}
	}
	s.eval(v, tn, T, s.An)
	return stepOK, 0 // one residual evaluation
}

// predWeights returns the weights of the polynomial extrapolation of the
// history to time t: constant, linear or quadratic through 1, 2 or 3
// points (Lagrange form; the weights of missing points are 0).
func (s *stepper) predWeights(t float64) (l0, l1, l2 float64) {
	switch s.histLen {
	case 1:
		return 1, 0, 0
	case 2:
		t0, t1 := s.histTim[0], s.histTim[1]
		l0 = (t - t1) / (t0 - t1)
		return l0, 1 - l0, 0
	}
	t0, t1, t2 := s.histTim[0], s.histTim[1], s.histTim[2]
	l0 = (t - t1) * (t - t2) / ((t0 - t1) * (t0 - t2))
	l1 = (t - t0) * (t - t2) / ((t1 - t0) * (t1 - t2))
	l2 = (t - t0) * (t - t1) / ((t2 - t0) * (t2 - t1))
	return l0, l1, l2
}

// predict fills (T, A) with the predictor at time t, Newton's starting
// point. Cure never decreases, nor passes the end of its law (1, or
// Cure.End).
func (s *stepper) predict(t float64, T, A []float64) {
	l0, l1, l2 := s.predWeights(t)
	h0, h1, h2 := s.histT[0], s.histT[1], s.histT[2]
	a0, a1, a2 := s.histA[0], s.histA[1], s.histA[2]
	for i := range s.n {
		T[i] = l0*h0[i] + l1*h1[i] + l2*h2[i]
		A[i] = min(max(l0*a0[i]+l1*a1[i]+l2*a2[i], s.A[i]), s.aEnd[i])
	}
}

// errorRatio estimates the local error of the step just solved (from s.t
// to tNew, size h), relative to the tolerances (≤ 1 means acceptable), from the
// difference between the corrector (Tn, An) and the predictor, which it
// recomputes (the same arithmetic as predict). With three history points
// and Crank–Nicolson, the quadratic predictor's error is
// y”'/6·h(h+h1)(h+h1+h2) and the trapezoidal rule's local error is
// h³y”'/12, so
//
//	LTE ≈ |y_C − y_P| · h² / (2 (h+h1)(h+h1+h2)).
//
// With two points (the implicit Euler start-up), the linear predictor's
// error is y”/2·h(h+h1) against implicit Euler's h²y”/2, so
// LTE ≈ |y_C − y_P| · h/(h+h1). With one point there is no estimate (0).
// The second return value is the order p of the error in h (LTE ∝ h^p).
func (s *stepper) errorRatio(tNew float64, cn bool) (ratio, order float64) {
	h := tNew - s.t
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
	l0, l1, l2 := s.predWeights(tNew)
	h0, h1, h2 := s.histT[0], s.histT[1], s.histT[2]
	// Two running maxima each, to shorten the dependency chain.
	var wT0, wT1 float64
	n2 := s.n &^ 1
	for i := 0; i < n2; i += 2 {
		wT0 = max(wT0, math.Abs(s.Tn[i]-(l0*h0[i]+l1*h1[i]+l2*h2[i])))
		j := i + 1
		wT1 = max(wT1, math.Abs(s.Tn[j]-(l0*h0[j]+l1*h1[j]+l2*h2[j])))
	}
	for i := n2; i < s.n; i++ {
		wT0 = max(wT0, math.Abs(s.Tn[i]-(l0*h0[i]+l1*h1[i]+l2*h2[i])))
	}
	worst := max(wT0, wT1) / s.p.TemperatureTolerance
	if s.curing {
		a0, a1, a2 := s.histA[0], s.histA[1], s.histA[2]
		wA := 0.0
		for i, c := range s.cure {
			if c != nil {
				pa := min(max(l0*a0[i]+l1*a1[i]+l2*a2[i], s.A[i]), s.aEnd[i])
				wA = max(wA, math.Abs(s.An[i]-pa))
			}
		}
		worst = max(worst, wA/s.p.CureTolerance)
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
