package lsq

import (
	"context"
	"math"
	"sync"
	"sync/atomic"

	"gonum.org/v1/gonum/mat"
)

// jacobian computes finite-difference Jacobians of f, column by column,
// with up to s.Workers columns at a time.
type jacobian struct {
	f       Func
	m, p    int
	step    float64
	central bool
	workers int
	evals   int
	// Per-worker buffers, kept between calls.
	xs, ys, y2s [][]float64
}

func newJacobian(f Func, m, p int, s Settings) *jacobian {
	w := min(max(s.Workers, 1), p)
	j := &jacobian{f: f, m: m, p: p, step: s.Step, central: s.Central, workers: w}
	for range w {
		j.xs = append(j.xs, make([]float64, p))
		j.ys = append(j.ys, make([]float64, m))
		j.y2s = append(j.y2s, make([]float64, m))
	}
	return j
}

// at writes ∂r/∂x at x into J, where r0 = r(x):
//
//	forward:  J[:, k] = (r(x + h·e_k) − r0)·(1/h)
//	central:  J[:, k] = (r(x + h·e_k) − r(x − h·e_k))/(2h)
//
// A forward column that is not finite is taken backward, (r0 − r(x −
// h·e_k))·(1/h); one that is still not finite is left NaN (the normal
// equations then fail to factorise and the step is damped).
//
// Method: finite differences (e.g. Nocedal & Wright, Numerical
// Optimization, 2nd ed., 2006, §8.1), with the forward formula evaluated in
// the same order as gonum's diff/fd.Jacobian so that a sequential Jacobian
// is bitwise the same as one from fd. Columns are independent, so they are
// shared among the workers; the result does not depend on their number.
//
// It returns false, leaving J partly written, when ctx is done.
//
// Cost: p evaluations of f (2p central), plus one per backward retry.
func (j *jacobian) at(ctx context.Context, J *mat.Dense, x, r0 []float64) bool {
	var evals atomic.Int64
	column := func(w, k int) {
		xw, y, y2 := j.xs[w], j.ys[w], j.y2s[w]
		copy(xw, x)
		xw[k] += j.step
		j.f(y, xw)
		evals.Add(1)
		if j.central {
			copy(xw, x)
			xw[k] -= j.step
			j.f(y2, xw)
			evals.Add(1)
			for i := range y {
				J.Set(i, k, (y[i]-y2[i])/(2*j.step))
			}
			return
		}
		inv := 1 / j.step
		ok := true
		for i := range y {
			v := (y[i] - r0[i]) * inv
			if math.IsNaN(v) || math.IsInf(v, 0) {
				ok = false
			}
			J.Set(i, k, v)
		}
		if ok || ctx.Err() != nil {
			return
		}
		copy(xw, x)
		xw[k] -= j.step
		j.f(y, xw)
		evals.Add(1)
		for i := range y {
			J.Set(i, k, (r0[i]-y[i])*inv)
		}
	}
	if j.workers == 1 {
		for k := range j.p {
			if ctx.Err() != nil {
				break
			}
			column(0, k)
		}
	} else {
		var wg sync.WaitGroup
		var next atomic.Int64
		for w := range j.workers {
			wg.Add(1)
			go func() {
				defer wg.Done()
				for {
					k := int(next.Add(1) - 1)
					if k >= j.p || ctx.Err() != nil {
						return
					}
					column(w, k)
				}
			}()
		}
		wg.Wait()
	}
	j.evals += int(evals.Load())
	return ctx.Err() == nil
}
