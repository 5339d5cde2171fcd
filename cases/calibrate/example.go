package calibrate

import (
	"context"
	_ "embed"
	"fmt"

	"cureslab/cases"
)

// ExampleLogName is the name of the embedded example log.
const ExampleLogName = "thick-potting-oven-trial.csv"

//go:embed examples/thick-potting-oven-trial.csv
var embeddedLog []byte

// ExampleLog returns the embedded example trial log: invented, made by
// cureslab itself from the embedded example case thick-potting-oven with
// other values of three of its inputs and seeded noise (see its header and
// makeExampleLog). Each call returns a fresh copy.
func ExampleLog() []byte { return append([]byte(nil), embeddedLog...) }

// The inputs the example log was made with, and its thermocouples.
var (
	exampleFree   = []string{"top.h", "bottom.h", "materials.potting-resin-A.cure.total_heat"}
	exampleValues = []float64{9, 28, 300} // W/m^2/K, W/m^2/K, J/g (the case has 15, 20, 340)
	exampleDepths = []float64{0, 6e-3, 12e-3}
)

// makeExampleLog makes the example log: the example case run with
// exampleValues, read at exampleDepths every minute for 4.5 h, with
// Gaussian noise of 0.3 K (seed 2026), rounded to 0.1 °C as a logger does.
func makeExampleLog() ([]byte, error) {
	ex, ok := cases.ExampleByName("thick-potting-oven")
	if !ok {
		return nil, fmt.Errorf("no example thick-potting-oven")
	}
	v, _, err := cases.NewCaseVariant(ex.Name+".toml", ex.Text, "")
	if err != nil {
		return nil, err
	}
	var frees []Free
	for _, k := range exampleFree {
		frees = append(frees, Free{Key: k})
	}
	b, err := bind(v, frees)
	if err != nil {
		return nil, err
	}
	p, err := b.problem(exampleValues)
	if err != nil {
		return nil, err
	}
	var times []float64
	for t := 0.0; t <= 4.5*3600; t += 60 {
		times = append(times, t)
	}
	comment := []string{
		"An invented trial log, made by cureslab itself (not measured): the embedded",
		"example case thick-potting-oven run with top.h = 9 W/m^2/K, bottom.h =",
		"28 W/m^2/K and materials.potting-resin-A.cure.total_heat = 300 J/g (the case",
		"has 15, 20 and 340), read at 0, 6 and 12 mm every minute, Gaussian noise of",
		"0.3 K (seed 2026), rounded to 0.1 C. For trying 'cureslab calibrate'.",
	}
	return SyntheticLog(context.Background(), p, Synth{Depths: exampleDepths, Times: times, Sigma: 0.3, Seed: 2026, Decimals: 1, Comment: comment})
}
