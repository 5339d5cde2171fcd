package dsc_test

import (
	"fmt"
	"math"

	"cureslab/physics"
	"cureslab/physics/dsc"
)

// The peak temperatures of the synthetic first-order set (derived here)
// (E = 80 kJ/mol, A = 1e10 1/min) give back E and A by Kissinger's plot,
// which is exact for first-order kinetics.
func ExampleKissinger() {
	beta := []float64{1.0 / 60, 2.0 / 60, 5.0 / 60, 10.0 / 60, 20.0 / 60} // K/s
	Tp := []float64{374.326, 383.922, 397.360, 408.140, 419.498}          // K
	k, err := dsc.Kissinger(beta, Tp)
	if err != nil {
		panic(err)
	}
	fmt.Printf("E = %.2f kJ/mol, A = %.3g 1/min\n", k.E/1000, 60*math.Exp(k.LnA))
	// Output:
	// E = 80.00 kJ/mol, A = 1e+10 1/min
}

// Four synthetic scans of a first-order resin, analysed and fitted with the
// n-th order law.
func ExampleAnalyze() {
	cure := &physics.Cure{Model: physics.NthOrder{A: 1e10 / 60, E: 80e3, N: 1}, TotalHeat: 400e3}
	var scans []*dsc.Scan
	for _, rate := range []float64{2, 5, 10, 20} { // K/min
		beta := rate / 60
		s, err := dsc.Synthesize(dsc.Synth{Name: fmt.Sprint(rate, " K/min"), Cure: cure, Start: 250, Rate: beta,
			Duration: 250 / beta, Step: 0.2 / beta, Baseline: 40, Slope: 0.3})
		if err != nil {
			panic(err)
		}
		scans = append(scans, s)
	}
	an, err := dsc.Analyze(scans, dsc.Options{Model: dsc.NthOrder})
	if err != nil {
		panic(err)
	}
	fmt.Printf("total heat %.1f J/g\n", an.TotalHeat/1000)
	fmt.Printf("Kissinger E = %.1f kJ/mol, OFW E = %.1f kJ/mol\n", an.Kissinger.E/1000, an.OFW.E/1000)
	fmt.Printf("Friedman E at α = 0.5: %.1f kJ/mol\n", an.Friedman[9].E/1000)
	m := an.Fit.Cure.Model.(physics.NthOrder)
	fmt.Printf("fit: E = %.1f kJ/mol, n = %.3f, warnings: %d\n", m.E/1000, m.N, len(an.Warnings))
	// Output:
	// total heat 399.8 J/g
	// Kissinger E = 80.0 kJ/mol, OFW E = 80.0 kJ/mol
	// Friedman E at α = 0.5: 80.0 kJ/mol
	// fit: E = 80.0 kJ/mol, n = 1.000, warnings: 0
}
