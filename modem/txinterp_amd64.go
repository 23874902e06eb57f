//go:build amd64 && !purego

package modem

import "golang.org/x/sys/cpu"

// useMixInterpAVX2 selects the AVX2/FMA interpolation kernels: they compute
// four phases per 256-bit vector, which plain Go cannot express (gc emits
// scalar SSE for float32 loops).
var useMixInterpAVX2 = cpu.X86.HasAVX2 && cpu.X86.HasFMA

// mixInterpRealAVX2 and mixInterpCplxAVX2 are mixInterpGo for real and
// complex taps (txinterp_amd64.s). They read win[:n−1+k] and
// taps[:groups·k·stride] and write dst[:(n−1)·up + 4·groups]; k is a
// positive multiple of 4.
//
//go:noescape
func mixInterpRealAVX2(dst, win *complex64, taps *float32, n, k, groups, up int)

//go:noescape
func mixInterpCplxAVX2(dst, win *complex64, taps *float32, n, k, groups, up int)

// levelAVX2 adds the squares of the parts of y[:n] lane by lane into sum
// and keeps the largest |y|² per lane pair in peak; n is a multiple of 16.
//
//go:noescape
func levelAVX2(y *complex64, n int, sum, peak *[8]float32)

// levelKernel returns the float32 sum of |y|² over y and the peak of
// |y|², starting from peak; see levelGo, the reference loop.
func levelKernel(y []complex64, peak float32) (float32, float32) {
	if !useMixInterpAVX2 {
		return levelGo(y, peak)
	}
	n := len(y) &^ 15
	var sum, pk [8]float32
	for i := range pk {
		pk[i] = peak
	}
	if n > 0 {
		levelAVX2(&y[0], n, &sum, &pk)
	}
	s, p := levelGo(y[n:], max(pk[0], pk[2], pk[4], pk[6]))
	return s + ((sum[0] + sum[1]) + (sum[2] + sum[3])) + ((sum[4] + sum[5]) + (sum[6] + sum[7])), p
}

// firVecGroup is the number of outputs of one pass of the real FIR
// kernel: four registers of eight.
const firVecGroup = 32

// firRealAVX2 computes out[i] = Σₖ h[k]·w[i+k] for i < n (a multiple of
// 32), each output accumulated over k in order with FMA.
//
//go:noescape
func firRealAVX2(out, w, h *float32, n, l int)

// realFIRVec is realFIRGo on the vector kernel. The last partial group
// runs on a zero-padded copy of its window (pad: 32 + len(h) − 1 floats),
// with the same arithmetic per output as the others.
func realFIRVec(out, w, h, pad []float32) {
	n := len(out)
	if n == 0 {
		return
	}
	l := len(h)
	if len(w) < n+l-1 || len(pad) < firVecGroup+l-1 {
		panic("modem: FIR kernel arguments out of range")
	}
	full := n &^ (firVecGroup - 1)
	if full > 0 {
		firRealAVX2(&out[0], &w[0], &h[0], full, l)
	}
	if rest := n - full; rest > 0 {
		m := copy(pad, w[full:n+l-1])
		clear(pad[m:])
		var tmp [firVecGroup]float32
		firRealAVX2(&tmp[0], &pad[0], &h[0], firVecGroup, l)
		copy(out[full:], tmp[:rest])
	}
}

// dotStepAVX2 computes out[i] = Σₜ h[t]·w[i·step + t], t < k, for i < n;
// k is a positive multiple of 4.
//
//go:noescape
func dotStepAVX2(out, w, h *float32, n, k, step int)

// decimRealVec computes out[i] = Σₜ h[t]·w[i·step + t] for every i of out:
// a real decimating stage's outputs (h the one phase, oldest input first).
// Each output is summed the same way wherever it falls.
func decimRealVec(out, w, h []float32, step int) {
	n, k := len(out), len(h)
	if n == 0 {
		return
	}
	if k == 0 || k%4 != 0 || step < 1 || len(w) < (n-1)*step+k {
		panic("modem: decimation kernel arguments out of range")
	}
	dotStepAVX2(&out[0], &w[0], &h[0], n, k, step)
}

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
