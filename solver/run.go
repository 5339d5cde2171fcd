package solver

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"

	"cureslab/physics"
)

// ErrProblem is returned (wrapped) by Run for a Problem that breaks its
// documented contract. Package cases validates user input before it gets
// here, so this signals a programming error upstream.
var ErrProblem = errors.New("invalid problem")

// RunawayError reports the first cell that passed the abort temperature.
type RunawayError struct {
	Time, Depth, Temperature, Limit float64 // s, m, K, K
}

func (e *RunawayError) Error() string {
	return fmt.Sprintf("runaway at t = %.6g s: %.6g °C at depth %.6g mm passed the abort limit %.6g °C",
		e.Time, e.Temperature-273.15, e.Depth*1e3, e.Limit-273.15)
}

// StepError reports a numerical failure: the step size fell below the
// smallest usable step at time Time without Newton converging or the
// error estimate being met.
type StepError struct {
	Time, Step float64 // s
	Reason     string
}

func (e *StepError) Error() string {
	return fmt.Sprintf("numerical failure at t = %.6g s (step %.3g s): %s", e.Time, e.Step, e.Reason)
}

// Run integrates the problem from t = 0 to p.End.
//
// Crank–Nicolson in time with two implicit Euler start-up steps after t = 0,
// where the boundary conditions jump from the initial state; Newton's method
// on the coupled heat and cure residuals with cure eliminated cell by cell;
// step size from a predictor–corrector estimate of the local error against
// the tolerances, landing exactly on every output time and every breakpoint of
// a face schedule. See DEVELOPERS.md for the equations.
//
// The returned error is non-nil only for a Problem that breaks its contract.
// A runaway, a numerical failure or a cancelled ctx still return a Result:
// its Status and Err say what happened, and it holds every snapshot up to
// that moment plus one at the moment itself.
func Run(ctx context.Context, p *Problem) (*Result, error) {
	return RunStream(ctx, p, nil)
}

// Sink receives the snapshots of a run one by one, in time order, as they
// are produced (see RunStream). The snapshot and its slices belong to the
// run: they are valid during the call only and are overwritten by the next
// snapshot, so a sink copies what it keeps. A non-nil error stops the run.
type Sink func(s *Snapshot) error

// RunStream is Run with every snapshot handed to sink as soon as it is
// produced instead of kept: Result.Snapshots is nil, and the memory of the
// run stays proportional to the cells, however many output times it has.
// A nil sink gives Run. The snapshots are the same, bit for bit, as those
// Run keeps, including the one at the moment of an early stop.
//
// An error from sink stops the run at once: Result.Status is Failed and
// Result.Err is the sink's error (the sink is not called again). Errors
// otherwise as for Run. Cost: as Run; one snapshot's slices are allocated
// once and reused.
func RunStream(ctx context.Context, p *Problem, sink Sink) (*Result, error) {
	q, err := normalise(p)
	if err != nil {
		return nil, err
	}
	s := newStepper(q, nil)
	return s.run(ctx, sink), nil
}

// normalise checks the contract and returns a copy with defaults filled in.
func normalise(p *Problem) (*Problem, error) {
	if p == nil || p.Mesh == nil || p.Mesh.Cells() == 0 {
		return nil, fmt.Errorf("%w: no mesh", ErrProblem)
	}
	if len(p.Materials) != len(p.Mesh.Layers) {
		return nil, fmt.Errorf("%w: %d materials for %d layers", ErrProblem, len(p.Materials), len(p.Mesh.Layers))
	}
	for j, m := range p.Materials {
		if m == nil || !(m.Density > 0) || !(m.SpecificHeat.Min() > 0) || !(m.Conductivity.Min() > 0) {
			return nil, fmt.Errorf("%w: material of layer %d needs positive density, specific heat and conductivity", ErrProblem, j)
		}
	}
	if !(p.End > 0) || math.IsInf(p.End, 0) {
		return nil, fmt.Errorf("%w: end time %g s", ErrProblem, p.End)
	}
	if !(p.InitialTemperature > 0) {
		return nil, fmt.Errorf("%w: initial temperature %g K", ErrProblem, p.InitialTemperature)
	}
	if !(p.InitialCure >= 0 && p.InitialCure < 1) {
		return nil, fmt.Errorf("%w: initial cure %g outside [0, 1)", ErrProblem, p.InitialCure)
	}
	for _, f := range []*physics.Face{&p.Top, &p.Bottom} {
		if !finite(f.H) || f.H < 0 || !(f.Emissivity >= 0 && f.Emissivity <= 1) {
			return nil, fmt.Errorf("%w: face coefficient h = %g, emissivity %g", ErrProblem, f.H, f.Emissivity)
		}
		for _, sch := range []*physics.Schedule{&f.Air, &f.Set, &f.Flux} {
			ts, vs := sch.Points()
			for k := range ts {
				if !finite(ts[k]) || !finite(vs[k]) {
					return nil, fmt.Errorf("%w: a %s face's program has a point that is not finite (%g s, %g)", ErrProblem, f.Kind, ts[k], vs[k])
				}
			}
		}
	}
	if v := p.Volumetric; v != nil && v.Attenuation == physics.StandingWave {
		b := v.Frequencies()
		if !(b.Lo > 0) || !(b.Hi >= b.Lo) || math.IsInf(b.Hi, 0) || (b.Points == 1 && b.Hi != b.Lo) ||
			!finite(v.IncidentPower) || v.IncidentPower < 0 || v.Incident < physics.IncidentTop || v.Incident > physics.IncidentBoth {
			return nil, fmt.Errorf("%w: standing wave with band %+v, incident power %g W/m², incidence %v", ErrProblem, b, v.IncidentPower, v.Incident)
		}
	}
	q := *p
	if q.TemperatureTolerance == 0 {
		q.TemperatureTolerance = DefaultTemperatureTolerance
	}
	if q.CureTolerance == 0 {
		q.CureTolerance = DefaultCureTolerance
	}
	if q.AbortTemperature == 0 {
		q.AbortTemperature = DefaultAbortTemperature
	}
	if q.MaxStep == 0 {
		q.MaxStep = q.End
	}
	if q.FlowViscosity == 0 {
		q.FlowViscosity = DefaultFlowViscosity
	}
	if !(q.FlowViscosity > 0) || math.IsInf(q.FlowViscosity, 0) {
		return nil, fmt.Errorf("%w: flow viscosity %g Pa·s", ErrProblem, q.FlowViscosity)
	}
	if !(q.TemperatureTolerance > 0 && q.CureTolerance > 0 && q.MaxStep > 0) {
		return nil, fmt.Errorf("%w: tolerances and max step must be positive", ErrProblem)
	}
	var outs []float64
	if q.OutputTimes == nil {
		for k := 1; k < 100; k++ {
			outs = append(outs, q.End*float64(k)/100)
		}
	} else {
		for _, t := range q.OutputTimes {
			if t > 0 && t < q.End {
				outs = append(outs, t)
			}
		}
	}
	outs = append(outs, q.End)
	if !slices.IsSorted(outs) {
		return nil, fmt.Errorf("%w: output times must increase", ErrProblem)
	}
	q.OutputTimes = slices.Compact(outs)
	thick := q.Mesh.Thickness()
	for _, z := range q.Probes {
		if !(z >= 0 && z <= thick) {
			return nil, fmt.Errorf("%w: probe at %g m outside the stack (0 to %g m)", ErrProblem, z, thick)
		}
	}
	return &q, nil
}

// run integrates from t = 0 to p.End (see Run): the initial state
// (start), a snapshot at t = 0, the march through the event times (march)
// and, when the run stops early, a snapshot at the moment itself. Without
// a sink the snapshots are kept in the Result; with one each is handed to
// it (see emitter).
func (s *stepper) run(ctx context.Context, sink Sink) *Result {
	res := &Result{}
	s.start()
	em := s.newEmitter(res, sink)
	tr := s.newTracker()
	tr.observe(s, 0)
	snap0 := s.snapshot(s.old, 0)

	events := s.events()
	s.h = s.initialStep(events[0])
	s.startup = 2 // implicit Euler steps after t = 0
	s.tr = tr

	ctl := (*physics.Control)(nil)
	if s.vol != nil {
		ctl = s.vol.Control
	}
	if ctl != nil {
		s.controlUpdate(ctl)
		snap0.PowerFraction = s.u
	}
	em.emit(snap0)
	if em.err != nil {
		res.Status, res.Err = Failed, em.err
	} else {
		res.Status, res.Err = s.march(ctx, events, ctl, em)
	}
	if res.Status != OK && em.err == nil && em.last != s.t {
		em.emit(s.snapshot(s.old, s.ledger.Faces+s.ledger.Volumetric))
		if em.err != nil {
			res.Err = errors.Join(res.Err, em.err)
		}
	}
	res.Ledger = s.ledger
	res.EndTime = s.t
	tr.finish(s, &s.ledger)
	res.Summary = tr.sum
	res.Summary.FieldSolutions = s.fieldRuns
	return res
}

// start sets the initial state at t = 0: p.InitialTemperature in every
// cell and p.InitialCure in every cell that cures, the standing-wave field
// (if any) and the accepted level there, which becomes the only entry of
// the history.
func (s *stepper) start() {
	p := s.p
	for i := range s.n {
		s.T[i] = p.InitialTemperature
		if s.cure[i] != nil {
			s.A[i] = p.InitialCure
		}
	}
	s.t = 0
	if s.wave != nil {
		s.refreshField()
	}
	s.eval(s.old, 0, s.T, s.A)
	s.histLen = 0
	s.pushHistory()
}

// march advances from the initial state through every event time (see
// events), one step attempt at a time (advance), sampling the controller
// ctl (nil for none) at every multiple of its period and emitting a
// snapshot at every output time. It returns OK after the last event, or
// the status and error of the first of: ctx cancelled (Interrupted), a
// step that cannot be made or a sink error (Failed), a cell past
// p.AbortTemperature (Runaway). It allocates nothing beyond the snapshots
// and the error.
func (s *stepper) march(ctx context.Context, events []float64, ctl *physics.Control, em *emitter) (Status, error) {
	p, tr := s.p, s.tr
	ev := 0     // next event index
	out := 0    // next output time index
	sample := 0 // index of the controller's last sample
	for ev < len(events) {
		if err := ctx.Err(); err != nil {
			return Interrupted, err
		}
		target := events[ev]
		if ctl != nil {
			target = min(target, float64(sample+1)*ctl.Period)
		}
		accepted, err := s.advance(target)
		if err != nil {
			return Failed, err
		}
		if !accepted {
			continue
		}
		if ctl != nil && s.t == float64(sample+1)*ctl.Period {
			sample++
			s.controlUpdate(ctl)
		}
		if s.t == events[ev] {
			ev++
			for out < len(p.OutputTimes) && p.OutputTimes[out] <= s.t {
				if p.OutputTimes[out] == s.t {
					em.emit(s.snapshot(s.old, s.ledger.Faces+s.ledger.Volumetric))
				}
				out++
			}
			if em.err != nil {
				return Failed, em.err
			}
		}
		if tr.hot > p.AbortTemperature {
			return Runaway, &RunawayError{Time: s.t, Depth: p.Mesh.Centers[tr.hotCell], Temperature: tr.hot, Limit: p.AbortTemperature}
		}
	}
	return OK, nil
}

// emitter hands the snapshots of a run on: without a sink it keeps them in
// res.Snapshots; with one it hands each to the sink in one reused Snapshot
// and rewinds the store, so that the next snapshot reuses the same slices.
type emitter struct {
	s     *stepper
	sink  Sink
	res   *Result
	shown Snapshot // the one snapshot handed to the sink, reused
	last  float64  // time of the last snapshot emitted (NaN before the first)
	err   error    // the sink's error for the last snapshot
}

// newEmitter sizes the snapshot store for a run that emits to sink (nil
// for none). Without a sink a block holds up to 3072 values, at least one
// snapshot and at most every snapshot of the run (the output times, t = 0
// and an early stop), and res.Snapshots has room for all of them; with a
// sink the block is one snapshot, reused.
func (s *stepper) newEmitter(res *Result, sink Sink) *emitter {
	shots := len(s.p.OutputTimes) + 2
	per := s.snapshotSize()
	if sink == nil {
		s.store.block = min(shots*per, max(per, 3072))
		res.Snapshots = make([]Snapshot, 0, shots)
	} else {
		s.store.block = per
	}
	return &emitter{s: s, sink: sink, res: res, last: math.NaN()}
}

// snapshotSize is the number of values in the slices of one snapshot (see
// snapshot): the probe temperatures and cures, the fields the problem
// records, and the probe viscosities.
func (s *stepper) snapshotSize() int {
	p, n := s.p, s.n
	per := 2 * len(p.Probes)
	switch {
	case p.NoFields:
	case s.curing:
		per += 4 * n
		if s.viscous {
			per += n
		}
	default:
		per += n
	}
	if s.vol != nil && !p.NoFields {
		per += n // Power
	}
	if s.viscous {
		per += len(p.Probes)
	}
	return per
}

// emit hands snap on (see emitter) and records its time.
func (e *emitter) emit(snap Snapshot) {
	e.last = snap.Time
	if e.sink == nil {
		e.res.Snapshots = append(e.res.Snapshots, snap)
		return
	}
	e.shown = snap
	e.err = e.sink(&e.shown)
	e.s.store.rewind()
}

// advance makes one step attempt from s.t toward target, never past it. It
// reports whether the step was accepted (s.t, s.T, s.A, s.old and the
// ledger then hold the new state; s.t == target exactly when the step
// landed on it). A rejected step shrinks s.h for the next attempt; the error
// is non-nil when the step size fell below the smallest usable step.
// advance allocates nothing.
func (s *stepper) advance(target float64) (bool, error) {
	p, tr := s.p, s.tr
	// The smallest usable step: a few rounding units of the time itself.
	minStep := 64 * eps * max(s.t, 1)
	hTry := min(s.h, p.MaxStep)
	landing := false
	switch rem := target - s.t; {
	case hTry*1.1 >= rem:
		hTry, landing = rem, true
	case hTry*2 > rem:
		hTry = rem / 2
	}
	theta := 0.5
	if s.startup > 0 {
		theta = 1
	}
	if s.wave != nil && s.refreshField() {
		// The field of this step, for the accepted level too (held over
		// the step).
		s.power(s.old, s.T, s.A)
	}
	tNew := s.t + hTry
	if landing {
		tNew = target
	}
	if !s.linear { // solveLinear needs no starting point
		s.predict(tNew, s.Tn, s.An)
	}
	outcome, its := s.solve(tNew-s.t, theta)
	tr.sum.NewtonIterations += its + 1
	tr.sum.MaxNewtonIterations = max(tr.sum.MaxNewtonIterations, its+1)
	if outcome != stepOK {
		tr.sum.RejectedSteps++
		s.h = hTry / 4
		if s.h < minStep {
			return false, &StepError{Time: s.t, Step: hTry, Reason: "Newton's iteration did not converge even for tiny steps"}
		}
		return false, nil
	}
	// Only an imposed heat flux can pull heat out without limit: a case
	// that asks for more cooling than the part holds ends here, with the
	// last physical state kept (cells and face temperatures above 1 K).
	cold, where := math.Min(s.cur.tfTop, s.cur.tfBot), -1.0
	if s.cur.tfTop < s.cur.tfBot {
		where = 0
	} else {
		where = p.Mesh.Thickness()
	}
	for i, T := range s.Tn {
		if T < cold || T != T {
			cold, where = T, p.Mesh.Centers[i]
		}
	}
	if !(cold > minTemperature) {
		return false, &StepError{Time: s.t, Step: hTry, Reason: fmt.Sprintf(
			"the temperature at depth %.6g mm would fall to %.6g K, near or below absolute zero: the heat drawn out (an imposed flux?) exceeds what the part holds",
			where*1e3, cold)}
	}
	ratio, order := s.errorRatio(tNew, theta == 0.5)
	if ratio > 1 {
		tr.sum.RejectedSteps++
		s.h = hTry * max(0.2, 0.9*math.Pow(ratio, -1/order))
		if s.h < minStep {
			return false, &StepError{Time: s.t, Step: hTry, Reason: "the error estimate cannot be met"}
		}
		return false, nil
	}
	// Accept.
	hUsed := tNew - s.t
	s.account(&s.ledger, hUsed, theta)
	s.t = tNew
	copy(s.T, s.Tn)
	copy(s.A, s.An)
	s.old, s.cur = s.cur, s.old
	s.pushHistory()
	tr.sum.Steps++
	if s.startup > 0 {
		s.startup--
	}
	grow := 5.0
	if ratio > 0 {
		grow = min(5, max(0.2, 0.9*math.Pow(ratio, -1/order)))
	}
	if hNext := hUsed * grow; !landing || hUsed >= min(s.h, p.MaxStep) {
		s.h = hNext
	} else {
		// Landing shortened the step: keep the controller's proposal.
		s.h = max(hNext, s.h)
	}
	tr.observe(s, hUsed)
	return true, nil
}

// account adds the accepted step to the ledger.
func (s *stepper) account(l *Ledger, h, theta float64) {
	o, v := s.old, s.cur
	l.Faces += h * (theta*(v.down[0]-v.down[s.n]) + (1-theta)*(o.down[0]-o.down[s.n]))
	stored := 0.0
	for i := range s.n {
		cs := 0.5 * (o.cp[i] + v.cp[i])
		stored += s.rho[i] * cs * s.w[i] * (s.Tn[i] - s.T[i])
	}
	l.Stored += stored
	if s.vol != nil {
		vol := 0.0
		for i := range s.n {
			vol += s.w[i] * (theta*v.P[i] + (1-theta)*o.P[i])
		}
		l.Volumetric += h * vol
	}
	if s.curing {
		reaction := 0.0
		for i, c := range s.cure {
			if c != nil {
				reaction += s.heat[i] * s.w[i] * (s.An[i] - s.A[i])
			}
		}
		l.Reaction += reaction
	}
}

// controlUpdate samples the sensor at the accepted state, updates the
// controller's output u, and re-evaluates the accepted level's absorbed
// power with it, the only part of a level that depends on u (u is held over
// the steps that follow, so both time levels of the next step use it).
func (s *stepper) controlUpdate(c *physics.Control) {
	Ts, _ := s.probe(s.old, c.Sensor)
	s.integral, s.u = c.Update(c.Program.At(s.t)-Ts, s.integral, s.u)
	s.power(s.old, s.T, s.A)
}

// events returns the times the stepper must land on: output times and face
// schedule breakpoints inside (0, End], sorted, End last.
func (s *stepper) events() []float64 {
	p := s.p
	ev := slices.Clone(p.OutputTimes)
	for _, fc := range []*physics.Face{&p.Top, &p.Bottom} {
		for _, sch := range []*physics.Schedule{&fc.Air, &fc.Set, &fc.Flux} {
			for _, t := range sch.Breakpoints() { // nil for an unused schedule
				if t > 0 && t < p.End {
					ev = append(ev, t)
				}
			}
		}
	}
	slices.Sort(ev)
	return slices.Compact(ev)
}

// initialStep picks the first step from the initial rates of change (by
// conduction, reaction and absorbed power): small enough that no cell's
// temperature moves by more than the tolerance and no cell's cure by more
// than the cure tolerance. The first step has no error estimate of its own.
func (s *stepper) initialStep(firstEvent float64) float64 {
	p := s.p
	h := min(firstEvent, p.MaxStep, 60.0)
	// A ramping air or platen temperature moves the face cells even when
	// nothing moves at t = 0: bound the step by the drivers' initial slopes.
	for _, f := range []*physics.Face{&p.Top, &p.Bottom} {
		if d, ok := f.Driver(); ok {
			dt := 1e-9 * max(p.End, 1)
			if slope := math.Abs(d.At(dt)-d.At(0)) / dt; slope > 0 {
				h = min(h, p.TemperatureTolerance/slope)
			}
		}
	}
	for i := range s.n {
		rate := math.Abs(s.old.D[i]+s.heat[i]*s.w[i]*s.old.r[i]+s.w[i]*s.old.P[i]) / (s.rho[i] * s.old.cp[i] * s.w[i])
		if rate > 0 {
			h = min(h, p.TemperatureTolerance/rate)
		}
		if s.cure[i] != nil && s.old.r[i] > 0 {
			h = min(h, p.CureTolerance/s.old.r[i])
		}
	}
	return max(h, 64*eps)
}

// minTemperature is the lowest temperature a run accepts, K: below it the
// case asks for the impossible (material data end far above it anyway).
const minTemperature = 1.0

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
