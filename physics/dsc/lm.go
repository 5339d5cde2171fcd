package dsc

import (
	"context"

	"gonum.org/v1/gonum/mat"

	"cureslab/physics/lsq"
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
// m residuals into dst: lsq.Minimize with its defaults (forward-difference
// Jacobian with an absolute step of 1e-7, so x should be scaled to order
// one), at most maxIter iterations. progress, if not nil, is called after
// every accepted step with the iteration count and the cost. A cancelled
// ctx stops it with the best point so far (Converged false, Stopped true).
//
// Cost: see lsq.Minimize.
func levenberg(ctx context.Context, f func(dst, x []float64), x0 []float64, m, maxIter int, progress func(int, float64)) lmResult {
	r := lsq.Minimize(ctx, f, x0, m, lsq.Settings{MaxIter: maxIter, Progress: progress})
	return lmResult{X: r.X, Cost: r.Cost, Residuals: r.Residuals, Jacobian: r.Jacobian,
		Iterations: r.Iterations, Evals: r.Evals, Converged: r.Status == lsq.Converged, Stopped: r.Status == lsq.Interrupted}
}

// covariance returns s²·(JᵀJ)⁻¹ with s² = 2·cost/(m − p): lsq.Covariance.
func covariance(J *mat.Dense, cost float64) (*mat.SymDense, bool) {
	return lsq.Covariance(J, cost)
}
