package lsq

import (
	"context"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Func writes the m residuals at x into dst.
type Func func(dst, x []float64)

// Settings tune Minimize. The zero value of every field is its default.
type Settings struct {
	// MaxIter bounds the iterations (accepted and rejected steps);
	// default 200.
	MaxIter int
	// Step is the finite-difference step of the Jacobian, absolute in x;
	// default 1e-7, right for a smooth residual function of variables of
	// order one in double precision. A residual function that carries
	// noise of its own (an adaptive solver) needs a larger step, above
	// that noise divided by the sensitivity.
	Step float64
	// Central selects central differences (2p evaluations per Jacobian,
	// error O(Step²)) instead of forward ones (p evaluations, error
	// O(Step)).
	Central bool
	// Workers is the number of residual evaluations of one Jacobian run
	// at a time; 0 or 1 means one after the other. More than one needs a
	// residual function that is safe for concurrent calls. The result does
	// not depend on it.
	Workers int
	// Progress, if not nil, is called after every accepted step with the
	// iteration count and the cost ½‖r‖².
	Progress func(iter int, cost float64)
}

// Status is how Minimize ended.
type Status int

// The outcomes of Minimize.
const (
	Converged      Status = iota + 1 // a convergence test was met (Result.Reason says which)
	IterationLimit                   // Settings.MaxIter iterations without meeting one
	Interrupted                      // the context was cancelled; X is the best point so far
	NoStart                          // the residuals are not finite at the start
)

var statusNames = [...]string{"", "converged", "iteration limit", "interrupted", "no finite start"}

func (s Status) String() string {
	if s <= 0 || int(s) >= len(statusNames) {
		return "Status(?)"
	}
	return statusNames[s]
}

// Result is the outcome of Minimize.
type Result struct {
	X         []float64
	Cost      float64    // ½‖r‖² at X
	Residuals []float64  // r at X
	Jacobian  *mat.Dense // ∂r/∂x at X; nil when interrupted before it was computed there
	// Iterations counts the steps tried, accepted or not; Evals the
	// evaluations of the residual function, Jacobians included.
	Iterations, Evals int
	Status            Status
	Reason            string // the convergence test met, when Status is Converged
}

// Minimize minimises the cost ½‖r(x)‖² over x from x0, where f(dst, x)
// writes the m residuals r(x) into dst.
//
// Method: Levenberg–Marquardt with Marquardt's diagonal scaling, the damped
// normal equations
//
//	(JᵀJ + λ·diag JᵀJ)·δ = −Jᵀr
//
// solved by Cholesky, and Nielsen's update of λ from the gain ratio ρ of
// the actual to the predicted reduction (λ ← λ·max(⅓, 1 − (2ρ − 1)³) after
// an accepted step, λ ← λν, ν ← 2ν after a rejected one): Madsen, Nielsen &
// Tingleff, Methods for Non-Linear Least Squares Problems, 2nd ed., 2004,
// §3.2, Algorithm 3.16. J by finite differences (Settings.Step, forward or
// central), so x should be scaled to order one. A step whose residuals are
// not finite is rejected like one that raises the cost; a Jacobian column
// whose forward difference is not finite is taken backward.
//
// Stops (Status Converged) when an accepted step lowers the cost by less
// than a relative 1e-10, when the step is below 1e-9 in every component
// (relative to the component, absolute below 1), when the gradient
// vanishes (‖Jᵀr‖∞ ≤ 1e-14·cost), or when no step lowers the cost (λ
// above 1e16); after MaxIter iterations (IterationLimit); when ctx is
// cancelled (Interrupted: the evaluation in flight is discarded and X is
// the best point accepted). f is never called after ctx is done.
//
// Preconditions: m ≥ 1 and len(x0) ≥ 1 (Minimize panics otherwise). It
// returns the start with Status NoStart when r(x0) is not finite.
//
// Cost: per iteration one evaluation of f for the trial step, plus one
// Jacobian (p evaluations forward, 2p central) after each accepted step;
// O(m·p² + p³) arithmetic per iteration.
func Minimize(ctx context.Context, f Func, x0 []float64, m int, s Settings) Result {
	p := len(x0)
	if p == 0 || m < 1 {
		panic("lsq: Minimize needs at least one variable and one residual")
	}
	if s.MaxIter <= 0 {
		s.MaxIter = 200
	}
	if s.Step == 0 {
		s.Step = 1e-7
	}
	x := append([]float64(nil), x0...)
	r := make([]float64, m)
	jac := newJacobian(f, m, p, s)
	res := Result{}
	finish := func(st Status, J *mat.Dense, cost float64) Result {
		res.X, res.Cost, res.Residuals, res.Jacobian, res.Status = x, cost, r, J, st
		res.Evals += jac.evals
		return res
	}
	if ctx.Err() != nil {
		return finish(Interrupted, nil, math.Inf(1))
	}
	cost := costOf(f, r, x)
	res.Evals++
	J := mat.NewDense(m, p, nil)
	if ctx.Err() != nil {
		return finish(Interrupted, nil, cost)
	}
	if math.IsInf(cost, 1) {
		if !jac.at(ctx, J, x, r) {
			J = nil
		}
		return finish(NoStart, J, cost)
	}
	if !jac.at(ctx, J, x, r) {
		return finish(Interrupted, nil, cost)
	}
	l := newLM(x, r, cost, J)
	status := IterationLimit
	iter := 0
	for iter < s.MaxIter {
		if ctx.Err() != nil {
			status = Interrupted
			break
		}
		iter++
		if !l.solve() {
			l.raise()
			continue
		}
		small := l.trial()
		costNew := costOf(f, l.rNew, l.xNew)
		res.Evals++
		if ctx.Err() != nil {
			status = Interrupted
			break
		}
		if costNew < l.cost {
			drop := l.accept(costNew)
			if !jac.at(ctx, l.J, l.x, l.r) {
				l.J = nil
				status = Interrupted
				break
			}
			l.normal()
			if s.Progress != nil {
				s.Progress(iter, l.cost)
			}
			if res.Reason = l.converged(drop, small); res.Reason != "" {
				status = Converged
				break
			}
		} else {
			if small {
				status, res.Reason = Converged, "the step was below a relative 1e-9 in every variable"
				break
			}
			l.raise()
			if l.lambda > 1e16 {
				// No step lowers the cost: a minimum to rounding.
				status, res.Reason = Converged, "no step lowers the cost"
				break
			}
		}
	}
	res.Iterations = iter
	return finish(status, l.J, l.cost)
}

// lm is the state of Minimize's iteration between two steps: the best
// point accepted, the normal equations there, the damping and the scratch
// of the trial step. Its slices and matrices are made in newLM and reused.
type lm struct {
	x, r       []float64     // the best point accepted and its residuals
	cost       float64       // ½‖r‖² at x
	J          *mat.Dense    // ∂r/∂x at x
	A          mat.SymDense  // JᵀJ at x
	g          *mat.VecDense // Jᵀr at x
	maxDiag    float64       // the largest diagonal element of JᵀJ at the start
	lambda, nu float64       // the damping λ and its growth factor ν
	xNew, rNew []float64     // the trial point and its residuals
	M          *mat.SymDense // the damped matrix JᵀJ + λ·D
	chol       mat.Cholesky  // of M
	delta      *mat.VecDense // −(the step), the solution of M·delta = g
}

// newLM starts the iteration at x with residuals r, cost ½‖r‖² and
// Jacobian J: it forms the normal equations there and sets λ = 1e-3
// (relative to the scaled diagonal, see scale) and ν = 2. x, r and J are
// kept, not copied.
func newLM(x, r []float64, cost float64, J *mat.Dense) *lm {
	m, p := J.Dims()
	l := &lm{
		x: x, r: r, cost: cost, J: J,
		g:      mat.NewVecDense(p, nil),
		lambda: 1e-3, nu: 2,
		xNew:  make([]float64, p),
		rNew:  make([]float64, m),
		M:     mat.NewSymDense(p, nil),
		delta: mat.NewVecDense(p, nil),
	}
	l.normal()
	for i := range p {
		l.maxDiag = max(l.maxDiag, l.A.At(i, i))
	}
	return l
}

// normal forms the normal equations at the current point,
//
//	A = JᵀJ,  g = Jᵀr.
//
// Cost: O(m·p²).
func (l *lm) normal() {
	m, _ := l.J.Dims()
	l.A.SymOuterK(1, l.J.T())
	l.g.MulVec(l.J.T(), mat.NewVecDense(m, l.r))
}

// scale is Marquardt's scaling D_ii of variable i: the diagonal (JᵀJ)_ii,
// kept above 1e-12 of the largest diagonal at the start (and above 1e-300)
// so that a variable the residuals do not see is still damped.
func (l *lm) scale(i int) float64 {
	return max(l.A.At(i, i), 1e-12*l.maxDiag, 1e-300)
}

// solve solves the damped normal equations with Marquardt's scaling,
//
//	(JᵀJ + λ·D)·delta = Jᵀr,  D = diag(scale),
//
// by Cholesky into delta (the step taken is −delta). It returns false when
// the matrix is not positive definite to rounding. Cost: O(p³).
func (l *lm) solve() bool {
	_, p := l.J.Dims()
	l.M.CopySym(&l.A)
	for i := range p {
		l.M.SetSym(i, i, l.A.At(i, i)+l.lambda*l.scale(i))
	}
	if !l.chol.Factorize(l.M) {
		return false
	}
	return l.chol.SolveVecTo(l.delta, l.g) == nil
}

// trial sets the trial point xNew = x − delta and reports whether the step
// is small: below 1e-9 in every component, relative to the component
// (absolute below 1).
func (l *lm) trial() (small bool) {
	small = true
	for i := range l.x {
		l.xNew[i] = l.x[i] - l.delta.AtVec(i)
		if math.Abs(l.delta.AtVec(i)) > 1e-9*max(math.Abs(l.x[i]), 1) {
			small = false
		}
	}
	return small
}

// raise increases the damping after a step that failed: λ ← λν, ν ← 2ν.
func (l *lm) raise() {
	l.lambda *= l.nu
	l.nu *= 2
}

// accept moves to the trial point, whose cost costNew is below the current
// one, and lowers the damping by Nielsen's rule
//
//	λ ← λ·max(⅓, 1 − (2ρ − 1)³),  ν ← 2,
//
// with ρ the gain ratio of the actual to the predicted reduction of the
// cost (Madsen, Nielsen & Tingleff 2004, §3.2, Algorithm 3.16); the
// predicted reduction of the quadratic model is ½hᵀ(λDh − g) with h =
// −delta the step taken. It returns the actual reduction. The Jacobian and
// the normal equations are left for the caller to update.
func (l *lm) accept(costNew float64) (drop float64) {
	var pred float64
	for i := range l.x {
		pred += 0.5 * l.delta.AtVec(i) * (l.lambda*l.scale(i)*l.delta.AtVec(i) + l.g.AtVec(i))
	}
	drop = l.cost - costNew
	rho := drop / max(pred, 1e-300)
	copy(l.x, l.xNew)
	copy(l.r, l.rNew)
	l.cost = costNew
	l.lambda *= max(1.0/3, 1-math.Pow(2*rho-1, 3))
	l.nu = 2
	return drop
}

// converged applies Minimize's convergence tests after an accepted step
// that lowered the cost by drop and was small or not (see trial), with the
// normal equations already at the new point. It returns the test met, or ""
// if none.
func (l *lm) converged(drop float64, small bool) string {
	if drop <= 1e-10*l.cost {
		return "the last step lowered the cost by less than a relative 1e-10"
	}
	if small {
		return "the last step was below a relative 1e-9 in every variable"
	}
	var gmax float64
	for i := range l.x {
		gmax = max(gmax, math.Abs(l.g.AtVec(i)))
	}
	if gmax <= 1e-14*max(l.cost, 1e-300) {
		return "the gradient vanishes"
	}
	return ""
}

// costOf evaluates f at x into r and returns ½‖r‖², +Inf when r is not
// finite.
func costOf(f Func, r, x []float64) float64 {
	f(r, x)
	var c float64
	for _, v := range r {
		c += v * v
	}
	if math.IsNaN(c) || math.IsInf(c, 0) {
		return math.Inf(1)
	}
	return c / 2
}
