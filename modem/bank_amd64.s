//go:build amd64 && !purego

#include "textflag.h"
#include "kernels_amd64.h"

// The Channeliser's AVX2/FMA kernels (bank_amd64.go). A register holds
// four complex64 (re, im, re, im, …); in the transforms each lane is one
// of four independent transforms, so the butterflies are plain vertical
// operations.

// bankOddNeg negates the odd float32 lanes: (re, im) → (re, −im).
DATA bankOddNeg<>+0(SB)/4, $0x00000000
DATA bankOddNeg<>+4(SB)/4, $0x80000000
DATA bankOddNeg<>+8(SB)/4, $0x00000000
DATA bankOddNeg<>+12(SB)/4, $0x80000000
DATA bankOddNeg<>+16(SB)/4, $0x00000000
DATA bankOddNeg<>+20(SB)/4, $0x80000000
DATA bankOddNeg<>+24(SB)/4, $0x00000000
DATA bankOddNeg<>+28(SB)/4, $0x80000000
GLOBL bankOddNeg<>(SB), RODATA|NOPTR, $32

// TRANS4 transposes the 4×4 block of complex64 in A, B, C, D (row j in
// register j) in place, with T0…T3 as scratch.
#define TRANS4(A, B, C, D, T0, T1, T2, T3) \
	VUNPCKLPD  B, A, T0 \ // a0 b0 a2 b2
	VUNPCKHPD  B, A, T1 \ // a1 b1 a3 b3
	VUNPCKLPD  D, C, T2 \ // c0 d0 c2 d2
	VUNPCKHPD  D, C, T3 \ // c1 d1 c3 d3
	VPERM2F128 $0x20, T2, T0, A \ // a0 b0 c0 d0
	VPERM2F128 $0x20, T3, T1, B \ // a1 b1 c1 d1
	VPERM2F128 $0x31, T2, T0, C \ // a2 b2 c2 d2
	VPERM2F128 $0x31, T3, T1, D    // a3 b3 c3 d3

// FOLDSTORE stores Y at position (e + r)·32 + OFF bytes of vb, mod m·32
// (R14 = (e + r)·32, R13 = (m−1)·32).
#define FOLDSTORE(Y, OFF) \
	LEAQ    OFF(R14), AX \
	ANDQ    R13, AX \
	VMOVUPS Y, (DI)(AX*1)

// func bankFoldAVX2(vb, win *complex64, g0 *float32, m, d, rows, e int)
//
// The four windows of a batch start d samples apart; together they span
// rows·m samples, which the kernel walks row by row (m samples, one
// branch each), eight positions (two groups of four) at a time: each
// load of four samples feeds the FMAs of all four lanes, lane j with its
// taps at i = p·m + r − j·d (zero outside its window, so a row where a
// lane has no taps costs a wasted FMA but no test). Eight accumulators,
// so that the FMAs of one row do not wait for those of the last. At the
// end each 4×4 block of complex results (lane j in register j) is
// transposed and each position's four lanes are stored together at
// position (e + r) mod m: the sum by absolute index mod m.
TEXT ·bankFoldAVX2(SB), NOSPLIT, $0-56
	MOVQ vb+0(FP), DI
	MOVQ win+8(FP), SI
	MOVQ g0+16(FP), R8
	MOVQ m+24(FP), R9
	MOVQ R9, R13
	DECQ R13
	SHLQ $5, R13 // (m−1)·32: position mask in vb bytes
	SHLQ $3, R9  // row stride in bytes
	MOVQ d+32(FP), DX
	SHLQ $3, DX
	NEGQ DX      // −d·8: from one lane's taps to the next's
	MOVQ rows+40(FP), CX
	MOVQ e+48(FP), R12
	SHLQ $5, R12 // e·32
	XORQ BX, BX  // position r, in bytes of samples

fold:
	CMPQ   BX, R9
	JGE    folddone
	ZERO8
	LEAQ   (SI)(BX*1), AX   // samples
	LEAQ   (R8)(BX*1), R10  // taps of lane 0 (lane 1 at +DX)
	LEAQ   (R10)(DX*2), R11 // taps of lane 2 (lane 3 at +DX)
	MOVQ   CX, R14

foldrow:
	VMOVUPS     (AX), Y8
	VMOVUPS     32(AX), Y9
	VFMADD231PS (R10), Y8, Y0
	VFMADD231PS 32(R10), Y9, Y4
	VFMADD231PS (R10)(DX*1), Y8, Y1
	VFMADD231PS 32(R10)(DX*1), Y9, Y5
	VFMADD231PS (R11), Y8, Y2
	VFMADD231PS 32(R11), Y9, Y6
	VFMADD231PS (R11)(DX*1), Y8, Y3
	VFMADD231PS 32(R11)(DX*1), Y9, Y7
	ADDQ        R9, AX
	ADDQ        R9, R10
	ADDQ        R9, R11
	DECQ        R14
	JNZ         foldrow

	TRANS4(Y0, Y1, Y2, Y3, Y8, Y9, Y10, Y11)
	TRANS4(Y4, Y5, Y6, Y7, Y8, Y9, Y10, Y11)
	LEAQ (R12)(BX*4), R14 // (e + r)·32
	FOLDSTORE(Y0, 0)
	FOLDSTORE(Y1, 32)
	FOLDSTORE(Y2, 64)
	FOLDSTORE(Y3, 96)
	FOLDSTORE(Y4, 128)
	FOLDSTORE(Y5, 160)
	FOLDSTORE(Y6, 192)
	FOLDSTORE(Y7, 224)
	ADDQ $64, BX
	JMP  fold

folddone:
	VZEROUPPER
	RET

// BFLY4 is the radix-4 butterfly of the four-lane elements in Y0…Y3
// (a, b, c, d), leaving y0 in Y0 and the untwiddled y1, y2, y3 in Y1,
// Y2, Y3; Y15 holds bankOddNeg. It uses Y4…Y7.
#define BFLY4 \
	VADDPS    Y2, Y0, Y4 \ // t0 = a + c
	VSUBPS    Y2, Y0, Y5 \ // t1 = a − c
	VADDPS    Y3, Y1, Y6 \ // t2 = b + d
	VSUBPS    Y3, Y1, Y7 \ // b − d
	VPERMILPS $0xB1, Y7, Y7 \
	VXORPS    Y15, Y7, Y7 \ // t3 = −j·(b − d)
	VADDPS    Y6, Y4, Y0 \ // y0 = t0 + t2
	VADDPS    Y7, Y5, Y1 \ // y1 = t1 + t3
	VSUBPS    Y6, Y4, Y2 \ // y2 = t0 − t2
	VSUBPS    Y7, Y5, Y3   // y3 = t1 − t3

// CMUL multiplies the four complex lanes of X by the twiddle whose real
// and imaginary parts are at RE and IM (broadcast), into Z; WR, WI are
// scratch: Z = X·re ∓ swap(X)·im (subtract in even lanes, add in odd).
#define CMUL(RE, IM, X, Z, WR, WI) \
	VBROADCASTSS   RE, WR \
	VBROADCASTSS   IM, WI \
	VPERMILPS      $0xB1, X, Z \
	VMULPS         WI, Z, Z \
	VFMADDSUB231PS WR, X, Z

// func bankPassAVX2(x *complex64, m, l int, tw *complex64)
TEXT ·bankPassAVX2(SB), NOSPLIT, $0-32
	MOVQ    x+0(FP), DI
	MOVQ    m+8(FP), CX
	SHLQ    $5, CX
	ADDQ    DI, CX // end
	MOVQ    l+16(FP), DX
	SHLQ    $5, DX // block bytes
	MOVQ    DX, R9
	SHRQ    $2, R9 // quarter bytes
	MOVQ    tw+24(FP), R11
	VMOVUPS bankOddNeg<>(SB), Y15

pblock:
	CMPQ DI, CX
	JGE  pdone
	LEAQ (DI)(R9*1), R12
	LEAQ (R12)(R9*1), R13
	LEAQ (R13)(R9*1), R14
	XORQ AX, AX
	MOVQ R11, R10

pbfly:
	VMOVUPS (DI)(AX*1), Y0
	VMOVUPS (R12)(AX*1), Y1
	VMOVUPS (R13)(AX*1), Y2
	VMOVUPS (R14)(AX*1), Y3
	BFLY4
	VMOVUPS Y0, (DI)(AX*1)
	CMUL(0(R10), 4(R10), Y1, Y8, Y9, Y10)
	VMOVUPS Y8, (R12)(AX*1)
	CMUL(8(R10), 12(R10), Y2, Y11, Y12, Y13)
	VMOVUPS Y11, (R13)(AX*1)
	CMUL(16(R10), 20(R10), Y3, Y8, Y9, Y10)
	VMOVUPS Y8, (R14)(AX*1)
	ADDQ    $24, R10
	ADDQ    $32, AX
	CMPQ    AX, R9
	JL      pbfly
	ADDQ    DX, DI
	JMP     pblock

pdone:
	VZEROUPPER
	RET

// func bankLast4AVX2(x *complex64, m int)
TEXT ·bankLast4AVX2(SB), NOSPLIT, $0-16
	MOVQ    x+0(FP), DI
	MOVQ    m+8(FP), CX
	SHLQ    $5, CX
	ADDQ    DI, CX
	VMOVUPS bankOddNeg<>(SB), Y15

l4:
	CMPQ    DI, CX
	JGE     l4done
	VMOVUPS (DI), Y0
	VMOVUPS 32(DI), Y1
	VMOVUPS 64(DI), Y2
	VMOVUPS 96(DI), Y3
	BFLY4
	VMOVUPS Y0, (DI)
	VMOVUPS Y1, 32(DI)
	VMOVUPS Y2, 64(DI)
	VMOVUPS Y3, 96(DI)
	ADDQ    $128, DI
	JMP     l4

l4done:
	VZEROUPPER
	RET

// func bankLast2AVX2(x *complex64, m int)
TEXT ·bankLast2AVX2(SB), NOSPLIT, $0-16
	MOVQ x+0(FP), DI
	MOVQ m+8(FP), CX
	SHLQ $5, CX
	ADDQ DI, CX

l2:
	CMPQ    DI, CX
	JGE     l2done
	VMOVUPS (DI), Y0
	VMOVUPS 32(DI), Y1
	VADDPS  Y1, Y0, Y2
	VSUBPS  Y1, Y0, Y3
	VMOVUPS Y2, (DI)
	VMOVUPS Y3, 32(DI)
	ADDQ    $64, DI
	JMP     l2

l2done:
	VZEROUPPER
	RET

// func bankGatherAVX2(out *complex64, stride int, vb *complex64, rows, offs *int32, n int)
TEXT ·bankGatherAVX2(SB), NOSPLIT, $0-48
	MOVQ out+0(FP), DI
	MOVQ stride+8(FP), DX
	MOVQ vb+16(FP), SI
	MOVQ rows+24(FP), R8
	MOVQ offs+32(FP), R9
	MOVQ n+40(FP), CX

gather:
	MOVLQSX (R8), AX
	IMULQ   DX, AX
	MOVLQSX (R9), BX
	VMOVUPS (SI)(BX*8), Y0
	VMOVUPS Y0, (DI)(AX*1)
	ADDQ    $4, R8
	ADDQ    $4, R9
	DECQ    CX
	JNZ     gather
	VZEROUPPER
	RET
