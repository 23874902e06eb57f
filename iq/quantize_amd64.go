//go:build amd64 && !purego

package iq

import "golang.org/x/sys/cpu"

// haveQuantizeKernel reports whether quantizeS16AVX2 runs on this CPU.
var haveQuantizeKernel = cpu.X86.HasAVX2 && cpu.X86.HasPOPCNT

// quantizeS16AVX2 is quantizeS16Go for n samples, n a multiple of 8, four
// float64 lanes at a time: vcvtps2pd, vmulpd, copysign(0.5) by vandpd and
// vorpd, the finite and in-range masks by vcmppd (counted with vmovmskpd
// and popcnt), non-finite lanes zeroed, vmaxpd/vminpd to the rails,
// vcvttpd2dq, vpackssdw.
//
//go:noescape
func quantizeS16AVX2(dst *byte, src *float32, n int, scale float64) (clipped, nonfinite int)

// quantizeS16FastAVX2 is quantizeS16AVX2 for audio within full scale:
// without the counts, at about half the instructions; it reports false
// (dst then undefined) when a sample needs clamping or is not finite.
//
//go:noescape
func quantizeS16FastAVX2(dst *byte, src *float32, n int, scale float64) (ok bool)

func quantizeS16(dst []byte, src []float32, scale float64) (clipped, nonfinite int) {
	k := 0
	if haveQuantizeKernel && len(src) >= 8 {
		k = len(src) &^ 7
		if !quantizeS16FastAVX2(&dst[0], &src[0], k, scale) {
			clipped, nonfinite = quantizeS16AVX2(&dst[0], &src[0], k, scale)
		}
	}
	c, nf := quantizeS16Go(dst[2*k:], src[k:], scale)
	return clipped + c, nonfinite + nf
}
