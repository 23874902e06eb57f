//go:build !amd64 || purego

package modem

// haveKernels is false: no assembly kernels on this build (see
// channel_kernel.go); the decimators use their Go loops.
const haveKernels = false

func dotComplexAVX2(dst []complex64, x *complex64, step int, crd, cid *float32, full int, mask *[8]int32, rem int, p, r complex128) {
	panic("modem: no assembly kernels in this build")
}

func dotRealAVX2(dst []complex64, x *complex64, step int, hd *float32, full int, mask *[8]int32, rem int) {
	panic("modem: no assembly kernels in this build")
}

func interpAVX2(dst *complex64, x *complex64, n int, taps *float32, k, full int, mask *[8]int32, part, stride int) {
	panic("modem: no assembly kernels in this build")
}

func dotSymAVX2(dst *complex64, n int, x *complex64, step int, pa, pb *float32, groups, hi int, q *[4]float64, r2 complex128) {
	panic("modem: no assembly kernels in this build")
}

func dotSym4AVX2(out *[4]*complex64, n int, x *complex64, step int, taps *float32, groups, hi int, q *[8]float64, rd *[16]float64) {
	panic("modem: no assembly kernels in this build")
}

func dotRealSymAVX2(dst *complex64, n int, x *complex64, step int, hd *float32, groups, hi int) {
	panic("modem: no assembly kernels in this build")
}

func dotSym2x2AVX2(out *[2]*complex64, n int, x *complex64, step int, taps *float32, groups, hi int, q *[8]float64, rd *[16]float64) {
	panic("modem: no assembly kernels in this build")
}

func bankPassAVX2(x *complex64, m, l int, tw *complex64) {
	panic("modem: no assembly kernels in this build")
}

func bankLast4AVX2(x *complex64, m int) {
	panic("modem: no assembly kernels in this build")
}

func bankLast2AVX2(x *complex64, m int) {
	panic("modem: no assembly kernels in this build")
}

func bankFoldAVX2(vb, win *complex64, g0 *float32, m, d, rows, e int) {
	panic("modem: no assembly kernels in this build")
}

func bankGatherAVX2(out *complex64, stride int, vb *complex64, rows, offs *int32, n int) {
	panic("modem: no assembly kernels in this build")
}

func interpRealAVX2(dst *float32, x *complex64, n int, taps *float32, k, groups, u, part int, mask *[4]int32) {
	panic("modem: no assembly kernels in this build")
}

func mixAVX2(dst, src *complex64, tab *complex128, n int, base complex128) {
	panic("modem: no assembly kernels in this build")
}

func dotRealSym1AVX2(dst *complex64, n int, x *complex64, hd *float32, slots, l int) {
	panic("modem: no assembly kernels in this build")
}

func resampRationalAVX2(dst, buf *complex64, c int, phd *float32, k, up, down int, state *[2]int) (n int) {
	panic("modem: no assembly kernels in this build")
}

func dotReal1AVX2(dst *complex64, n int, x *complex64, hd *float32, l int) {
	panic("modem: no assembly kernels in this build")
}

func mixRealAVX2(dst *float32, src *complex64, tab *complex128, n int, base complex128) {
	panic("modem: no assembly kernels in this build")
}
