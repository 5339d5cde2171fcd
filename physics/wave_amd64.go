//go:build amd64 && !purego

package physics

// The AVX2 and FMA kernels of the pass up the stack (wave_amd64.s): four
// frequencies per instruction. They are used when the processor and the
// operating system support both (checked once, with CPUID and XGETBV);
// otherwise, on other architectures and under the purego build tag, the
// pure Go loops of wave.go run. Both give the same results to round-off
// (TestWaveAgainstReference).

func init() { simd = hasAVX2FMA() }

// hasAVX2FMA reports whether AVX2 and FMA instructions may be used: the
// processor has them (CPUID leaf 1, ECX bits 12 FMA, 27 OSXSAVE and 28 AVX;
// leaf 7, EBX bit 5 AVX2) and the operating system saves the YMM registers
// (XCR0 bits 1 and 2). Intel 64 and IA-32 Architectures Software
// Developer's Manual, vol. 1, §14.3 "Detection of Intel AVX instructions"
// and §14.7 for FMA (from memory).
func hasAVX2FMA() bool {
	max, _, _, _ := cpuid(0, 0)
	if max < 7 {
		return false
	}
	_, _, c, _ := cpuid(1, 0)
	const fma, osxsave, avx = 1 << 12, 1 << 27, 1 << 28
	if c&(fma|osxsave|avx) != fma|osxsave|avx {
		return false
	}
	if lo, _ := xgetbv(); lo&6 != 6 {
		return false
	}
	_, b, _, _ := cpuid(7, 0)
	return b&(1<<5) != 0
}

func cpuid(eaxArg, ecxArg uint32) (eax, ebx, ecx, edx uint32)

func xgetbv() (eax, edx uint32)

// lossy4 is kernel.lossy over n frequencies (n a multiple of 4, n > 0),
// four at a time, with the segment's constants and the four lanes' starting
// values in l.
//
//go:noescape
func lossy4(l *lanes, gr, gi, into, in, on *float64, n int)

// lossless4 is kernel.lossless likewise (in is not used).
//
//go:noescape
func lossless4(l *lanes, gr, gi, into, in, on *float64, n int)
