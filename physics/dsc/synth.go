package dsc

import (
	"errors"
	"math"
	"math/rand/v2"

	"cureslab/physics"
)

// Synth describes a synthetic DSC scan of a resin with a known cure law.
type Synth struct {
	Name     string
	Cure     *physics.Cure // rate law (diffusion factor included) and TotalHeat, J/kg of sample
	Start    float64       // temperature at time 0, K
	Rate     float64       // heating rate, K/s; 0 for an isothermal scan
	Duration float64       // s
	Step     float64       // sampling interval, s
	Alpha0   float64       // degree of cure at time 0

	// Instrument baseline: Baseline + Slope·(T − Start) + CpStep·α, W/kg.
	// CpStep is the shift of a dynamic baseline as the sample cures
	// (heating rate × change in heat capacity).
	Baseline, Slope, CpStep float64
	// Noise is the standard deviation of the Gaussian noise added to the
	// heat flow, as a fraction of the peak reaction heat flow; Seed makes
	// it reproducible.
	Noise float64
	Seed  uint64
}

// Synthesize returns the scan described by s: samples every Step from 0 to
// Duration of
//
//	T(t) = Start + Rate·t,   q(t) = TotalHeat·dα/dt + baseline(T, α) + noise,
//	dα/dt = Cure.Rate(T, α),  α(0) = Alpha0.
//
// Method: classical fourth-order Runge–Kutta with 16 steps per sample
// (Press et al., Numerical Recipes, 3rd ed., §17.1), α clamped to [0, 1]
// inside Cure.Rate. The noise is drawn from a PCG generator seeded with
// Seed (math/rand/v2), so a Synth always gives the same scan.
//
// Preconditions: Cure and its Model non-nil, TotalHeat > 0, Start > 0,
// Duration ≥ (MinPoints−1)·Step, Step > 0, Rate ≥ 0; otherwise an error.
// Cost: 64 rate evaluations per sample.
func Synthesize(s Synth) (*Scan, error) {
	switch {
	case s.Cure == nil || s.Cure.Model == nil:
		return nil, errors.New("dsc: Synthesize needs a cure law")
	case !(s.Cure.TotalHeat > 0):
		return nil, errors.New("dsc: Synthesize needs a positive total heat")
	case !(s.Start > 0) || !(s.Step > 0) || !(s.Rate >= 0) || !(s.Duration >= float64(MinPoints-1)*s.Step):
		return nil, errors.New("dsc: Synthesize: bad start, step, rate or duration")
	}
	n := int(math.Floor(s.Duration/s.Step+1e-9)) + 1
	sc := &Scan{Name: s.Name, Time: make([]float64, n), Temp: make([]float64, n), HeatFlow: make([]float64, n)}
	rate := make([]float64, n)
	alpha := make([]float64, n)
	const sub = 16
	a := min(max(s.Alpha0, 0), 1)
	T := func(t float64) float64 { return s.Start + s.Rate*t }
	f := func(t, a float64) float64 {
		r, _, _ := s.Cure.Rate(T(t), a)
		return r
	}
	var peak float64
	for i := range n {
		t := float64(i) * s.Step
		if i > 0 {
			h := s.Step / sub
			t0 := float64(i-1) * s.Step
			for j := range sub {
				tj := t0 + float64(j)*h
				k1 := f(tj, a)
				k2 := f(tj+h/2, a+h/2*k1)
				k3 := f(tj+h/2, a+h/2*k2)
				k4 := f(tj+h, a+h*k3)
				a = min(max(a+h/6*(k1+2*k2+2*k3+k4), 0), 1)
			}
		}
		sc.Time[i], sc.Temp[i] = t, T(t)
		alpha[i], rate[i] = a, f(t, a)
		peak = max(peak, s.Cure.TotalHeat*rate[i])
	}
	rng := rand.New(rand.NewPCG(s.Seed, 0x5eed))
	for i := range n {
		q := s.Cure.TotalHeat*rate[i] + s.Baseline + s.Slope*(sc.Temp[i]-s.Start) + s.CpStep*alpha[i]
		if s.Noise > 0 {
			q += s.Noise * peak * rng.NormFloat64()
		}
		sc.HeatFlow[i] = q
	}
	return sc, nil
}
