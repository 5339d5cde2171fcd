package solver

import (
	"context"
	"testing"

	"cureslab/physics"
)

// benchConduction is a 200-cell, 4-hour conduction case: a 20 mm slab in an
// oven ramping 23 → 150 °C at 3 K/min, held, then cooled.
func benchConduction(b testing.TB) *Problem {
	air, err := physics.FromSegments(296.15, []physics.Segment{
		{Rate: 3.0 / 60, To: 423.15}, {Hold: 7200}, {Rate: -3.0 / 60, To: 323.15},
	})
	if err != nil {
		b.Fatal(err)
	}
	m := inert(2000, 900, 1.2)
	return &Problem{
		Mesh:               mustSlab(b, 0.02, 200),
		Materials:          []*physics.Material{m},
		Top:                physics.Face{Kind: physics.Convection, H: 25, Air: air},
		Bottom:             physics.Face{Kind: physics.Convection, H: 10, Air: air},
		InitialTemperature: 296.15,
		End:                4 * 3600,
		Probes:             []float64{0, 0.01, 0.02},
	}
}

func BenchmarkConduction200Cells4h(b *testing.B) {
	p := benchConduction(b)
	var r *Result
	b.ReportAllocs()
	for b.Loop() {
		r, _ = Run(context.Background(), p)
	}
	b.ReportMetric(float64(r.Summary.Steps), "steps/run")
}

func BenchmarkCoupled150Cells5h(b *testing.B) {
	p := thickPotting(b, 150)
	p.End = 5 * 3600
	p.OutputTimes = nil
	var r *Result
	b.ReportAllocs()
	for b.Loop() {
		r, _ = Run(context.Background(), p)
	}
	b.ReportMetric(float64(r.Summary.Steps), "steps/run")
	b.ReportMetric(float64(r.Summary.NewtonIterations)/float64(r.Summary.Steps+r.Summary.RejectedSteps), "newton/step")
}
