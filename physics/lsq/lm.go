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
	rNew := make([]float64, m)
	xNew := make([]float64, p)
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
	var A mat.SymDense
	g := mat.NewVecDense(p, nil)
	normal := func() {
		A.SymOuterK(1, J.T())
		g.MulVec(J.T(), mat.NewVecDense(m, r))
	}
	normal()
	maxDiag := 0.0
	for i := range p {
		maxDiag = max(maxDiag, A.At(i, i))
	}
	lambda := 1e-3
	nu := 2.0
	M := mat.NewSymDense(p, nil)
	var chol mat.Cholesky
	delta := mat.NewVecDense(p, nil)
	status := IterationLimit
	iter := 0
	for iter < s.MaxIter {
		if ctx.Err() != nil {
			status = Interrupted
			break
		}
		iter++
		// Damped normal equations with Marquardt's scaling.
		M.CopySym(&A)
		for i := range p {
			d := max(A.At(i, i), 1e-12*maxDiag, 1e-300)
			M.SetSym(i, i, A.At(i, i)+lambda*d)
		}
		if !chol.Factorize(M) {
			lambda *= nu
			nu *= 2
			continue
		}
		if err := chol.SolveVecTo(delta, g); err != nil {
			lambda *= nu
			nu *= 2
			continue
		}
		small := true
		for i := range p {
			xNew[i] = x[i] - delta.AtVec(i)
			if math.Abs(delta.AtVec(i)) > 1e-9*max(math.Abs(x[i]), 1) {
				small = false
			}
		}
		costNew := costOf(f, rNew, xNew)
		res.Evals++
		if ctx.Err() != nil {
			status = Interrupted
			break
		}
		// Predicted reduction of the quadratic model: ½δᵀ(λDδ + g) with
		// δ the step taken (−delta).
		var pred float64
		for i := range p {
			d := max(A.At(i, i), 1e-12*maxDiag, 1e-300)
			pred += 0.5 * delta.AtVec(i) * (lambda*d*delta.AtVec(i) + g.AtVec(i))
		}
		if costNew < cost {
			drop := cost - costNew
			rho := drop / max(pred, 1e-300)
			copy(x, xNew)
			copy(r, rNew)
			cost = costNew
			lambda *= max(1.0/3, 1-math.Pow(2*rho-1, 3))
			nu = 2
			if !jac.at(ctx, J, x, r) {
				J = nil
				status = Interrupted
				break
			}
			normal()
			if s.Progress != nil {
				s.Progress(iter, cost)
			}
			if drop <= 1e-10*cost {
				status, res.Reason = Converged, "the last step lowered the cost by less than a relative 1e-10"
				break
			}
			if small {
				status, res.Reason = Converged, "the last step was below a relative 1e-9 in every variable"
				break
			}
			var gmax float64
			for i := range p {
				gmax = max(gmax, math.Abs(g.AtVec(i)))
			}
			if gmax <= 1e-14*max(cost, 1e-300) {
				status, res.Reason = Converged, "the gradient vanishes"
				break
			}
		} else {
			if small {
				status, res.Reason = Converged, "the step was below a relative 1e-9 in every variable"
				break
			}
			lambda *= nu
			nu *= 2
			if lambda > 1e16 {
				// No step lowers the cost: a minimum to rounding.
				status, res.Reason = Converged, "no step lowers the cost"
				break
			}
		}
	}
	res.Iterations = iter
	return finish(status, J, cost)
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
