//go:build amd64 && !purego

#include "textflag.h"
#include "kernels_amd64.h"

// The AVX2/FMA kernels of channel_amd64.go. Their pure-Go twins,
// dotComplexGo and dotRealGo in channel_kernel.go, are the reference
// loops; TestKernelsMatchGo compares both on random data.
//
// Taps are stored duplicated, t[2k] = t[2k+1] = tap k, and zero-padded
// to whole groups of four complex samples (eight floats), so that one
// 256-bit load of four interleaved samples (xr, xi, …) multiplies a tap
// register lane by lane. A last partial group of rem samples is read
// with VMASKMOVPS, which touches no memory in its masked lanes.

// func dotComplexAVX2(dst []complex64, x *complex64, step int, crd, cid *float32, full int, mask *[8]int32, rem int, p, r complex128)
//
// dst[m] = p·rᵐ·Σₖ (cr[k] + j·ci[k])·x[m·step + k], k < 4·full + rem.
// Two accumulators per part, A = Σ cr·(xr, xi) and B = Σ ci·(xr, xi);
// at the end (A.re − B.im, A.im + B.re) is one VPERMILPS and one
// VADDSUBPS, then the four complex lanes are summed. The phasor q = p·rᵐ
// runs as a float64 recursion in X8 (q ← q·r by VFMADDSUB, as (qr·rr −
// qi·ri, qi·rr + qr·ri)), off the critical path of the dot products, and
// multiplies the sum after rounding to float32.
TEXT ·dotComplexAVX2(SB), NOSPLIT, $0-112
	MOVQ dst_base+0(FP), DI
	MOVQ dst_len+8(FP), CX
	MOVQ x+24(FP), SI
	MOVQ step+32(FP), DX
	SHLQ $3, DX
	MOVQ crd+40(FP), R8
	MOVQ cid+48(FP), R9
	MOVQ full+56(FP), BX
	MOVQ mask+64(FP), R11
	MOVQ rem+72(FP), R12
	TESTQ CX, CX
	JZ   cdone
	VMOVDQU  (R11), Y7
	VMOVSD   p_real+80(FP), X8
	VMOVHPD  p_imag+88(FP), X8, X8
	VMOVDDUP r_real+96(FP), X9
	VMOVDDUP r_imag+104(FP), X10
	SHLQ     $5, BX          // bytes of the full groups (window and taps alike)
	MOVQ     BX, R13
	ANDQ     $-128, R13      // bytes run four groups at a time

couter:
	VXORPS Y0, Y0, Y0
	VXORPS Y1, Y1, Y1
	VXORPS Y2, Y2, Y2
	VXORPS Y3, Y3, Y3
	XORQ   AX, AX
	TESTQ  R13, R13
	JZ     ctwo

cfour:
	VMOVUPS     (SI)(AX*1), Y4
	VMOVUPS     32(SI)(AX*1), Y5
	VFMADD231PS (R8)(AX*1), Y4, Y0
	VFMADD231PS (R9)(AX*1), Y4, Y1
	VFMADD231PS 32(R8)(AX*1), Y5, Y2
	VFMADD231PS 32(R9)(AX*1), Y5, Y3
	VMOVUPS     64(SI)(AX*1), Y4
	VMOVUPS     96(SI)(AX*1), Y5
	VFMADD231PS 64(R8)(AX*1), Y4, Y0
	VFMADD231PS 64(R9)(AX*1), Y4, Y1
	VFMADD231PS 96(R8)(AX*1), Y5, Y2
	VFMADD231PS 96(R9)(AX*1), Y5, Y3
	ADDQ        $128, AX
	CMPQ        AX, R13
	JLT         cfour

ctwo:
	LEAQ        64(AX), R11
	CMPQ        R11, BX
	JGT         cone
	VMOVUPS     (SI)(AX*1), Y4
	VMOVUPS     32(SI)(AX*1), Y5
	VFMADD231PS (R8)(AX*1), Y4, Y0
	VFMADD231PS (R9)(AX*1), Y4, Y1
	VFMADD231PS 32(R8)(AX*1), Y5, Y2
	VFMADD231PS 32(R9)(AX*1), Y5, Y3
	MOVQ        R11, AX

cone:
	CMPQ        AX, BX
	JGE         ctail
	VMOVUPS     (SI)(AX*1), Y4
	VFMADD231PS (R8)(AX*1), Y4, Y0
	VFMADD231PS (R9)(AX*1), Y4, Y1
	ADDQ        $32, AX

ctail:
	TESTQ       R12, R12
	JZ          creduce
	VMASKMOVPS  (SI)(AX*1), Y7, Y4
	VFMADD231PS (R8)(AX*1), Y4, Y2
	VFMADD231PS (R9)(AX*1), Y4, Y3

creduce:
	VADDPS       Y2, Y0, Y0
	VADDPS       Y3, Y1, Y1
	VPERMILPS    $0xB1, Y1, Y1
	VADDSUBPS    Y1, Y0, Y0
	VEXTRACTF128 $1, Y0, X1
	VADDPS       X1, X0, X0
	VMOVHLPS     X0, X1, X1
	VADDPS       X1, X0, X0

	// rotate by q in float32, then q ← q·r in float64
	VCVTPD2PSX     X8, X11
	VMOVSLDUP      X11, X12
	VMOVSHDUP      X11, X13
	VPERMILPS      $0xB1, X0, X1
	VMULPS         X13, X1, X1
	VFMADDSUB213PS X1, X12, X0
	VMOVSD         X0, (DI)
	VPERMILPD      $1, X8, X11
	VMULPD         X10, X11, X11
	VFMADDSUB213PD X11, X9, X8

	ADDQ DX, SI
	ADDQ $8, DI
	DECQ CX
	JNZ  couter

cdone:
	VZEROUPPER
	RET

// func dotRealAVX2(dst []complex64, x *complex64, step int, hd *float32, full int, mask *[8]int32, rem int)
//
// dst[m] = Σₖ h[k]·x[m·step + k], k < 4·full + rem.
TEXT ·dotRealAVX2(SB), NOSPLIT, $0-72
	MOVQ dst_base+0(FP), DI
	MOVQ dst_len+8(FP), CX
	MOVQ x+24(FP), SI
	MOVQ step+32(FP), DX
	SHLQ $3, DX
	MOVQ hd+40(FP), R8
	MOVQ full+48(FP), R10
	MOVQ mask+56(FP), R11
	MOVQ rem+64(FP), R12
	TESTQ CX, CX
	JZ   rdone
	VMOVDQU (R11), Y7

router:
	VXORPS Y0, Y0, Y0
	VXORPS Y1, Y1, Y1
	VXORPS Y2, Y2, Y2
	VXORPS Y3, Y3, Y3
	MOVQ SI, AX
	MOVQ R8, BX
	MOVQ R10, R11
	CMPQ R11, $4
	JLT  rtwo

rfours:
	VMOVUPS     (AX), Y4
	VMOVUPS     32(AX), Y5
	VMOVUPS     64(AX), Y6
	VMOVUPS     96(AX), Y8
	VFMADD231PS (BX), Y4, Y0
	VFMADD231PS 32(BX), Y5, Y1
	VFMADD231PS 64(BX), Y6, Y2
	VFMADD231PS 96(BX), Y8, Y3
	ADDQ        $128, AX
	ADDQ        $128, BX
	SUBQ        $4, R11
	CMPQ        R11, $4
	JGE         rfours

rtwo:
	CMPQ        R11, $2
	JLT         rsingle
	VMOVUPS     (AX), Y4
	VMOVUPS     32(AX), Y5
	VFMADD231PS (BX), Y4, Y0
	VFMADD231PS 32(BX), Y5, Y1
	ADDQ        $64, AX
	ADDQ        $64, BX
	SUBQ        $2, R11

rsingle:
	TESTQ       R11, R11
	JZ          rtail
	VMOVUPS     (AX), Y4
	VFMADD231PS (BX), Y4, Y2
	ADDQ        $32, AX
	ADDQ        $32, BX

rtail:
	TESTQ       R12, R12
	JZ          rreduce
	VMASKMOVPS  (AX), Y7, Y4
	VFMADD231PS (BX), Y4, Y3

rreduce:
	VADDPS       Y1, Y0, Y0
	VADDPS       Y3, Y2, Y2
	VADDPS       Y2, Y0, Y0
	VEXTRACTF128 $1, Y0, X1
	VADDPS       X1, X0, X0
	VMOVHLPS     X0, X1, X1
	VADDPS       X1, X0, X0
	VMOVSD       X0, (DI)
	ADDQ         $8, DI
	ADDQ         DX, SI
	DECQ         CX
	JNZ          router

rdone:
	VZEROUPPER
	RET

// ITAPS adds the taps of one group of four phases for one input to two
// accumulators, the even taps to A and the odd ones to B (T0, T1
// scratch): taps rows from BX (R8 walks them, DX bytes apart), the input
// samples broadcast from SI, R9 taps. PAIR, ONE and DONE are the macro's
// labels, unique per use.
#define ITAPS(A, B, T0, T1, PAIR, ONE, DONE) \
	MOVQ BX, R8; \
	XORQ R13, R13; \
	MOVQ R9, R10; \
	SUBQ $1, R10; \
PAIR: \
	CMPQ         R13, R10; \
	JGE          ONE; \
	VBROADCASTSD (SI)(R13*8), T0; \
	VBROADCASTSD 8(SI)(R13*8), T1; \
	VFMADD231PS  (R8), T0, A; \
	VFMADD231PS  (R8)(DX*1), T1, B; \
	LEAQ         (R8)(DX*2), R8; \
	ADDQ         $2, R13; \
	JMP          PAIR; \
ONE: \
	CMPQ         R13, R9; \
	JGE          DONE; \
	VBROADCASTSD (SI)(R13*8), T0; \
	VFMADD231PS  (R8), T0, A; \
DONE:

// func interpAVX2(dst *complex64, x *complex64, n int, taps *float32, k, full int, mask *[8]int32, part, stride int)
//
// For each input j < n and phase p < u = 4·full + (u mod 4):
// dst[j·u + p] = Σₜ ph[p][t]·x[j + t], t < k. The taps are transposed,
// taps[(t·G + g)·8 + 2q + {0, 1}] = ph[4g + q][t] with G = full + part
// groups of four phases, so each sample is broadcast (VBROADCASTSD) and
// multiplies four phases at once; the group of the last u mod 4 phases
// (part = 1) is stored with VMASKMOVPS. stride = 8·u bytes.
TEXT ·interpAVX2(SB), NOSPLIT, $0-72
	MOVQ dst+0(FP), DI
	MOVQ x+8(FP), SI
	MOVQ n+16(FP), CX
	MOVQ k+32(FP), R9
	MOVQ mask+48(FP), R11
	MOVQ part+56(FP), R12
	VMOVDQU (R11), Y7
	MOVQ full+40(FP), DX
	ADDQ R12, DX
	SHLQ $5, DX
	TESTQ CX, CX
	JZ   idone

iouter:
	MOVQ  taps+24(FP), BX
	MOVQ  DI, R11
	MOVQ  full+40(FP), AX
	TESTQ AX, AX
	JZ    ipart

igroup:
	VXORPS Y0, Y0, Y0
	VXORPS Y1, Y1, Y1
	ITAPS(Y0, Y1, Y2, Y3, igpair, igone, igsum)
	VADDPS  Y1, Y0, Y0
	VMOVUPS Y0, (R11)
	ADDQ    $32, R11
	ADDQ    $32, BX
	DECQ    AX
	JNZ     igroup

ipart:
	TESTQ  R12, R12
	JZ     inext
	VXORPS Y0, Y0, Y0
	VXORPS Y1, Y1, Y1
	MOVQ   BX, R8
	XORQ   R13, R13
	MOVQ   R9, R10
	SUBQ   $1, R10

ippair:
	CMPQ         R13, R10
	JGE          ipone
	VBROADCASTSD (SI)(R13*8), Y2
	VBROADCASTSD 8(SI)(R13*8), Y3
	VFMADD231PS  (R8), Y2, Y0
	VFMADD231PS  (R8)(DX*1), Y3, Y1
	LEAQ         (R8)(DX*2), R8
	ADDQ         $2, R13
	JMP          ippair

ipone:
	CMPQ         R13, R9
	JGE          ipsum
	VBROADCASTSD (SI)(R13*8), Y2
	VFMADD231PS  (R8), Y2, Y0

ipsum:
	VADDPS     Y1, Y0, Y0
	VMASKMOVPS Y0, Y7, (R11)

inext:
	ADDQ $8, SI
	ADDQ stride+64(FP), DI
	DECQ CX
	JNZ  iouter

idone:
	VZEROUPPER
	RET

// Shared pieces of the symmetric kernels below.
//
// SUMS2(b) adds the four complex lanes of Y0 and of b, as
// (l₀ + l₂) + (l₁ + l₃), into X4 = (Σ Y0, Σ b); it uses Y5.
#define SUMS2(b) \
	VPERM2F128   $0x20, b, Y0, Y4; \
	VPERM2F128   $0x31, b, Y0, Y5; \
	VADDPS       Y5, Y4, Y4; \
	VPERMILPD    $5, Y4, Y5; \
	VADDPS       Y5, Y4, Y4; \
	VEXTRACTF128 $1, Y4, X5; \
	VUNPCKLPD    X5, X4, X4

// SUMS4 turns the four lanes' accumulators (A, B) = (Y0, Y1), (Y2, Y3),
// (Y4, Y5), (Y6, Y7) into C = (A.re − B.im, A.im + B.re), then sums each
// C's four complex lanes in SUMS2's order, giving (s₀, s₂ | s₁, s₃) in
// Y11; it uses Y8…Y10.
#define SUMS4 \
	VPERMILPS  $0xB1, Y1, Y1; \
	VADDSUBPS  Y1, Y0, Y0; \
	VPERMILPS  $0xB1, Y3, Y3; \
	VADDSUBPS  Y3, Y2, Y2; \
	VPERMILPS  $0xB1, Y5, Y5; \
	VADDSUBPS  Y5, Y4, Y4; \
	VPERMILPS  $0xB1, Y7, Y7; \
	VADDSUBPS  Y7, Y6, Y6; \
	VPERM2F128 $0x20, Y2, Y0, Y8; \
	VPERM2F128 $0x31, Y2, Y0, Y9; \
	VADDPS     Y9, Y8, Y8; \
	VPERM2F128 $0x20, Y6, Y4, Y10; \
	VPERM2F128 $0x31, Y6, Y4, Y11; \
	VADDPS     Y11, Y10, Y10; \
	VUNPCKLPD  Y10, Y8, Y11; \
	VUNPCKHPD  Y10, Y8, Y9; \
	VADDPS     Y9, Y11, Y11

// ROTATE4 multiplies Y11 by the float64 phasors (Y12 | Y13) rounded to
// float32; it uses Y10, Y14, Y15.
#define ROTATE4 \
	VCVTPD2PSY     Y12, X14; \
	VCVTPD2PSY     Y13, X15; \
	VINSERTF128    $1, X15, Y14, Y14; \
	VMOVSLDUP      Y14, Y15; \
	VMOVSHDUP      Y14, Y14; \
	VPERMILPS      $0xB1, Y11, Y10; \
	VMULPS         Y14, Y10, Y10; \
	VFMADDSUB213PS Y10, Y15, Y11

// ADVANCE2 multiplies the phasors Y12, Y13 (float64) by the rotations at
// AX (Re, Im for Y12, then for Y13, each duplicated to a vector); it uses
// Y8, Y9.
#define ADVANCE2 \
	VPERMILPD      $5, Y12, Y8; \
	VMULPD         32(AX), Y8, Y8; \
	VFMADDSUB132PD (AX), Y8, Y12; \
	VPERMILPD      $5, Y13, Y9; \
	VMULPD         96(AX), Y9, Y9; \
	VFMADDSUB132PD 64(AX), Y9, Y13

// func dotSymAVX2(dst *complex64, n int, x *complex64, step int, pa, pb *float32, groups, hi int, q *[4]float64, r2 complex128)
//
// The symmetric form of ShiftDecimator.blockSym, two outputs per pass:
// for output m and pair slot k (lo = x[m·step + k], hi = x[m·step + L−1−k])
//
//	dst[m] = qₘ·Σₖ (pa[k]·(lo + hi) − j·pb[k]·(hi − lo)),
//
// pa and pb duplicated in the kernel layout, pb negated so that the end is
// the same VPERMILPS + VADDSUBPS as dotComplexAVX2's. Slots come in groups
// of four; the four hi samples of a group are loaded from x + hi − 32·g
// (hi = 8·(L−4)) and reversed by VPERMPD. Each pass makes outputs 2i and
// 2i+1 from one read of the taps, then rotates both by the phasors
// q = (q₂ᵢ, q₂ᵢ₊₁) (float64, Y8), advanced by r² after each pass, so the
// phasor recursion is half as long a chain as one per output. An odd last
// output runs as a pass whose second output repeats the first window and
// is not stored, so every output has the same arithmetic wherever the
// blocks of a stream begin.
TEXT ·dotSymAVX2(SB), NOSPLIT, $0-88
	MOVQ dst+0(FP), DI
	MOVQ n+8(FP), CX
	MOVQ x+16(FP), SI
	MOVQ step+24(FP), DX
	SHLQ $3, DX                // bytes between outputs
	MOVQ pa+32(FP), R8
	MOVQ pb+40(FP), R9
	MOVQ groups+48(FP), BX
	SHLQ $5, BX                // bytes of each tap array
	MOVQ hi+56(FP), R12
	MOVQ q+64(FP), AX
	TESTQ CX, CX
	JZ   sdone
	VMOVUPD      (AX), Y8
	VBROADCASTSD r2_real+72(FP), Y9
	VBROADCASTSD r2_imag+80(FP), Y10

souter:
	CMPQ CX, $1
	JNE  spair
	XORQ DX, DX                // the odd last output: the second window repeats the first

spair:
	VXORPS Y0, Y0, Y0
	VXORPS Y1, Y1, Y1
	VXORPS Y2, Y2, Y2
	VXORPS Y3, Y3, Y3
	XORQ   AX, AX
	MOVQ   SI, R14             // lo, output 2i
	LEAQ   (SI)(R12*1), R10    // hi, output 2i
	LEAQ   (SI)(DX*1), R11     // lo, output 2i+1
	LEAQ   (R10)(DX*1), R13    // hi, output 2i+1

sinner:
	VMOVUPS     (R14), Y4
	VPERMPD     $0x1B, (R10), Y5
	VADDPS      Y5, Y4, Y6
	VSUBPS      Y4, Y5, Y5
	VFMADD231PS (R8)(AX*1), Y6, Y0
	VFMADD231PS (R9)(AX*1), Y5, Y1
	VMOVUPS     (R11), Y11
	VPERMPD     $0x1B, (R13), Y12
	VADDPS      Y12, Y11, Y13
	VSUBPS      Y11, Y12, Y12
	VFMADD231PS (R8)(AX*1), Y13, Y2
	VFMADD231PS (R9)(AX*1), Y12, Y3
	ADDQ        $32, R14
	ADDQ        $32, R11
	SUBQ        $32, R10
	SUBQ        $32, R13
	ADDQ        $32, AX
	CMPQ        AX, BX
	JLT         sinner

	// (A.re − B.im, A.im + B.re) for both outputs, then the sums of
	// their four complex lanes, as (s₂ᵢ, s₂ᵢ₊₁) in X4
	VPERMILPS    $0xB1, Y1, Y1
	VADDSUBPS    Y1, Y0, Y0
	VPERMILPS    $0xB1, Y3, Y3
	VADDSUBPS    Y3, Y2, Y2
	SUMS2(Y2)

	// rotate by q in float32, then q ← q·r² in float64
	VCVTPD2PSY     Y8, X5
	VMOVSLDUP      X5, X6
	VMOVSHDUP      X5, X7
	VPERMILPS      $0xB1, X4, X5
	VMULPS         X7, X5, X5
	VFMADDSUB213PS X5, X6, X4
	CMPQ           CX, $1
	JEQ            sone
	VMOVUPS        X4, (DI)
	VPERMILPD      $5, Y8, Y5
	VMULPD         Y10, Y5, Y5
	VFMADDSUB213PD Y5, Y9, Y8

	LEAQ (SI)(DX*2), SI
	ADDQ $16, DI
	SUBQ $2, CX
	JNZ  souter
	JMP  sdone

sone:
	VMOVSD X4, (DI)

sdone:
	VZEROUPPER
	RET

// func dotSym4AVX2(out *[4]*complex64, n int, x *complex64, step int, taps *float32, groups, hi int, q *[8]float64, rd *[16]float64)
//
// dotSymAVX2 for four channels whose windows coincide (same length,
// decimation and phase; their taps and phasors differ): the pair sums
// lo + hi and differences hi − lo of each group are formed once and feed
// the eight accumulators (A, B of channels 0…3, Y0…Y7). taps holds, per
// group of four slots, pa then −pb of channel 0, then of channels 1, 2,
// 3 (256 bytes a group). The sums of the four complex lanes are added in
// the order of dotSymAVX2 ((l₀ + l₂) + (l₁ + l₃)), so a channel's sums are
// the same as from that kernel. The phasors are float64 in Y12 = (q₀, q₂)
// and Y13 = (q₁, q₃), advanced by their own rotations, rd = (Re r₀, Re r₀,
// Re r₂, Re r₂, Im r₀, Im r₀, Im r₂, Im r₂, then the same for r₁, r₃).
TEXT ·dotSym4AVX2(SB), NOSPLIT, $0-72
	MOVQ out+0(FP), AX
	MOVQ 0(AX), R11
	MOVQ 8(AX), R12
	MOVQ 16(AX), R13
	MOVQ 24(AX), DI
	MOVQ n+8(FP), CX
	MOVQ x+16(FP), SI
	MOVQ step+24(FP), DX
	SHLQ $3, DX                // bytes between outputs
	MOVQ taps+32(FP), R8
	MOVQ groups+40(FP), BX
	SHLQ $8, BX                // bytes of taps
	MOVQ q+56(FP), AX
	TESTQ CX, CX
	JZ   fdone
	VMOVUPD (AX), Y12
	VMOVUPD 32(AX), Y13
	XORQ    R9, R9             // output index

fouter:
	ZERO8
	XORQ   AX, AX
	MOVQ   SI, R14             // lo
	MOVQ   hi+48(FP), R10
	ADDQ   SI, R10             // hi

finner:
	VMOVUPS     (R14), Y8
	VPERMPD     $0x1B, (R10), Y9
	VADDPS      Y9, Y8, Y10
	VSUBPS      Y8, Y9, Y9
	VFMADD231PS (R8)(AX*1), Y10, Y0
	VFMADD231PS 32(R8)(AX*1), Y9, Y1
	VFMADD231PS 64(R8)(AX*1), Y10, Y2
	VFMADD231PS 96(R8)(AX*1), Y9, Y3
	VFMADD231PS 128(R8)(AX*1), Y10, Y4
	VFMADD231PS 160(R8)(AX*1), Y9, Y5
	VFMADD231PS 192(R8)(AX*1), Y10, Y6
	VFMADD231PS 224(R8)(AX*1), Y9, Y7
	ADDQ        $32, R14
	SUBQ        $32, R10
	ADDQ        $256, AX
	CMPQ        AX, BX
	JLT         finner

	SUMS4
	ROTATE4                    // by (q₀, q₂ | q₁, q₃)
	VMOVSD         X11, (R11)(R9*8)
	VMOVHPS        X11, (R13)(R9*8)
	VEXTRACTF128   $1, Y11, X10
	VMOVSD         X10, (R12)(R9*8)
	VMOVHPS        X10, (DI)(R9*8)

	MOVQ     rd+64(FP), AX
	ADVANCE2                   // q ← q·r

	ADDQ DX, SI
	INCQ R9
	DECQ CX
	JNZ  fouter

fdone:
	VZEROUPPER
	RET

// RSYMGROUP adds one group of four slots of dotRealSymAVX2's two outputs
// to acc0 and acc1 (tap, a, b, c, d scratch), moves the pointers on and
// compares the tap offset AX with its end BX for the caller's branch.
#define RSYMGROUP(tap, a, b, c, d, acc0, acc1) \
	VMOVUPS     (R8)(AX*1), tap; \
	VMOVUPS     (R14), a; \
	VPERMPD     $0x1B, (R10), b; \
	VADDPS      b, a, a; \
	VFMADD231PS tap, a, acc0; \
	VMOVUPS     (R11), c; \
	VPERMPD     $0x1B, (R13), d; \
	VADDPS      d, c, c; \
	VFMADD231PS tap, c, acc1; \
	ADDQ        $32, R14; \
	ADDQ        $32, R11; \
	SUBQ        $32, R10; \
	SUBQ        $32, R13; \
	ADDQ        $32, AX; \
	CMPQ        AX, BX

// func dotRealSymAVX2(dst *complex64, n int, x *complex64, step int, hd *float32, groups, hi int)
//
// dotRealAVX2 for symmetric taps h[k] = h[L−1−k], two outputs a pass:
// dst[m] = Σₖ h[k]·(lo + hi), lo = x[m·step + k], hi = x[m·step + L−1−k],
// over the pair slots k of realSymTaps (the centre of an odd length as
// a slot with h/2). The hi samples of a group of four slots are loaded
// from x + hi − 32·g and reversed by VPERMPD, as in dotSymAVX2; half the
// multiply-adds of dotRealAVX2. An odd last output runs as a pass whose
// second window repeats the first and is not stored.
TEXT ·dotRealSymAVX2(SB), NOSPLIT, $0-56
	MOVQ dst+0(FP), DI
	MOVQ n+8(FP), CX
	MOVQ x+16(FP), SI
	MOVQ step+24(FP), DX
	SHLQ $3, DX
	MOVQ hd+32(FP), R8
	MOVQ groups+40(FP), BX
	SHLQ $5, BX
	MOVQ hi+48(FP), R12
	TESTQ CX, CX
	JZ   ydone

youter:
	CMPQ CX, $1
	JNE  ypair
	XORQ DX, DX

ypair:
	VXORPS Y0, Y0, Y0
	VXORPS Y1, Y1, Y1
	XORQ   AX, AX
	MOVQ   SI, R14
	LEAQ   (SI)(R12*1), R10
	LEAQ   (SI)(DX*1), R11
	LEAQ   (R10)(DX*1), R13

	VXORPS Y2, Y2, Y2
	VXORPS Y3, Y3, Y3

yinner:
	// even groups into Y0, Y1 and odd ones into Y2, Y3: two chains an
	// output, so that a group need not wait for the last one's FMA
	RSYMGROUP(Y8, Y4, Y5, Y6, Y7, Y0, Y1)
	JGE yend
	RSYMGROUP(Y9, Y10, Y11, Y12, Y13, Y2, Y3)
	JLT yinner

yend:
	VADDPS Y2, Y0, Y0
	VADDPS Y3, Y1, Y1

	// the sums of four complex lanes, (l₀ + l₂) + (l₁ + l₃), of both
	// outputs into X4
	SUMS2(Y1)
	CMPQ         CX, $1
	JEQ          yone
	VMOVUPS      X4, (DI)
	LEAQ         (SI)(DX*2), SI
	ADDQ         $16, DI
	SUBQ         $2, CX
	JNZ          youter
	JMP          ydone

yone:
	VMOVSD X4, (DI)

ydone:
	VZEROUPPER
	RET

// func dotSym2x2AVX2(out *[2]*complex64, n int, x *complex64, step int, taps *float32, groups, hi int, q *[8]float64, rd *[16]float64)
//
// dotSym4AVX2 for two channels of one window geometry, two outputs a
// pass: lanes 0 and 1 are channels 0 and 1 at output m (the sums and
// differences of window m), lanes 2 and 3 the same channels at output
// m+1 (window m+1). taps holds, per group of four slots, pa then −pb of
// channel 0, then of channel 1 (128 bytes a group). After the reduction
// (as dotSym4AVX2's) X11 holds channel 0's outputs m, m+1 and the upper
// half channel 1's, stored 16 bytes each. Phasors: Y12 = (q₀(m), q₀(m+1)),
// Y13 = (q₁(m), q₁(m+1)), advanced by r₀², r₁² (rd as in dotSym4AVX2 with
// r₀² twice, then r₁² twice). An odd last output runs as a pass whose
// second window repeats the first, storing 8 bytes a channel.
TEXT ·dotSym2x2AVX2(SB), NOSPLIT, $0-72
	MOVQ out+0(FP), AX
	MOVQ 0(AX), R11
	MOVQ 8(AX), R12
	MOVQ n+8(FP), CX
	MOVQ x+16(FP), SI
	MOVQ step+24(FP), DX
	SHLQ $3, DX                // bytes between outputs
	MOVQ taps+32(FP), R8
	MOVQ groups+40(FP), BX
	SHLQ $7, BX                // bytes of taps
	MOVQ q+56(FP), AX
	TESTQ CX, CX
	JZ   tdone
	VMOVUPD (AX), Y12
	VMOVUPD 32(AX), Y13
	XORQ    R9, R9             // output index

touter:
	CMPQ CX, $1
	JNE  tpair
	XORQ DX, DX                // the odd last output: window m+1 repeats window m

tpair:
	ZERO8
	XORQ   AX, AX
	MOVQ   SI, R14             // lo, output m
	MOVQ   hi+48(FP), R10
	ADDQ   SI, R10             // hi, output m
	LEAQ   (R14)(DX*1), R13    // lo, output m+1
	LEAQ   (R10)(DX*1), DI     // hi, output m+1

tinner:
	VMOVUPS     (R14), Y8
	VPERMPD     $0x1B, (R10), Y9
	VADDPS      Y9, Y8, Y10
	VSUBPS      Y8, Y9, Y9
	VFMADD231PS (R8)(AX*1), Y10, Y0
	VFMADD231PS 32(R8)(AX*1), Y9, Y1
	VFMADD231PS 64(R8)(AX*1), Y10, Y2
	VFMADD231PS 96(R8)(AX*1), Y9, Y3
	VMOVUPS     (R13), Y8
	VPERMPD     $0x1B, (DI), Y9
	VADDPS      Y9, Y8, Y11
	VSUBPS      Y8, Y9, Y9
	VFMADD231PS (R8)(AX*1), Y11, Y4
	VFMADD231PS 32(R8)(AX*1), Y9, Y5
	VFMADD231PS 64(R8)(AX*1), Y11, Y6
	VFMADD231PS 96(R8)(AX*1), Y9, Y7
	ADDQ        $32, R14
	ADDQ        $32, R13
	SUBQ        $32, R10
	SUBQ        $32, DI
	ADDQ        $128, AX
	CMPQ        AX, BX
	JLT         tinner

	// lanes Y0 (ch 0, m), Y2 (ch 1, m), Y4 (ch 0, m+1), Y6 (ch 1, m+1):
	// (s₀(m), s₀(m+1) | s₁(m), s₁(m+1)) in Y11
	SUMS4
	ROTATE4                    // by (q₀(m), q₀(m+1) | q₁(m), q₁(m+1))
	VEXTRACTF128   $1, Y11, X10
	CMPQ           CX, $1
	JEQ            tone
	VMOVUPS        X11, (R11)(R9*8)
	VMOVUPS        X10, (R12)(R9*8)

	MOVQ     rd+64(FP), AX
	ADVANCE2                   // q ← q·r²

	LEAQ (SI)(DX*2), SI
	ADDQ $2, R9
	SUBQ $2, CX
	JNZ  touter
	JMP  tdone

tone:
	VMOVSD X11, (R11)(R9*8)
	VMOVSD X10, (R12)(R9*8)

tdone:
	VZEROUPPER
	RET

// interpEven gathers the even float32 lanes into the low half.
DATA interpEven<>+0(SB)/4, $0
DATA interpEven<>+4(SB)/4, $2
DATA interpEven<>+8(SB)/4, $4
DATA interpEven<>+12(SB)/4, $6
DATA interpEven<>+16(SB)/4, $1
DATA interpEven<>+20(SB)/4, $3
DATA interpEven<>+24(SB)/4, $5
DATA interpEven<>+28(SB)/4, $7
GLOBL interpEven<>(SB), RODATA|NOPTR, $32

// IRSTORE sums the lane pairs of the accumulators A + B (four phases of
// one input, (Re·Re, −Im·Im) each) into four float32 outputs at ADDR,
// those of the mask X15 (all four but in a last partial group); it uses
// Y13, Y14 and Y12 = interpEven.
#define IRSTORE(A, B, ADDR) \
	VADDPS     B, A, Y13 \
	VPERMILPS  $0xB1, Y13, Y14 \
	VADDPS     Y14, Y13, Y13 \
	VPERMPS    Y13, Y12, Y13 \
	VMASKMOVPS X13, X15, ADDR

// IRMASK sets X15 to the store mask of the group R12 counts down to:
// all four phases, or the mask argument's in the last group when the
// phases end in a partial one.
#define IRMASK(L) \
	VPCMPEQD X15, X15, X15 \
	CMPQ     R12, $1 \
	JNE      L \
	MOVQ     part+56(FP), AX \
	TESTQ    AX, AX \
	JZ       L \
	MOVQ     mask+64(FP), AX \
	VMOVDQU  (AX), X15 \
L:

// func interpRealAVX2(dst *float32, x *complex64, n int, taps *float32, k, groups, u, part int, mask *[4]int32)
//
// interpAVX2 with real outputs, four inputs a pass: for each group of
// four phases the tap rows t and t+1 are loaded once and feed the eight
// accumulators (four inputs, even and odd taps), each input's sample
// broadcast (VBROADCASTSD); then each input's pair of accumulators is
// summed and its lanes added in pairs (the detector's Re c·Re z −
// Im c·Im z) to four float32 outputs. Eight independent FMA chains keep
// the loop from waiting on FMA latency (interpAVX2 has two). The last n
// mod 4 inputs go one at a time. groups counts a last partial group of
// u mod 4 phases (part = 1), whose outputs are stored under mask.
TEXT ·interpRealAVX2(SB), NOSPLIT, $0-72
	MOVQ    dst+0(FP), DI
	MOVQ    x+8(FP), SI
	MOVQ    n+16(FP), CX
	MOVQ    k+32(FP), R9
	MOVQ    groups+40(FP), DX
	SHLQ    $5, DX // bytes of a tap row
	MOVQ    u+48(FP), R11
	SHLQ    $2, R11 // bytes of one input's outputs
	VMOVDQU interpEven<>(SB), Y12
	CMPQ    CX, $4
	JL      irfour

irouter:
	MOVQ taps+24(FP), BX // group g's taps
	MOVQ DI, R14         // its outputs for input j
	MOVQ groups+40(FP), R12

irgroup:
	IRMASK(irgmask)
	ZERO8
	MOVQ   BX, R8
	XORQ   R13, R13
	MOVQ   R9, R10
	SUBQ   $1, R10

irpair:
	CMPQ         R13, R10
	JGE          irone
	VMOVUPS      (R8), Y8
	VMOVUPS      (R8)(DX*1), Y9
	VBROADCASTSD (SI)(R13*8), Y10
	VBROADCASTSD 8(SI)(R13*8), Y11
	VFMADD231PS  Y8, Y10, Y0
	VFMADD231PS  Y9, Y11, Y4
	VBROADCASTSD 16(SI)(R13*8), Y10
	VFMADD231PS  Y8, Y11, Y1
	VFMADD231PS  Y9, Y10, Y5
	VBROADCASTSD 24(SI)(R13*8), Y11
	VFMADD231PS  Y8, Y10, Y2
	VFMADD231PS  Y9, Y11, Y6
	VBROADCASTSD 32(SI)(R13*8), Y10
	VFMADD231PS  Y8, Y11, Y3
	VFMADD231PS  Y9, Y10, Y7
	LEAQ         (R8)(DX*2), R8
	ADDQ         $2, R13
	JMP          irpair

irone:
	CMPQ         R13, R9
	JGE          irsum
	VMOVUPS      (R8), Y8
	VBROADCASTSD (SI)(R13*8), Y10
	VFMADD231PS  Y8, Y10, Y0
	VBROADCASTSD 8(SI)(R13*8), Y10
	VFMADD231PS  Y8, Y10, Y1
	VBROADCASTSD 16(SI)(R13*8), Y10
	VFMADD231PS  Y8, Y10, Y2
	VBROADCASTSD 24(SI)(R13*8), Y10
	VFMADD231PS  Y8, Y10, Y3

irsum:
	IRSTORE(Y0, Y4, (R14))
	IRSTORE(Y1, Y5, (R14)(R11*1))
	LEAQ    (R14)(R11*2), AX
	IRSTORE(Y2, Y6, (AX))
	IRSTORE(Y3, Y7, (AX)(R11*1))
	ADDQ    $32, BX
	ADDQ    $16, R14
	DECQ    R12
	JNZ     irgroup

	ADDQ $32, SI       // four inputs on
	LEAQ (DI)(R11*4), DI
	SUBQ $4, CX
	CMPQ CX, $4
	JGE  irouter

irfour:
	// the last n mod 4 inputs one at a time, two accumulators a group
	TESTQ CX, CX
	JLE   irdone

irtail:
	MOVQ taps+24(FP), BX
	MOVQ DI, R14
	MOVQ groups+40(FP), R12

irtgroup:
	IRMASK(irtmask)
	VXORPS Y0, Y0, Y0
	VXORPS Y4, Y4, Y4
	ITAPS(Y0, Y4, Y10, Y11, irtpair, irtone, irtsum)
	IRSTORE(Y0, Y4, (R14))
	ADDQ $32, BX
	ADDQ $16, R14
	DECQ R12
	JNZ  irtgroup

	ADDQ $8, SI
	ADDQ R11, DI
	DECQ CX
	JNZ  irtail

irdone:
	VZEROUPPER
	RET

// DOTR1(acc, t, off) adds h·(lo + hi) for four consecutive outputs at
// byte offset off: acc += Y8·(x[lo+off] + x[hi+off]) with t as scratch.
#define DOTR1(acc, t, off) \
	VMOVUPS     off(R10), t; \
	VADDPS      off(R11), t, t; \
	VFMADD231PS Y8, t, acc

// R16STEP is one slot k of dotRealSym1AVX2's sixteen outputs: output
// group i (outputs m+4i … m+4i+3, accumulator Y0+i) adds h[k]·(lo_i +
// hi_i), lo_i = x[m+4i+k …], hi_i = x[m+4i+L−1−k …]. Slot k+4 reuses
// the runs: its lo_i is this lo_{i+1} and its hi_i this hi_{i−1}, so a
// step loads only the new lo_3 (into nlo, this step's lo_0) and hi_0
// (into nhi, this step's hi_3); the caller rotates the register names.
// AX is k, BX the number of slots (done jumps out when k+4 reaches it),
// R10 and R11 the lo and hi runs of output m, Y8 and Y13 scratch.
#define R16STEP(l0, l1, l2, l3, h0, h1, h2, h3, nlo, nhi, done) \
	VBROADCASTSS (R8)(AX*8), Y8; \
	VADDPS       h0, l0, Y13; \
	VFMADD231PS  Y8, Y13, Y0; \
	VADDPS       h1, l1, Y13; \
	VFMADD231PS  Y8, Y13, Y1; \
	VADDPS       h2, l2, Y13; \
	VFMADD231PS  Y8, Y13, Y2; \
	VADDPS       h3, l3, Y13; \
	VFMADD231PS  Y8, Y13, Y3; \
	ADDQ         $4, AX; \
	CMPQ         AX, BX; \
	JGE          done; \
	ADDQ         $32, R10; \
	SUBQ         $32, R11; \
	VMOVUPS      96(R10), nlo; \
	VMOVUPS      (R11), nhi

// func dotRealSym1AVX2(dst *complex64, n int, x *complex64, hd *float32, slots, l int)
//
// dotRealSymAVX2 for step 1 with the outputs in the lanes instead of the
// taps: outputs m … m+3 are one register, and slot k adds
// h[k]·(x[m+k …] + x[m+L−1−k …]), both runs of four samples read forward
// (no reversal, no sum across lanes), the tap broadcast from hd[2k].
// Sixteen outputs a pass in four accumulators (four FMA chains), then
// four at a time; n is a multiple of 4. slots = ⌈L/2⌉, the centre of an
// odd length being a slot with h/2 whose two runs coincide.
TEXT ·dotRealSym1AVX2(SB), NOSPLIT, $0-48
	MOVQ dst+0(FP), DI
	MOVQ n+8(FP), CX
	MOVQ x+16(FP), SI
	MOVQ hd+24(FP), R8
	MOVQ slots+32(FP), BX
	MOVQ l+40(FP), R12
	DECQ R12
	SHLQ $3, R12 // (L−1)·8: from the lo run of slot 0 to its hi run

r16:
	CMPQ   CX, $16
	JLT    r4
	VXORPS Y0, Y0, Y0
	VXORPS Y1, Y1, Y1
	VXORPS Y2, Y2, Y2
	VXORPS Y3, Y3, Y3
	XORQ   R9, R9 // residue r: slots r, r+4, r+8, …

r16res:
	MOVQ    R9, AX
	CMPQ    AX, BX
	JGE     r16next
	LEAQ    (SI)(AX*8), R10 // lo run of slot k for output m
	MOVQ    SI, R11
	ADDQ    R12, R11
	MOVQ    AX, R13
	SHLQ    $3, R13
	SUBQ    R13, R11        // hi run of slot k for output m
	VMOVUPS (R10), Y4
	VMOVUPS 32(R10), Y5
	VMOVUPS 64(R10), Y6
	VMOVUPS 96(R10), Y7
	VMOVUPS (R11), Y9
	VMOVUPS 32(R11), Y10
	VMOVUPS 64(R11), Y11
	VMOVUPS 96(R11), Y12

r16k:
	R16STEP(Y4, Y5, Y6, Y7, Y9, Y10, Y11, Y12, Y4, Y12, r16next)
	R16STEP(Y5, Y6, Y7, Y4, Y12, Y9, Y10, Y11, Y5, Y11, r16next)
	R16STEP(Y6, Y7, Y4, Y5, Y11, Y12, Y9, Y10, Y6, Y10, r16next)
	R16STEP(Y7, Y4, Y5, Y6, Y10, Y11, Y12, Y9, Y7, Y9, r16next)
	JMP     r16k

r16next:
	INCQ    R9
	CMPQ    R9, $4
	JLT     r16res
	LANES16DONE
	JMP     r16

r4:
	CMPQ   CX, $4
	JLT    r1done
	VXORPS Y0, Y0, Y0
	MOVQ   SI, R10
	LEAQ   (SI)(R12*1), R11
	XORQ   AX, AX

r4k:
	VBROADCASTSS (R8)(AX*8), Y8
	DOTR1(Y0, Y4, 0)
	ADDQ         $8, R10
	SUBQ         $8, R11
	INCQ         AX
	CMPQ         AX, BX
	JLT          r4k
	VMOVUPS      Y0, (DI)
	ADDQ         $32, SI
	ADDQ         $32, DI
	SUBQ         $4, CX
	JMP          r4

r1done:
	VZEROUPPER
	RET

// DOTL1(acc, t, off) adds h·x for four consecutive outputs: acc +=
// Y8·x[R10 + off …] (t scratch).
#define DOTL1(acc, t, off) \
	VMOVUPS     off(R10), t; \
	VFMADD231PS Y8, t, acc

// func dotReal1AVX2(dst *complex64, n int, x *complex64, hd *float32, l int)
//
// dotRealAVX2 for step 1 with the outputs in the vector lanes (as
// dotRealSym1AVX2, for taps with no symmetry: a channel filter carrying a
// fractional delay): outputs m … m+3 are one register, and tap k adds
// h[k]·x[m+k …], the tap broadcast from hd[2k]. Sixteen outputs a pass in
// four accumulators, then four at a time; n is a multiple of 4.
TEXT ·dotReal1AVX2(SB), NOSPLIT, $0-40
	MOVQ dst+0(FP), DI
	MOVQ n+8(FP), CX
	MOVQ x+16(FP), SI
	MOVQ hd+24(FP), R8
	MOVQ l+32(FP), BX

l16:
	CMPQ   CX, $16
	JLT    l4
	VXORPS Y0, Y0, Y0
	VXORPS Y1, Y1, Y1
	VXORPS Y2, Y2, Y2
	VXORPS Y3, Y3, Y3
	MOVQ   SI, R10
	XORQ   AX, AX

l16k:
	VBROADCASTSS (R8)(AX*8), Y8
	DOTL1(Y0, Y4, 0)
	DOTL1(Y1, Y5, 32)
	DOTL1(Y2, Y6, 64)
	DOTL1(Y3, Y7, 96)
	ADDQ         $8, R10
	INCQ         AX
	CMPQ         AX, BX
	JLT          l16k
	LANES16DONE
	JMP          l16

l4:
	CMPQ   CX, $4
	JLT    l1done
	VXORPS Y0, Y0, Y0
	MOVQ   SI, R10
	XORQ   AX, AX

l4k:
	VBROADCASTSS (R8)(AX*8), Y8
	DOTL1(Y0, Y4, 0)
	ADDQ         $8, R10
	INCQ         AX
	CMPQ         AX, BX
	JLT          l4k
	VMOVUPS      Y0, (DI)
	ADDQ         $32, SI
	ADDQ         $32, DI
	SUBQ         $4, CX
	JMP          l4

l1done:
	VZEROUPPER
	RET
