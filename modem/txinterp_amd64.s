//go:build amd64 && !purego

#include "textflag.h"

// Interpolation kernels (AVX2, FMA): see mixInterpGo in txinterp.go for the
// loop they implement. Each input position j broadcasts every window
// sample w = (re, im) to all four complex lanes and multiplies it by the
// taps of four phases, so a YMM accumulator holds four complex outputs in
// memory order and no horizontal sum is needed.
//
// Registers: DI outputs of position j, SI window of position j, DX taps,
// CX positions left, R8 k, R9 groups, R10 output stride (up·8 bytes),
// R11 taps of the group, R12 outputs of the group, R13 groups left,
// BX window pointer in the tap loop, AX taps left.

// func mixInterpRealAVX2(dst, win *complex64, taps *float32, n, k, groups, up int)
TEXT ·mixInterpRealAVX2(SB), NOSPLIT, $0-56
	MOVQ dst+0(FP), DI
	MOVQ win+8(FP), SI
	MOVQ taps+16(FP), DX
	MOVQ n+24(FP), CX
	MOVQ k+32(FP), R8
	MOVQ groups+40(FP), R9
	MOVQ up+48(FP), R10
	SHLQ $3, R10
	TESTQ CX, CX
	JLE  rdone
	CMPQ R8, $8
	JEQ  r8pos

rpos:
	MOVQ DX, R11
	MOVQ DI, R12
	MOVQ R9, R13

rgrp:
	VXORPS Y0, Y0, Y0
	VXORPS Y1, Y1, Y1
	VXORPS Y2, Y2, Y2
	VXORPS Y3, Y3, Y3
	MOVQ   SI, BX
	MOVQ   R8, AX

rtap:
	VBROADCASTSD 0(BX), Y4
	VBROADCASTSD 8(BX), Y5
	VBROADCASTSD 16(BX), Y6
	VBROADCASTSD 24(BX), Y7
	VFMADD231PS  0(R11), Y4, Y0
	VFMADD231PS  32(R11), Y5, Y1
	VFMADD231PS  64(R11), Y6, Y2
	VFMADD231PS  96(R11), Y7, Y3
	ADDQ         $32, BX
	ADDQ         $128, R11
	SUBQ         $4, AX
	JNZ          rtap

	VADDPS  Y1, Y0, Y0
	VADDPS  Y3, Y2, Y2
	VADDPS  Y2, Y0, Y0
	VMOVUPS Y0, (R12)
	ADDQ    $32, R12
	DECQ    R13
	JNZ     rgrp

	ADDQ $8, SI
	ADDQ R10, DI
	DECQ CX
	JNZ  rpos

rdone:
	VZEROUPPER
	RET

	// k = 8: the eight broadcast window samples stay in Y8…Y15 for all
	// groups of a position, so the group loop loads only taps.
r8pos:
	VBROADCASTSD 0(SI), Y8
	VBROADCASTSD 8(SI), Y9
	VBROADCASTSD 16(SI), Y10
	VBROADCASTSD 24(SI), Y11
	VBROADCASTSD 32(SI), Y12
	VBROADCASTSD 40(SI), Y13
	VBROADCASTSD 48(SI), Y14
	VBROADCASTSD 56(SI), Y15
	MOVQ         DX, R11
	MOVQ         DI, R12
	MOVQ         R9, R13

r8grp:
	VMULPS      0(R11), Y8, Y0
	VMULPS      32(R11), Y9, Y1
	VMULPS      64(R11), Y10, Y2
	VMULPS      96(R11), Y11, Y3
	VFMADD231PS 128(R11), Y12, Y0
	VFMADD231PS 160(R11), Y13, Y1
	VFMADD231PS 192(R11), Y14, Y2
	VFMADD231PS 224(R11), Y15, Y3
	VADDPS      Y1, Y0, Y0
	VADDPS      Y3, Y2, Y2
	VADDPS      Y2, Y0, Y0
	VMOVUPS     Y0, (R12)
	ADDQ        $256, R11
	ADDQ        $32, R12
	DECQ        R13
	JNZ         r8grp

	ADDQ $8, SI
	ADDQ R10, DI
	DECQ CX
	JNZ  r8pos
	VZEROUPPER
	RET

// For complex taps c = cr + j·ci the products w·cr and w·ci accumulate
// separately; at the end (wr·ci, wi·ci) is swapped to (wi·ci, wr·ci) and
// VADDSUBPS gives (wr·cr − wi·ci, wi·cr + wr·ci) = w·c.

// func mixInterpCplxAVX2(dst, win *complex64, taps *float32, n, k, groups, up int)
TEXT ·mixInterpCplxAVX2(SB), NOSPLIT, $0-56
	MOVQ dst+0(FP), DI
	MOVQ win+8(FP), SI
	MOVQ taps+16(FP), DX
	MOVQ n+24(FP), CX
	MOVQ k+32(FP), R8
	MOVQ groups+40(FP), R9
	MOVQ up+48(FP), R10
	SHLQ $3, R10
	TESTQ CX, CX
	JLE  cdone
	CMPQ R8, $8
	JEQ  c8pos

cpos:
	MOVQ DX, R11
	MOVQ DI, R12
	MOVQ R9, R13

cgrp:
	VXORPS Y0, Y0, Y0
	VXORPS Y1, Y1, Y1
	VXORPS Y2, Y2, Y2
	VXORPS Y3, Y3, Y3
	MOVQ   SI, BX
	MOVQ   R8, AX

ctap:
	VBROADCASTSD 0(BX), Y4
	VBROADCASTSD 8(BX), Y5
	VFMADD231PS  0(R11), Y4, Y0
	VFMADD231PS  32(R11), Y4, Y1
	VFMADD231PS  64(R11), Y5, Y2
	VFMADD231PS  96(R11), Y5, Y3
	VBROADCASTSD 16(BX), Y4
	VBROADCASTSD 24(BX), Y5
	VFMADD231PS  128(R11), Y4, Y0
	VFMADD231PS  160(R11), Y4, Y1
	VFMADD231PS  192(R11), Y5, Y2
	VFMADD231PS  224(R11), Y5, Y3
	ADDQ         $32, BX
	ADDQ         $256, R11
	SUBQ         $4, AX
	JNZ          ctap

	VADDPS    Y2, Y0, Y0
	VADDPS    Y3, Y1, Y1
	VPERMILPS $0xB1, Y1, Y1
	VADDSUBPS Y1, Y0, Y0
	VMOVUPS   Y0, (R12)
	ADDQ      $32, R12
	DECQ      R13
	JNZ       cgrp

	ADDQ $8, SI
	ADDQ R10, DI
	DECQ CX
	JNZ  cpos

cdone:
	VZEROUPPER
	RET

	// k = 8, window in registers as above.
c8pos:
	VBROADCASTSD 0(SI), Y8
	VBROADCASTSD 8(SI), Y9
	VBROADCASTSD 16(SI), Y10
	VBROADCASTSD 24(SI), Y11
	VBROADCASTSD 32(SI), Y12
	VBROADCASTSD 40(SI), Y13
	VBROADCASTSD 48(SI), Y14
	VBROADCASTSD 56(SI), Y15
	MOVQ         DX, R11
	MOVQ         DI, R12
	MOVQ         R9, R13

c8grp:
	VMULPS      0(R11), Y8, Y0
	VMULPS      32(R11), Y8, Y1
	VMULPS      64(R11), Y9, Y2
	VMULPS      96(R11), Y9, Y3
	VFMADD231PS 128(R11), Y10, Y0
	VFMADD231PS 160(R11), Y10, Y1
	VFMADD231PS 192(R11), Y11, Y2
	VFMADD231PS 224(R11), Y11, Y3
	VFMADD231PS 256(R11), Y12, Y0
	VFMADD231PS 288(R11), Y12, Y1
	VFMADD231PS 320(R11), Y13, Y2
	VFMADD231PS 352(R11), Y13, Y3
	VFMADD231PS 384(R11), Y14, Y0
	VFMADD231PS 416(R11), Y14, Y1
	VFMADD231PS 448(R11), Y15, Y2
	VFMADD231PS 480(R11), Y15, Y3
	VADDPS      Y2, Y0, Y0
	VADDPS      Y3, Y1, Y1
	VPERMILPS   $0xB1, Y1, Y1
	VADDSUBPS   Y1, Y0, Y0
	VMOVUPS     Y0, (R12)
	ADDQ        $512, R11
	ADDQ        $32, R12
	DECQ        R13
	JNZ         c8grp

	ADDQ $8, SI
	ADDQ R10, DI
	DECQ CX
	JNZ  c8pos
	VZEROUPPER
	RET

// Level statistics (AVX2): squares of the I and Q parts summed per lane
// (their total is Σ|y|²), and |y|² = I² + Q² (pairs added after a swap)
// kept by maximum. The peak operands are ordered so that a NaN sample
// leaves the peak unchanged, as the Go loop does.

// func levelAVX2(y *complex64, n int, sum, peak *[8]float32)
TEXT ·levelAVX2(SB), NOSPLIT, $0-32
	MOVQ    y+0(FP), SI
	MOVQ    n+8(FP), CX
	MOVQ    sum+16(FP), DI
	MOVQ    peak+24(FP), DX
	VMOVUPS (DI), Y0
	VXORPS  Y1, Y1, Y1
	VXORPS  Y2, Y2, Y2
	VXORPS  Y3, Y3, Y3
	VMOVUPS (DX), Y4
	VMOVUPS Y4, Y5
	TESTQ   CX, CX
	JLE     ldone

lloop:
	VMOVUPS   0(SI), Y8
	VMOVUPS   32(SI), Y9
	VMOVUPS   64(SI), Y10
	VMOVUPS   96(SI), Y11
	VMULPS    Y8, Y8, Y8
	VMULPS    Y9, Y9, Y9
	VMULPS    Y10, Y10, Y10
	VMULPS    Y11, Y11, Y11
	VADDPS    Y8, Y0, Y0
	VADDPS    Y9, Y1, Y1
	VADDPS    Y10, Y2, Y2
	VADDPS    Y11, Y3, Y3
	VPERMILPS $0xB1, Y8, Y12
	VPERMILPS $0xB1, Y9, Y13
	VPERMILPS $0xB1, Y10, Y14
	VPERMILPS $0xB1, Y11, Y15
	VADDPS    Y12, Y8, Y8
	VADDPS    Y13, Y9, Y9
	VADDPS    Y14, Y10, Y10
	VADDPS    Y15, Y11, Y11
	VMAXPS    Y4, Y8, Y4
	VMAXPS    Y5, Y9, Y5
	VMAXPS    Y4, Y10, Y4
	VMAXPS    Y5, Y11, Y5
	ADDQ      $128, SI
	SUBQ      $16, CX
	JNZ       lloop

ldone:
	VADDPS  Y1, Y0, Y0
	VADDPS  Y3, Y2, Y2
	VADDPS  Y2, Y0, Y0
	VMAXPS  Y4, Y5, Y4
	VMOVUPS Y0, (DI)
	VMOVUPS Y4, (DX)
	VZEROUPPER
	RET

// Real FIR (AVX2, FMA): out[i] = Σₖ h[k]·w[i+k] for 32 outputs at a time,
// four registers of eight consecutive outputs, h[k] broadcast. Every
// output is accumulated over k in order, so any output's value does not
// depend on the group it falls in.

// func firRealAVX2(out, w, h *float32, n, l int)
TEXT ·firRealAVX2(SB), NOSPLIT, $0-40
	MOVQ out+0(FP), DI
	MOVQ w+8(FP), SI
	MOVQ h+16(FP), DX
	MOVQ n+24(FP), CX
	MOVQ l+32(FP), R8
	TESTQ CX, CX
	JLE  fdone

fgrp:
	VXORPS Y0, Y0, Y0
	VXORPS Y1, Y1, Y1
	VXORPS Y2, Y2, Y2
	VXORPS Y3, Y3, Y3
	MOVQ   SI, BX
	MOVQ   DX, R11
	MOVQ   R8, AX

ftap:
	VBROADCASTSS (R11), Y4
	VFMADD231PS  0(BX), Y4, Y0
	VFMADD231PS  32(BX), Y4, Y1
	VFMADD231PS  64(BX), Y4, Y2
	VFMADD231PS  96(BX), Y4, Y3
	ADDQ         $4, BX
	ADDQ         $4, R11
	DECQ         AX
	JNZ          ftap

	VMOVUPS Y0, 0(DI)
	VMOVUPS Y1, 32(DI)
	VMOVUPS Y2, 64(DI)
	VMOVUPS Y3, 96(DI)
	ADDQ    $128, DI
	ADDQ    $128, SI
	SUBQ    $32, CX
	JNZ     fgrp

fdone:
	VZEROUPPER
	RET

// Decimating dot products (AVX2, FMA): out[i] = Σₜ h[t]·w[i·step + t].
// Eight taps per FMA into Y0, a last four into X2 (a VEX XMM operation
// would clear the upper half of Y0), then a horizontal sum.

// func dotStepAVX2(out, w, h *float32, n, k, step int)
TEXT ·dotStepAVX2(SB), NOSPLIT, $0-48
	MOVQ out+0(FP), DI
	MOVQ w+8(FP), SI
	MOVQ h+16(FP), DX
	MOVQ n+24(FP), CX
	MOVQ k+32(FP), R8
	MOVQ step+40(FP), R10
	SHLQ $2, R10
	MOVQ R8, R9
	SHRQ $3, R9            // groups of eight taps
	ANDQ $4, R8            // 4 when a group of four is left
	TESTQ CX, CX
	JLE  ddone

dout:
	VXORPS Y0, Y0, Y0
	VXORPS Y1, Y1, Y1
	VXORPS X2, X2, X2
	MOVQ   SI, BX
	MOVQ   DX, R11
	MOVQ   R9, AX
	TESTQ  AX, AX
	JEQ    dtail

d8:
	VMOVUPS     (BX), Y3
	VFMADD231PS (R11), Y3, Y0
	ADDQ        $32, BX
	ADDQ        $32, R11
	DECQ        AX
	JNZ         d8

dtail:
	TESTQ       R8, R8
	JEQ         dsum
	VMOVUPS     (BX), X3
	VFMADD231PS (R11), X3, X2

dsum:
	VEXTRACTF128 $1, Y0, X1
	VADDPS       X1, X0, X0
	VADDPS       X2, X0, X0
	VHADDPS      X0, X0, X0
	VHADDPS      X0, X0, X0
	VMOVSS       X0, (DI)
	ADDQ         $4, DI
	ADDQ         R10, SI
	DECQ         CX
	JNZ          dout

ddone:
	VZEROUPPER
	RET
