//go:build !amd64 || purego

package modem

// useMixInterpAVX2 is false: no vector kernel on this platform or build.
const useMixInterpAVX2 = false

// mixInterpKernel runs the interpolation kernel: the reference loop mixInterpGo.
func mixInterpKernel(dst, win []complex64, taps []float32, n, k, groups, up int, cplx bool) {
	mixInterpGo(dst, win, taps, n, k, groups, up, cplx)
}

// levelKernel returns the float32 sum of |y|² over y and the peak of
// |y|², starting from peak: the reference loop levelGo.
func levelKernel(y []complex64, peak float32) (float32, float32) { return levelGo(y, peak) }

// firVecGroup is unused without the vector kernel.
const firVecGroup = 32

// realFIRVec is never called without the vector kernel (RealFIR keeps no
// pad); it is the reference loop.
func realFIRVec(out, w, h, pad []float32) { realFIRGo(out, w, h) }

// decimRealVec is never called without the vector kernel.
func decimRealVec(out, w, h []float32, step int) {
	panic("modem: no decimation kernel on this platform")
}
