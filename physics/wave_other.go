//go:build !amd64 || purego

package physics

// Without the AVX2 kernels (simd stays false) these are never called.

func lossy4(l *lanes, gr, gi, into, in, on *float64, n int) { panic("physics: no vector kernel") }

func lossless4(l *lanes, gr, gi, into, in, on *float64, n int) { panic("physics: no vector kernel") }
