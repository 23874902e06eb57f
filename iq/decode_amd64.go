//go:build amd64 && !purego

package iq

import "golang.org/x/sys/cpu"

// haveDecodeKernels reports whether the AVX2 kernels of decode_amd64.s
// run on this CPU (the cu8 one uses FMA, all use POPCNT for the clip
// counts); without them the integer datatypes decode with their
// reference loops and cf32_le with the portable word scan.
var haveDecodeKernels = cpu.X86.HasAVX2 && cpu.X86.HasFMA && cpu.X86.HasPOPCNT

// kernelBlock is the number of samples a kernel loop step decodes; the
// last len(dst) mod kernelBlock samples go through the reference loop.
const kernelBlock = 16

// decodeCU8AVX2 is decodeCU8Go for n samples, n a multiple of 16:
// vpmovzxbd, vcvtdq2ps, t = v − 127.5 (exact), then the quotient
// t/127.5 as the table rounds it: q = t·r with r = float32(1/127.5),
// e = t − q·127.5 by one FMA (exact), q + e·r by another — the
// correction step of Markstein's division (P. Markstein, IBM J. Res.
// Develop. 34(1), 1990, from memory). A bare multiply by r or
// fma(v, r, −1) is 1 ulp off for 126 and 223 of the 256 codes; this is
// exact for all of them (TestDecodeAllCodes checks every code), and 35 %
// faster than vdivps, which is also exact. Rails: vpcmpeqb against 0
// and 255 on 32 bytes, vpmovmskb, the two bits of a sample ORed, popcnt.
//
//go:noescape
func decodeCU8AVX2(dst *complex64, src *byte, n int) (clipped int)

// decodeCI8AVX2 is decodeCI8Go for n samples, n a multiple of 16:
// vpmovsxbd, vcvtdq2ps, vmulps by 2⁻⁷ (exact); rails −128 and 127.
//
//go:noescape
func decodeCI8AVX2(dst *complex64, src *byte, n int) (clipped int)

// decodeCI16AVX2 is decodeCI16Go for n samples, n a multiple of 16:
// vpmovsxwd, vcvtdq2ps, vmulps by 2⁻¹⁵ (exact); rails −32768 and 32767
// by vpcmpeqw, four mask bits a sample.
//
//go:noescape
func decodeCI16AVX2(dst *complex64, src *byte, n int) (clipped int)

// decodeCF32AVX2 copies n cf32_le samples (n a multiple of 16) to dst
// and counts the samples with a component of |v| ≥ 1, comparing the
// magnitude bits as integers (IEEE Std 754-2019 clause 3.4: for
// non-negative binary32 values the bit patterns order as the values).
// It reports nonfinite = 1, and its count is then meaningless, when some
// component is NaN or ±Inf (magnitude bits above 0x7f7fffff); the caller
// then decodes the block with the reference loop.
//
//go:noescape
func decodeCF32AVX2(dst *complex64, src *byte, n int) (clipped, nonfinite int)

func decodeCU8(dst []complex64, b []byte) int {
	k := 0
	clipped := 0
	if haveDecodeKernels && len(dst) >= kernelBlock {
		k = len(dst) &^ (kernelBlock - 1)
		clipped = decodeCU8AVX2(&dst[0], &b[0], k)
	}
	return clipped + decodeCU8Go(dst[k:], b[2*k:])
}

func decodeCI8(dst []complex64, b []byte) int {
	k := 0
	clipped := 0
	if haveDecodeKernels && len(dst) >= kernelBlock {
		k = len(dst) &^ (kernelBlock - 1)
		clipped = decodeCI8AVX2(&dst[0], &b[0], k)
	}
	return clipped + decodeCI8Go(dst[k:], b[2*k:])
}

func decodeCI16(dst []complex64, b []byte) int {
	k := 0
	clipped := 0
	if haveDecodeKernels && len(dst) >= kernelBlock {
		k = len(dst) &^ (kernelBlock - 1)
		clipped = decodeCI16AVX2(&dst[0], &b[0], k)
	}
	return clipped + decodeCI16Go(dst[k:], b[4*k:])
}

func decodeCF32(dst []complex64, b []byte) (clipped, nonfinite int) {
	if !haveDecodeKernels || len(dst) < kernelBlock {
		return decodeCF32Words(dst, b)
	}
	k := len(dst) &^ (kernelBlock - 1)
	clipped, bad := decodeCF32AVX2(&dst[0], &b[0], k)
	if bad != 0 {
		// Rare: a block holding NaN or ±Inf takes the reference loop.
		return decodeCF32Go(dst, b)
	}
	c, nf := decodeCF32Go(dst[k:], b[8*k:])
	return clipped + c, nf
}
