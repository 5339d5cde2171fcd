package dsc

import (
	"math"
	"math/rand/v2"
	"testing"
)

// unevenSamples returns n increasing times with random gaps in [0.5, 1.5) s
// and a noisy peak on a sloped line sampled at them (fixed seed).
func unevenSamples(n int) (t, y []float64) {
	rng := rand.New(rand.NewPCG(7, 0))
	t = make([]float64, n)
	y = make([]float64, n)
	for i := range n {
		if i > 0 {
			t[i] = t[i-1] + 0.5 + rng.Float64()
		}
	}
	mid, w := t[n/2], t[n-1]/10
	for i, ti := range t {
		y[i] = 3 + 0.01*ti + 50*math.Exp(-0.5*math.Pow((ti-mid)/w, 2)) + rng.NormFloat64()
	}
	return t, y
}

// The running sums fit the same quadratic as fitting each window on its
// own: the fitted value at t[i] does not depend on the coordinate in which
// the window is fitted, so the two must agree to rounding.
func TestSmoothRunningMatchesDirect(t *testing.T) {
	ts, ys := unevenSamples(3000)
	for _, h := range []int{4, 5, 17, 40, 1499, 3000} {
		want, _ := smoothDirect(ts, ys, h)
		got, _ := smoothRunning(ts, ys, h)
		for i := range want {
			if d := math.Abs(got[i] - want[i]); !(d <= 1e-9*max(1, math.Abs(want[i]))) {
				t.Fatalf("h=%d sample %d: running %.17g, direct %.17g", h, i, got[i], want[i])
			}
		}
	}
}

// A least-squares quadratic reproduces any quadratic exactly (analytic:
// the data lie in the model's span), at every sample, ends included.
func TestSmoothQuadKeepsQuadratics(t *testing.T) {
	ts, _ := unevenSamples(2000)
	ys := make([]float64, len(ts))
	for i, x := range ts {
		ys[i] = 2 - 0.3*x + 1e-4*x*x
	}
	for _, h := range []int{5, 100} {
		got := smoothQuad(ts, ys, h)
		for i := range ys {
			if d := math.Abs(got[i] - ys[i]); d > 1e-9*max(1, math.Abs(ys[i])) {
				t.Fatalf("h=%d sample %d: %.17g, want %.17g", h, i, got[i], ys[i])
			}
		}
	}
}

// Smoothing with a window that grows with the scan (Process uses n/200
// samples) costs a fixed number of sample updates per sample, not one per
// sample of the window: counted, not timed.
func TestSmoothQuadLinearWork(t *testing.T) {
	for _, n := range []int{20000, 200000} {
		ts := make([]float64, n)
		ys := make([]float64, n)
		for i := range ts {
			ts[i] = float64(i)
			ys[i] = math.Sin(float64(i) / 1000)
		}
		_, work := smoothQuadWork(ts, ys, n/200)
		if work > 5*n {
			t.Errorf("n=%d, h=%d: %d sample updates, want at most %d (5 per sample)", n, n/200, work, 5*n)
		}
	}
}
