//go:build amd64 && !purego

#include "textflag.h"

// Offsets in lanes (wave.go): four float64 per field.
#define YR 0
#define YI 32
#define E 64
#define Q 96
#define YDR 128
#define YDI 160
#define ED 192
#define P 224
#define RR 256
#define RI 288
#define TT 320
#define C1 352
#define C2 384
#define ONE 416

// ENTER, the start of both vector kernels (below), loads their arguments
// (the same for both) and the lanes' y, ρ and ones, and sets AX = 0.
#define ENTER \
	MOVQ    l+0(FP), R8      \
	MOVQ    gr+8(FP), SI     \
	MOVQ    gi+16(FP), DI    \
	MOVQ    into+24(FP), DX  \
	MOVQ    in+32(FP), R9    \
	MOVQ    on+40(FP), R10   \
	MOVQ    n+48(FP), CX     \
	VMOVUPD YR(R8), Y0       \
	VMOVUPD YI(R8), Y1       \
	VMOVUPD RR(R8), Y4       \
	VMOVUPD RI(R8), Y5       \
	VMOVUPD ONE(R8), Y6      \
	XORQ    AX, AX

// func cpuid(eaxArg, ecxArg uint32) (eax, ebx, ecx, edx uint32)
TEXT ·cpuid(SB), NOSPLIT, $0-24
	MOVL eaxArg+0(FP), AX
	MOVL ecxArg+4(FP), CX
	CPUID
	MOVL AX, eax+8(FP)
	MOVL BX, ebx+12(FP)
	MOVL CX, ecx+16(FP)
	MOVL DX, edx+20(FP)
	RET

// func xgetbv() (eax, edx uint32)
TEXT ·xgetbv(SB), NOSPLIT, $0-8
	MOVL $0, CX
	XGETBV
	MOVL AX, eax+0(FP)
	MOVL DX, edx+4(FP)
	RET

// Steps shared by both kernels, on the four frequencies at index AX.
// Registers: Y0 yr, Y1 yi (the lanes' y), Y4 rr, Y5 ri, Y6 ones; SI gr,
// DI gi, DX into, R9 in, R10 on, R8 the lanes, CX n.

// TOP loads Γ_bot (Y7 re, Y8 im) and forms t = Γ_top = Γ_bot y (Y9, Y10).
#define TOP \
	VMOVUPD     (SI)(AX*8), Y7 \
	VMOVUPD     (DI)(AX*8), Y8 \
	VMULPD      Y1, Y8, Y9     \ // bi yi
	VFMSUB231PD Y0, Y7, Y9     \ // tr = br yr − bi yi
	VMULPD      Y0, Y8, Y10    \ // bi yr
	VFMADD231PD Y1, Y7, Y10       // ti = br yi + bi yr

// ACROSS carries Γ across the interface above: d = 1 + ρ t (Y11, Y12),
// r = 1/|d|² (Y13), Γ_bot above = (ρ + t) conj(d) r into gr, gi, and
// into = tt r.
#define ACROSS \
	VMOVAPD      Y9, Y11           \
	VFMADD213PD  Y6, Y4, Y11       \ // dr = rr tr + 1
	VFNMADD231PD Y10, Y5, Y11      \ //      − ri ti
	VMULPD       Y10, Y4, Y12      \ // di = rr ti
	VFMADD231PD  Y9, Y5, Y12       \ //      + ri tr
	VMULPD       Y11, Y11, Y13     \
	VFMADD231PD  Y12, Y12, Y13     \
	VDIVPD       Y13, Y6, Y13      \ // r
	VADDPD       Y4, Y9, Y9        \ // nr = rr + tr
	VADDPD       Y5, Y10, Y10      \ // ni = ri + ti
	VMULPD       Y10, Y12, Y14     \ // ni di
	VFMADD231PD  Y9, Y11, Y14      \ // + nr dr
	VMULPD       Y13, Y14, Y14     \
	VMOVUPD      Y14, (SI)(AX*8)   \
	VMULPD       Y9, Y12, Y15      \ // nr di
	VFMSUB231PD  Y10, Y11, Y15     \ // ni dr − nr di
	VMULPD       Y13, Y15, Y15     \
	VMOVUPD      Y15, (DI)(AX*8)   \
	VMULPD       TT(R8), Y13, Y13  \
	VMOVUPD      Y13, (DX)(AX*8)

// YSTEP carries y four frequencies on: y *= y_Δ⁴.
#define YSTEP \
	VMULPD      YDI(R8), Y1, Y7 \
	VFMSUB231PD YDR(R8), Y0, Y7 \ // yr y_Δr − yi y_Δi
	VMULPD      YDI(R8), Y0, Y8 \
	VFMADD231PD YDR(R8), Y1, Y8 \ // yi y_Δr + yr y_Δi
	VMOVAPD     Y7, Y0          \
	VMOVAPD     Y8, Y1

// func lossy4(l *lanes, gr, gi, into, in, on *float64, n int)
//
// Registers as above, and Y2 e, Y3 q (the lanes' state). Per four frequencies (see kernel.lossy):
//
//	t = Γ_bot y;  in = q c1 (1 + |Γ_bot|² e) − c2 (Im t − e Im Γ_bot);  on = e into
//	d = 1 + ρ t;  r = 1/|d|²;  Γ_bot = (ρ + t) conj(d) r;  into = tt r
//	q += p (1 − q);  e *= e_Δ;  y *= y_Δ
TEXT ·lossy4(SB), NOSPLIT, $0-56
	ENTER
	VMOVUPD E(R8), Y2
	VMOVUPD Q(R8), Y3

lossyloop:
	TOP

	// in = q c1 (1 + (br² + bi²) e) − c2 (ti − bi e)
	VMULPD       Y7, Y7, Y11     // br²
	VFMADD231PD  Y8, Y8, Y11     // + bi²
	VFMADD213PD  Y6, Y2, Y11     // e |Γ_bot|² + 1
	VMULPD       C1(R8), Y3, Y12 // q c1
	VMULPD       Y12, Y11, Y11
	VMULPD       Y8, Y2, Y12     // bi e
	VSUBPD       Y12, Y10, Y12   // ti − bi e
	VFNMADD231PD C2(R8), Y12, Y11
	VMOVUPD      Y11, (R9)(AX*8)

	// on = e into (into still that of the segment below)
	VMULPD  (DX)(AX*8), Y2, Y11
	VMOVUPD Y11, (R10)(AX*8)

	ACROSS

	// q += p (1 − q); e *= e_Δ
	VSUBPD      Y3, Y6, Y7
	VFMADD231PD P(R8), Y7, Y3
	VMULPD      ED(R8), Y2, Y2

	YSTEP

	ADDQ $4, AX
	CMPQ AX, CX
	JLT  lossyloop

	VMOVUPD Y0, YR(R8)
	VMOVUPD Y1, YI(R8)
	VMOVUPD Y2, E(R8)
	VMOVUPD Y3, Q(R8)
	VZEROUPPER
	RET

// func lossless4(l *lanes, gr, gi, into, in, on *float64, n int)
//
// lossy4 without the integral (in is not used): e = 1, so on = into.
TEXT ·lossless4(SB), NOSPLIT, $0-56
	ENTER

losslessloop:
	TOP
	VMOVUPD (DX)(AX*8), Y11
	VMOVUPD Y11, (R10)(AX*8)
	ACROSS
	YSTEP

	ADDQ $4, AX
	CMPQ AX, CX
	JLT  losslessloop

	VMOVUPD Y0, YR(R8)
	VMOVUPD Y1, YI(R8)
	VZEROUPPER
	RET
