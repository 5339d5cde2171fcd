package dsc

import (
	"context"
	"errors"
	"testing"
)

// An interrupted analysis stops: before the scans are processed it returns
// nothing; during the fit it returns what was computed (the curves and the
// isoconversional estimates) without a fit, and says so.
func TestAnalyzeContextStops(t *testing.T) {
	var scans []*Scan
	for _, s := range DemoScans()[:4] {
		sc, err := Synthesize(s)
		if err != nil {
			t.Fatal(err)
		}
		scans = append(scans, sc)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if an, err := AnalyzeContext(ctx, scans, Options{Model: NthOrder}); an != nil || !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled before: analysis %v, error %v; want none and context.Canceled", an != nil, err)
	}

	ctx, cancel = context.WithCancel(context.Background())
	defer cancel()
	iters := 0
	opt := Options{Model: NthOrder, Progress: func(int, float64) { iters++; cancel() }}
	an, err := AnalyzeContext(ctx, scans, opt)
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("cancelled in the fit: error %v, want context.Canceled", err)
	}
	if an == nil || an.Fit != nil || an.FitRefused == "" || len(an.Curves) != 4 || an.Kissinger == nil {
		t.Fatalf("cancelled in the fit: want the curves and estimates without a fit, got %+v", an)
	}
	if iters != 1 {
		t.Errorf("the fit went on for %d iterations after the cancel, want it to stop after the first", iters-1)
	}
}
