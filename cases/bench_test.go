package cases

import (
	"context"
	"fmt"
	"math"
	"path/filepath"
	"testing"
	"time"

	"cureslab/solver"
)

// Benchmarks over the fixed cases of testdata/bench (README "Performance").

func loadBench(tb testing.TB, name string) *Case {
	tb.Helper()
	c, err := Load(filepath.Join("..", "testdata", "bench", name))
	if err != nil {
		tb.Fatal(err)
	}
	return c
}

func benchRun(b *testing.B, name string) {
	c := loadBench(b, name)
	var r *solver.Result
	b.ReportAllocs()
	for b.Loop() {
		var err error
		if r, err = solver.Run(context.Background(), c.Problem); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(r.Summary.Steps), "steps/run")
	b.ReportMetric(float64(r.Summary.NewtonIterations)/float64(r.Summary.Steps+r.Summary.RejectedSteps), "newton/step")
}

func BenchmarkBenchConduction(b *testing.B) { benchRun(b, "conduction.toml") }
func BenchmarkBenchPotting(b *testing.B)    { benchRun(b, "potting.toml") }
func BenchmarkBenchVolumetric(b *testing.B) { benchRun(b, "volumetric.toml") }

// TestWorkPrecision runs the coupled bench case at tolerances from loose to
// tight against a very fine reference run on the same mesh and prints the
// work–precision table of the contributor guide's measurement journal
// (go test ./cases -run WorkPrecision -v).
// The timings are printed, never asserted. The accuracy of the default
// tolerance is asserted: peak temperature within 0.2 K and minimum final cure
// within 0.002 of the reference (the requirement for the default).
func TestWorkPrecision(t *testing.T) {
	if testing.Short() {
		t.Skip("work–precision study")
	}
	c := loadBench(t, "potting.toml")
	// The time per run is the fastest of five (single runs are noisy).
	run := func(tolT, tolA float64) (*solver.Result, time.Duration) {
		p := *c.Problem
		p.TemperatureTolerance, p.CureTolerance = tolT, tolA
		var r *solver.Result
		best := time.Duration(math.MaxInt64)
		for range 5 {
			start := time.Now()
			var err error
			r, err = solver.Run(context.Background(), &p)
			best = min(best, time.Since(start))
			if err != nil || r.Status != solver.OK {
				t.Fatalf("tolerance %g K: %v %v", tolT, err, r.Err)
			}
		}
		return r, best
	}
	ref, _ := run(1e-5, 4e-7)
	rs := ref.Summary
	t.Logf("reference (0.00001 K, 4e-7): peak %.4f °C at %.1f s, min final cure %.6f, %d steps",
		rs.PeakTemperature-273.15, rs.PeakTime, rs.MinFinalCure, rs.Steps)
	t.Logf("%-10s %-9s %8s %10s %10s %12s %7s %9s", "tol (K)", "tol (α)", "", "peak (K)", "peak t (s)", "min cure", "steps", "time")
	for _, tolT := range []float64{0.5, 0.2, 0.1, 0.05, 0.02, 0.01, 0.005, 0.002} {
		tolA := solver.DefaultCureTolerance * tolT / solver.DefaultTemperatureTolerance
		r, d := run(tolT, tolA)
		s := r.Summary
		dT := s.PeakTemperature - rs.PeakTemperature
		dt := s.PeakTime - rs.PeakTime
		dA := s.MinFinalCure - rs.MinFinalCure
		mark := ""
		if tolT == solver.DefaultTemperatureTolerance {
			mark = "default"
			if math.Abs(dT) > 0.2 || math.Abs(dA) > 0.002 {
				t.Errorf("default tolerance: peak off by %.3g K (limit 0.2), min cure by %.3g (limit 0.002)", dT, dA)
			}
		}
		t.Logf("%-10g %-9.3g %8s %+10.4f %+10.1f %+12.2e %7d %9s", tolT, tolA, mark, dT, dt, dA, s.Steps,
			fmt.Sprintf("%.2f ms", float64(d.Microseconds())/1000))
	}
}
