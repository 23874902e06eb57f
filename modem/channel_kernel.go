package modem

// The inner loops of the receive chain's decimators: dot products of a
// tap vector with windows of complex samples taken every step samples,
//
//	dst[m] = Σₖ t[k]·x[m·step + k],  k = 0 … L−1,
//
// with complex taps (ShiftDecimator, the mixer folded in) or real taps
// (Decimator). On amd64 with AVX2 and FMA they run as assembly kernels
// (channel_amd64.s, eight float32 lanes, four complex samples per load);
// dotComplexGo and dotRealGo below are their reference loops, used
// elsewhere and with the build tag purego, and the test compares both.
// Hand-written: gonum's float32 kernels (gonum/internal/asm/f32) are
// internal to gonum and have no complex-times-real or strided form.

// kernelMasks[r] selects the first r complex samples (2r float32 lanes)
// of a group of four, for the kernels' last partial group.
var kernelMasks = [4][8]int32{
	{},
	{-1, -1},
	{-1, -1, -1, -1},
	{-1, -1, -1, -1, -1, -1},
}

// kernelTaps holds taps in the layout of the assembly kernels: each tap
// twice (t[2k] = t[2k+1], to multiply interleaved I and Q lane by lane),
// zero-padded to whole groups of four complex samples.
type kernelTaps struct {
	n      int       // number of taps
	full   int       // whole groups of four taps
	rem    int       // taps in the last partial group (0…3)
	re, im []float32 // duplicated real and imaginary parts; im is nil for real taps
}

// newKernelTaps returns the kernel layout of the taps re (+ j·im when im
// is not nil), given in window order.
func newKernelTaps(re, im []float32) *kernelTaps {
	n := len(re)
	g := (n + 3) / 4
	t := &kernelTaps{n: n, full: n / 4, rem: n % 4, re: make([]float32, 8*g)}
	for k, v := range re {
		t.re[2*k], t.re[2*k+1] = v, v
	}
	if im != nil {
		t.im = make([]float32, 8*g)
		for k, v := range im {
			t.im[2*k], t.im[2*k+1] = v, v
		}
	}
	return t
}

// checkWindow panics unless x holds the samples of len(dst) windows of n
// taps spaced step apart.
func checkWindow(dst, x []complex64, step, n int) {
	if len(dst) > 0 && len(x) < (len(dst)-1)*step+n {
		panic("modem: kernel window too short")
	}
}

// dotComplexGo is the reference loop of dotComplexAVX2:
// dst[m] = Σₖ (cr[k] + j·ci[k])·x[m·step + k] for k < len(cr), the complex
// products written out on float32 real and imaginary parts with two
// partial sums.
func dotComplexGo(dst, x []complex64, step int, cr, ci []float32) {
	l := len(cr)
	ci = ci[:l]
	for m := range dst {
		w := x[m*step : m*step+l]
		var ar, ai, br, bi float32
		k := 0
		for ; k+1 < l; k += 2 {
			x0, x1 := w[k], w[k+1]
			xr0, xi0 := real(x0), imag(x0)
			xr1, xi1 := real(x1), imag(x1)
			ar += cr[k]*xr0 - ci[k]*xi0
			ai += cr[k]*xi0 + ci[k]*xr0
			br += cr[k+1]*xr1 - ci[k+1]*xi1
			bi += cr[k+1]*xi1 + ci[k+1]*xr1
		}
		if k < l {
			xr0, xi0 := real(w[k]), imag(w[k])
			ar += cr[k]*xr0 - ci[k]*xi0
			ai += cr[k]*xi0 + ci[k]*xr0
		}
		dst[m] = complex(ar+br, ai+bi)
	}
}

// dotRealGo is the reference loop of dotRealAVX2:
// dst[m] = Σₖ h[k]·x[m·step + k] for k < len(h).
func dotRealGo(dst, x []complex64, step int, h []float32) {
	l := len(h)
	for m := range dst {
		w := x[m*step : m*step+l]
		w = w[:len(h)]
		var r0, i0, r1, i1 float32
		k := 0
		for ; k+1 < len(h); k += 2 {
			a, b := w[k], w[k+1]
			r0 += h[k] * real(a)
			i0 += h[k] * imag(a)
			r1 += h[k+1] * real(b)
			i1 += h[k+1] * imag(b)
		}
		if k < len(h) {
			r0 += h[k] * real(w[k])
			i0 += h[k] * imag(w[k])
		}
		dst[m] = complex(r0+r1, i0+i1)
	}
}

// dotRotate computes dst[m] = p·rᵐ·Σₖ t[k]·x[m·step + k] with the
// complex taps t by the assembly kernel (the rotation as in rotate). It
// panics if x is too short.
func (t *kernelTaps) dotRotate(dst, x []complex64, step int, p, r complex128) {
	checkWindow(dst, x, step, t.n)
	if len(dst) == 0 {
		return
	}
	dotComplexAVX2(dst, &x[0], step, &t.re[0], &t.im[0], t.full, &kernelMasks[t.rem], t.rem, p, r)
}

// dotReal computes dst[m] = Σₖ t[k]·x[m·step + k] with the real taps t
// by the assembly kernel. It panics if x is too short.
func (t *kernelTaps) dotReal(dst, x []complex64, step int) {
	checkWindow(dst, x, step, t.n)
	if step == 1 && len(dst) >= 4 {
		// a filter that does not decimate: outputs in the lanes
		n := len(dst) &^ 3
		dotReal1AVX2(&dst[0], n, &x[0], &t.re[0], t.n)
		dst, x = dst[n:], x[n:]
	}
	if len(dst) == 0 {
		return
	}
	dotRealAVX2(dst, &x[0], step, &t.re[0], t.full, &kernelMasks[t.rem], t.rem)
}

// interpTaps holds the phases of an Interpolator transposed for
// interpAVX2: taps[(t·G + g)·8 + 2q + {0, 1}] = ph[4g + q][t], G groups of
// four phases, zero for the phases past u.
type interpTaps struct {
	taps []float32
	k    int // taps per phase
	u    int // phases
	full int // whole groups of four phases
	part int // 1 when u mod 4 phases follow in a last group
}

// newInterpTaps returns the transposed layout of the phases ph (each of
// k taps in window order).
func newInterpTaps(ph [][]float32, k int) *interpTaps { return newInterpTapsIQ(ph, ph, k) }

// newInterpTapsIQ is newInterpTaps with the taps phq for the imaginary
// parts of the samples (the odd lanes) instead of ph.
func newInterpTapsIQ(ph, phq [][]float32, k int) *interpTaps {
	u := len(ph)
	t := &interpTaps{k: k, u: u, full: u / 4}
	if u%4 != 0 {
		t.part = 1
	}
	g := t.full + t.part
	t.taps = make([]float32, k*g*8)
	for p, row := range ph {
		for i, v := range row {
			o := (i*g+p/4)*8 + 2*(p%4)
			t.taps[o], t.taps[o+1] = v, phq[p][i]
		}
	}
	return t
}

// interpGo is the reference loop of interpAVX2: for each input j <
// len(dst)/len(ph) and phase p, dst[j·u + p] = Σₜ ph[p][t]·x[j + t].
func interpGo(dst, x []complex64, ph [][]float32) { interpIQGo(dst, x, ph, ph) }

// interpIQGo is interpGo with the taps phq for the imaginary parts:
// dst[j·u + p] = Σₜ ph[p][t]·re x[j+t] + j·Σₜ phq[p][t]·im x[j+t].
func interpIQGo(dst, x []complex64, ph, phq [][]float32) {
	interpSums(len(dst), x, ph, phq, func(o int, r, i float32) { dst[o] = complex(r, i) })
}

// interpSums computes, for the n/u inputs j whose windows start at x[j]
// and each phase p, the sums r = Σₜ ph[p][t]·re x[j+t] and i = Σₜ
// phq[p][t]·im x[j+t] of output o = j·u + p, and hands them to out (the
// Go twins of the interpolation kernels differ only in what they store).
func interpSums(n int, x []complex64, ph, phq [][]float32, out func(o int, r, i float32)) {
	u := len(ph)
	k := len(ph[0])
	o := 0
	for j := range n / u {
		w := x[j : j+k]
		for p, h := range ph {
			h = h[:len(w)]
			hq := phq[p][:len(w)]
			var r, i float32
			for t, v := range w {
				r += h[t] * real(v)
				i += hq[t] * imag(v)
			}
			out(o, r, i)
			o++
		}
	}
}

// interp computes the outputs of len(dst)/u inputs by the assembly
// kernel. It panics if x is too short or len(dst) is not a multiple of u.
func (t *interpTaps) interp(dst, x []complex64) {
	n := len(dst) / t.u
	if n*t.u != len(dst) || (n > 0 && len(x) < n+t.k-1) {
		panic("modem: interpolation kernel size mismatch")
	}
	if n == 0 {
		return
	}
	interpAVX2(&dst[0], &x[0], n, &t.taps[0], t.k, t.full, &kernelMasks[t.u%4], t.part, 8*t.u)
}

// symTaps holds a ShiftDecimator's symmetric taps (see blockSym) in the
// layout of dotSymAVX2: pair slot k holds pa[k] and −pb[k], each twice,
// the centre tap of an odd length as one more slot (pa = h[c]/2, pb = 0,
// its two samples being the same), zero-padded to whole groups of four.
type symTaps struct {
	l, groups int
	pa, pb    []float32
}

// newSymTaps returns the kernel layout of the pair coefficients pa, pb
// and centre tap hc of l symmetric taps, or nil when the groups of four
// slots would reach past the window (l < 4 or l = 6).
func newSymTaps(pa, pb []float32, hc float32, l int) *symTaps {
	slots := len(pa) + l%2
	g := (slots + 3) / 4
	if 4*g > l {
		return nil
	}
	t := &symTaps{l: l, groups: g, pa: make([]float32, 8*g), pb: make([]float32, 8*g)}
	for k := range pa {
		t.pa[2*k], t.pa[2*k+1] = pa[k], pa[k]
		t.pb[2*k], t.pb[2*k+1] = -pb[k], -pb[k]
	}
	if l%2 == 1 {
		k := len(pa)
		t.pa[2*k], t.pa[2*k+1] = hc/2, hc/2
	}
	return t
}

// dotRotate computes dst[m] = p·rᵐ·(the symmetric sum of window m) by
// dotSymAVX2. It panics if x is too short.
func (t *symTaps) dotRotate(dst, x []complex64, step int, p, r complex128) {
	checkWindow(dst, x, step, t.l)
	if len(dst) == 0 {
		return
	}
	p1 := p * r
	q := [4]float64{real(p), imag(p), real(p1), imag(p1)}
	dotSymAVX2(&dst[0], len(dst), &x[0], step, &t.pa[0], &t.pb[0], t.groups, 8*(t.l-4), &q, r*r)
}

// realSymTaps holds symmetric real taps in the layout of dotRealSymAVX2:
// slot k < L/2 holds h[k] (twice), the centre tap of an odd length one
// more slot with h[c]/2, zero-padded to whole groups of four slots.
type realSymTaps struct {
	l, groups int
	hd        []float32
}

// newRealSymTaps returns the layout of the taps h (in window order), or
// nil when they are not symmetric or the groups of four slots would reach
// past the window (l < 4 or l = 6).
func newRealSymTaps(h []float32) *realSymTaps {
	l := len(h)
	for k := range l / 2 {
		if h[k] != h[l-1-k] {
			return nil
		}
	}
	g := ((l+1)/2 + 3) / 4
	if 4*g > l {
		return nil
	}
	t := &realSymTaps{l: l, groups: g, hd: make([]float32, 8*g)}
	for k := range l / 2 {
		t.hd[2*k], t.hd[2*k+1] = h[k], h[k]
	}
	if l%2 == 1 {
		k := l / 2
		t.hd[2*k], t.hd[2*k+1] = h[k]/2, h[k]/2
	}
	return t
}

// dot computes dst[m] = Σₖ h[k]·x[m·step + k] by dotRealSymAVX2. It
// panics if x is too short.
func (t *realSymTaps) dot(dst, x []complex64, step int) {
	checkWindow(dst, x, step, t.l)
	if step == 1 && len(dst) >= 4 {
		// a filter that does not decimate: outputs in the lanes, about
		// 1.6 times faster
		n := len(dst) &^ 3
		dotRealSym1AVX2(&dst[0], n, &x[0], &t.hd[0], (t.l+1)/2, t.l)
		dst, x = dst[n:], x[n:]
	}
	if len(dst) == 0 {
		return
	}
	dotRealSymAVX2(&dst[0], len(dst), &x[0], step, &t.hd[0], t.groups, 8*(t.l-4))
}
