//go:build !amd64 || purego

package fft

const HaveAVX2 = false

func butterfliesAVX2(x0, x1, x2, x3, w1, w2, w3 *complex128, m int) {
	panic("fft: no AVX2 kernel on this platform")
}
