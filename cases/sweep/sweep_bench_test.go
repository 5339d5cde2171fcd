package sweep

import (
	"context"
	"cureslab/cases"
	"os"
	"path/filepath"
	"strconv"
	"testing"
)

// BenchmarkSweepDemoPotting runs sweeps of the embedded thick-potting-oven
// example (8 runs per operation, top.h from 10 to 24 W/m^2/K) with 1 and 2
// workers, every run committed to the journal as in a real sweep, and
// reports the throughput in runs/s:
//
//	go test ./cases -run '^$' -bench SweepDemoPotting -benchtime 20x
func BenchmarkSweepDemoPotting(b *testing.B) {
	ex, ok := cases.ExampleByName("thick-potting-oven")
	if !ok {
		b.Fatal("no thick-potting-oven example")
	}
	const runs = 8
	v, err := ParseVary("top.h=10W/m^2/K:24W/m^2/K:" + strconv.Itoa(runs))
	if err != nil {
		b.Fatal(err)
	}
	s, err := New("thick-potting-oven.toml", ex.Text, "", Settings{Vary: []cases.Vary{v}})
	if err != nil {
		b.Fatal(err)
	}
	benchSweep(b, s, runs)
}

// BenchmarkSweepBench1000 is the sweep of the speed targets: 1000 runs of
// the coupled bench case (testdata/bench/potting.toml, 150 cells, 5 h) with
// the top film coefficient varied from 10 to 25 W/m^2/K, with 1 and 2
// workers, journal and summary as in a real sweep. One operation is the
// whole sweep (seconds), so run it once:
//
//	go test ./cases/sweep -run '^$' -bench SweepBench1000 -benchtime 1x -count 3
func BenchmarkSweepBench1000(b *testing.B) {
	path := filepath.Join("..", "..", "testdata", "bench", "potting.toml")
	data, err := os.ReadFile(path)
	if err != nil {
		b.Fatal(err)
	}
	const runs = 1000
	v, err := ParseVary("top.h=10W/m^2/K:25W/m^2/K:" + strconv.Itoa(runs))
	if err != nil {
		b.Fatal(err)
	}
	s, err := New("potting.toml", data, filepath.Dir(path), Settings{Vary: []cases.Vary{v}})
	if err != nil {
		b.Fatal(err)
	}
	benchSweep(b, s, runs)
}

// benchSweep runs sweep s (of runs runs) into a fresh directory per
// operation with 1 and 2 workers and reports the throughput.
func benchSweep(b *testing.B, s *Sweep, runs int) {
	for _, jobs := range []int{1, 2} {
		b.Run("j"+strconv.Itoa(jobs), func(b *testing.B) {
			root := b.TempDir()
			done := 0
			for b.Loop() {
				dir, err := os.MkdirTemp(root, "sweep")
				if err != nil {
					b.Fatal(err)
				}
				rep, err := s.Run(context.Background(), dir, Options{Jobs: jobs})
				if err != nil || rep.Done != runs {
					b.Fatalf("sweep: %v, %+v", err, rep)
				}
				done += rep.Done
			}
			b.ReportMetric(float64(done)/b.Elapsed().Seconds(), "runs/s")
		})
	}
}
