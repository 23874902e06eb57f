//go:build !amd64 || purego

package iq

func quantizeS16(dst []byte, src []float32, scale float64) (clipped, nonfinite int) {
	return quantizeS16Go(dst, src, scale)
}

// haveQuantizeKernel is false: no assembly kernel in this build.
const haveQuantizeKernel = false

func quantizeS16AVX2(dst *byte, src *float32, n int, scale float64) (clipped, nonfinite int) {
	panic("iq: no quantize kernel in this build")
}

func quantizeS16FastAVX2(dst *byte, src *float32, n int, scale float64) (ok bool) {
	panic("iq: no quantize kernel in this build")
}
