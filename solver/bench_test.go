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

// BenchmarkVolumetric150Cells compares the cost of the field models on the
// 150-cell potting over a metal cup (5 h), open loop and under control (a
// controller sample, and so a step, every second for the first hour): the
// exponential model ("top") against the standing wave at one frequency and
// over a 101-point band, whose field is computed again at nearly every
// step as the cure changes the loss factor.
func BenchmarkVolumetric150Cells(b *testing.B) {
	prog, err := physics.FromSegments(296.15, []physics.Segment{{Rate: 2.0 / 60, To: 343.15}, {Hold: 1800}})
	if err != nil {
		b.Fatal(err)
	}
	for _, loop := range []string{"open", "controlled"} {
		for _, mode := range []string{"exponential", "standing-1", "standing-101"} {
			b.Run(loop+"/"+mode, func(b *testing.B) {
				var ctl *physics.Control
				if loop == "controlled" {
					ctl = &physics.Control{Sensor: 0.006, Program: prog, Period: 1, Gain: 0.2, IntegralTime: 60}
				}
				p := metalCup(b, 150, physics.Band{Lo: 2.4e9, Hi: 2.5e9, Points: 101}, ctl)
				p.OutputTimes = nil
				switch mode {
				case "exponential":
					p.Volumetric = &physics.Volumetric{Frequency: 2.45e9, Field: 1500, Attenuation: physics.FromTop, Control: ctl}
				case "standing-1":
					p.Volumetric.Band = physics.Band{}
				}
				if loop == "controlled" {
					p.End = prog.End()
					p.Volumetric.Field *= 3
					p.Volumetric.IncidentPower = 20000
				} else {
					p.End = 5 * 3600
				}
				var r *Result
				b.ReportAllocs()
				for b.Loop() {
					r, _ = Run(context.Background(), p)
				}
				b.ReportMetric(float64(r.Summary.Steps), "steps/run")
				b.ReportMetric(float64(r.Summary.FieldSolutions), "fields/run")
			})
		}
	}
}
