//go:build !amd64 || purego

package modem

// useMixInterpAVX2 is false: no vector kernel on this platform or build.
const useMixInterpAVX2 = false

// mixInterpKernel runs the interpolation kernel: the reference loop mixInterpGo.
func mixInterpKernel(dst, win []complex64, taps []float32, n, k, groups, up int, cplx bool) {
	mixInterpGo(dst, win, taps, n, k, groups, up, cplx)
}
