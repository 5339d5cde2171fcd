//go:build amd64 && !purego

package physics

import (
	"testing"
	"unsafe"
)

func TestWaveLanesLayout(t *testing.T) {
	// The vector kernels read lanes by the offsets defined at the top of
	// wave_amd64.s (identity: they must be the struct's own).
	var l lanes
	for _, c := range []struct {
		name      string
		got, want uintptr
	}{
		{"yr", unsafe.Offsetof(l.yr), 0}, {"yi", unsafe.Offsetof(l.yi), 32},
		{"e", unsafe.Offsetof(l.e), 64}, {"q", unsafe.Offsetof(l.q), 96},
		{"ydr", unsafe.Offsetof(l.ydr), 128}, {"ydi", unsafe.Offsetof(l.ydi), 160},
		{"ed", unsafe.Offsetof(l.ed), 192}, {"p", unsafe.Offsetof(l.p), 224},
		{"rr", unsafe.Offsetof(l.rr), 256}, {"ri", unsafe.Offsetof(l.ri), 288},
		{"tt", unsafe.Offsetof(l.tt), 320}, {"c1", unsafe.Offsetof(l.c1), 352},
		{"c2", unsafe.Offsetof(l.c2), 384}, {"one", unsafe.Offsetof(l.one), 416},
	} {
		if c.got != c.want {
			t.Errorf("lanes.%s at offset %d, the assembly reads it at %d", c.name, c.got, c.want)
		}
	}
	t.Logf("vector kernels in use: %v", simd)
}
