package dsc

import (
	"errors"
	"fmt"
	"math"

	"cureslab/physics"
)

// Isoconversional names the model-free law (physics.Isoconversional) that
// Fit builds from Friedman's analysis instead of fitting parameters.
const Isoconversional = "isoconversional"

// IsoconversionalLevels are the degrees of cure of the table Fit builds for
// Isoconversional: 0.01, 0.02, 0.05 to 0.95 in steps of 0.05, 0.98 and
// 0.99. The ends are denser because the rate changes fastest there, and the
// table reaches 0.99 because a simulated cure stops at its last row.
func IsoconversionalLevels() []float64 {
	out := []float64{0.01, 0.02}
	for i := 1; i <= 19; i++ {
		out = append(out, float64(i)/20)
	}
	return append(out, 0.98, 0.99)
}

// fitIsoconversional builds the isoconversional table from Friedman's
// analysis of curves at IsoconversionalLevels and measures how well it
// reproduces them (see Fit).
func fitIsoconversional(curves []*Curve, spec FitSpec) (*FitResult, error) {
	if spec.Diffusion {
		return nil, errors.New("dsc: the isoconversional table needs no diffusion factor: it holds whatever slows the cure at high α")
	}
	var alpha, E, lnAf []float64
	var params []Param
	for _, p := range Friedman(curves, IsoconversionalLevels()) {
		// A level where the line is not a credible Arrhenius plot (no
		// positive E, a non-finite intercept) is left out: interpolation
		// between its neighbours is the better estimate.
		if !(p.E > 0) || !finite(p.LnA) {
			continue
		}
		alpha = append(alpha, p.Alpha)
		E = append(E, p.E)
		lnAf = append(lnAf, p.LnA)
		params = append(params,
			Param{Name: fmt.Sprintf("E(%g)", p.Alpha), Value: p.E, SE: p.SE},
			Param{Name: fmt.Sprintf("lnAf(%g)", p.Alpha), Value: p.LnA, SE: p.LnASE})
	}
	if len(alpha) < 2 {
		return nil, errors.New("dsc: too few isoconversional points for a table: the scans must reach the same degrees of cure at two or more temperatures")
	}
	m, err := physics.NewIsoconversional(alpha, E, lnAf)
	if err != nil {
		return nil, fmt.Errorf("dsc: %w", err)
	}
	res := &FitResult{Params: params, Converged: true, Identifiable: true, RefTemp: math.NaN()}
	res.Cure.Model = m
	// Quality: the table's law integrated along each curve's temperature,
	// compared with the measured rate as Fit compares a fitted law.
	var ssr, sum, sum2 float64
	for _, c := range curves {
		d := prepare(c, 1)
		fc := FitCurve{Time: d.t, Temp: d.T, Measured: d.y, Model: make([]float64, len(d.t))}
		simulateCure(&res.Cure, &d, fc.Model)
		var cs float64
		for j := range d.t {
			rw := (fc.Model[j] - d.y[j]) * d.w
			cs += rw * rw
			yw := d.y[j] * d.w
			sum += yw
			sum2 += yw * yw
		}
		ssr += cs
		res.Points += len(d.t)
		fc.RMS = math.Sqrt(cs / float64(len(d.t)))
		res.Curves = append(res.Curves, fc)
	}
	n := float64(res.Points)
	res.RMS = math.Sqrt(ssr / n)
	if sst := sum2 - sum*sum/n; sst > 0 {
		res.R2 = 1 - ssr/sst
	}
	return res, nil
}

// simulateCure writes into out the rate of law c at the fit samples of d,
// integrating dα/dt = c.Rate(T, α) from α = 0 along the samples'
// temperature (linear between samples) by classical RK4 with d.sub steps per
// interval, and subtracting the mean over the tail of an isothermal curve
// as simulate does.
func simulateCure(c *physics.Cure, d *fitData, out []float64) {
	rate := func(T, a float64) float64 { r, _, _ := c.Rate(T, a); return r }
	a := 0.0
	out[0] = rate(d.T[0], a)
	for j := 1; j < len(d.t); j++ {
		h := (d.t[j] - d.t[j-1]) / float64(d.sub)
		T := func(s float64) float64 { return d.T[j-1] + s*(d.T[j]-d.T[j-1]) }
		for s := range d.sub {
			f0 := float64(s) / float64(d.sub)
			fh := (float64(s) + 0.5) / float64(d.sub)
			f1 := float64(s+1) / float64(d.sub)
			r1 := rate(T(f0), a)
			r2 := rate(T(fh), a+h/2*r1)
			r3 := rate(T(fh), a+h/2*r2)
			r4 := rate(T(f1), a+h*r3)
			a = min(max(a+h/6*(r1+2*r2+2*r3+r4), 0), 1)
		}
		out[j] = rate(d.T[j], a)
	}
	d.subtractTail(out)
}
