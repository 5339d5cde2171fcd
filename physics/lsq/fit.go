package lsq

import (
	"context"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Var is one unknown of Fit, in its own units.
type Var struct {
	Start float64 // the starting value; strictly inside the bounds
	// Lo and Hi bound the value; -Inf and +Inf (or NaN) mean no bound.
	Lo, Hi float64
	// Log fits the logarithm of the value, for a positive quantity whose
	// plausible values span decades (a rate constant, a film
	// coefficient): Start must be > 0, and Lo ≤ 0 means no lower bound.
	Log bool
	// Scale is the typical size of a change of a linear (not Log) value,
	// in its units: the finite-difference step is Settings.Step times it.
	// 0 means |Start|, or Hi − Lo when Start is 0 and both bounds are
	// given, or 1.
	Scale float64
}

// Problem is a weighted nonlinear least-squares problem for Fit.
type Problem struct {
	Vars []Var
	M    int // number of residuals, > len(Vars)
	// Residuals writes the m unweighted residuals (model − data) at the
	// values v (one per Var, in its units) into dst. It must be safe for
	// concurrent calls when Settings.Workers > 1. A residual that cannot
	// be evaluated (the model fails at v) is NaN.
	Residuals func(dst, v []float64)
	// Weights, when not nil, weight the squared residuals (length M, each
	// > 0 and finite): relative weights, 1/variance up to a common
	// factor that the fit estimates. Nil means equal weights.
	Weights []float64
	// Level of the confidence intervals, in (0, 1); 0 means 0.95.
	Level float64
}

// Estimate is the outcome of Fit. Standard errors, intervals, the
// covariance and the correlations are NaN (or nil) when the Jacobian at the
// optimum does not determine them (Identifiable false, or an interrupted
// fit that has no Jacobian at its best point).
type Estimate struct {
	Value []float64 // the estimates, in the units of the Vars
	SE    []float64 // standard errors (delta method through the transformation)
	// Low and High are the Level interval of each value: value ± t·SE in
	// the fitted scale (the logarithm for a Log Var, mapped back by exp),
	// clipped to the bounds.
	Low, High []float64
	// AtBound: the value is at (within a relative 1e-6 of) one of its
	// bounds. It is held there for the statistics: its SE, interval,
	// covariances and correlations are NaN, and the others are those of a
	// fit with it fixed (DoF counts the other unknowns only).
	AtBound []bool
	Cov     *mat.SymDense // covariance of the values; nil when not identifiable
	Corr    *mat.SymDense // correlations; nil when not identifiable
	// Identifiable is false when JᵀWJ is not numerically positive
	// definite: some combination of the unknowns is not determined.
	Identifiable bool
	// Null is the combination of the unknowns (a unit vector in the
	// scaled variables, largest component positive) that the data
	// determine worst, and Condition the ratio of the smallest to the
	// largest singular value of the scaled Jacobian (0: not at all).
	Null      []float64
	Condition float64

	Residuals []float64 // unweighted residuals (model − data) at Value
	SSR       float64   // weighted sum of squared residuals at Value
	M, DoF    int       // residuals, and degrees of freedom M − (unknowns not on a bound)
	Sigma     float64   // residual standard deviation √(SSR/DoF), of a residual of weight 1
	T         float64   // the Student-t quantile of the intervals

	Status            Status
	Reason            string
	Iterations, Evals int
}

// VarError is a Var that Fit cannot use.
type VarError struct {
	Index int
	Msg   string
}

func (e *VarError) Error() string { return fmt.Sprintf("lsq: unknown %d: %s", e.Index, e.Msg) }

// transform maps an unbounded scaled variable u to a value and back.
//
// With y the value (Log: its logarithm) and yl, yh the bounds in the same
// scale, y0 the start:
//
//	no bound:    y = y0 + s·u
//	both:        y = yl + (yh − yl)/(1 + e^−u)   (logistic)
//	lower only:  y = yl + (y0 − yl)·e^u
//	upper only:  y = yh − (yh − y0)·e^−u
//
// each smooth, increasing and one-to-one from ℝ onto the allowed interval
// (bounds by transformation, common practice), with u = 0 at the start
// except under two bounds, where u0 = ln((y0 − yl)/(yh − y0)).
type transform struct {
	log          bool
	lo, hi       bool // which bounds there are
	yl, yh, y0   float64
	s            float64
	u0           float64
	qLo, qHi     float64 // the bounds as given (±Inf for none)
	hasLo, hasHi bool
}

func newTransform(i int, v Var) (transform, error) {
	fail := func(format string, a ...any) (transform, error) {
		return transform{}, &VarError{Index: i, Msg: fmt.Sprintf(format, a...)}
	}
	if math.IsNaN(v.Start) || math.IsInf(v.Start, 0) {
		return fail("the start %v is not finite", v.Start)
	}
	t := transform{log: v.Log, qLo: math.Inf(-1), qHi: math.Inf(1)}
	if !math.IsNaN(v.Lo) && !math.IsInf(v.Lo, -1) && !(v.Log && v.Lo <= 0) {
		if math.IsInf(v.Lo, 1) {
			return fail("the lower bound is +Inf")
		}
		t.lo, t.qLo = true, v.Lo
	}
	if !math.IsNaN(v.Hi) && !math.IsInf(v.Hi, 1) {
		if math.IsInf(v.Hi, -1) {
			return fail("the upper bound is -Inf")
		}
		t.hi, t.qHi = true, v.Hi
	}
	if t.lo && t.hi && !(v.Lo < v.Hi) {
		return fail("the bounds %g and %g are not increasing", v.Lo, v.Hi)
	}
	if (t.lo && !(v.Start > v.Lo)) || (t.hi && !(v.Start < v.Hi)) {
		return fail("the start %g is not strictly inside the bounds [%g, %g]", v.Start, t.qLo, t.qHi)
	}
	y := func(q float64) float64 {
		if v.Log {
			return math.Log(q)
		}
		return q
	}
	if v.Log && !(v.Start > 0) {
		return fail("a logarithmic unknown needs a positive start, got %g", v.Start)
	}
	t.y0 = y(v.Start)
	if t.lo {
		t.yl = y(v.Lo)
	}
	if t.hi {
		t.yh = y(v.Hi)
	}
	switch {
	case t.lo && t.hi:
		t.u0 = math.Log((t.y0 - t.yl) / (t.yh - t.y0))
	case !t.lo && !t.hi:
		t.s = 1
		if !v.Log {
			switch {
			case v.Scale > 0 && !math.IsInf(v.Scale, 1):
				t.s = v.Scale
			case v.Scale != 0:
				return fail("the scale %g is not positive and finite", v.Scale)
			case v.Start != 0:
				t.s = math.Abs(v.Start)
			}
		}
	}
	return t, nil
}

// y returns the value in the fitted scale at u, and dy/du.
func (t *transform) y(u float64) (y, dy float64) {
	switch {
	case t.lo && t.hi:
		// Logistic, written to stay accurate for large |u|.
		var sg, sc float64 // σ(u), 1 − σ(u)
		if u >= 0 {
			e := math.Exp(-u)
			sg, sc = 1/(1+e), e/(1+e)
		} else {
			e := math.Exp(u)
			sg, sc = e/(1+e), 1/(1+e)
		}
		w := t.yh - t.yl
		if sg < 0.5 {
			return t.yl + w*sg, w * sg * sc
		}
		return t.yh - w*sc, w * sg * sc
	case t.lo:
		d := (t.y0 - t.yl) * math.Exp(u)
		return t.yl + d, d
	case t.hi:
		d := (t.yh - t.y0) * math.Exp(-u)
		return t.yh - d, d
	}
	return t.y0 + t.s*u, t.s
}

// value returns the value at u.
func (t *transform) value(u float64) float64 {
	y, _ := t.y(u)
	return t.fromY(y)
}

func (t *transform) fromY(y float64) float64 {
	if t.log {
		return math.Exp(y)
	}
	return y
}

// atBound reports whether u puts the value within a relative 1e-6 of a
// bound (of the bounds' span, or of the start's distance to a lone bound).
func (t *transform) atBound(u float64) bool {
	switch {
	case t.lo && t.hi:
		return math.Abs(u) > 13.8 // σ(u) or 1 − σ(u) below 1e-6
	case t.lo:
		return u < -13.8
	case t.hi:
		return u > 13.8
	}
	return false
}

// Fit estimates the unknowns of pr by weighted nonlinear least squares:
//
//	minimise Σ_i w_i·r_i(v)²  over v within the bounds,
//
// from the starts, by Minimize on the scaled unbounded variables u of each
// Var (see transform: bounds by transformation; the logarithm for Log
// unknowns; a linear unknown divided by its Scale), so that a step of
// order one in u is a change of order one in the value's own terms.
//
// At the optimum, with J the Jacobian of √w·r in u and s² = SSR/(m − p):
//
//	Cov_u = s²·(JᵀJ)⁻¹                 (Covariance)
//	SE_k  = |dv_k/du_k|·√Cov_u[k][k]   (delta method)
//	interval: y_k ± t·|dy_k/du_k|·√Cov_u[k][k], mapped back to v_k and
//	          clipped to the bounds, t the Student-t quantile of Level
//	          with m − p degrees of freedom (TQuantile)
//
// where y is the fitted scale (ln v for a Log unknown, v otherwise): Bates
// & Watts, Nonlinear Regression Analysis and Its Applications, 1988, ch. 2
// (linear-approximation standard errors and t intervals). For an interior
// optimum the standard errors do not depend on the transformation (J in u
// is J in v times diag(dv/du)); the intervals of Log unknowns are
// symmetric in ln v, so they stay positive. Weights are relative: the
// covariance scales with the s² the residuals show, not with the weights'
// absolute size.
//
// Errors: a VarError for a Var that cannot be used (start not strictly
// inside its bounds, a Log unknown with a start ≤ 0, bounds not
// increasing); an error when M ≤ len(Vars) or a weight is not positive and
// finite. A fit that does not converge is not an error: Status says so, and
// the values are those of the best point. Fit panics when Residuals is nil
// or Weights has a length other than M.
//
// Cost: that of Minimize (each residual evaluation one call of
// pr.Residuals), plus O(m·p² + p³) for the statistics.
func Fit(ctx context.Context, pr Problem, s Settings) (*Estimate, error) {
	p, m := len(pr.Vars), pr.M
	if pr.Residuals == nil || (pr.Weights != nil && len(pr.Weights) != m) {
		panic("lsq: Fit needs a residual function and one weight per residual")
	}
	level, sw, err := checkProblem(pr)
	if err != nil {
		return nil, err
	}
	tr := make([]transform, p)
	u0 := make([]float64, p)
	for i, v := range pr.Vars {
		if tr[i], err = newTransform(i, v); err != nil {
			return nil, err
		}
		u0[i] = tr[i].u0
	}
	f := func(dst, u []float64) {
		v := make([]float64, p)
		for i := range u {
			v[i] = tr[i].value(u[i])
		}
		pr.Residuals(dst, v)
		for i := range dst {
			dst[i] *= sw[i]
		}
	}
	r := Minimize(ctx, f, u0, m, s)
	e, dv, dy := newEstimate(r, tr, sw, level)
	if r.Jacobian != nil {
		e.statistics(r, tr, dv, dy, level)
	}
	return e, nil
}

// checkProblem checks the sizes, the confidence level and the weights of
// pr, and returns the level (0.95 for 0) and the square roots of the
// weights (all 1 without weights), the factors of the residuals that
// Minimize sees.
func checkProblem(pr Problem) (level float64, sw []float64, err error) {
	p, m := len(pr.Vars), pr.M
	if p == 0 {
		return 0, nil, fmt.Errorf("lsq: no unknowns")
	}
	if m <= p {
		return 0, nil, fmt.Errorf("lsq: %d residuals for %d unknowns: need more residuals than unknowns", m, p)
	}
	level = pr.Level
	if level == 0 {
		level = 0.95
	}
	if !(level > 0 && level < 1) {
		return 0, nil, fmt.Errorf("lsq: confidence level %g is not in (0, 1)", level)
	}
	sw = make([]float64, m)
	for i := range sw {
		sw[i] = 1
		if pr.Weights != nil {
			w := pr.Weights[i]
			if !(w > 0) || math.IsInf(w, 1) {
				return 0, nil, fmt.Errorf("lsq: weight %d is %g: weights must be positive and finite", i, w)
			}
			sw[i] = math.Sqrt(w)
		}
	}
	return level, sw, nil
}

// newEstimate maps the outcome r of Minimize in the scaled variables back
// to the values, AtBound flags and unweighted residuals (dividing by the
// square roots of the weights sw), with SSR = 2·cost, DoF = m − p,
// Sigma = √(SSR/DoF) and T at level; SE and the intervals are NaN, for
// statistics to fill. It also returns the derivatives dv/du and dy/du of
// each value and of its fitted scale at the optimum (see transform).
func newEstimate(r Result, tr []transform, sw []float64, level float64) (e *Estimate, dv, dy []float64) {
	p, m := len(tr), len(r.Residuals)
	e = &Estimate{
		Value: make([]float64, p), SE: make([]float64, p), Low: make([]float64, p), High: make([]float64, p),
		AtBound: make([]bool, p), Residuals: make([]float64, m),
		SSR: 2 * r.Cost, M: m, DoF: m - p, Status: r.Status, Reason: r.Reason,
		Iterations: r.Iterations, Evals: r.Evals, Condition: math.NaN(),
	}
	e.Sigma = math.Sqrt(e.SSR / float64(e.DoF))
	e.T = TQuantile(level, e.DoF)
	for i := range r.Residuals {
		e.Residuals[i] = r.Residuals[i] / sw[i]
	}
	dv = make([]float64, p)
	dy = make([]float64, p)
	for i := range p {
		var y float64
		y, dy[i] = tr[i].y(r.X[i])
		e.Value[i] = tr[i].fromY(y)
		dv[i] = dy[i]
		if tr[i].log {
			dv[i] *= e.Value[i]
		}
		e.AtBound[i] = tr[i].atBound(r.X[i])
		e.SE[i], e.Low[i], e.High[i] = math.NaN(), math.NaN(), math.NaN()
	}
	return e, dv, dy
}

// statistics fills the linear-approximation statistics of e from the
// Jacobian r.Jacobian (not nil) of the weighted residuals in the scaled
// variables at the optimum r.X (the formulas are in Fit's doc comment).
// A value on a bound is held there: its column (near zero, as the
// transformation flattens there) is left out, its entries stay NaN, and
// DoF, Sigma and T count the free unknowns only. The weakest direction and
// the condition come from Nullspace; nothing more is filled when
// Covariance finds JᵀJ not positive definite (Identifiable false). Cost:
// O(m·p² + p³).
func (e *Estimate) statistics(r Result, tr []transform, dv, dy []float64, level float64) {
	p, m := len(tr), len(r.Residuals)
	var free []int
	for i := range p {
		if !e.AtBound[i] {
			free = append(free, i)
		}
	}
	if len(free) == 0 {
		return
	}
	J := r.Jacobian
	if len(free) < p {
		J = mat.NewDense(m, len(free), nil)
		for k, i := range free {
			for row := range m {
				J.Set(row, k, r.Jacobian.At(row, i))
			}
		}
		e.DoF = m - len(free)
		e.Sigma = math.Sqrt(e.SSR / float64(e.DoF))
		e.T = TQuantile(level, e.DoF)
	}
	null, cond := Nullspace(J)
	e.Condition = cond
	if null != nil {
		e.Null = make([]float64, p)
		for k, i := range free {
			e.Null[i] = null[k]
		}
	}
	cov, ok := Covariance(J, r.Cost)
	e.Identifiable = ok
	if !ok {
		return
	}
	e.setCovariance(cov, free, dv)
	for a, i := range free {
		su := math.Sqrt(cov.At(a, a))
		e.SE[i] = math.Abs(dv[i]) * su
		y, _ := tr[i].y(r.X[i])
		h := e.T * math.Abs(dy[i]) * su
		lo, hi := tr[i].fromY(y-h), tr[i].fromY(y+h)
		e.Low[i] = max(lo, tr[i].qLo)
		e.High[i] = min(hi, tr[i].qHi)
	}
}

// setCovariance sets Cov and Corr of the values from the covariance cov of
// the free scaled variables (free[a] is the unknown of row a):
//
//	Cov[i][j] = (dv_i/du_i)·Cov_u[a][b]·(dv_j/du_j)
//
// with NaN in the rows and columns of the unknowns held on a bound.
func (e *Estimate) setCovariance(cov *mat.SymDense, free []int, dv []float64) {
	p := len(e.Value)
	corr := Correlation(cov)
	e.Corr, e.Cov = mat.NewSymDense(p, nil), mat.NewSymDense(p, nil)
	for i := range p {
		for j := i; j < p; j++ {
			e.Corr.SetSym(i, j, math.NaN())
			e.Cov.SetSym(i, j, math.NaN())
		}
	}
	for a, i := range free {
		for b, j := range free {
			if j < i {
				continue
			}
			e.Corr.SetSym(i, j, corr.At(a, b))
			e.Cov.SetSym(i, j, dv[i]*cov.At(a, b)*dv[j])
		}
	}
}
