package lsq

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"sync/atomic"
	"testing"

	"gonum.org/v1/gonum/mat"
)

func TestMinimizeRosenbrock(t *testing.T) {
	// Rosenbrock as least squares, r = (10(x2 − x1²), 1 − x1): minimum at
	// (1, 1) (analytic), from the classical start (−1.2, 1) (Moré, Garbow &
	// Hillstrom, ACM TOMS 7:17, 1981, problem 1).
	f := func(dst, x []float64) {
		dst[0] = 10 * (x[1] - x[0]*x[0])
		dst[1] = 1 - x[0]
	}
	for _, central := range []bool{false, true} {
		r := Minimize(context.Background(), f, []float64{-1.2, 1}, 2, Settings{Central: central, Step: 1e-6})
		if r.Status != Converged || math.Abs(r.X[0]-1) > 1e-6 || math.Abs(r.X[1]-1) > 1e-6 {
			t.Errorf("central %v: %v after %d iterations (%v)", central, r.X, r.Iterations, r.Status)
		}
	}
}

// expModel is the synthetic test problem y = a·e^(−b·t) + c, with its
// analytic derivatives.
type expModel struct {
	t, y []float64
}

func (e *expModel) value(p []float64, t float64) float64 { return p[0]*math.Exp(-p[1]*t) + p[2] }

// jacobian returns ∂y/∂(a, b, c) at p (analytic).
func (e *expModel) jacobian(p []float64) *mat.Dense {
	J := mat.NewDense(len(e.t), 3, nil)
	for i, t := range e.t {
		x := math.Exp(-p[1] * t)
		J.Set(i, 0, x)
		J.Set(i, 1, -p[0]*t*x)
		J.Set(i, 2, 1)
	}
	return J
}

func (e *expModel) residuals(dst, p []float64) {
	for i, t := range e.t {
		dst[i] = e.value(p, t) - e.y[i]
	}
}

// newExp samples a = 5, b = 0.4, c = 1 at 30 times in [0, 12] with
// Gaussian noise of standard deviation sigma from seed.
func newExp(seed uint64, sigma float64) *expModel {
	rng := rand.New(rand.NewPCG(seed, 99))
	e := &expModel{}
	truth := []float64{5, 0.4, 1}
	for i := range 30 {
		t := 12 * float64(i) / 29
		e.t = append(e.t, t)
		e.y = append(e.y, e.value(truth, t)+sigma*rng.NormFloat64())
	}
	return e
}

var expTruth = []float64{5, 0.4, 1}

// expVars: a linear and free, b logarithmic and bounded, c linear with a
// lower bound only; starts well away from the truth.
func expVars() []Var {
	inf := math.Inf(1)
	return []Var{
		{Start: 3, Lo: -inf, Hi: inf},
		{Start: 1, Lo: 0.01, Hi: 10, Log: true},
		{Start: 0.5, Lo: -2, Hi: inf},
	}
}

func fitExp(t *testing.T, e *expModel, vars []Var, s Settings) *Estimate {
	t.Helper()
	est, err := Fit(context.Background(), Problem{Vars: vars, M: len(e.t), Residuals: e.residuals}, s)
	if err != nil {
		t.Fatal(err)
	}
	if est.Status != Converged {
		t.Fatalf("status %v after %d iterations", est.Status, est.Iterations)
	}
	return est
}

func TestFitNoiseFreeRecovery(t *testing.T) {
	// Data without noise: the fit returns the values that made them.
	est := fitExp(t, newExp(1, 0), expVars(), Settings{})
	for i, want := range expTruth {
		if math.Abs(est.Value[i]-want) > 1e-7*max(1, want) {
			t.Errorf("parameter %d: %.12g, want %g", i, est.Value[i], want)
		}
	}
}

func TestFitStraightLineClosedForm(t *testing.T) {
	// A model linear in its parameters, y = b0 + b1·x: the least-squares
	// estimates and their standard errors have closed forms (Draper &
	// Smith, Applied Regression Analysis, 3rd ed., 1998, ch. 1):
	//
	//	b1 = Sxy/Sxx, b0 = ȳ − b1·x̄, s² = SSR/(n − 2),
	//	se(b1) = s/√Sxx, se(b0) = s·√(1/n + x̄²/Sxx),
	//	interval b ± t(n − 2, 0.975)·se(b).
	//
	// The fit must give the same with any transformation of the unknowns
	// (here: both free; b1 bounded; b0 logarithmic with an upper bound).
	x := []float64{1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12}
	y := []float64{3.1, 4.8, 7.2, 8.9, 11.3, 12.7, 15.2, 16.8, 19.4, 20.9, 23.2, 24.7}
	n := float64(len(x))
	var mx, my float64
	for i := range x {
		mx += x[i] / n
		my += y[i] / n
	}
	var sxx, sxy float64
	for i := range x {
		sxx += (x[i] - mx) * (x[i] - mx)
		sxy += (x[i] - mx) * (y[i] - my)
	}
	b1 := sxy / sxx
	b0 := my - b1*mx
	var ssr float64
	for i := range x {
		d := y[i] - b0 - b1*x[i]
		ssr += d * d
	}
	s := math.Sqrt(ssr / (n - 2))
	se1 := s / math.Sqrt(sxx)
	se0 := s * math.Sqrt(1/n+mx*mx/sxx)
	tq := TQuantile(0.95, len(x)-2)
	res := func(dst, p []float64) {
		for i := range x {
			dst[i] = p[0] + p[1]*x[i] - y[i]
		}
	}
	inf := math.Inf(1)
	for _, c := range []struct {
		name string
		vars []Var
		// linear: the intervals are symmetric in the value
		linear bool
	}{
		{"free", []Var{{Start: 0, Lo: -inf, Hi: inf, Scale: 1}, {Start: 1, Lo: -inf, Hi: inf}}, true},
		{"bounded", []Var{{Start: 0, Lo: -inf, Hi: inf, Scale: 1}, {Start: 1, Lo: 0, Hi: 10}}, true},
		{"log", []Var{{Start: 2, Lo: 0, Hi: 50, Log: true}, {Start: 1, Lo: -inf, Hi: 10}}, false},
	} {
		t.Run(c.name, func(t *testing.T) {
			est, err := Fit(context.Background(), Problem{Vars: c.vars, M: len(x), Residuals: res}, Settings{})
			if err != nil {
				t.Fatal(err)
			}
			if est.Status != Converged {
				t.Fatalf("status %v", est.Status)
			}
			// The finite-difference Jacobian (step 1e-7 in the scaled
			// variables) is exact for the linear model up to rounding of
			// order 1e-9 relative: 1e-6 is ample.
			for _, k := range []struct {
				name     string
				got, exp float64
			}{
				{"b0", est.Value[0], b0}, {"b1", est.Value[1], b1},
				{"se(b0)", est.SE[0], se0}, {"se(b1)", est.SE[1], se1},
				{"s", est.Sigma, s},
			} {
				if math.Abs(k.got-k.exp) > 1e-6*math.Abs(k.exp) {
					t.Errorf("%s = %.10g, closed form %.10g", k.name, k.got, k.exp)
				}
			}
			if est.DoF != len(x)-2 {
				t.Errorf("degrees of freedom %d, want %d", est.DoF, len(x)-2)
			}
			if c.linear {
				if math.Abs(est.Low[1]-(b1-tq*se1)) > 1e-6 || math.Abs(est.High[1]-(b1+tq*se1)) > 1e-6 {
					t.Errorf("interval of b1 [%g, %g], closed form %g ± %g", est.Low[1], est.High[1], b1, tq*se1)
				}
			} else {
				// Symmetric in ln b0, with se(ln b0) = se(b0)/b0 (delta method).
				h := tq * se0 / b0
				if math.Abs(est.Low[0]-b0*math.Exp(-h)) > 1e-6 || math.Abs(est.High[0]-b0*math.Exp(h)) > 1e-6 {
					t.Errorf("interval of b0 [%g, %g], want %g·exp(±%g)", est.Low[0], est.High[0], b0, h)
				}
			}
			// Correlation of b0 and b1: −x̄/√(x̄² + Sxx/n) (from the
			// closed-form covariance −x̄·s²/Sxx).
			rho := -mx / math.Sqrt(mx*mx+sxx/n)
			if math.Abs(est.Corr.At(0, 1)-rho) > 1e-6 {
				t.Errorf("correlation %g, closed form %g", est.Corr.At(0, 1), rho)
			}
		})
	}
}

func TestTQuantile(t *testing.T) {
	// Closed forms of Student's t quantile Q(p): ν = 1 (Cauchy) Q =
	// tan(π(p − ½)); ν = 2: Q = (2p − 1)/√(2p(1 − p)) (analytic, from the
	// distribution functions ½ + atan(t)/π and ½ + t/(2√(2 + t²))).
	p := 0.975
	if got, want := TQuantile(0.95, 1), math.Tan(math.Pi*(p-0.5)); math.Abs(got-want) > 1e-9*want {
		t.Errorf("ν = 1: %.12g, want %.12g", got, want)
	}
	if got, want := TQuantile(0.95, 2), (2*p-1)/math.Sqrt(2*p*(1-p)); math.Abs(got-want) > 1e-9*want {
		t.Errorf("ν = 2: %.12g, want %.12g", got, want)
	}
	// Table values t(0.975; ν), three decimals (from memory of the
	// standard table, e.g. Draper & Smith, Applied Regression Analysis,
	// percentage points of the t distribution): 10 → 2.228, 30 → 2.042,
	// and the normal limit 1.960.
	for _, c := range []struct {
		dof  int
		want float64
	}{{10, 2.228}, {30, 2.042}, {100000, 1.960}} {
		if got := TQuantile(0.95, c.dof); math.Abs(got-c.want) > 0.0005 {
			t.Errorf("ν = %d: %.5f, table %.3f", c.dof, got, c.want)
		}
	}
	if !math.IsNaN(TQuantile(0.95, 0)) {
		t.Error("ν = 0: want NaN")
	}
}

func TestFitStandardErrorsAgainstIndependentCovariance(t *testing.T) {
	// The nonlinear exponential with noise: the standard errors of Fit
	// (forward differences in the transformed variables, delta method)
	// must equal √diag(s²(JᵀJ)⁻¹) computed here in the physical
	// parameters, once with the analytic Jacobian and once with a central
	// finite-difference Jacobian of step 1e-6 (Bates & Watts, Nonlinear
	// Regression Analysis and Its Applications, 1988, ch. 2).
	e := newExp(7, 0.05)
	est := fitExp(t, e, expVars(), Settings{})
	p := est.Value
	central := mat.NewDense(len(e.t), 3, nil)
	r1, r2 := make([]float64, len(e.t)), make([]float64, len(e.t))
	for k := range 3 {
		h := 1e-6 * math.Abs(p[k])
		q := append([]float64(nil), p...)
		q[k] = p[k] + h
		e.residuals(r1, q)
		q[k] = p[k] - h
		e.residuals(r2, q)
		for i := range r1 {
			central.Set(i, k, (r1[i]-r2[i])/(2*h))
		}
	}
	e.residuals(r1, p)
	var ssr float64
	for _, v := range r1 {
		ssr += v * v
	}
	s2 := ssr / float64(len(e.t)-3)
	for name, J := range map[string]*mat.Dense{"analytic": e.jacobian(p), "central differences": central} {
		var A, inv mat.Dense
		A.Mul(J.T(), J)
		if err := inv.Inverse(&A); err != nil {
			t.Fatal(err)
		}
		for k := range 3 {
			want := math.Sqrt(s2 * inv.At(k, k))
			// Forward differences of step 1e-7 relative: about 1e-6
			// relative error in J; 1e-4 is ample and still far below a
			// wrong formula (a missing factor dv/du is O(1)).
			if math.Abs(est.SE[k]-want) > 1e-4*want {
				t.Errorf("%s: se[%d] = %.8g, independent %.8g", name, k, est.SE[k], want)
			}
			for j := range 3 {
				c := s2 * inv.At(k, j)
				if math.Abs(est.Cov.At(k, j)-c) > 1e-4*math.Sqrt(s2*inv.At(k, k)*s2*inv.At(j, j)) {
					t.Errorf("%s: cov[%d][%d] = %.8g, independent %.8g", name, k, j, est.Cov.At(k, j), c)
				}
			}
		}
	}
}

func TestFitIntervalCoverage(t *testing.T) {
	// Coverage of the 95 % intervals over 1000 noisy data sets of the
	// exponential: for a model this close to linear in its parameters the
	// t intervals hold the true value in 95 % of the sets (Bates & Watts
	// 1988, ch. 2). With 1000 sets the observed share has a binomial
	// standard deviation of 0.0069; [0.93, 0.97] is ±2.9 of them. The
	// spread of the estimates over the sets must match the mean standard
	// error within 10 % (the sampling error of a standard deviation from
	// 1000 values is 2.2 %).
	const sets = 1000
	var hits [3]int
	var sum, sum2, seSum [3]float64
	for seed := range uint64(sets) {
		est := fitExp(t, newExp(seed+1, 0.05), expVars(), Settings{})
		for k := range 3 {
			if est.Low[k] <= expTruth[k] && expTruth[k] <= est.High[k] {
				hits[k]++
			}
			sum[k] += est.Value[k]
			sum2[k] += est.Value[k] * est.Value[k]
			seSum[k] += est.SE[k]
		}
	}
	for k := range 3 {
		cov := float64(hits[k]) / sets
		mean := sum[k] / sets
		sd := math.Sqrt((sum2[k] - sets*mean*mean) / (sets - 1))
		se := seSum[k] / sets
		t.Logf("parameter %d: coverage %.3f, spread %.4g, mean standard error %.4g", k, cov, sd, se)
		if cov < 0.93 || cov > 0.97 {
			t.Errorf("parameter %d: coverage %.3f outside [0.93, 0.97]", k, cov)
		}
		if math.Abs(sd/se-1) > 0.1 {
			t.Errorf("parameter %d: spread of the estimates %.4g, mean standard error %.4g", k, sd, se)
		}
	}
}

func TestFitAtBound(t *testing.T) {
	// The data want b = 0.4 but the bounds allow at most 0.2: the fit
	// stops at the bound and says so.
	vars := expVars()
	vars[1] = Var{Start: 0.1, Lo: 0.01, Hi: 0.2, Log: true}
	e := newExp(3, 0.05)
	est, err := Fit(context.Background(), Problem{Vars: vars, M: len(e.t), Residuals: e.residuals}, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if !est.AtBound[1] || math.Abs(est.Value[1]-0.2) > 1e-6 || !math.IsNaN(est.SE[1]) {
		t.Errorf("b = %g (at bound %v, se %g), want the bound 0.2 with no standard error", est.Value[1], est.AtBound[1], est.SE[1])
	}
	if est.AtBound[0] || est.AtBound[2] {
		t.Errorf("a and c are not at a bound: %v", est.AtBound)
	}
	// a and c get the statistics of a fit with b fixed at 0.2: the same
	// values, standard errors and correlation as fitting a and c alone
	// (on 30 − 2 degrees of freedom).
	fixed, err := Fit(context.Background(), Problem{Vars: []Var{vars[0], vars[2]}, M: len(e.t), Residuals: func(dst, p []float64) {
		e.residuals(dst, []float64{p[0], 0.2, p[1]})
	}}, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	for k, i := range []int{0, 2} {
		if math.Abs(est.Value[i]/fixed.Value[k]-1) > 1e-5 || math.Abs(est.SE[i]/fixed.SE[k]-1) > 1e-3 {
			t.Errorf("parameter %d: %g ± %g at the bound, %g ± %g with b fixed", i, est.Value[i], est.SE[i], fixed.Value[k], fixed.SE[k])
		}
	}
	if est.DoF != 28 || math.Abs(est.Corr.At(0, 2)-fixed.Corr.At(0, 1)) > 1e-3 || !math.IsNaN(est.Corr.At(0, 1)) {
		t.Errorf("DoF %d, correlation %g (b fixed: %g), with b %g", est.DoF, est.Corr.At(0, 2), fixed.Corr.At(0, 1), est.Corr.At(0, 1))
	}
}

func TestFitNotIdentifiable(t *testing.T) {
	// y = (a + b)·x determines a + b only: JᵀJ is singular, and the worst
	// determined combination is a − b (equal scales: (1, −1)/√2).
	x := []float64{1, 2, 3, 4, 5, 6}
	y := []float64{2.1, 3.9, 6.2, 7.8, 10.1, 12.0}
	res := func(dst, p []float64) {
		for i := range x {
			dst[i] = (p[0]+p[1])*x[i] - y[i]
		}
	}
	inf := math.Inf(1)
	est, err := Fit(context.Background(), Problem{Vars: []Var{{Start: 1, Lo: -inf, Hi: inf}, {Start: 1, Lo: -inf, Hi: inf}},
		M: len(x), Residuals: res}, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if est.Identifiable && math.Abs(est.Corr.At(0, 1)) < 0.999 {
		t.Errorf("identifiable with correlation %g", est.Corr.At(0, 1))
	}
	if est.Condition > 1e-6 {
		t.Errorf("condition %g, want ~0", est.Condition)
	}
	if math.Abs(est.Null[0]-1/math.Sqrt2) > 1e-6 || math.Abs(est.Null[1]+1/math.Sqrt2) > 1e-6 {
		t.Errorf("null combination %v, want (1, −1)/√2", est.Null)
	}
	if s := est.Value[0] + est.Value[1]; math.Abs(s-2.0) > 0.05 {
		t.Errorf("a + b = %g, want about 2", s)
	}
}

func TestFitWeights(t *testing.T) {
	// Weights w_i: the weighted fit equals the unweighted fit of √w_i·r_i
	// (the definition), and scaling every weight by 4 changes neither the
	// values nor the standard errors (weights are relative).
	e := newExp(5, 0.05)
	w := make([]float64, len(e.t))
	for i := range w {
		w[i] = 1 + float64(i%3)
	}
	fit := func(w []float64, res func(dst, p []float64)) *Estimate {
		est, err := Fit(context.Background(), Problem{Vars: expVars(), M: len(e.t), Residuals: res, Weights: w}, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		return est
	}
	a := fit(w, e.residuals)
	b := fit(nil, func(dst, p []float64) {
		e.residuals(dst, p)
		for i := range dst {
			dst[i] *= math.Sqrt(w[i])
		}
	})
	w4 := make([]float64, len(w))
	for i := range w {
		w4[i] = 4 * w[i]
	}
	c := fit(w4, e.residuals)
	for k := range 3 {
		if math.Abs(a.Value[k]-b.Value[k]) > 1e-9*math.Abs(b.Value[k]) || math.Abs(a.SE[k]-b.SE[k]) > 1e-6*b.SE[k] {
			t.Errorf("%d: weighted %g ± %g, pre-weighted %g ± %g", k, a.Value[k], a.SE[k], b.Value[k], b.SE[k])
		}
		if math.Abs(a.Value[k]-c.Value[k]) > 1e-6*math.Abs(a.Value[k]) || math.Abs(a.SE[k]-c.SE[k]) > 1e-4*a.SE[k] {
			t.Errorf("%d: weights ×4 changed %g ± %g to %g ± %g", k, a.Value[k], a.SE[k], c.Value[k], c.SE[k])
		}
	}
	if _, err := Fit(context.Background(), Problem{Vars: expVars(), M: len(e.t), Residuals: e.residuals, Weights: make([]float64, len(e.t))}, Settings{}); err == nil {
		t.Error("zero weights: no error")
	}
}

func TestWorkersGiveTheSameResult(t *testing.T) {
	// The Jacobian's columns are independent: computing them on 3 workers
	// gives bitwise the same fit as one after the other.
	e := newExp(11, 0.05)
	one := fitExp(t, e, expVars(), Settings{})
	three := fitExp(t, e, expVars(), Settings{Workers: 3})
	for k := range 3 {
		if one.Value[k] != three.Value[k] || one.SE[k] != three.SE[k] {
			t.Errorf("%d: %v ± %v on one worker, %v ± %v on three", k, one.Value[k], one.SE[k], three.Value[k], three.SE[k])
		}
	}
	if one.Evals != three.Evals || one.Iterations != three.Iterations {
		t.Errorf("evaluations %d/%d, iterations %d/%d", one.Evals, three.Evals, one.Iterations, three.Iterations)
	}
}

func TestInterrupted(t *testing.T) {
	// Cancelled after 12 evaluations: the fit stops, reports Interrupted,
	// keeps the best accepted point (no worse than the start) and calls
	// the residual function no more.
	e := newExp(2, 0.05)
	ctx, cancel := context.WithCancel(context.Background())
	var calls, after atomic.Int64
	res := func(dst, p []float64) {
		if ctx.Err() != nil {
			after.Add(1)
		}
		if calls.Add(1) == 12 {
			cancel()
		}
		e.residuals(dst, p)
	}
	est, err := Fit(ctx, Problem{Vars: expVars(), M: len(e.t), Residuals: res}, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if est.Status != Interrupted {
		t.Fatalf("status %v, want interrupted", est.Status)
	}
	if after.Load() != 0 {
		t.Errorf("%d evaluations after the cancellation", after.Load())
	}
	r0 := make([]float64, len(e.t))
	start := []float64{expVars()[0].Start, expVars()[1].Start, expVars()[2].Start}
	e.residuals(r0, start)
	var c0 float64
	for _, v := range r0 {
		c0 += v * v
	}
	if est.SSR > c0 {
		t.Errorf("best point SSR %g above the start's %g", est.SSR, c0)
	}
	// Its residuals are those of its values.
	e.residuals(r0, est.Value)
	for i := range r0 {
		if math.Abs(r0[i]-est.Residuals[i]) > 1e-12 {
			t.Fatalf("residual %d: %g reported, %g at the reported values", i, est.Residuals[i], r0[i])
		}
	}
}

func TestNotFiniteRegionIsAvoided(t *testing.T) {
	// The model cannot be evaluated for b > 0.6 (NaN residuals, as a
	// solver run that fails): a start at 0.55 next to that region still
	// converges to b = 0.4 (steps into the region are rejected, and the
	// Jacobian column is taken backward there).
	e := newExp(4, 0)
	res := func(dst, p []float64) {
		if p[1] > 0.6 {
			for i := range dst {
				dst[i] = math.NaN()
			}
			return
		}
		e.residuals(dst, p)
	}
	vars := expVars()
	vars[1].Start = 0.6 - 1e-9
	est, err := Fit(context.Background(), Problem{Vars: vars, M: len(e.t), Residuals: res}, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if est.Status != Converged || math.Abs(est.Value[1]-0.4) > 1e-6 {
		t.Errorf("b = %g (%v), want 0.4", est.Value[1], est.Status)
	}
}

func TestVarErrors(t *testing.T) {
	inf := math.Inf(1)
	e := newExp(1, 0)
	for _, c := range []struct {
		name string
		v    Var
	}{
		{"start on the bound", Var{Start: 1, Lo: 1, Hi: 2}},
		{"start above", Var{Start: 3, Lo: 1, Hi: 2}},
		{"bounds reversed", Var{Start: 1.5, Lo: 2, Hi: 1}},
		{"log of zero", Var{Start: 0, Lo: -inf, Hi: inf, Log: true}},
		{"NaN start", Var{Start: math.NaN(), Lo: -inf, Hi: inf}},
	} {
		vars := expVars()
		vars[1] = c.v
		_, err := Fit(context.Background(), Problem{Vars: vars, M: len(e.t), Residuals: e.residuals}, Settings{})
		var ve *VarError
		if err == nil || !errors.As(err, &ve) || ve.Index != 1 {
			t.Errorf("%s: %v, want a VarError on unknown 1", c.name, err)
		}
	}
	if _, err := Fit(context.Background(), Problem{Vars: expVars(), M: 3, Residuals: e.residuals}, Settings{}); err == nil {
		t.Error("3 residuals for 3 unknowns: no error")
	}
}
