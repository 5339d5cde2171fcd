package solver

import (
	"context"
	"errors"
	"runtime"
	"slices"
	"testing"

	"cureslab/physics"
)

// controlledPotting is thickPotting heated by a controlled microwave field
// (invented dielectric data), the sensor at the given depth.
func controlledPotting(t testing.TB, cells int, sensor float64) *Problem {
	p := thickPotting(t, cells)
	m := *p.Materials[0]
	m.Dielectric = &physics.Dielectric{Permittivity: 4, LossFactor: 0.4, LossFactorCured: 0.05}
	p.Materials[0] = &m
	prog, err := physics.FromSegments(296.15, []physics.Segment{{Rate: 2.0 / 60, To: 343.15}, {Hold: 3600}})
	if err != nil {
		t.Fatal(err)
	}
	p.Volumetric = &physics.Volumetric{Frequency: 2.45e9, Field: 3000, Attenuation: physics.FromTop,
		Control: &physics.Control{Sensor: sensor, Program: prog, Period: 30, Gain: 0.2, IntegralTime: 60}}
	return p
}

// copySnapshot returns s with slices of its own.
func copySnapshot(s *Snapshot) Snapshot {
	c := *s
	c.T, c.Cure, c.Rate, c.Tg = slices.Clone(s.T), slices.Clone(s.Cure), slices.Clone(s.Rate), slices.Clone(s.Tg)
	c.ProbeT, c.ProbeCure = slices.Clone(s.ProbeT), slices.Clone(s.ProbeCure)
	c.Power = slices.Clone(s.Power)
	return c
}

// A streamed run hands the sink the same snapshots, bit for bit, as Run
// keeps (coupled cure; controlled volumetric heating, whose first snapshot
// carries the controller's first output), and the same summary. Source: the
// contract of RunStream (a regression guard, no outside reference).
func TestRunStreamSameSnapshots(t *testing.T) {
	controlled := func() *Problem {
		p := controlledPotting(t, 30, 0.005)
		p.OutputTimes = nil
		return p
	}
	noFields := thickPotting(t, 20)
	noFields.NoFields = true
	for name, p := range map[string]*Problem{"coupled": thickPotting(t, 40), "controlled": controlled(), "no fields": noFields} {
		want, err := Run(context.Background(), p)
		if err != nil {
			t.Fatal(err)
		}
		var shots []Snapshot
		got, err := RunStream(context.Background(), p, func(s *Snapshot) error {
			shots = append(shots, copySnapshot(s))
			return nil
		})
		if err != nil {
			t.Fatal(err)
		}
		if got.Snapshots != nil {
			t.Errorf("%s: a streamed result keeps %d snapshots, want none", name, len(got.Snapshots))
		}
		got.Snapshots = shots
		if !sameResult(got, want) {
			t.Errorf("%s: the streamed snapshots differ from Run's (%d against %d)", name, len(shots), len(want.Snapshots))
		}
	}
}

// A sink's error stops the run at once and comes back as the run's error;
// the sink is not called again.
func TestRunStreamSinkErrorStops(t *testing.T) {
	p := thickPotting(t, 20)
	p.OutputTimes = nil // 100 output times
	full := errors.New("disk full")
	calls := 0
	r, err := RunStream(context.Background(), p, func(s *Snapshot) error {
		calls++
		if calls == 3 {
			return full
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if r.Status != Failed || !errors.Is(r.Err, full) || calls != 3 || !(r.EndTime < p.End) {
		t.Errorf("status %v, error %v, %d calls, end %g s: want failed, the sink's error, 3 calls, an early end", r.Status, r.Err, calls, r.EndTime)
	}
}

// A run cancelled from outside stops, and the last snapshot the sink saw is
// the state at the moment it stopped.
func TestRunStreamCancelKeepsLastState(t *testing.T) {
	p := thickPotting(t, 20)
	p.OutputTimes = nil
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	var last Snapshot
	calls := 0
	r, err := RunStream(ctx, p, func(s *Snapshot) error {
		calls++
		if calls == 5 {
			cancel()
		}
		last = copySnapshot(s)
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if !errors.Is(r.Err, context.Canceled) || last.Time != r.EndTime || calls != 5 {
		t.Errorf("error %v, last snapshot at %g s, end %g s, %d calls: want context.Canceled, the end time, 5 calls", r.Err, last.Time, r.EndTime, calls)
	}
}

// Memory of a streamed run does not grow with the number of output times:
// 5,000 outputs of 400 cells would keep 5,000 × 4 × 400 floats (64 MB) in
// Run; streamed, the run allocates a small multiple of the cells (plus the
// list of output times). A deterministic count of bytes, not a timing.
func TestRunStreamMemoryProportionalToCells(t *testing.T) {
	p := thickPotting(t, 400)
	p.End = 600
	p.OutputTimes = make([]float64, 5000)
	for k := range p.OutputTimes {
		p.OutputTimes[k] = p.End * float64(k+1) / 5001
	}
	var a, b runtime.MemStats
	runtime.ReadMemStats(&a)
	shots := 0
	r, err := RunStream(context.Background(), p, func(*Snapshot) error { shots++; return nil })
	runtime.ReadMemStats(&b)
	if err != nil || r.Status != OK {
		t.Fatal(err, r.Status)
	}
	kept := uint64(shots) * 4 * 400 * 8
	alloc := b.TotalAlloc - a.TotalAlloc
	t.Logf("%d snapshots of 400 cells streamed: %d B allocated (kept: %d B)", shots, alloc, kept)
	if alloc > kept/20 {
		t.Errorf("%d snapshots streamed with %d B allocated; keeping them would take %d B: want under a twentieth", shots, alloc, kept)
	}
}
