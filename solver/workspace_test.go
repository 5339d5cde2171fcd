package solver

import (
	"context"
	"math"
	"reflect"
	"runtime"
	"testing"
)

// TestWorkspaceSameResults runs a sequence of different problems (coupled,
// linear, controlled volumetric, of different sizes) through one Workspace
// and checks every result against a run with fresh allocations, bit for
// bit: a reused buffer must start each run as a new one would. Source: the
// contract of Workspace (no outside reference; this is a regression guard
// against state leaking between runs).
func TestWorkspaceSameResults(t *testing.T) {
	coupled := func(cells int) *Problem { return thickPotting(t, cells) }
	linear := func(cells int) *Problem {
		p := thickPotting(t, cells)
		p.Materials[0] = inert(2000, 900, 1.2)
		p.Top.Emissivity = 0
		return p
	}
	volumetric := func(cells int) *Problem { return controlledPotting(t, cells, 0.01) }
	seq := []*Problem{coupled(40), linear(40), volumetric(40), coupled(25), volumetric(60), linear(60), coupled(60)}
	var ws Workspace
	for k, p := range seq {
		got, err := ws.Run(context.Background(), p)
		if err != nil {
			t.Fatal(err)
		}
		want, err := Run(context.Background(), p)
		if err != nil {
			t.Fatal(err)
		}
		if !sameResult(got, want) {
			t.Fatalf("problem %d: the workspace run differs from a fresh run", k)
		}
	}
}

// sameResult compares two results bit for bit (NaN equal to NaN).
func sameResult(a, b *Result) bool {
	if a.Status != b.Status || a.EndTime != b.EndTime || a.Ledger != b.Ledger || len(a.Snapshots) != len(b.Snapshots) {
		return false
	}
	if !reflect.DeepEqual(bits(reflect.ValueOf(a.Summary)), bits(reflect.ValueOf(b.Summary))) {
		return false
	}
	for k := range a.Snapshots {
		if !reflect.DeepEqual(bits(reflect.ValueOf(a.Snapshots[k])), bits(reflect.ValueOf(b.Snapshots[k]))) {
			return false
		}
	}
	return true
}

// bits lists every float64 of a struct (fields and slices) as its bits, and
// every int, so that NaN compares equal to NaN.
func bits(v reflect.Value) []uint64 {
	var out []uint64
	switch v.Kind() {
	case reflect.Float64:
		out = append(out, math.Float64bits(v.Float()))
	case reflect.Int:
		out = append(out, uint64(v.Int()))
	case reflect.Slice:
		out = append(out, uint64(v.Len()))
		for i := range v.Len() {
			out = append(out, bits(v.Index(i))...)
		}
	case reflect.Struct:
		for i := range v.NumField() {
			out = append(out, bits(v.Field(i))...)
		}
	}
	return out
}

// TestWorkspaceAllocatesLess: after its first run, a workspace run of the
// same problem allocates fewer bytes than a fresh run (the solver's arrays
// come from the workspace). Source: the purpose of Workspace; a
// deterministic count, not a timing (STYLE.md habit 9).
func TestWorkspaceAllocatesLess(t *testing.T) {
	p := thickPotting(t, 60)
	p.NoFields = true
	var ws Workspace
	if _, err := ws.Run(context.Background(), p); err != nil {
		t.Fatal(err)
	}
	perRun := func(run func()) uint64 {
		var a, b runtime.MemStats
		runtime.ReadMemStats(&a)
		for range 5 {
			run()
		}
		runtime.ReadMemStats(&b)
		return (b.TotalAlloc - a.TotalAlloc) / 5
	}
	fresh := perRun(func() { Run(context.Background(), p) })
	reused := perRun(func() { ws.Run(context.Background(), p) })
	if !(reused < fresh/2) {
		t.Errorf("%d B per run with the workspace, %d B fresh: want less than half", reused, fresh)
	}
	t.Logf("bytes per run: %d fresh, %d with a workspace", fresh, reused)
}
