package dsc

import (
	"context"
	"math"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/mat"
)

// lmResult is the outcome of levenberg.
type lmResult struct {
	X          []float64
	Cost       float64    // ½‖r‖² at X
	Residuals  []float64  // r at X
	Jacobian   *mat.Dense // at X
	Iterations int
	Evals      int
	Converged  bool
	Stopped    bool // by a cancelled context
}

// levenberg minimises ½‖r(x)‖² over x from x0, where f(dst, x) writes the
// m residuals into dst.
//
// Method: Levenberg–Marquardt with Marquardt's diagonal scaling (the damped
// normal equations (JᵀJ + λ·diag JᵀJ)δ = −Jᵀr solved by Cholesky) and
// Nielsen's update of λ from the gain ratio (Madsen, Nielsen & Tingleff,
// Methods for Non-Linear Least Squares Problems, 2nd ed., 2004, §3.2,
// Algorithm 3.16). J by forward differences (gonum diff/fd) with an
// absolute step of 1e-7, so x should be scaled to order one. A step whose
// residuals are not finite is rejected like one that raises the cost.
//
// Stops when an accepted step lowers the cost by less than a relative
// 1e-10, when the step is below 1e-9 in every component (relative to the
// component, absolute below 1), when the gradient vanishes, or after
// maxIter iterations (Converged false). progress, if not nil, is called
// after every iteration with the iteration count and the cost. A cancelled
// ctx, checked before every iteration, stops it with the best point so far
// (Converged false, Stopped true).
//
// Cost: (len(x) + 1 + rejected steps) evaluations of f per iteration.
func levenberg(ctx context.Context, f func(dst, x []float64), x0 []float64, m, maxIter int, progress func(int, float64)) lmResult {
	p := len(x0)
	x := append([]float64(nil), x0...)
	r := make([]float64, m)
	rNew := make([]float64, m)
	xNew := make([]float64, p)
	evals := 0
	eval := func(dst, x []float64) float64 {
		evals++
		f(dst, x)
		var c float64
		for _, v := range dst {
			c += v * v
		}
		if !finite(c) {
			return math.Inf(1)
		}
		return c / 2
	}
	cost := eval(r, x)
	J := mat.NewDense(m, p, nil)
	jac := func() {
		fd.Jacobian(J, func(y, x []float64) { evals++; f(y, x) }, x, &fd.JacobianSettings{
			Formula: fd.Forward, Step: 1e-7, OriginValue: r,
		})
	}
	res := lmResult{}
	if math.IsInf(cost, 1) {
		res.X, res.Cost, res.Residuals, res.Evals = x, cost, r, evals
		jac()
		res.Jacobian = J
		return res
	}
	jac()
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
	iter := 0
	for iter < maxIter {
		if ctx.Err() != nil {
			res.Stopped = true
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
		costNew := eval(rNew, xNew)
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
			jac()
			normal()
			if progress != nil {
				progress(iter, cost)
			}
			if drop <= 1e-10*cost || small {
				res.Converged = true
				break
			}
			var gmax float64
			for i := range p {
				gmax = max(gmax, math.Abs(g.AtVec(i)))
			}
			if gmax <= 1e-14*max(cost, 1e-300) {
				res.Converged = true
				break
			}
		} else {
			if small {
				res.Converged = true
				break
			}
			lambda *= nu
			nu *= 2
			if lambda > 1e16 {
				res.Converged = true // no step lowers the cost: a minimum to rounding
				break
			}
		}
	}
	res.X, res.Cost, res.Residuals, res.Jacobian = x, cost, r, J
	res.Iterations, res.Evals = iter, evals
	return res
}

// covariance returns s²·(JᵀJ)⁻¹ with s² = 2·cost/(m − p), the asymptotic
// covariance of least-squares estimates (Bates & Watts, Nonlinear
// Regression Analysis and Its Applications, 1988, §2.3); ok is false when
// JᵀJ is singular or m ≤ p.
func covariance(J *mat.Dense, cost float64) (*mat.SymDense, bool) {
	m, p := J.Dims()
	if m <= p {
		return nil, false
	}
	var A mat.SymDense
	A.SymOuterK(1, J.T())
	var chol mat.Cholesky
	if !chol.Factorize(&A) {
		return nil, false
	}
	var inv mat.SymDense
	if err := chol.InverseTo(&inv); err != nil {
		return nil, false
	}
	inv.ScaleSym(2*cost/float64(m-p), &inv)
	return &inv, true
}
