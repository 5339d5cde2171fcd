package calibrate

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"strings"
	"sync/atomic"

	"gonum.org/v1/gonum/mat"

	"cureslab/cases/check"
	"cureslab/physics/lsq"
	"cureslab/solver"
)

// Param is one free value of a calibration, in the unit it is written in
// the case (Unit; "" for a plain number).
type Param struct {
	Key  string
	Unit string
	// Lo and Hi are the bounds (-Inf, +Inf for none).
	Lo, Hi float64
	// Log: fitted on a logarithmic scale (film coefficients, contact
	// resistances, rate constants): its interval is symmetric in ln.
	Log bool
	// Ratio: a quantity with a true zero (not a temperature), for which an
	// interval wider than the value means the log does not determine it.
	Ratio bool
	// Start is the case's value (or the middle of the range when the case
	// has none); Value the fitted one, SE its standard error, Low and
	// High its 95 % interval. SE, Low and High are NaN when the log does
	// not determine them.
	Start, Value, SE, Low, High float64
	AtBound                     bool // the fit ended on a bound
}

// Result is a calibration.
type Result struct {
	CaseFile, Title string // the case calibrated: its file and title
	// Scope says which cautions apply to the case (a curing resin,
	// volumetric heating).
	Scope check.CautionScope
	// Calibrated is the case text with the fitted values written in.
	Calibrated string

	Log    *Log
	Params []Param
	// Corr is the correlation matrix of the fitted values; nil when the
	// log does not determine them all.
	Corr *mat.SymDense
	// Status: lsq.Converged, lsq.IterationLimit or lsq.Interrupted; the
	// values are those of the best point reached.
	Status     lsq.Status
	Reason     string
	Iterations int
	Runs       int // solver runs
	Readings   int // measured temperatures compared
	DoF        int // Readings − len(Params)
	Sigma      float64
	// Start and Fitted are the simulated temperatures (K) per probe and
	// log time at the start and at the fitted values; NaN where a run did
	// not reach.
	Start, Fitted [][]float64
	// RMS residual per probe and over all readings (K), at the start and
	// fitted.
	StartRMS, RMS       []float64
	StartRMSAll, RMSAll float64
	// Autocorr is the lag-1 autocorrelation of each probe's residuals
	// over its consecutive readings.
	Autocorr []float64
	Warnings []string
}

// Converged reports whether the fit met a convergence test.
func (r *Result) Converged() bool { return r.Status == lsq.Converged }

// builder returns the solver problem of the case with the free values
// vals (one per Param, in its unit), or why the case is invalid there.
type builder func(vals []float64) (*solver.Problem, error)

// Options tune a calibration. The zero value of every field is its
// default.
type Options struct {
	Jobs    int // solver runs at a time (Jacobian columns); 0 means runtime.NumCPU()
	MaxIter int // Levenberg–Marquardt iterations; 0 means 100
	// Progress, when not nil, is called after every accepted step with
	// the iteration, the RMS residual (K) and the solver runs so far.
	Progress func(iter int, rms float64, runs int)
}

// fdStep is the finite-difference step of the Jacobian in the scaled
// variables (a relative 1e-4 of a value on a log scale or scaled by
// itself). The solver's step sequence is fixed by the log's times as long
// as readings are closer than its natural steps, which makes the simulated
// temperatures smooth in the values to well below this step; measured on
// the examples, forward differences at 1e-4 agree with central ones at
// 1e-5 to about 1e-4 relative.
const fdStep = 1e-4

// engine evaluates the residuals of a log against the case.
type engine struct {
	log   *Log
	build builder
	obs   [][2]int // (probe, time) of each residual
	ws    chan *solver.Workspace
	cache *simCache
	runs  atomic.Int64
	ctx   context.Context
}

func newEngine(ctx context.Context, l *Log, build builder, jobs, p int) *engine {
	e := &engine{log: l, build: build, ws: make(chan *solver.Workspace, jobs), cache: newSimCache(4*p + 16), ctx: ctx}
	for range jobs {
		e.ws <- &solver.Workspace{}
	}
	for k, pr := range l.Probes {
		for i, v := range pr.T {
			if !math.IsNaN(v) {
				e.obs = append(e.obs, [2]int{k, i})
			}
		}
	}
	return e
}

// traces returns the simulated temperatures at vals, running the case
// unless the cache has them.
func (e *engine) traces(vals []float64) ([][]float64, error) {
	if s, ok := e.cache.get(vals); ok {
		return s, nil
	}
	p, err := e.build(vals)
	if err != nil {
		return nil, err
	}
	ws := <-e.ws
	defer func() { e.ws <- ws }()
	sim, res, err := simulate(e.ctx, ws, p, e.log)
	if err != nil {
		return nil, err
	}
	if e.ctx.Err() != nil {
		return nil, e.ctx.Err()
	}
	e.runs.Add(1)
	if res.Status != solver.OK {
		msg := "the run stopped early"
		if res.Err != nil {
			msg = res.Err.Error()
		}
		return nil, errors.New(msg)
	}
	e.cache.put(vals, sim)
	return sim, nil
}

// residuals writes simulated − measured at vals into dst (K); NaN where the
// case is invalid or its run fails there.
func (e *engine) residuals(dst, vals []float64) {
	sim, err := e.traces(vals)
	for j, o := range e.obs {
		if err != nil {
			dst[j] = math.NaN()
			continue
		}
		dst[j] = sim[o[0]][o[1]] - e.log.Probes[o[0]].T[o[1]]
	}
}

// run fits params to the log: weighted least squares with equal weights
// (every reading counts alike, so a thermocouple read more often weighs
// more), through lsq.Fit on the Params' scales and bounds.
func run(ctx context.Context, l *Log, build builder, params []Param, opt Options) (*Result, error) {
	jobs := opt.Jobs
	if jobs <= 0 {
		jobs = runtime.NumCPU()
	}
	maxIter := opt.MaxIter
	if maxIter <= 0 {
		maxIter = 100
	}
	p := len(params)
	e := newEngine(ctx, l, build, min(jobs, p), p)
	m := len(e.obs)
	if m <= p {
		return nil, fmt.Errorf("%s: %d readings for %d free values: the log needs more readings than free values", l.File, m, p)
	}
	start := make([]float64, p)
	vars := make([]lsq.Var, p)
	for i, pr := range params {
		start[i] = pr.Start
		vars[i] = lsq.Var{Start: pr.Start, Lo: pr.Lo, Hi: pr.Hi, Log: pr.Log}
	}
	startSim, err := e.traces(start)
	if err != nil {
		if ctx.Err() != nil {
			return nil, ctx.Err()
		}
		return nil, fmt.Errorf("the case does not run at its own values: %v", err)
	}
	for _, o := range e.obs {
		if math.IsNaN(startSim[o[0]][o[1]]) {
			return nil, fmt.Errorf("%s:%d: the case gives no temperature at %s s (depth %s mm): the run did not land on that time",
				l.File, l.Lines[o[1]], fmtNum(l.Times[o[1]]), l.Probes[o[0]].Label)
		}
	}
	set := lsq.Settings{MaxIter: maxIter, Step: fdStep, Workers: min(jobs, p)}
	if opt.Progress != nil {
		set.Progress = func(iter int, cost float64) {
			opt.Progress(iter, math.Sqrt(2*cost/float64(m)), int(e.runs.Load()))
		}
	}
	est, err := lsq.Fit(ctx, lsq.Problem{Vars: vars, M: m, Residuals: e.residuals}, set)
	if err != nil {
		return nil, err
	}
	res := &Result{Log: l, Params: append([]Param(nil), params...), Corr: est.Corr, Status: est.Status,
		Reason: est.Reason, Iterations: est.Iterations, Readings: m, DoF: est.DoF, Sigma: est.Sigma, Start: startSim}
	for i := range res.Params {
		pr := &res.Params[i]
		pr.Value, pr.SE, pr.Low, pr.High, pr.AtBound = est.Value[i], est.SE[i], est.Low[i], est.High[i], est.AtBound[i]
	}
	if res.Fitted, err = e.traces(est.Value); err != nil {
		// Not in the cache (it keeps the latest runs): run it once more,
		// even after an interruption, so that the outputs show the best
		// point.
		e.ctx = context.Background()
		if res.Fitted, err = e.traces(est.Value); err != nil {
			return nil, fmt.Errorf("the best point does not run again: %v", err)
		}
	}
	res.Runs = int(e.runs.Load())
	res.stats()
	res.warn(est)
	return res, nil
}

// stats fills the RMS residuals and the residuals' autocorrelation.
func (r *Result) stats() {
	n := len(r.Log.Probes)
	r.StartRMS, r.RMS, r.Autocorr = make([]float64, n), make([]float64, n), make([]float64, n)
	var s0, s1 float64
	var cnt int
	for k, pr := range r.Log.Probes {
		var a0, a1 float64
		var c int
		var res []float64 // consecutive readings' residuals
		for i, v := range pr.T {
			if math.IsNaN(v) {
				continue
			}
			d0, d1 := r.Start[k][i]-v, r.Fitted[k][i]-v
			a0 += d0 * d0
			a1 += d1 * d1
			res = append(res, d1)
			c++
		}
		r.StartRMS[k] = math.Sqrt(a0 / float64(c))
		r.RMS[k] = math.Sqrt(a1 / float64(c))
		r.Autocorr[k] = lag1(res)
		s0 += a0
		s1 += a1
		cnt += c
	}
	r.StartRMSAll = math.Sqrt(s0 / float64(cnt))
	r.RMSAll = math.Sqrt(s1 / float64(cnt))
}

// lag1 returns the lag-1 autocorrelation of x about its mean,
//
//	r1 = Σ (x_i − x̄)(x_{i+1} − x̄) / Σ (x_i − x̄)²,
//
// the sample autocorrelation at lag 1 (Box & Jenkins, Time Series
// Analysis, ch. 2); NaN for fewer than 3 values or no spread.
func lag1(x []float64) float64 {
	if len(x) < 3 {
		return math.NaN()
	}
	var m float64
	for _, v := range x {
		m += v
	}
	m /= float64(len(x))
	var num, den float64
	for i, v := range x {
		den += (v - m) * (v - m)
		if i+1 < len(x) {
			num += (v - m) * (x[i+1] - m)
		}
	}
	if !(den > 0) {
		return math.NaN()
	}
	return num / den
}

// Thresholds of the warnings.
const (
	maxCorrelation = 0.95 // |r| beyond this: two values the log cannot tell apart
	maxAutocorr    = 0.5  // lag-1 autocorrelation beyond this: residuals that wander, not scatter
)

// cannotTell is the advice of the identifiability warnings.
const cannotTell = "the log cannot tell these apart; measure another depth or fix one"

// warn adds the warnings of the result.
func (r *Result) warn(est *lsq.Estimate) {
	add := func(format string, a ...any) { r.Warnings = append(r.Warnings, fmt.Sprintf(format, a...)) }
	switch r.Status {
	case lsq.IterationLimit:
		add("the fit did not converge in %d iterations: the values are the best point reached, not a minimum; start nearer (edit the case) or free fewer values", r.Iterations)
	case lsq.Interrupted:
		add("interrupted: the values are the best point reached so far, not a minimum")
	}
	if !est.Identifiable && est.Null != nil {
		var names []string
		for i, v := range est.Null {
			if math.Abs(v) > 0.3 {
				names = append(names, r.Params[i].Key)
			}
		}
		add("the log determines only a combination of %s (no standard errors): %s", strings.Join(names, " and "), cannotTell)
	}
	if r.Corr != nil {
		for i := range r.Params {
			for j := i + 1; j < len(r.Params); j++ {
				if c := r.Corr.At(i, j); math.Abs(c) > maxCorrelation {
					add("%s and %s correlate at r = %.3f: %s", r.Params[i].Key, r.Params[j].Key, c, cannotTell)
				}
			}
		}
	}
	for _, p := range r.Params {
		switch {
		case p.AtBound:
			add("%s ended on a bound of its range (%s): the log asks for a value beyond it; widen the range or check the case", p.Key, fmtRange(p))
		case p.Ratio && p.High-p.Low > math.Abs(p.Value):
			add("the 95 %% interval of %s (%s to %s) is wider than the value: %s", p.Key, fmtVal(p.Low), withUnit(fmtVal(p.High), p.Unit), cannotTell)
		}
	}
	for k, a := range r.Autocorr {
		// Below a hundredth of a kelvin the residuals are the solver's own
		// error, far under any thermocouple's resolution: nothing to warn.
		if a > maxAutocorr && r.RMS[k] > 0.01 {
			add("the residuals at %s mm run in long waves (lag-1 autocorrelation %.2f), not independent scatter: the model misses something systematic there, and the intervals, which assume independent readings, are too narrow",
				r.Log.Probes[k].Label, a)
		}
	}
	for _, c := range r.Log.Dropped {
		add("column %s has no reading: left out", c)
	}
}

func fmtVal(v float64) string { return fmt.Sprintf("%.4g", v) }

func fmtRange(p Param) string {
	lo, hi := "−∞", "+∞"
	if !math.IsInf(p.Lo, 0) {
		lo = fmtVal(p.Lo)
	}
	if !math.IsInf(p.Hi, 0) {
		hi = fmtVal(p.Hi)
	}
	return strings.TrimSpace(lo + " to " + hi + " " + p.Unit)
}
