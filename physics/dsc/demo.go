package dsc

import "cureslab/physics"

// DemoResin returns the cure law of "dsc-demo-resin", an invented
// autocatalytic epoxy with a diffusion factor and a DiBenedetto glass
// transition. Its numbers are plausible for the class (epoxy–amine DSC
// heats of 400–550 J/g, from memory) and belong to no product; they exist
// to make the example scans of testdata/dsc.
func DemoResin() *physics.Cure {
	return &physics.Cure{
		Model: physics.Autocatalytic{
			A1: 3.0e6, E1: 78e3, // 1/s, J/mol
			A2: 6.0e5, E2: 65e3,
			M: 0.55, N: 1.45,
		},
		// αc = −1.55 + 0.006·T: 0.69 at 100 °C, 0.87 at 130 °C, 1 near 150 °C.
		Diffusion:     &physics.Diffusion{C: 30, Alpha0: -1.55, AlphaT: 0.006},
		Glass:         &physics.DiBenedetto{Tg0: 273.15 - 30, TgFull: 273.15 + 165, Lambda: 0.45},
		TotalHeat:     430e3, // J/kg
		ResinFraction: 1,
		GelPoint:      0.6,
	}
}

// DemoScans returns the synthetic scans of dsc-demo-resin that make
// testdata/dsc: dynamic scans at 2, 5, 10 and 20 K/min from 20 °C to 300 °C
// (a sample every 0.25 K) on a sloped instrument baseline that also shifts
// by −0.1 J/(g·K) × heating rate as the sample cures, and isothermal scans
// at 100, 115 and 130 °C (a sample every 6 s) on a constant baseline, each
// with Gaussian noise of 1 % of its peak reaction heat flow and its own
// seed. Names are the file names.
func DemoScans() []Synth {
	cure := DemoResin()
	var out []Synth
	for _, b := range []struct {
		name string
		rate float64 // K/min
	}{{"dyn-02Kmin.csv", 2}, {"dyn-05Kmin.csv", 5}, {"dyn-10Kmin.csv", 10}, {"dyn-20Kmin.csv", 20}} {
		beta := b.rate / 60
		out = append(out, Synth{
			Name: b.name, Cure: cure, Start: 293.15, Rate: beta, Duration: 280 / beta, Step: 0.25 / beta,
			Baseline: -80, Slope: 0.4, CpStep: -100 * beta, // W/kg, W/(kg·K), Δcp = −100 J/(kg·K)
			Noise: 0.01, Seed: uint64(100 + b.rate),
		})
	}
	for _, i := range []struct {
		name string
		T    float64 // °C
		dur  float64 // h
	}{{"iso-100C.csv", 100, 4}, {"iso-115C.csv", 115, 3}, {"iso-130C.csv", 130, 2}} {
		out = append(out, Synth{
			Name: i.name, Cure: cure, Start: 273.15 + i.T, Duration: i.dur * 3600, Step: 6,
			Baseline: -50, Noise: 0.01, Seed: uint64(200 + i.T),
		})
	}
	return out
}
