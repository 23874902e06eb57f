//go:build amd64 && !purego

#include "textflag.h"

// RDOT(w, t, acc, s) multiplies four complex samples at w by the four
// duplicated taps at t and adds them to acc lane by lane (products, then
// sums: no fused multiply-add, as the Go loop), with s as scratch.
#define RDOT(w, t, acc, s) \
	VMOVUPS (w), s; \
	VMULPS  (t), s, s; \
	VADDPS  s, acc, acc

// RSUM leaves in the low 64 bits of Xacc the sum (l₀ + l₁) + (l₂ + l₃)
// of the four complex lanes of Yacc, the Go loop's order (s scratch).
#define RSUM(acc, accx, s, sx) \
	VPERMILPD    $5, acc, s; \
	VADDPS       s, acc, acc; \
	VEXTRACTF128 $1, acc, sx; \
	VADDPS       sx, accx, accx

// RNEXT advances the position (j in AX, phase p in BX) by one output:
// p += down, then while p ≥ up: p −= up, j++.
#define RNEXT(L, D) \
	ADDQ R12, BX; \
L: \
	CMPQ BX, R11; \
	JLT  D; \
	SUBQ R11, BX; \
	INCQ AX; \
	JMP  L; \
D:

// func resampRationalAVX2(dst, buf *complex64, c int, phd *float32, k, up, down int, state *[2]int) (n int)
//
// The rational branch of cstage.process, bit for bit: while j < c, output
// Σₜ ph[p·k + t]·buf[j + t] (t < k, k a multiple of 4), four complex
// lanes summed as the Go loop sums its four partial sums, then p += down
// and j += ⌊p/up⌋, p mod up. Two outputs a pass, so that the sums of one
// do not wait for the other's. phd holds each phase's taps duplicated
// (h, h for the real and imaginary parts), 8·k bytes a phase. state is
// (j, p), read and written back; n is the number of outputs.
TEXT ·resampRationalAVX2(SB), NOSPLIT, $0-72
	MOVQ dst+0(FP), DI
	MOVQ buf+8(FP), SI
	MOVQ phd+24(FP), R9
	MOVQ k+32(FP), R10
	MOVQ R10, R14
	SHLQ $3, R14 // bytes of a phase's duplicated taps
	SHRQ $2, R10 // groups of four taps
	MOVQ up+40(FP), R11
	MOVQ down+48(FP), R12
	MOVQ state+56(FP), AX
	MOVQ 8(AX), BX
	MOVQ 0(AX), AX

rpair:
	CMPQ AX, c+16(FP)
	JGE  rdone
	// output A: window at SI + 8j, taps at R9 + p·R14
	LEAQ  (SI)(AX*8), DX
	MOVQ  BX, R15
	IMULQ R14, R15
	ADDQ  R9, R15
	RNEXT(ra, radone)
	CMPQ  AX, c+16(FP)
	JGE   rsingle
	// output B
	LEAQ   (SI)(AX*8), R8
	MOVQ   BX, R13
	IMULQ  R14, R13
	ADDQ   R9, R13
	RNEXT(rb, rbdone)
	VXORPS Y0, Y0, Y0
	VXORPS Y1, Y1, Y1
	MOVQ   R10, CX

rtwo:
	RDOT(DX, R15, Y0, Y2)
	RDOT(R8, R13, Y1, Y3)
	ADDQ $32, DX
	ADDQ $32, R15
	ADDQ $32, R8
	ADDQ $32, R13
	DECQ CX
	JNZ  rtwo
	RSUM(Y0, X0, Y2, X2)
	RSUM(Y1, X1, Y3, X3)
	VMOVSD X0, (DI)
	VMOVSD X1, 8(DI)
	ADDQ   $16, DI
	JMP    rpair

rsingle:
	VXORPS Y0, Y0, Y0
	MOVQ   R10, CX

rone:
	RDOT(DX, R15, Y0, Y2)
	ADDQ $32, DX
	ADDQ $32, R15
	DECQ CX
	JNZ  rone
	RSUM(Y0, X0, Y2, X2)
	VMOVSD X0, (DI)
	ADDQ   $8, DI

rdone:
	MOVQ state+56(FP), CX
	MOVQ AX, 0(CX)
	MOVQ BX, 8(CX)
	SUBQ dst+0(FP), DI
	SHRQ $3, DI
	MOVQ DI, n+64(FP)
	VZEROUPPER
	RET
