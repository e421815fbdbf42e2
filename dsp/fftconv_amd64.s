//go:build amd64 && !purego

#include "textflag.h"

// AVX2/FMA kernels of the power-of-two correlator plan (fftconv.go). Each
// ymm register holds two complex128 values (re, im, re, im): the kernels
// run two butterflies at a time. They compute what the pure Go kernels
// of fftconv.go compute, with complex products by fused multiply-add
// (rounding differs in the last bits). The Go wrappers in
// fftconv_amd64.go check the lengths these assume.

// Sign masks: negate element 1 and 3 (the imaginary parts), element 3
// only, element 2 only.
DATA negIm<>+0(SB)/8, $0x0000000000000000
DATA negIm<>+8(SB)/8, $0x8000000000000000
DATA negIm<>+16(SB)/8, $0x0000000000000000
DATA negIm<>+24(SB)/8, $0x8000000000000000
GLOBL negIm<>(SB), RODATA|NOPTR, $32

DATA negHiIm<>+0(SB)/8, $0x0000000000000000
DATA negHiIm<>+8(SB)/8, $0x0000000000000000
DATA negHiIm<>+16(SB)/8, $0x0000000000000000
DATA negHiIm<>+24(SB)/8, $0x8000000000000000
GLOBL negHiIm<>(SB), RODATA|NOPTR, $32

DATA negHiRe<>+0(SB)/8, $0x0000000000000000
DATA negHiRe<>+8(SB)/8, $0x0000000000000000
DATA negHiRe<>+16(SB)/8, $0x8000000000000000
DATA negHiRe<>+24(SB)/8, $0x0000000000000000
GLOBL negHiRe<>(SB), RODATA|NOPTR, $32

// CMUL multiplies the pairs in U by the pairs in W (complex, per lane)
// into U, using R and S as temporaries.
#define CMUL(U, W, R, S) \
	VMOVDDUP W, R; \
	VPERMILPD $15, W, W; \
	VPERMILPD $5, U, S; \
	VMULPD W, S, S; \
	VFMADDSUB231PD R, U, S; \
	VMOVAPD S, U

// CMULC multiplies U by conj(W) into U.
#define CMULC(U, W, R, S) \
	VMOVDDUP W, R; \
	VPERMILPD $15, W, W; \
	VPERMILPD $5, U, S; \
	VMULPD W, S, S; \
	VFMSUBADD231PD R, U, S; \
	VMOVAPD S, U

// LOADTW loads the twiddles of butterflies k and k+1 (AX points at
// tw[k], [3]complex128 each) as three pairs into Y12, Y13, Y14.
#define LOADTW \
	VMOVUPD (AX), X12; \
	VINSERTF128 $1, 48(AX), Y12, Y12; \
	VMOVUPD 16(AX), X13; \
	VINSERTF128 $1, 64(AX), Y13, Y13; \
	VMOVUPD 32(AX), X14; \
	VINSERTF128 $1, 80(AX), Y14, Y14

// func fwd4AVX(dst, src *complex128, tw *[3]complex128, q, cnt, nseg int)
//
// nseg segments of 4q points (the segment i at src+4q·i, written to
// dst+4q·i): the forward radix-4 butterflies k < cnt (cnt even, ≥ 2)
// of each, x[k+j·q] ← w^{j·k}·Σ_l x[k+l·q]·exp(−j2π·j·l/4), w^{j·k} =
// tw[k][j−1].
TEXT ·fwd4AVX(SB), NOSPLIT, $0-48
	MOVQ dst+0(FP), DI
	MOVQ src+8(FP), SI
	MOVQ tw+16(FP), DX
	MOVQ q+24(FP), R9
	MOVQ cnt+32(FP), BX
	MOVQ nseg+40(FP), R8
	SHLQ $4, R9              // q in bytes
	LEAQ (R9)(R9*1), R10     // 2q
	LEAQ (R10)(R9*1), R11    // 3q
	LEAQ (R11)(R9*1), R12    // 4q
	VMOVUPD negIm<>(SB), Y15

fseg:
	MOVQ SI, R13
	MOVQ DI, R14
	MOVQ DX, AX
	MOVQ BX, CX

floop:
	VMOVUPD (R13), Y0
	VMOVUPD (R13)(R9*1), Y1
	VMOVUPD (R13)(R10*1), Y2
	VMOVUPD (R13)(R11*1), Y3
	LOADTW
	VADDPD Y2, Y0, Y4        // t0 = a0+a2
	VSUBPD Y2, Y0, Y5        // t1 = a0−a2
	VADDPD Y3, Y1, Y6        // t2 = a1+a3
	VSUBPD Y3, Y1, Y7        // d = a1−a3
	VADDPD Y6, Y4, Y0        // y0 = t0+t2
	VSUBPD Y6, Y4, Y2        // t0−t2
	VPERMILPD $5, Y7, Y7     // (di, dr)
	VXORPD Y15, Y7, Y7       // −j·d = (di, −dr)
	VADDPD Y7, Y5, Y1        // t1 − j·d
	VSUBPD Y7, Y5, Y3        // t1 + j·d
	CMUL(Y1, Y12, Y8, Y9)
	CMUL(Y2, Y13, Y10, Y11)
	CMUL(Y3, Y14, Y8, Y9)
	VMOVUPD Y0, (R14)
	VMOVUPD Y1, (R14)(R9*1)
	VMOVUPD Y2, (R14)(R10*1)
	VMOVUPD Y3, (R14)(R11*1)
	ADDQ $32, R13
	ADDQ $32, R14
	ADDQ $96, AX
	SUBQ $2, CX
	JNZ  floop

	ADDQ R12, SI
	ADDQ R12, DI
	DECQ R8
	JNZ  fseg
	VZEROUPPER
	RET

// func inv4AVX(dst, src *complex128, tw *[3]complex128, q, cnt, nseg int)
//
// The inverse radix-4 butterflies, laid out as fwd4AVX's:
// x[k+l·q] ← Σ_j conj(w^{j·k})·x[k+j·q]·exp(+j2π·j·l/4).
TEXT ·inv4AVX(SB), NOSPLIT, $0-48
	MOVQ dst+0(FP), DI
	MOVQ src+8(FP), SI
	MOVQ tw+16(FP), DX
	MOVQ q+24(FP), R9
	MOVQ cnt+32(FP), BX
	MOVQ nseg+40(FP), R8
	SHLQ $4, R9
	LEAQ (R9)(R9*1), R10
	LEAQ (R10)(R9*1), R11
	LEAQ (R11)(R9*1), R12
	VMOVUPD negIm<>(SB), Y15

iseg:
	MOVQ SI, R13
	MOVQ DI, R14
	MOVQ DX, AX
	MOVQ BX, CX

iloop:
	VMOVUPD (R13), Y0
	VMOVUPD (R13)(R9*1), Y1
	VMOVUPD (R13)(R10*1), Y2
	VMOVUPD (R13)(R11*1), Y3
	LOADTW
	CMULC(Y1, Y12, Y8, Y9)
	CMULC(Y2, Y13, Y10, Y11)
	CMULC(Y3, Y14, Y8, Y9)
	VADDPD Y2, Y0, Y4        // t0 = b0+b2
	VSUBPD Y2, Y0, Y5        // t1 = b0−b2
	VADDPD Y3, Y1, Y6        // t2 = b1+b3
	VSUBPD Y3, Y1, Y7        // d = b1−b3
	VADDPD Y6, Y4, Y0        // y0 = t0+t2
	VSUBPD Y6, Y4, Y2        // y2 = t0−t2
	VPERMILPD $5, Y7, Y7
	VXORPD Y15, Y7, Y7       // −j·d
	VSUBPD Y7, Y5, Y1        // y1 = t1 + j·d
	VADDPD Y7, Y5, Y3        // y3 = t1 − j·d
	VMOVUPD Y0, (R14)
	VMOVUPD Y1, (R14)(R9*1)
	VMOVUPD Y2, (R14)(R10*1)
	VMOVUPD Y3, (R14)(R11*1)
	ADDQ $32, R13
	ADDQ $32, R14
	ADDQ $96, AX
	SUBQ $2, CX
	JNZ  iloop

	ADDQ R12, SI
	ADDQ R12, DI
	DECQ R8
	JNZ  iseg
	VZEROUPPER
	RET

// func bottom4AVX(x, spec *complex128, n int)
//
// The last forward level (groups of 4 points, unit twiddles), the
// product by spec and the first inverse level, on n points (n a
// multiple of 4, ≥ 4), in place.
TEXT ·bottom4AVX(SB), NOSPLIT, $0-24
	MOVQ x+0(FP), DI
	MOVQ spec+8(FP), SI
	MOVQ n+16(FP), CX
	SHRQ $2, CX
	VMOVUPD negHiIm<>(SB), Y14
	VMOVUPD negHiRe<>(SB), Y15

bloop:
	VMOVUPD (DI), Y0         // (a0, a1)
	VMOVUPD 32(DI), Y1       // (a2, a3)
	VADDPD Y1, Y0, Y2        // (t0, t2)
	VSUBPD Y1, Y0, Y3        // (t1, d)
	VPERM2F128 $0x20, Y3, Y2, Y4 // (t0, t1)
	VPERM2F128 $0x31, Y3, Y2, Y5 // (t2, d)
	VPERMILPD $6, Y5, Y5     // (t2, (di, dr))
	VXORPD Y14, Y5, Y5       // (t2, −j·d)
	VADDPD Y5, Y4, Y0        // (y0, y1)
	VSUBPD Y5, Y4, Y1        // (y2, y3)
	VMOVUPD (SI), Y6
	VMOVUPD 32(SI), Y7
	CMUL(Y0, Y6, Y8, Y9)
	CMUL(Y1, Y7, Y10, Y11)
	VADDPD Y1, Y0, Y2        // (t0, t2)
	VSUBPD Y1, Y0, Y3        // (t1, d)
	VPERM2F128 $0x20, Y3, Y2, Y4 // (t0, t1)
	VPERM2F128 $0x31, Y3, Y2, Y5 // (t2, d)
	VPERMILPD $6, Y5, Y5
	VXORPD Y15, Y5, Y5       // (t2, +j·d)
	VADDPD Y5, Y4, Y0        // (t0+t2, t1+j·d)
	VSUBPD Y5, Y4, Y1        // (t0−t2, t1−j·d)
	VMOVUPD Y0, (DI)
	VMOVUPD Y1, 32(DI)
	ADDQ $64, DI
	ADDQ $64, SI
	DECQ CX
	JNZ  bloop
	VZEROUPPER
	RET

// LOADTOP loads w^k and w^{k+1} (AX points at w^k) into Y12 and makes
// their squares in Y13 and cubes in Y14 (Y8–Y10 temporaries).
#define LOADTOP \
	VMOVUPD (AX), Y12; \
	VMOVAPD Y12, Y13; \
	VMOVAPD Y12, Y8; \
	CMUL(Y13, Y8, Y9, Y10); \
	VMOVAPD Y13, Y14; \
	VMOVAPD Y12, Y8; \
	CMUL(Y14, Y8, Y9, Y10)

// func fwd4TopAVX(dst, src, w *complex128, q, cnt int)
//
// fwd4AVX on one segment with the top level's compact table: w points at
// w^k (one factor per butterfly); w^{2k} and w^{3k} are its square and
// cube.
TEXT ·fwd4TopAVX(SB), NOSPLIT, $0-40
	MOVQ dst+0(FP), R14
	MOVQ src+8(FP), R13
	MOVQ w+16(FP), AX
	MOVQ q+24(FP), R9
	MOVQ cnt+32(FP), CX
	SHLQ $4, R9
	LEAQ (R9)(R9*1), R10
	LEAQ (R10)(R9*1), R11
	VMOVUPD negIm<>(SB), Y15

tloop:
	LOADTOP
	VMOVUPD (R13), Y0
	VMOVUPD (R13)(R9*1), Y1
	VMOVUPD (R13)(R10*1), Y2
	VMOVUPD (R13)(R11*1), Y3
	VADDPD Y2, Y0, Y4
	VSUBPD Y2, Y0, Y5
	VADDPD Y3, Y1, Y6
	VSUBPD Y3, Y1, Y7
	VADDPD Y6, Y4, Y0
	VSUBPD Y6, Y4, Y2
	VPERMILPD $5, Y7, Y7
	VXORPD Y15, Y7, Y7
	VADDPD Y7, Y5, Y1
	VSUBPD Y7, Y5, Y3
	CMUL(Y1, Y12, Y8, Y9)
	CMUL(Y2, Y13, Y10, Y11)
	CMUL(Y3, Y14, Y8, Y9)
	VMOVUPD Y0, (R14)
	VMOVUPD Y1, (R14)(R9*1)
	VMOVUPD Y2, (R14)(R10*1)
	VMOVUPD Y3, (R14)(R11*1)
	ADDQ $32, R13
	ADDQ $32, R14
	ADDQ $32, AX
	SUBQ $2, CX
	JNZ  tloop
	VZEROUPPER
	RET

// func inv4TopAVX(dst, src, w *complex128, q, cnt int)
//
// inv4AVX on one segment with the top level's compact table.
TEXT ·inv4TopAVX(SB), NOSPLIT, $0-40
	MOVQ dst+0(FP), R14
	MOVQ src+8(FP), R13
	MOVQ w+16(FP), AX
	MOVQ q+24(FP), R9
	MOVQ cnt+32(FP), CX
	SHLQ $4, R9
	LEAQ (R9)(R9*1), R10
	LEAQ (R10)(R9*1), R11
	VMOVUPD negIm<>(SB), Y15

uloop:
	LOADTOP
	VMOVUPD (R13), Y0
	VMOVUPD (R13)(R9*1), Y1
	VMOVUPD (R13)(R10*1), Y2
	VMOVUPD (R13)(R11*1), Y3
	CMULC(Y1, Y12, Y8, Y9)
	CMULC(Y2, Y13, Y10, Y11)
	CMULC(Y3, Y14, Y8, Y9)
	VADDPD Y2, Y0, Y4
	VSUBPD Y2, Y0, Y5
	VADDPD Y3, Y1, Y6
	VSUBPD Y3, Y1, Y7
	VADDPD Y6, Y4, Y0
	VSUBPD Y6, Y4, Y2
	VPERMILPD $5, Y7, Y7
	VXORPD Y15, Y7, Y7
	VSUBPD Y7, Y5, Y1
	VADDPD Y7, Y5, Y3
	VMOVUPD Y0, (R14)
	VMOVUPD Y1, (R14)(R9*1)
	VMOVUPD Y2, (R14)(R10*1)
	VMOVUPD Y3, (R14)(R11*1)
	ADDQ $32, R13
	ADDQ $32, R14
	ADDQ $32, AX
	SUBQ $2, CX
	JNZ  uloop
	VZEROUPPER
	RET
