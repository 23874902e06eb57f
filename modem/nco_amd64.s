//go:build amd64 && !purego

#include "textflag.h"

// PHASORS4 leaves in Y0 the four complex64 phasors float32(base·tab[k]),
// k = 0…3 of DX (tab entries tr ti): br·tr − bi·ti and br·ti + bi·tr
// from VMULPD twice and VADDSUBPD, as the Go loops round them (Y14, Y15:
// br, bi broadcast; Y1–Y3 scratch).
#define PHASORS4 \
	VMOVUPD     (DX), Y0; \
	VMOVUPD     32(DX), Y1; \
	VPERMILPD   $5, Y0, Y2; \
	VPERMILPD   $5, Y1, Y3; \
	VMULPD      Y14, Y0, Y0; \
	VMULPD      Y14, Y1, Y1; \
	VMULPD      Y15, Y2, Y2; \
	VMULPD      Y15, Y3, Y3; \
	VADDSUBPD   Y2, Y0, Y0; \
	VADDSUBPD   Y3, Y1, Y1; \
	VCVTPD2PSY  Y0, X0; \
	VCVTPD2PSY  Y1, X1; \
	VINSERTF128 $1, X1, Y0, Y0

// func mixAVX2(dst, src *complex64, tab *complex128, n int, base complex128)
//
// dst[k] = src[k]·float32(base·tab[k]) for k < n, n a multiple of 4, with
// the roundings of Oscillator.Mix's Go loop, bit for bit: the phasor is
// the complex128 product written out (products, then one add or
// subtract: VMULPD twice and VADDSUBPD), rounded to complex64, and the
// complex64 product the same way in float32 (no fused multiply-add).
TEXT ·mixAVX2(SB), NOSPLIT, $0-48
	MOVQ dst+0(FP), DI
	MOVQ src+8(FP), SI
	MOVQ tab+16(FP), DX
	MOVQ n+24(FP), CX
	VBROADCASTSD base_real+32(FP), Y14 // br br br br
	VBROADCASTSD base_imag+40(FP), Y15 // bi bi bi bi
	SHRQ $2, CX
	JZ   mdone

mloop:
	PHASORS4                   // or oi × 4
	VMOVUPS    (SI), Y4        // xr xi × 4
	VMOVSLDUP  Y0, Y5          // or or
	VMOVSHDUP  Y0, Y6          // oi oi
	VPERMILPS  $0xB1, Y4, Y7   // xi xr
	VMULPS     Y5, Y4, Y4      // xr·or xi·or
	VMULPS     Y6, Y7, Y7      // xi·oi xr·oi
	VADDSUBPS  Y7, Y4, Y4      // xr·or − xi·oi, xi·or + xr·oi
	VMOVUPS    Y4, (DI)
	ADDQ       $64, DX
	ADDQ       $32, SI
	ADDQ       $32, DI
	DECQ       CX
	JNZ        mloop

mdone:
	VZEROUPPER
	RET

// func mixRealAVX2(dst *float32, src *complex64, tab *complex128, n int, base complex128)
//
// dst[k] = Re(src[k]·float32(base·tab[k])) for k < n, n a multiple of 8,
// with the roundings of SSBDemod.Process's Go loop, bit for bit: the
// phasor as in mixAVX2, then xr·or and xi·oi rounded and subtracted
// (VMULPS, VHSUBPS, which leaves the samples in the order 0 1 4 5 2 3 6
// 7, put right by VPERMPD).
TEXT ·mixRealAVX2(SB), NOSPLIT, $0-48
	MOVQ dst+0(FP), DI
	MOVQ src+8(FP), SI
	MOVQ tab+16(FP), DX
	MOVQ n+24(FP), CX
	VBROADCASTSD base_real+32(FP), Y14
	VBROADCASTSD base_imag+40(FP), Y15
	SHRQ $3, CX
	JZ   rmdone

rmloop:
	PHASORS4
	VMULPS (SI), Y0, Y4 // xr·or xi·oi, samples 0–3
	ADDQ   $64, DX
	PHASORS4
	VMULPS  32(SI), Y0, Y5 // samples 4–7
	VHSUBPS Y5, Y4, Y4     // s0 s1 s4 s5 | s2 s3 s6 s7
	VPERMPD $0xD8, Y4, Y4
	VMOVUPS Y4, (DI)
	ADDQ    $64, DX
	ADDQ    $64, SI
	ADDQ    $32, DI
	DECQ    CX
	JNZ     rmloop

rmdone:
	VZEROUPPER
	RET
