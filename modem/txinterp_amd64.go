//go:build amd64 && !purego

package modem

import "golang.org/x/sys/cpu"

// useMixInterpAVX2 selects the AVX2/FMA interpolation kernels: they compute
// four phases per 256-bit vector, which plain Go cannot express (gc emits
// scalar SSE for float32 loops).
var useMixInterpAVX2 = cpu.X86.HasAVX2 && cpu.X86.HasFMA

// mixInterpRealAVX2 and mixInterpCplxAVX2 are mixInterpGo for real and complex taps
// (txinterp_amd64.s). They read win[:n−1+k] and taps[:groups·k·stride] and
// write dst[:(n−1)·up + 4·groups]; k is a positive multiple of 4.
//
//go:noescape
func mixInterpRealAVX2(dst, win *complex64, taps *float32, n, k, groups, up int)

//go:noescape
func mixInterpCplxAVX2(dst, win *complex64, taps *float32, n, k, groups, up int)

// mixInterpKernel runs the interpolation kernel: see mixInterpGo, the reference
// loop it must match.
func mixInterpKernel(dst, win []complex64, taps []float32, n, k, groups, up int, cplx bool) {
	if !useMixInterpAVX2 || n <= 0 {
		mixInterpGo(dst, win, taps, n, k, groups, up, cplx)
		return
	}
	stride := 8
	if cplx {
		stride = 16
	}
	if k <= 0 || k%4 != 0 || up < 1 || groups*mixInterpGroup < up ||
		len(win) < n-1+k || len(taps) < groups*k*stride || len(dst) < (n-1)*up+mixInterpGroup*groups {
		panic("modem: interpolation kernel arguments out of range")
	}
	if cplx {
		mixInterpCplxAVX2(&dst[0], &win[0], &taps[0], n, k, groups, up)
	} else {
		mixInterpRealAVX2(&dst[0], &win[0], &taps[0], n, k, groups, up)
	}
}
