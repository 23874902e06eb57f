//go:build amd64 && !purego

#include "textflag.h"

// signodd negates the imaginary parts of two complex128 values.
DATA signodd<>+0(SB)/8, $0x0000000000000000
DATA signodd<>+8(SB)/8, $0x8000000000000000
DATA signodd<>+16(SB)/8, $0x0000000000000000
DATA signodd<>+24(SB)/8, $0x8000000000000000
GLOBL signodd<>(SB), RODATA|NOPTR, $32

// CMUL multiplies the complex pairs in X by those at W (memory) into Z,
// with T, WR, WI as scratch:
//   Z = X·re(W) ∓ swap(X)·im(W)  (subtract in even lanes, add in odd)
#define CMUL(W, X, Z, WR, WI) \
	VMOVUPD W, WI \
	VMOVDDUP WI, WR \
	VPERMILPD $15, WI, WI \
	VPERMILPD $5, X, Z \
	VMULPD WI, Z, Z \
	VFMADDSUB231PD X, WR, Z

// func butterfliesAVX2(x0, x1, x2, x3, w1, w2, w3 *complex128, m int)
TEXT ·butterfliesAVX2(SB), NOSPLIT, $0-64
	MOVQ x0+0(FP), SI
	MOVQ x1+8(FP), DI
	MOVQ x2+16(FP), R8
	MOVQ x3+24(FP), R9
	MOVQ w1+32(FP), R10
	MOVQ w2+40(FP), R11
	MOVQ w3+48(FP), R12
	MOVQ m+56(FP), CX
	SHLQ $4, CX // bytes
	XORQ AX, AX
	VMOVUPD signodd<>(SB), Y15

loop:
	CMPQ AX, CX
	JGE  done
	VMOVUPD (SI)(AX*1), Y0 // a
	VMOVUPD (DI)(AX*1), Y1 // b
	VMOVUPD (R8)(AX*1), Y2 // c
	VMOVUPD (R9)(AX*1), Y3 // d
	VADDPD  Y2, Y0, Y4     // t0 = a + c
	VSUBPD  Y2, Y0, Y5     // t1 = a − c
	VADDPD  Y3, Y1, Y6     // t2 = b + d
	VSUBPD  Y3, Y1, Y7     // b − d
	VPERMILPD $5, Y7, Y7   // (im, re)
	VXORPD  Y15, Y7, Y7    // t3 = −j·(b − d) = (im, −re)
	VADDPD  Y6, Y4, Y0     // y0 = t0 + t2
	VMOVUPD Y0, (SI)(AX*1)
	VADDPD  Y7, Y5, Y1     // t1 + t3
	CMUL((R10)(AX*1), Y1, Y8, Y9, Y10)
	VMOVUPD Y8, (DI)(AX*1) // y1 = (t1 + t3)·w1
	VSUBPD  Y6, Y4, Y2     // t0 − t2
	CMUL((R11)(AX*1), Y2, Y11, Y12, Y13)
	VMOVUPD Y11, (R8)(AX*1) // y2 = (t0 − t2)·w2
	VSUBPD  Y7, Y5, Y3     // t1 − t3
	CMUL((R12)(AX*1), Y3, Y8, Y9, Y10)
	VMOVUPD Y8, (R9)(AX*1) // y3 = (t1 − t3)·w3
	ADDQ    $32, AX
	JMP     loop

done:
	VZEROUPPER
	RET
