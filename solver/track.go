package solver

import (
	"math"
	"sort"

	"cureslab/physics"
)

// tracker follows the summary quantities over accepted steps.
type tracker struct {
	sum      Summary
	gel      []float64 // gel time per cell, NaN until gelled
	drivers  []*physics.Schedule
	programs []*physics.Schedule // every program of the case (drivers, air, flux)
	next     []int               // per driver, the index of its first breakpoint after the last observed time
	prevMinA float64
	hot      float64 // the hottest cell of the state last observed, K
	hotCell  int
	// dStar holds the drivers' running maximum D*(t) at the times of the
	// stepper's history (dStar[0] at the newest), K; −Inf before any.
	dStar [3]float64
	prevD float64 // D at the previous observed time, K

	// Viscosity (only when some cell has a viscosity law): ln η per cell
	// at the last three observed states (lnEta[0] the newest; +Inf at or
	// past gel), how many of them are valid, the time each cell spent
	// below the flow threshold, ln of that threshold, and the lowest ln η.
	lnEta  [3][]float64
	visN   int
	below  []float64
	lnFlow float64
	minLn  float64
}

func (s *stepper) newTracker() *tracker {
	nan := math.NaN()
	tr := &tracker{gel: make([]float64, s.n)}
	tr.sum = Summary{
		PeakTemperature: math.Inf(-1), Overshoot: nan, MaxSpread: nan,
		HeatingLag: nan, HeatingLagTime: nan, HeatingLagDepth: nan, HottestDriving: nan,
		CoolingLag: nan, CoolingLagTime: nan, CoolingLagDepth: nan,
		LayerSpread:  make([]float64, len(s.p.Mesh.Layers)),
		MinFinalCure: nan, MinFinalCureDepth: nan, MeanFinalCure: nan, TimeToMinCure: nan,
		GelTimeFirst: nan, GelTimeLast: nan, MinFinalGlass: nan,
	}
	for i := range tr.gel {
		tr.gel[i] = nan
	}
	tr.drivers = Drivers(s.p)
	tr.next = make([]int, len(tr.drivers))
	for _, f := range []*physics.Face{&s.p.Top, &s.p.Bottom} {
		switch {
		case f.Kind == physics.Fixed:
			tr.programs = append(tr.programs, &f.Set)
		case f.Kind == physics.Flux:
			tr.programs = append(tr.programs, &f.Flux)
		}
		if f.HasAir() {
			tr.programs = append(tr.programs, &f.Air)
		}
	}
	if v := s.vol; v != nil && v.Control != nil {
		tr.programs = append(tr.programs, &v.Control.Program)
	}
	inf := math.Inf(-1)
	tr.dStar = [3]float64{inf, inf, inf}
	tr.prevD = nan
	tr.prevMinA = math.NaN()
	tr.sum.MinViscosity, tr.sum.MinViscosityTime, tr.sum.MinViscosityDepth, tr.sum.FlowWindow = nan, nan, nan, nan
	if s.viscous {
		for k := range tr.lnEta {
			tr.lnEta[k] = make([]float64, s.n)
		}
		tr.below = make([]float64, s.n)
		tr.lnFlow = math.Log(s.p.FlowViscosity)
		tr.minLn = math.Inf(1)
	}
	return tr
}

// Drivers returns the temperature programs that drive p:
// the air of each convective face, the set temperature of each fixed face
// and, under closed-loop volumetric heating, the control program. Under
// volumetric heating without control it returns none: the power, not a
// temperature program, heats the part, and faces only take heat away. A
// flux face is never a driver (physics.Face.Driver). Overshoot and the lags
// are NaN when there is no driver.
func Drivers(p *Problem) []*physics.Schedule {
	if v := p.Volumetric; v != nil && v.Control == nil {
		return nil
	}
	var ds []*physics.Schedule
	for _, f := range []*physics.Face{&p.Top, &p.Bottom} {
		if d, ok := f.Driver(); ok {
			ds = append(ds, d)
		}
	}
	if v := p.Volumetric; v != nil {
		ds = append(ds, &v.Control.Program)
	}
	return ds
}

// drive returns D(t), the hottest driving temperature at t, and the
// drivers' largest value over (t−h, t] (their values at t and at any
// breakpoint inside the interval, where a piecewise-linear program has its
// extremes). It advances tr.next past t.
func (tr *tracker) drive(t, h float64) (D, hi float64) {
	D, hi = math.Inf(-1), math.Inf(-1)
	for k, d := range tr.drivers {
		v := d.At(t)
		D, hi = max(D, v), max(hi, v)
		bt, bv := d.Points()
		for tr.next[k] < len(bt) && bt[tr.next[k]] <= t {
			if bt[tr.next[k]] > t-h {
				hi = max(hi, bv[tr.next[k]])
			}
			tr.next[k]++
		}
	}
	return D, hi
}

// observe updates the tracked quantities with the state just accepted at
// s.t after a step of size h (h = 0 for the initial state). Crossing times
// (gelation, reaching the minimum cure) are interpolated linearly in time
// within the step.
func (tr *tracker) observe(s *stepper, h float64) {
	t := s.t
	sum := &tr.sum
	hot, at := s.T[0], 0
	cold, coldAt := s.T[0], 0
	for i, T := range s.T {
		if T > hot { // strict: the shallowest cell on ties
			hot, at = T, i
		}
		if T < cold {
			cold, coldAt = T, i
		}
	}
	tr.hot, tr.hotCell = hot, at
	if hot > sum.PeakTemperature { // strict: the earliest time on ties
		sum.PeakTemperature, sum.PeakTime, sum.PeakDepth = hot, t, s.p.Mesh.Centers[at]
	}
	m := s.p.Mesh
	for j := range m.Layers {
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, T := range s.T[m.First[j]:m.First[j+1]] {
			lo, hi = min(lo, T), max(hi, T)
		}
		sum.LayerSpread[j] = max(sum.LayerSpread[j], hi-lo)
	}
	if len(tr.drivers) > 0 {
		D, hiStep := tr.drive(t, h)
		tr.dStar[2], tr.dStar[1] = tr.dStar[1], tr.dStar[0]
		tr.dStar[0] = max(tr.dStar[1], hiStep)
		sum.HottestDriving = tr.dStar[0]
		if ov := hot - tr.dStar[0]; !(ov <= sum.Overshoot) {
			sum.Overshoot = ov
		}
		// The drivers' direction over the step just taken; at t = 0, over
		// the first instant after it.
		falling := D < tr.prevD
		if h == 0 {
			dt := 1e-9 * max(s.p.End, 1)
			Dn := math.Inf(-1)
			for _, d := range tr.drivers {
				Dn = max(Dn, d.At(t+dt))
			}
			falling = Dn < D
		}
		tr.prevD = D
		if falling {
			if lag := hot - D; !(lag <= sum.CoolingLag) {
				sum.CoolingLag, sum.CoolingLagTime, sum.CoolingLagDepth = lag, t, m.Centers[at]
			}
		} else if lag := D - cold; !(lag <= sum.HeatingLag) {
			sum.HeatingLag, sum.HeatingLagTime, sum.HeatingLagDepth = lag, t, m.Centers[coldAt]
		}
	}
	if s.histLen == 3 {
		tr.peakBetweenSteps(s)
	}
	if !s.curing {
		return
	}
	lo, hi, minA := math.Inf(1), math.Inf(-1), math.Inf(1)
	prevA := s.histA[1] // the state before this step (valid when h > 0)
	for i, c := range s.cure {
		if c == nil {
			continue
		}
		lo, hi = min(lo, s.T[i]), max(hi, s.T[i])
		a := s.A[i]
		minA = min(minA, a)
		if math.IsNaN(tr.gel[i]) && a >= c.GelPoint {
			tr.gel[i] = crossing(t, h, prevA, i, a, c.GelPoint)
		}
	}
	if spread := hi - lo; !(spread <= sum.MaxSpread) {
		sum.MaxSpread = spread
	}
	if s.viscous {
		tr.viscosity(s, h)
	}
	if mc := s.p.MinCure; mc > 0 && math.IsNaN(sum.TimeToMinCure) && minA >= mc {
		if h == 0 || math.IsNaN(tr.prevMinA) || tr.prevMinA >= mc {
			sum.TimeToMinCure = t
		} else {
			sum.TimeToMinCure = t - h + h*(mc-tr.prevMinA)/(minA-tr.prevMinA)
		}
	}
	tr.prevMinA = minA
}

// peakBetweenSteps looks for a temperature maximum between accepted steps:
// where a cell's middle value of the last three steps is the largest, the
// parabola through the three (second order, like the scheme) has its vertex
// between them, and that vertex is the cell's peak. Reading the peak only at
// step times would miss up to h²|T″|/8 with steps of a few minutes. The
// parabola stands for a smooth history only: where a program of the case
// (a face's air, set temperature or flux, the control program) changes
// slope between the first and the last of the three times, the history has
// a kink there (a hold ending, a lamp switching) and no vertex is read.
func (tr *tracker) peakBetweenSteps(s *stepper) {
	sum := &tr.sum
	t0, t1, t2 := s.histTim[0], s.histTim[1], s.histTim[2]
	if tr.spansBreakpoint(t2, t0) {
		return
	}
	for i := range s.n {
		// A maximum of T is a minimum of −T.
		tv, ny, ok := vertexMin(t0, t1, t2, -s.histT[0][i], -s.histT[1][i], -s.histT[2][i])
		if !ok {
			continue
		}
		yv := -ny
		if yv > sum.PeakTemperature {
			sum.PeakTemperature, sum.PeakTime, sum.PeakDepth = yv, tv, s.p.Mesh.Centers[i]
		}
		if len(tr.drivers) > 0 {
			// D*(tv): the running maximum before the step that holds tv, or
			// the drivers at tv (linear within a step) if higher.
			ds := tr.dStar[2]
			if tv > t1 {
				ds = tr.dStar[1]
			}
			for _, d := range tr.drivers {
				ds = max(ds, d.At(tv))
			}
			if ov := yv - ds; ov > sum.Overshoot {
				sum.Overshoot = ov
			}
		}
	}
}

// spansBreakpoint reports whether a breakpoint of a face or control program
// lies strictly inside (t2, t0): the state has a kink there, and no
// parabola through the steps around it describes the state between them.
func (tr *tracker) spansBreakpoint(t2, t0 float64) bool {
	for _, p := range tr.programs {
		bt := p.Breakpoints()
		k := sort.SearchFloat64s(bt, t2)
		for k < len(bt) && bt[k] <= t2 {
			k++
		}
		if k < len(bt) && bt[k] < t0 {
			return true
		}
	}
	return false
}

// vertexMin returns the vertex (tv, yv) of the parabola through (t2, y2),
// (t1, y1), (t0, y0), t2 < t1 < t0, when the middle value is a strict
// minimum of the three (a plateau has no vertex) and the vertex lies
// strictly between t2 and t0; ok is false otherwise (and for non-finite
// values).
func vertexMin(t0, t1, t2, y0, y1, y2 float64) (tv, yv float64, ok bool) {
	if !(y1 < y0 && y1 < y2) || math.IsInf(y0, 0) || math.IsInf(y2, 0) {
		return 0, 0, false
	}
	// Divided differences of the parabola.
	d1 := (y1 - y2) / (t1 - t2)
	d0 := (y0 - y1) / (t0 - t1)
	c := (d0 - d1) / (t0 - t2) // curvature/2, > 0 at a minimum
	if !(c > 0) {
		return 0, 0, false
	}
	tv = 0.5*(t1+t2) - d1/(2*c) // where the slope d1 + c(2t − t1 − t2) vanishes
	if !(tv > t2 && tv < t0) {
		return 0, 0, false
	}
	return tv, y1 + (tv-t1)*(d1+c*(tv-t2)), true
}

// viscosity follows the viscosity of the cells with a viscosity law over
// the step just accepted (size h, 0 for the initial state): the lowest
// ln η, at the steps and between them (vertexMin on the last three steps,
// like the peak temperature, unless a program breakpoint lies between
// them), and each cell's time below the flow
// threshold. Within a step the state is taken linear in time; a step in
// which a cell crosses the threshold is split where it crosses
// (crossFraction). No allocation.
func (tr *tracker) viscosity(s *stepper, h float64) {
	sum := &tr.sum
	t := s.t
	centers := s.p.Mesh.Centers
	tr.lnEta[0], tr.lnEta[1], tr.lnEta[2] = tr.lnEta[2], tr.lnEta[0], tr.lnEta[1]
	cur, prev := tr.lnEta[0], tr.lnEta[1]
	prevT, prevA := s.histT[1], s.histA[1] // the state before this step (h > 0)
	tr.visN = min(tr.visN+1, 3)
	for i, v := range s.visc {
		if v == nil {
			continue
		}
		gel := s.cure[i].GelPoint
		L := v.LnAt(s.T[i], s.A[i], gel)
		cur[i] = L
		if L < tr.minLn { // strict: the earliest time, then the shallowest cell
			tr.minLn, sum.MinViscosityTime, sum.MinViscosityDepth = L, t, centers[i]
		}
		if h == 0 {
			continue
		}
		b0, b1 := prev[i] < tr.lnFlow, L < tr.lnFlow
		switch {
		case b0 && b1:
			tr.below[i] += h
		case b0 != b1:
			f := crossFraction(v, gel, tr.lnFlow, prevT[i], prevA[i], s.T[i], s.A[i])
			if b0 {
				tr.below[i] += f * h
			} else {
				tr.below[i] += (1 - f) * h
			}
		}
	}
	if t0, t1, t2 := s.histTim[0], s.histTim[1], s.histTim[2]; tr.visN == 3 && !tr.spansBreakpoint(t2, t0) {
		old := tr.lnEta[2]
		for i, v := range s.visc {
			if v == nil {
				continue
			}
			if tv, yv, ok := vertexMin(t0, t1, t2, cur[i], prev[i], old[i]); ok && yv < tr.minLn {
				tr.minLn, sum.MinViscosityTime, sum.MinViscosityDepth = yv, tv, centers[i]
			}
		}
	}
}

// crossFraction returns the fraction f in [0, 1] of a step at which ln η
// crosses lnFlow, the state moving linearly from (T0, a0) to (T1, a1): 40
// bisections of ln η(T0 + f(T1 − T0), a0 + f(a1 − a0)) − lnFlow, whose
// sign differs at the ends (+Inf past gel counts as above). Only the few
// steps in which a cell crosses the threshold pay for it.
func crossFraction(v *physics.CastroMacosko, gel, lnFlow, T0, a0, T1, a1 float64) float64 {
	lo, hi := 0.0, 1.0
	below0 := v.LnAt(T0, a0, gel) < lnFlow
	for range 40 {
		m := 0.5 * (lo + hi)
		if (v.LnAt(T0+m*(T1-T0), a0+m*(a1-a0), gel) < lnFlow) == below0 {
			lo = m
		} else {
			hi = m
		}
	}
	return 0.5 * (lo + hi)
}

// crossing returns the time within the step (t−h, t] at which cell i's cure,
// linear in time from prev[i] to a, reached level.
func crossing(t, h float64, prev []float64, i int, a, level float64) float64 {
	if h == 0 || prev[i] >= level || a == prev[i] {
		return t
	}
	return t - h + h*(level-prev[i])/(a-prev[i])
}

// finish fills the end-of-run fields of the summary.
func (tr *tracker) finish(s *stepper, l *Ledger) {
	sum := &tr.sum
	capacity := 0.0 // J/(m²·K), at the final state
	for i := range s.n {
		capacity += s.rho[i] * s.old.cp[i] * s.w[i]
	}
	sum.ConservationResidual = l.BalanceError(capacity * 1e-3)
	if !s.curing {
		return
	}
	m := s.p.Mesh
	var wsum, asum float64
	allGel := true
	for i, c := range s.cure {
		if c == nil {
			continue
		}
		a := s.A[i]
		if !(a >= sum.MinFinalCure) { // strict after the first: shallowest on ties
			sum.MinFinalCure, sum.MinFinalCureDepth = a, m.Centers[i]
		}
		wsum += m.Widths[i]
		asum += m.Widths[i] * a
		if c.Glass != nil {
			if tg := c.Glass.Tg(a); !(tg >= sum.MinFinalGlass) {
				sum.MinFinalGlass = tg
			}
		}
		g := tr.gel[i]
		if math.IsNaN(g) {
			allGel = false
		} else if !(g >= sum.GelTimeFirst) {
			sum.GelTimeFirst = g
		}
		if !(g <= sum.GelTimeLast) {
			sum.GelTimeLast = g
		}
	}
	sum.MeanFinalCure = asum / wsum
	if !allGel {
		sum.GelTimeLast = math.NaN()
	}
	if s.viscous {
		if !math.IsInf(tr.minLn, 1) {
			sum.MinViscosity = math.Exp(tr.minLn)
		} else {
			sum.MinViscosityTime, sum.MinViscosityDepth = math.NaN(), math.NaN()
		}
		sum.FlowWindow = math.Inf(1)
		for i, v := range s.visc {
			if v != nil {
				sum.FlowWindow = min(sum.FlowWindow, tr.below[i])
			}
		}
	}
}

// snapshot records the accepted state held by lv (at s.t) and the
// cumulative heat in. Its slices come from s.store.
func (s *stepper) snapshot(lv *level, heatIn float64) Snapshot {
	n := s.n
	nan := math.NaN()
	snap := Snapshot{
		Time:   s.t,
		AirTop: nan, AirBottom: nan, HeatIn: heatIn, PowerFraction: nan,
	}
	if s.vol != nil && s.vol.Control != nil {
		snap.PowerFraction = s.u
	}
	if !s.p.NoFields {
		snap.T = s.store.take(n)
		copy(snap.T, s.T)
	}
	if !s.p.NoFields && s.vol != nil {
		snap.Power = s.store.take(n)
		copy(snap.Power, lv.P)
	}
	if !s.p.NoFields && s.curing {
		snap.Cure, snap.Rate, snap.Tg = s.store.take(n), s.store.take(n), s.store.take(n)
		for i, c := range s.cure {
			snap.Cure[i], snap.Rate[i], snap.Tg[i] = nan, nan, nan
			if c == nil {
				continue
			}
			snap.Cure[i], snap.Rate[i] = s.A[i], lv.r[i]
			if s.A[i] >= s.aEnd[i] {
				snap.Rate[i] = 0 // held at the end of its law
			}
			if c.Glass != nil {
				snap.Tg[i] = c.Glass.Tg(s.A[i])
			}
		}
	}
	if !s.p.NoFields && s.viscous {
		snap.Viscosity = s.store.take(n)
		for i, v := range s.visc {
			snap.Viscosity[i] = nan
			if v != nil {
				snap.Viscosity[i] = viscosityAt(v, s.cure[i].GelPoint, s.T[i], s.A[i])
			}
		}
	}
	if s.p.Top.HasAir() {
		snap.AirTop = s.p.Top.Air.At(s.t)
	}
	if s.p.Bottom.HasAir() {
		snap.AirBottom = s.p.Bottom.Air.At(s.t)
	}
	if np := len(s.p.Probes); np > 0 {
		snap.ProbeT, snap.ProbeCure = s.store.take(np), s.store.take(np)
		for k, z := range s.p.Probes {
			snap.ProbeT[k], snap.ProbeCure[k] = s.probe(lv, z)
		}
		if s.viscous {
			snap.ProbeViscosity = s.store.take(np)
			for k, z := range s.p.Probes {
				snap.ProbeViscosity[k] = nan
				i := s.p.Mesh.First[s.probeLayer(z)]
				if v := s.visc[i]; v != nil {
					snap.ProbeViscosity[k] = viscosityAt(v, s.cure[i].GelPoint, snap.ProbeT[k], snap.ProbeCure[k])
				}
			}
		}
	}
	return snap
}

// viscosityAt returns η in Pa·s, NaN at or past gel.
func viscosityAt(v *physics.CastroMacosko, gel, T, a float64) float64 {
	if a >= gel {
		return math.NaN()
	}
	return v.At(T, a, gel)
}

// store hands out the snapshots' slices from large blocks, so that the
// outputs of a whole run cost a few allocations instead of a few per
// output time. Each slice has its own capacity (appending to one copies).
// A streaming run rewinds the store after each snapshot, so that one
// block serves them all.
type store struct {
	buf   []float64
	whole []float64 // the current block, for rewind
	block int       // floats per block
}

func (st *store) take(m int) []float64 {
	if len(st.buf) < m {
		st.buf = make([]float64, max(st.block, m))
		st.whole = st.buf
	}
	s := st.buf[:m:m]
	st.buf = st.buf[m:]
	return s
}

// rewind hands out the current block again from its start.
func (st *store) rewind() { st.buf = st.whole }

// probe returns temperature and cure at depth z: linear through the cell
// centres of z's layer and the temperatures on that layer's side of its two
// faces; a depth exactly on a layer face belongs to the upper layer. Cure is
// linear between centres and constant from the outermost centre to the face;
// NaN in a layer that does not cure.
func (s *stepper) probe(lv *level, z float64) (T, a float64) {
	m := s.p.Mesh
	n := s.n
	j := s.probeLayer(z)
	first, last := m.First[j], m.First[j+1]-1
	ztop, zbot := m.Faces[first], m.Faces[last+1]
	var Ttop, Tbot float64
	if first == 0 {
		Ttop = lv.tfTop
	} else {
		Ttop = s.T[first] + lv.down[first]*lv.R[first]
	}
	if last == n-1 {
		Tbot = lv.tfBot
	} else {
		Tbot = s.T[last] - lv.down[last+1]*lv.R[last]
	}
	cured := s.cure[first] != nil
	a = math.NaN()
	switch {
	case z <= m.Centers[first]:
		T = lerp(ztop, Ttop, m.Centers[first], s.T[first], z)
		if cured {
			a = s.A[first]
		}
	case z >= m.Centers[last]:
		T = lerp(m.Centers[last], s.T[last], zbot, Tbot, z)
		if cured {
			a = s.A[last]
		}
	default:
		i := first
		for m.Centers[i+1] < z {
			i++
		}
		T = lerp(m.Centers[i], s.T[i], m.Centers[i+1], s.T[i+1], z)
		if cured {
			a = lerp(m.Centers[i], s.A[i], m.Centers[i+1], s.A[i+1], z)
		}
	}
	return T, a
}

// probeLayer returns the layer that holds depth z, the upper one on a face
// between two layers.
func (s *stepper) probeLayer(z float64) int {
	m := s.p.Mesh
	j := 0
	for j < len(m.Layers)-1 && z > m.Faces[m.First[j+1]] {
		j++
	}
	return j
}

func lerp(x0, y0, x1, y1, x float64) float64 {
	if x1 == x0 {
		return y0
	}
	return y0 + (y1-y0)*(x-x0)/(x1-x0)
}
