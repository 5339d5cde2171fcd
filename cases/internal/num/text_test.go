package num

import (
	"math"
	"testing"
)

// TestDuration: times for reading never carry six decimals; the seconds
// beside a long time are whole (common practice for reading a cycle time).
func TestDuration(t *testing.T) {
	for _, tc := range []struct {
		t    float64
		want string
	}{
		{22604.059067, "6.28 h (22604 s)"},
		{5688.2, "94.8 min (5688 s)"},
		{95.31, "95.3 s"},
		{150.25, "2.5 min (150.2 s)"},
		{math.NaN(), "n/a"},
		{math.Inf(1), "n/a"},
	} {
		if got := Duration(tc.t); got != tc.want {
			t.Errorf("Duration(%v) = %q, want %q", tc.t, got, tc.want)
		}
	}
	for _, tc := range []struct {
		t    float64
		want string
	}{
		{24155.760682, "24156"}, {24156, "24156"}, {24156.0000001, "24156"}, {24156.001, "24157"},
	} {
		if got := SecondsUp(tc.t); got != tc.want {
			t.Errorf("SecondsUp(%v) = %q, want %q", tc.t, got, tc.want)
		}
	}
}
