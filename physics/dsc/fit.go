package dsc

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sort"

	"cureslab/physics"
)

// Models that Fit can fit, named as in a case file.
const (
	NthOrder      = "nth-order"
	Autocatalytic = "autocatalytic"
)

// FitSpec chooses what Fit fits. The zero value of a field means its
// default.
type FitSpec struct {
	Model     string // NthOrder, Autocatalytic or Isoconversional (required)
	Diffusion bool   // also fit the Chern–Poehlein diffusion factor
	// MaxIter bounds the Levenberg–Marquardt iterations of each start;
	// default 200.
	MaxIter int
	// Progress, if not nil, is called after every iteration with the
	// iteration count and the RMS residual (fraction of the peak rate).
	Progress func(iter int, rms float64)
}

// Param is a fitted parameter with its standard error, in SI units.
type Param struct {
	Name  string // as in a case file: "A1", "E1", "m", "C", "alpha_cT"; "ln A1" for the log of A1
	Value float64
	SE    float64 // NaN when the parameters are not identifiable from the data
}

// FitCurve is the fit on one curve: the measured and the fitted rate at
// the samples used.
type FitCurve struct {
	Time, Temp []float64 // s, K
	Measured   []float64 // dα/dt as measured (not smoothed), 1/s
	Model      []float64 // dα/dt of the fitted law, 1/s
	RMS        float64   // RMS residual as a fraction of the curve's peak rate
}

// FitResult is a fitted cure law.
type FitResult struct {
	// Cure is the fitted law: Model, and Diffusion when asked for.
	// TotalHeat is left to the caller.
	Cure   physics.Cure
	Params []Param
	// R2 is the coefficient of determination and RMS the root-mean-square
	// residual, both of the weighted residuals (each curve's rates divided
	// by its peak rate, so every curve counts alike).
	R2, RMS    float64
	Points     int // residuals in the fit
	Curves     []FitCurve
	Iterations int // of the best start
	Evals      int // rate-law integrations, all starts together
	Converged  bool
	// Identifiable is false when JᵀJ is singular at the solution: some
	// combination of parameters is not determined by the data, and the
	// standard errors are NaN.
	Identifiable bool
	RefTemp      float64 // K, the reference temperature of the parameterisation
}

// ErrDiffusionData is returned by Fit when the diffusion factor is asked
// for without the isothermal scans that determine it.
var ErrDiffusionData = errors.New("the diffusion factor needs isothermal scans at two or more temperatures whose cure stops short of full cure (α < 0.97): vitrification below the full-cure Tg")

// maxFitPoints bounds the samples of one curve that enter the fit.
const maxFitPoints = 250

// fitData is one curve prepared for the fit.
type fitData struct {
	t, T, y []float64 // fit samples: time, temperature, measured rate
	w       float64   // 1/peak rate
	// Node temperatures of the RK4 stages: 2·sub+1 per interval, shared
	// at the ends; u = Tref/T − 1 at each.
	u   []float64
	dT  []float64 // T − Tref at each node
	sub int
	// tail is the first fit sample of the stretch whose mean heat flow was
	// taken as the baseline of an isothermal curve (-1 for a dynamic one):
	// the model's rates are compared after subtracting their own mean over
	// it, as the measurement's were.
	tail int
}

// fitModel maps the fit variables to rates.
type fitModel struct {
	auto, diff bool
	Tref       float64
	data       []fitData
	m          int     // residuals
	noise      float64 // RMS noise of the weighted measured rates
}

// Fit fits the cure law of spec to all curves at once by nonlinear least
// squares on the rate dα/dt:
//
//	minimise Σ_curves Σ_i [(r_model(t_i) − r_measured(t_i)) / r_peak]²,
//
// where r_model integrates dα/dt = law(T(t), α) along each curve's measured
// temperature from α = 0 at the start of its window, and r_measured is the
// net heat flow over the curve's Total (not smoothed). Dividing by each
// curve's peak rate makes every curve count alike and the noise of the
// residuals roughly uniform. Curves should have been normalised against one
// total heat where that matters (Analyze measures isothermal curves against
// the dynamic total).
//
// Parameterisation (order one, and with the strong correlation of ln A and E
// removed by a reference temperature Tref, the mean of 1/T at the
// isoconversional points): ln k_i(Tref), ln[E_i/(R·Tref)], ln m, ln n; with
// diffusion ln C, αc(Tref) and 100·∂αc/∂T. Logarithms keep the orders and C
// positive, so no bounds are needed.
//
// Start: from the isoconversional data (Friedman points at α = 0.1 … 0.9
// with E fixed at their mean): ln[A·f(α)] = ln r + E/(R·T) is fitted by
// linear least squares as ln A + n·ln(1 − α) (nth-order), or as
// (A1 + A2·α^m)(1 − α)^n for A1, A2 on a grid of m and n (autocatalytic,
// E1 = E2); the diffusion factor starts at C = 30 with αc(T) the straight
// line through the final cure of the isothermal curves. The six best grid
// points are ranked by their cost on the data; the best is refined by
// levenberg (Levenberg–Marquardt), and the next ones (up to three in all)
// only while the result has not converged to an RMS residual within 1.5
// times the noise of the measured rates; the lowest cost wins.
//
// An isothermal curve's baseline is the mean heat flow of its last tenth
// (Process), which holds whatever reaction still creeps on there; the
// model's rates are compared after the same subtraction, so a cure that
// has not quite stopped at the end of the scan biases nothing.
//
// Integration: classical RK4 between consecutive fit samples with two
// steps per interval (the samples are thinned to about 250 per curve, and
// at most 0.01 in α apart), α clamped to [0, 1]; fixed steps keep the cost
// a smooth function of the parameters for the finite-difference Jacobian.
//
// Uncertainties: standard errors from s²·(JᵀJ)⁻¹ (Bates & Watts 1988,
// §2.3), transformed to the physical parameters by the delta method. They
// reflect the noise, not errors of the baseline or the model.
//
// Isoconversional fits nothing: the table of physics.Isoconversional is
// Friedman's E_α and ln[A·f(α)] at IsoconversionalLevels (the iso argument
// is not used; levels whose line gives no positive E are left out), and
// the quality figures (R2, RMS, Curves) are those of that law integrated
// along each curve as above; Params lists "E(α)" and "lnAf(α)" per row
// with the standard errors of the Friedman lines, Converged and
// Identifiable are true, RefTemp is NaN.
//
// Errors: fewer than two curves, no isoconversional data, an unknown model,
// ErrDiffusionData, a diffusion factor asked with Isoconversional. Cost: typically 50 to 500 integrations of all curves
// (well under a second for a few thousand samples).
func Fit(curves []*Curve, iso []IsoPoint, spec FitSpec) (*FitResult, error) {
	return FitContext(context.Background(), curves, iso, spec)
}

// FitContext is Fit that stops when ctx is cancelled: ctx is checked before
// every Levenberg–Marquardt iteration (a few integrations of all curves,
// milliseconds), and the error is then ctx.Err() with no result.
func FitContext(ctx context.Context, curves []*Curve, iso []IsoPoint, spec FitSpec) (*FitResult, error) {
	if spec.Model != NthOrder && spec.Model != Autocatalytic && spec.Model != Isoconversional {
		return nil, fmt.Errorf("dsc: unknown model %q (want %q, %q or %q)", spec.Model, NthOrder, Autocatalytic, Isoconversional)
	}
	if len(curves) < 2 {
		return nil, errors.New("dsc: a model is fitted to two or more scans")
	}
	if spec.Model == Isoconversional {
		return fitIsoconversional(curves, spec)
	}
	// Isoconversional start data.
	E0, Tref, pts := isoStart(curves, iso)
	if len(pts) < 3 || !(E0 > 0) {
		return nil, errors.New("dsc: too few isoconversional points to start the fit")
	}
	fm := &fitModel{auto: spec.Model == Autocatalytic, diff: spec.Diffusion, Tref: Tref}
	var diff0 []float64
	if spec.Diffusion {
		var ok bool
		if diff0, ok = diffusionStart(curves, Tref); !ok {
			return nil, ErrDiffusionData
		}
	}
	for _, c := range curves {
		fm.data = append(fm.data, prepare(c, Tref))
	}
	for _, d := range fm.data {
		fm.m += len(d.t)
	}
	fm.noise = noiseLevel(curves)
	// Rank the starts by their cost on the data, refine the best; refine
	// the next one too when the first does not converge or fits poorly.
	starts := kineticStarts(spec.Model, E0, Tref, pts)
	r0 := make([]float64, fm.m)
	costs := make([]float64, len(starts))
	for i := range starts {
		starts[i] = append(starts[i], diff0...)
		fm.residuals(r0, starts[i])
		costs[i] = 0
		for _, v := range r0 {
			costs[i] += v * v
		}
		if !finite(costs[i]) {
			costs[i] = math.Inf(1)
		}
	}
	order := make([]int, len(starts))
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool { return costs[order[a]] < costs[order[b]] })
	maxIter := spec.MaxIter
	if maxIter <= 0 {
		maxIter = 200
	}
	var best lmResult
	best.Cost = math.Inf(1)
	evals := len(starts)
	var prog func(int, float64)
	if spec.Progress != nil {
		prog = func(it int, cost float64) { spec.Progress(it, math.Sqrt(2*cost/float64(fm.m))) }
	}
	for k, i := range order {
		if k >= 3 || math.IsInf(costs[i], 1) {
			break
		}
		r := levenberg(ctx, fm.residuals, starts[i], fm.m, maxIter, prog)
		if r.Stopped {
			return nil, ctx.Err()
		}
		evals += r.Evals
		if r.Cost < best.Cost {
			best = r
		}
		// Good enough: converged, and an RMS residual within 1.5 times
		// the noise of the measured rates.
		if best.Converged && math.Sqrt(2*best.Cost/float64(fm.m)) <= 1.5*fm.noise {
			break
		}
	}
	if math.IsInf(best.Cost, 1) {
		return nil, errors.New("dsc: the fit failed: the rate law overflows from every start")
	}
	res := fm.result(best)
	res.Evals = evals
	return res, nil
}

// isoPt is one isoconversional sample: α, T and rate.
type isoPt struct{ a, T, r float64 }

// isoStart returns the mean Friedman E over α in [0.1, 0.9], the reference
// temperature 1/mean(1/T) and the isoconversional samples there.
func isoStart(curves []*Curve, iso []IsoPoint) (E, Tref float64, pts []isoPt) {
	var n int
	for _, p := range iso {
		if p.Alpha >= 0.1-1e-9 && p.Alpha <= 0.9+1e-9 && p.E > 0 {
			E += p.E
			n++
		}
	}
	if n == 0 {
		return math.NaN(), math.NaN(), nil
	}
	E /= float64(n)
	var inv float64
	for a := 0.1; a < 0.9+1e-9; a += 0.05 {
		for _, c := range curves {
			if p, ok := c.At(a); ok && p.Rate > 0 {
				pts = append(pts, isoPt{a, p.Temp, p.Rate})
				inv += 1 / p.Temp
			}
		}
	}
	if len(pts) == 0 {
		return E, math.NaN(), nil
	}
	return E, float64(len(pts)) / inv, pts
}

// kineticStarts returns up to six starting vectors of the kinetic fit
// variables, best first.
func kineticStarts(model string, E, Tref float64, pts []isoPt) [][]float64 {
	eps := E / (physics.GasConstant * Tref) // E/(R·Tref)
	z := make([]float64, len(pts))          // ln[A f(α)] = ln r + E/(R T)
	for i, p := range pts {
		z[i] = math.Log(p.r) + E/(physics.GasConstant*p.T)
	}
	if model == NthOrder {
		x := make([]float64, len(pts))
		for i, p := range pts {
			x[i] = math.Log(1 - p.a)
		}
		l := fitLine(x, z)
		n := l.Slope
		if !(n > 0.05) || n > 6 {
			n = 1
		}
		lnA := l.Intercept
		return [][]float64{{lnA - eps, math.Log(eps), math.Log(n)}}
	}
	type cand struct {
		x   []float64
		res float64
	}
	var cands []cand
	for _, m := range []float64{0.25, 0.5, 0.75, 1, 1.5} {
		for _, n := range []float64{0.75, 1, 1.5, 2, 2.5, 3} {
			// exp(z)/(1−α)^n = A1 + A2 α^m, in relative terms: divide each
			// equation by its left side.
			var s11, s12, s22, b1, b2 float64
			for i, p := range pts {
				lhs := math.Exp(z[i]) / math.Pow(1-p.a, n)
				u, v := 1/lhs, math.Pow(p.a, m)/lhs
				s11 += u * u
				s12 += u * v
				s22 += v * v
				b1 += u
				b2 += v
			}
			det := s11*s22 - s12*s12
			if !(det > 0) {
				continue
			}
			A1 := (b1*s22 - b2*s12) / det
			A2 := (s11*b2 - s12*b1) / det
			if !(A2 > 0) {
				continue
			}
			A1 = max(A1, 0.01*A2*math.Pow(0.05, m)) // keep k1 > 0: α = 0 must react
			var res float64
			for i, p := range pts {
				lhs := math.Exp(z[i]) / math.Pow(1-p.a, n)
				d := (A1+A2*math.Pow(p.a, m))/lhs - 1
				res += d * d
			}
			cands = append(cands, cand{[]float64{math.Log(A1) - eps, math.Log(eps), math.Log(A2) - eps, math.Log(eps), math.Log(m), math.Log(n)}, res})
		}
	}
	sort.Slice(cands, func(i, j int) bool { return cands[i].res < cands[j].res })
	var out [][]float64
	for i := 0; i < len(cands) && i < 6; i++ {
		out = append(out, cands[i].x)
	}
	if len(out) == 0 { // the data admit no positive autocatalytic term: start as n-th order
		out = append(out, []float64{z[0] - eps, math.Log(eps), z[0] - eps - 3, math.Log(eps), math.Log(0.5), 0})
	}
	return out
}

// diffusionStart returns the starting diffusion variables from the final
// cure of the isothermal curves: ln C, αc(Tref), 100·dαc/dT.
func diffusionStart(curves []*Curve, Tref float64) ([]float64, bool) {
	var T, a []float64
	for _, c := range curves {
		if c.Program.Kind != Isothermal {
			continue
		}
		af := c.Alpha[len(c.Alpha)-1]
		if af < 0.97 {
			T = append(T, c.Program.Temperature)
			a = append(a, af)
		}
	}
	if len(T) < 2 || !distinct(T) {
		return nil, false
	}
	l := fitLine(T, a)
	slope := l.Slope
	if !(slope > 0) {
		slope = 0.005
	}
	const C0 = 30
	// The factor is ½ at αc and the cure creeps on a little past it.
	acRef := l.Intercept + l.Slope*Tref - 1.5/C0
	return []float64{math.Log(C0), acRef, 100 * slope}, true
}

// prepare thins the samples of c for the fit and lays out its RK4 nodes.
func prepare(c *Curve, Tref float64) fitData {
	n := len(c.Time)
	stride := max(1, (n+maxFitPoints-1)/maxFitPoints)
	var d fitData
	last := -1
	var peak float64
	for i := range n {
		peak = max(peak, c.Rate[i])
		if last >= 0 && i != n-1 && i-last < stride && c.Alpha[i]-c.Alpha[last] < 0.01 {
			continue
		}
		last = i
		d.t = append(d.t, c.Time[i])
		d.T = append(d.T, c.Temp[i])
		d.y = append(d.y, c.Net[i]/c.Total)
	}
	d.w = 1 / peak
	d.sub = 2
	d.tail = -1
	if c.Program.Kind == Isothermal {
		from := c.Time[n-max(3, n/10)] // isothermalBaseline's stretch
		for j, tj := range d.t {
			if tj >= from {
				d.tail = j
				break
			}
		}
	}
	nodes := 2*d.sub*(len(d.t)-1) + 1
	d.u = make([]float64, nodes)
	d.dT = make([]float64, nodes)
	for j := range len(d.t) - 1 {
		for k := 0; k <= 2*d.sub; k++ {
			f := float64(k) / float64(2*d.sub)
			T := d.T[j] + f*(d.T[j+1]-d.T[j])
			d.u[2*d.sub*j+k] = Tref/T - 1
			d.dT[2*d.sub*j+k] = T - Tref
		}
	}
	if len(d.t) == 1 {
		d.u[0], d.dT[0] = Tref/d.T[0]-1, d.T[0]-Tref
	}
	return d
}

// noiseLevel returns the RMS of the measured rates about their smoothed
// values, each curve divided by its peak rate: the residual a perfect model
// would leave.
func noiseLevel(curves []*Curve) float64 {
	var s float64
	var n int
	for _, c := range curves {
		var pk float64
		for _, v := range c.Smooth {
			pk = max(pk, v)
		}
		for i := range c.Net {
			d := (c.Net[i] - c.Smooth[i]) / pk
			s += d * d
			n++
		}
	}
	return math.Sqrt(s / float64(max(n, 1)))
}

// law holds the decoded fit variables.
type law struct {
	lk1, eps1, lk2, eps2, m, n float64
	C, acRef, acT              float64 // acT in 1/K
	auto, diff                 bool
}

func (fm *fitModel) decode(x []float64) law {
	l := law{auto: fm.auto, diff: fm.diff, lk1: x[0], eps1: math.Exp(x[1])}
	i := 2
	if fm.auto {
		l.lk2, l.eps2, l.m = x[2], math.Exp(x[3]), math.Exp(x[4])
		i = 5
	}
	l.n = math.Exp(x[i])
	i++
	if fm.diff {
		l.C, l.acRef, l.acT = math.Exp(x[i]), x[i+1], x[i+2]/100
	}
	return l
}

// rate returns dα/dt at α for rate constants k1, k2 and diffusion
// midpoint ac.
func (l *law) rate(a, k1, k2, ac float64) float64 {
	if a >= 1 {
		return 0
	}
	a = max(a, 0)
	c := k1
	if l.auto && a > 0 {
		c += k2 * math.Exp(l.m*math.Log(a))
	}
	r := c * math.Exp(l.n*math.Log1p(-a))
	if l.diff {
		e := l.C * (a - ac)
		if e > 700 {
			return 0
		}
		r /= 1 + math.Exp(e)
	}
	return r
}

// simulate writes the model rate at the fit samples of d into out.
func (fm *fitModel) simulate(l *law, d *fitData, out []float64, k1, k2, ac []float64) {
	for i, u := range d.u {
		k1[i] = math.Exp(l.lk1 - l.eps1*u)
		if l.auto {
			k2[i] = math.Exp(l.lk2 - l.eps2*u)
		}
		if l.diff {
			ac[i] = l.acRef + l.acT*d.dT[i]
		}
	}
	a := 0.0
	out[0] = l.rate(a, k1[0], k2[0], ac[0])
	for j := 1; j < len(d.t); j++ {
		h := (d.t[j] - d.t[j-1]) / float64(d.sub)
		base := 2 * d.sub * (j - 1)
		for s := range d.sub {
			n0, n1, n2 := base+2*s, base+2*s+1, base+2*s+2
			r1 := l.rate(a, k1[n0], k2[n0], ac[n0])
			r2 := l.rate(a+h/2*r1, k1[n1], k2[n1], ac[n1])
			r3 := l.rate(a+h/2*r2, k1[n1], k2[n1], ac[n1])
			r4 := l.rate(a+h*r3, k1[n2], k2[n2], ac[n2])
			a = min(max(a+h/6*(r1+2*r2+2*r3+r4), 0), 1)
		}
		n := 2 * d.sub * j
		out[j] = l.rate(a, k1[n], k2[n], ac[n])
	}
	d.subtractTail(out)
}

// subtractTail subtracts from the model rates out the mean over the
// stretch that an isothermal curve's baseline was taken from (d.tail on),
// as the measurement had it subtracted; nothing for a dynamic curve.
func (d *fitData) subtractTail(out []float64) {
	if d.tail < 0 {
		return
	}
	var m float64
	for _, v := range out[d.tail:] {
		m += v
	}
	m /= float64(len(out) - d.tail)
	for j := range out {
		out[j] -= m
	}
}

// residuals writes the weighted residuals at x into dst.
func (fm *fitModel) residuals(dst, x []float64) {
	l := fm.decode(x)
	off := 0
	for i := range fm.data {
		d := &fm.data[i]
		nn := len(d.u)
		k1, k2, ac := make([]float64, nn), make([]float64, nn), make([]float64, nn)
		out := dst[off : off+len(d.t)]
		fm.simulate(&l, d, out, k1, k2, ac)
		for j := range out {
			out[j] = (out[j] - d.y[j]) * d.w
		}
		off += len(d.t)
	}
}

// result turns the best LM result into a FitResult.
func (fm *fitModel) result(r lmResult) *FitResult {
	l := fm.decode(r.X)
	R := physics.GasConstant
	res := &FitResult{Points: fm.m, Iterations: r.Iterations, Converged: r.Converged, RefTemp: fm.Tref}
	E1 := l.eps1 * R * fm.Tref
	lnA1 := l.lk1 + l.eps1
	if fm.auto {
		E2 := l.eps2 * R * fm.Tref
		lnA2 := l.lk2 + l.eps2
		res.Cure.Model = physics.Autocatalytic{A1: math.Exp(lnA1), E1: E1, A2: math.Exp(lnA2), E2: E2, M: l.m, N: l.n}
	} else {
		res.Cure.Model = physics.NthOrder{A: math.Exp(lnA1), E: E1, N: l.n}
	}
	if fm.diff {
		res.Cure.Diffusion = &physics.Diffusion{C: l.C, Alpha0: l.acRef - l.acT*fm.Tref, AlphaT: l.acT}
	}
	cov, ok := covariance(r.Jacobian, r.Cost)
	res.Identifiable = ok
	p := len(r.X)
	// se returns the standard error of g·x for the gradient g (delta method).
	se := func(g []float64) float64 {
		if !ok {
			return math.NaN()
		}
		var v float64
		for i := range p {
			for j := range p {
				v += g[i] * cov.At(i, j) * g[j]
			}
		}
		return math.Sqrt(max(v, 0))
	}
	unit := func(i int, scale float64) []float64 {
		g := make([]float64, p)
		g[i] = scale
		return g
	}
	pair := func(i int, eps float64) []float64 { // ln A = lk + ε, ε = exp(x[i+1])
		g := make([]float64, p)
		g[i], g[i+1] = 1, eps
		return g
	}
	add := func(name string, v, s float64) { res.Params = append(res.Params, Param{name, v, s}) }
	seLnA1 := se(pair(0, l.eps1))
	add("A1", math.Exp(lnA1), math.Exp(lnA1)*seLnA1)
	add("ln A1", lnA1, seLnA1)
	add("E1", E1, se(unit(1, E1)))
	i := 2
	if fm.auto {
		lnA2 := l.lk2 + l.eps2
		seLnA2 := se(pair(2, l.eps2))
		add("A2", math.Exp(lnA2), math.Exp(lnA2)*seLnA2)
		add("ln A2", lnA2, seLnA2)
		add("E2", l.eps2*R*fm.Tref, se(unit(3, l.eps2*R*fm.Tref)))
		add("m", l.m, se(unit(4, l.m)))
		i = 5
	}
	add("n", l.n, se(unit(i, l.n)))
	i++
	if fm.diff {
		add("C", l.C, se(unit(i, l.C)))
		g := make([]float64, p)
		g[i+1], g[i+2] = 1, -fm.Tref/100
		add("alpha_c0", l.acRef-l.acT*fm.Tref, se(g))
		add("alpha_cT", l.acT, se(unit(i+2, 0.01)))
	}

	// Fit quality and the fitted curves.
	var ssr, sum, sum2 float64
	off := 0
	for k := range fm.data {
		d := &fm.data[k]
		fc := FitCurve{Time: d.t, Temp: d.T, Measured: d.y, Model: make([]float64, len(d.t))}
		var cs float64
		for j := range d.t {
			rw := r.Residuals[off+j]
			fc.Model[j] = d.y[j] + rw/d.w
			cs += rw * rw
			yw := d.y[j] * d.w
			sum += yw
			sum2 += yw * yw
		}
		ssr += cs
		fc.RMS = math.Sqrt(cs / float64(len(d.t)))
		res.Curves = append(res.Curves, fc)
		off += len(d.t)
	}
	n := float64(fm.m)
	res.RMS = math.Sqrt(ssr / n)
	if sst := sum2 - sum*sum/n; sst > 0 {
		res.R2 = 1 - ssr/sst
	}
	return res
}
