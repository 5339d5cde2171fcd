package num

import (
	"math"
	"math/rand/v2"
	"strconv"
	"testing"
)

// TestAppendFixedMatchesStrconv: AppendFixed writes exactly Fixed, the
// rounded value formatted by strconv.FormatFloat (the reference), over
// random values of every magnitude the outputs hold, both signs, values on
// and next to the rounding boundaries, at the ends of the integer path, and
// special values.
func TestAppendFixedMatchesStrconv(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	check := func(v float64, d int) {
		want := Fixed(v, d)
		if got := string(AppendFixed(nil, v, d)); got != want {
			t.Fatalf("AppendFixed(%v (%b), %d) = %q, want %q", v, v, d, got, want)
		}
	}
	for _, d := range []int{0, 1, 3, 6, 9} {
		for _, v := range []float64{0, math.Copysign(0, -1), 1e-12, -1e-12, 0.5e-6, -0.5e-6, 1.5e-6, 2.5e-6,
			math.Inf(1), math.Inf(-1), math.NaN(), math.MaxFloat64, -math.MaxFloat64, 5e-324,
			fixedFastMax[d], -fixedFastMax[d], math.Nextafter(fixedFastMax[d], 0), 1e15, 123456.7890125} {
			check(v, d)
		}
		for range 100000 {
			mag := math.Pow(10, -12+rng.Float64()*(20))
			v := mag * (rng.Float64() - 0.5)
			check(v, d)
			// on a rounding boundary of d decimals, and next to it
			h := (math.Round(v*math.Pow10(d)) + 0.5) / math.Pow10(d)
			check(h, d)
			check(math.Nextafter(h, 0), d)
			check(math.Nextafter(h, math.Inf(1)), d)
			// a whole number of units of 10^-d
			check(float64(rng.Int64N(1<<40)-(1<<39))/math.Pow10(d), d)
		}
	}
}

// TestAppendSigMatchesSig: AppendSig writes exactly Sig (strconv.FormatFloat).
func TestAppendSigMatchesSig(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	for _, v := range []float64{0, math.Copysign(0, -1), math.NaN(), math.Inf(1), 1e-300, 123456789012, 0.1, 1} {
		if got, want := string(AppendSig(nil, v)), Sig(v); got != want {
			t.Fatalf("AppendSig(%v) = %q, want %q", v, got, want)
		}
	}
	for range 100000 {
		v := math.Pow(10, -20+rng.Float64()*30) * (rng.Float64() - 0.5)
		if got, want := string(AppendSig(nil, v)), Sig(v); got != want {
			t.Fatalf("AppendSig(%v) = %q, want %q", v, got, want)
		}
	}
}

var appendSink []byte

func BenchmarkAppendFixed6(b *testing.B) {
	buf := make([]byte, 0, 64)
	v := 65.123456789
	for b.Loop() {
		buf = AppendFixed(buf[:0], v, 6)
		v += 0.37
	}
	appendSink = buf
}

// A time is written as the shortest decimal that parses back to the same
// float64: no rounding, so distinct times stay distinct.
func TestAppendTimeRoundTrips(t *testing.T) {
	for _, v := range []float64{0, 1e-6, 1e-8, 2e-8, 120, 3600.0000001, 5725.431341, 16710, 1.5e7, 1.0 / 3} {
		s := string(AppendTime(nil, v))
		back, err := strconv.ParseFloat(s, 64)
		if err != nil || back != v {
			t.Errorf("AppendTime(%v) = %q, reads back as %v (%v)", v, s, back, err)
		}
	}
	if s := string(AppendTime(nil, 1e-6)); s != "1e-06" {
		t.Errorf("1 µs written as %q, want 1e-06", s)
	}
	if s := string(AppendTime(nil, math.Copysign(0, -1))); s != "0" {
		t.Errorf("-0 written as %q", s)
	}
}
