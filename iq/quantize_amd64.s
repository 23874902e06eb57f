//go:build amd64 && !purego

#include "textflag.h"

// The kernel of quantize_amd64.go, eight samples a step in two groups of
// four float64 lanes. Per group, with x = v·scale:
//   Y1 = x − x: 0 where x is finite, NaN otherwise; finite = (Y1 == 0)
//   y = x + copysign(0.5, x); in = (y < 32768) ∧ (y > −32769)
//   clipped += popcnt(finite) − popcnt(in); nonfinite += 4 − popcnt(finite)
//   code = trunc(clamp(y ∧ finite, −32768, 32767))

DATA quantConst<>+0(SB)/8, $0x8000000000000000  // sign bit
DATA quantConst<>+8(SB)/8, $0x3fe0000000000000  // 0.5
DATA quantConst<>+16(SB)/8, $0x40e0000000000000 // 32768
DATA quantConst<>+24(SB)/8, $0xc0e0002000000000 // −32769
DATA quantConst<>+32(SB)/8, $0x40dfffc000000000 // 32767
DATA quantConst<>+40(SB)/8, $0xc0e0000000000000 // −32768
GLOBL quantConst<>(SB), RODATA|NOPTR, $48

// func quantizeS16AVX2(dst *byte, src *float32, n int, scale float64) (clipped, nonfinite int)
TEXT ·quantizeS16AVX2(SB), NOSPLIT, $0-48
	MOVQ dst+0(FP), DI
	MOVQ src+8(FP), SI
	MOVQ n+16(FP), CX
	VBROADCASTSD scale+24(FP), Y15
	VBROADCASTSD quantConst<>+0(SB), Y14
	VBROADCASTSD quantConst<>+8(SB), Y13
	VBROADCASTSD quantConst<>+16(SB), Y12
	VBROADCASTSD quantConst<>+24(SB), Y11
	VBROADCASTSD quantConst<>+32(SB), Y10
	VBROADCASTSD quantConst<>+40(SB), Y9
	VXORPD Y8, Y8, Y8
	XORQ R8, R8                  // finite samples
	XORQ R9, R9                  // in-range samples
	SHRQ $3, CX
	JZ   qdone

qloop:
	VCVTPS2PD (SI), Y0
	VCVTPS2PD 16(SI), Y4
	VMULPD    Y15, Y0, Y0
	VMULPD    Y15, Y4, Y4
	VSUBPD    Y0, Y0, Y1
	VSUBPD    Y4, Y4, Y5
	VCMPPD    $0, Y8, Y1, Y1     // finite: x − x == 0 (EQ_OQ)
	VCMPPD    $0, Y8, Y5, Y5
	VANDPD    Y14, Y0, Y2
	VANDPD    Y14, Y4, Y6
	VORPD     Y13, Y2, Y2
	VORPD     Y13, Y6, Y6
	VADDPD    Y2, Y0, Y0         // y = x + copysign(0.5, x)
	VADDPD    Y6, Y4, Y4
	VCMPPD    $1, Y12, Y0, Y2    // y < 32768 (LT_OS)
	VCMPPD    $1, Y12, Y4, Y6
	VCMPPD    $1, Y0, Y11, Y3    // −32769 < y
	VCMPPD    $1, Y4, Y11, Y7
	VANDPD    Y3, Y2, Y2
	VANDPD    Y7, Y6, Y6
	VMOVMSKPD Y1, AX
	VMOVMSKPD Y5, BX
	SHLL      $4, BX
	ORL       BX, AX
	POPCNTL   AX, AX
	ADDQ      AX, R8
	VMOVMSKPD Y2, AX
	VMOVMSKPD Y6, BX
	SHLL      $4, BX
	ORL       BX, AX
	POPCNTL   AX, AX
	ADDQ      AX, R9
	VANDPD    Y1, Y0, Y0         // non-finite lanes → 0
	VANDPD    Y5, Y4, Y4
	VMAXPD    Y9, Y0, Y0
	VMAXPD    Y9, Y4, Y4
	VMINPD    Y10, Y0, Y0
	VMINPD    Y10, Y4, Y4
	VCVTTPD2DQY Y0, X0
	VCVTTPD2DQY Y4, X4
	VPACKSSDW X4, X0, X0
	VMOVDQU   X0, (DI)
	ADDQ      $32, SI
	ADDQ      $16, DI
	DECQ      CX
	JNZ       qloop

qdone:
	VZEROUPPER
	MOVQ n+16(FP), AX
	ANDQ $-8, AX
	MOVQ R8, BX
	SUBQ R9, BX
	MOVQ BX, clipped+32(FP)
	SUBQ R8, AX
	MOVQ AX, nonfinite+40(FP)
	RET

// func quantizeS16FastAVX2(dst *byte, src *float32, n int, scale float64) (ok bool)
//
// quantizeS16AVX2 without the counts, for the common case of audio
// within full scale: y = v·scale + copysign(0.5, v·scale) in float64,
// truncated by vcvttpd2dq. Every y with −32769 < y < 32768 truncates to
// its code exactly as in quantizeS16Go; anything else (a sample to clamp,
// NaN or ±Inf, which vcvttpd2dq turns into −2³¹) truncates outside
// −32768 … 32767, which sets a flag: ok is false, dst holds garbage and
// the caller runs quantizeS16AVX2 for the clamping and the counts.
TEXT ·quantizeS16FastAVX2(SB), NOSPLIT, $0-33
	MOVQ dst+0(FP), DI
	MOVQ src+8(FP), SI
	MOVQ n+16(FP), CX
	VBROADCASTSD scale+24(FP), Y15
	VBROADCASTSD quantConst<>+0(SB), Y14 // sign mask
	VBROADCASTSD quantConst<>+8(SB), Y13 // 0.5
	VPBROADCASTD fastConst<>+0(SB), Y12  // 32767
	VPBROADCASTD fastConst<>+4(SB), Y11  // −32768
	VPXOR Y10, Y10, Y10                  // out-of-range flags
	SHRQ $3, CX
	JZ   fdone

floop:
	VCVTPS2PD   (SI), Y0
	VCVTPS2PD   16(SI), Y1
	VMULPD      Y15, Y0, Y0
	VMULPD      Y15, Y1, Y1
	VANDPD      Y14, Y0, Y2
	VANDPD      Y14, Y1, Y3
	VORPD       Y13, Y2, Y2
	VORPD       Y13, Y3, Y3
	VADDPD      Y2, Y0, Y0
	VADDPD      Y3, Y1, Y1
	VCVTTPD2DQY Y0, X0
	VCVTTPD2DQY Y1, X1
	VINSERTI128 $1, X1, Y0, Y2
	VPCMPGTD    Y12, Y2, Y3 // code > 32767
	VPCMPGTD    Y2, Y11, Y4 // −32768 > code
	VPOR        Y3, Y10, Y10
	VPOR        Y4, Y10, Y10
	VPACKSSDW   X1, X0, X0
	VMOVDQU     X0, (DI)
	ADDQ        $32, SI
	ADDQ        $16, DI
	DECQ        CX
	JNZ         floop

fdone:
	VPTEST Y10, Y10
	SETEQ  ok+32(FP)
	VZEROUPPER
	RET

DATA fastConst<>+0(SB)/4, $32767
DATA fastConst<>+4(SB)/4, $-32768
GLOBL fastConst<>(SB), RODATA|NOPTR, $8
