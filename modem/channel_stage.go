package modem

import "math"

// stageChunk is the number of input samples a stage takes per inner pass;
// it bounds each stage's buffer whatever block size the caller uses.
const stageChunk = 4096

// ShiftDecimator is a frequency-translating polyphase decimator: it mixes
// the input down by freq Hz and low-pass filters and decimates by d in one
// pass,
//
//	y[m] = Σₖ h[k]·x[n−k]·e^{−jω(n−k)} = e^{−jωn}·Σₖ (h[k]·e^{jωk})·x[n−k],
//	n = m·d + phase,  ω = 2π·freq/rate,
//
// so the mixer is folded into complex taps h[k]·e^{jωk} and only the
// outputs are rotated, once per d inputs (Crochiere & Rabiner, Multirate
// Digital Signal Processing, 1983, sec. 7.2, frequency-translating
// filters). The phase of the rotation is computed from the absolute input
// index with a 64-bit fixed-point accumulator (2⁶⁴ ≙ one cycle), so there
// is no drift however long the stream; within a block it is advanced by a
// float64 recursion restarted from the exact value at every block.
//
// The taps and arithmetic are float32 with the complex products written
// out on real and imaginary parts (Go may evaluate complex64 products
// through complex128). Hand-written: no library offers a streaming
// frequency-translating decimator. On amd64 with AVX2 and FMA the dot
// products and the rotation run in an assembly kernel (see
// channel_kernel.go); elsewhere, and with the build tag purego, in Go
// loops that pair the symmetric taps.
type ShiftDecimator struct {
	cr, ci []float32 // folded taps in window order: c[i] = h[L−1−i]·e^{jω(L−1−i)}
	// With symmetric taps, the pairs k, L−1−k share one coefficient:
	// pa[k] = h[k]·cos θₖ, pb[k] = h[k]·sin θₖ, θₖ = ω(c − k), c = (L−1)/2,
	// and hc = h[c] for odd L (see Block).
	sym    bool
	pa, pb []float32
	hc     float32
	post   complex128 // e^{jωc}, folded into the output rotation
	l, d   int
	phase  int    // output at input indices m·d + phase
	step   uint64 // −freq/rate in 2⁻⁶⁴ cycles per sample
	base   uint64 // phase of the mixer at input index 0 (0 but after a Channeliser)
	rot    complex128
	buf    []complex64 // history (l−1) then the current chunk
	pos    int64       // absolute index of the next input sample
	kt     *kernelTaps // cr, ci for the assembly kernel (nil without it)
	st     *symTaps    // pa, pb for the symmetric assembly kernel (nil without it)
}

// NewShiftDecimator returns a decimator by d with the given low-pass taps
// (copied), mixing down by freq Hz at rate Hz; output m is taken at input
// index m·d + phase. It panics if taps is empty, d < 1 or phase is not in
// [0, d).
func NewShiftDecimator(taps []float64, d, phase int, freq, rate float64) *ShiftDecimator {
	if len(taps) == 0 || d < 1 || phase < 0 || phase >= d {
		panic("modem: invalid shift decimator parameters")
	}
	l := len(taps)
	s := &ShiftDecimator{l: l, d: d, phase: phase, cr: make([]float32, l), ci: make([]float32, l)}
	s.step = phaseStep(-freq / rate)
	w := 2 * math.Pi * freq / rate
	for k, h := range taps {
		sn, cs := math.Sincos(w * float64(k))
		s.cr[l-1-k] = float32(h * cs)
		s.ci[l-1-k] = float32(h * sn)
	}
	s.rot = phasor(uint64(d) * s.step)
	s.sym = true
	for k := range l / 2 {
		if taps[k] != taps[l-1-k] {
			s.sym = false
		}
	}
	if s.sym {
		c := float64(l-1) / 2
		for k := range l / 2 {
			sn, cs := math.Sincos(w * (c - float64(k)))
			s.pa = append(s.pa, float32(taps[k]*cs))
			s.pb = append(s.pb, float32(taps[k]*sn))
		}
		if l%2 == 1 {
			s.hc = float32(taps[l/2])
		}
		sn, cs := math.Sincos(w * c)
		s.post = complex(cs, sn)
	}
	if haveKernels {
		s.kt = newKernelTaps(s.cr, s.ci)
		if s.sym {
			s.st = newSymTaps(s.pa, s.pb, s.hc, l)
		}
	}
	s.buf = make([]complex64, l-1, 2*(l-1))
	return s
}

// Decim returns the decimation factor.
func (s *ShiftDecimator) Decim() int { return s.d }

// Delay returns the group delay in input samples, (L−1)/2 − phase: output
// m represents the input at time (m·d + phase − (L−1)/2)/rate.
func (s *ShiftDecimator) Delay() float64 { return float64(s.l-1)/2 - float64(s.phase) }

// Reset clears the history and returns to input index 0.
func (s *ShiftDecimator) Reset() {
	clear(s.buf[:s.l-1])
	s.buf = s.buf[:s.l-1]
	s.pos = 0
}

// MaxOut returns the most outputs n inputs can give.
func (s *ShiftDecimator) MaxOut(n int) int { return n/s.d + 1 }

// Process decimates src and appends the outputs to dst[:0], returning it.
// dst is reallocated when its capacity is below MaxOut(len(src)); it must
// not overlap src. As in Decimator.Process, only the outputs whose window
// reaches into the history read a copy (the history then the first L−1
// inputs); the others read src in place.
func (s *ShiftDecimator) Process(dst, src []complex64) []complex64 {
	if cap(dst) < s.MaxOut(len(src)) {
		dst = make([]complex64, 0, s.MaxOut(len(src)))
	}
	dst = dst[:0]
	l, n := s.l, len(src)
	if n == 0 {
		return dst
	}
	hd := min(l-1, n)
	head := append(s.buf[:l-1], src[:hd]...)
	dst = s.Block(dst, head, s.pos) // outputs at pos … pos+hd−1
	if n > hd {
		dst = s.Block(dst, src, s.pos+int64(l-1)) // outputs at pos+L−1 … pos+n−1
	}
	if n >= l-1 {
		copy(s.buf[:l-1], src[n-(l-1):])
	} else {
		copy(s.buf[:l-1], head[n:])
	}
	s.buf = s.buf[:l-1]
	s.pos += int64(n)
	return dst
}

// Block is the stateless kernel of Process: win holds the inputs of
// absolute indices a−(L−1) … a+len(win)−L (the L−1 samples before a
// then the block), and the outputs whose index m·d + phase lies in the
// block are appended to dst. Blocks of one stream may be run in any order
// and on any goroutine; their outputs, concatenated, equal Process's.
func (s *ShiftDecimator) Block(dst, win []complex64, a int64) []complex64 {
	n, cnt := s.span(a, int64(len(win)-(s.l-1)))
	if cnt == 0 {
		return dst
	}
	w := win[n-a:] // the first output's window onwards
	switch {
	case s.st != nil:
		return s.blockSymKernel(dst, w, n, cnt)
	case s.sym && s.kt == nil:
		return s.blockSym(dst, w, n, cnt)
	}
	return s.blockDot(dst, w, n, cnt)
}

// span returns the absolute index n of the first output of a block of
// nb inputs from index a (the first n ≥ a with n ≡ phase mod d) and the
// number of outputs in the block (0 when n ≥ a + nb).
func (s *ShiftDecimator) span(a, nb int64) (n int64, cnt int) {
	d := int64(s.d)
	r := (a - int64(s.phase)) % d
	if r < 0 {
		r += d
	}
	n = a
	if r != 0 {
		n += d - r
	}
	if n >= a+nb {
		return n, 0
	}
	return n, int((a+nb-1-n)/d) + 1
}

// grow returns dst with room for cnt more samples after its length.
func grow(dst []complex64, cnt int) []complex64 {
	k := len(dst)
	if cap(dst)-k < cnt {
		nd := make([]complex64, k, 2*(k+cnt))
		copy(nd, dst)
		dst = nd
	}
	return dst
}

// blockSymKernel is blockSym by the assembly kernel.
func (s *ShiftDecimator) blockSymKernel(dst, w []complex64, n int64, cnt int) []complex64 {
	k := len(dst)
	dst = grow(dst, cnt)
	p := phasor(s.base+uint64(n)*s.step) * s.post
	s.st.dotRotate(dst[k:k+cnt], w, s.d, p, s.rot)
	return dst[:k+cnt]
}

// blockDot is Block as the dot products of the folded taps with every
// d-th window (by the assembly kernel when there is one, else its Go
// twin), then the output rotation. Like blockSym and blockSymKernel it
// appends cnt outputs, the first of absolute index n, whose windows start
// at w, w+d, ….
func (s *ShiftDecimator) blockDot(dst, w []complex64, n int64, cnt int) []complex64 {
	k := len(dst)
	dst = grow(dst, cnt)
	out := dst[k : k+cnt]
	p := phasor(s.base + uint64(n)*s.step)
	if s.kt != nil {
		s.kt.dotRotate(out, w, s.d, p, s.rot)
	} else {
		dotComplexGo(out, w, s.d, s.cr, s.ci)
		rotate(out, p, s.rot)
	}
	return dst[:k+cnt]
}

// rotate multiplies out[i] by p·rⁱ, the phasor advanced by a float64
// recursion. The caller restarts p from the exact phase at every block,
// so the rounding of the recursion does not accumulate over a stream.
func rotate(out []complex64, p, r complex128) {
	pr, pi := real(p), imag(p)
	rr, ri := real(r), imag(r)
	for i, v := range out {
		ar, ai := real(v), imag(v)
		fr, fi := float32(pr), float32(pi)
		out[i] = complex(ar*fr-ai*fi, ar*fi+ai*fr)
		pr, pi = pr*rr-pi*ri, pr*ri+pi*rr
	}
}

// blockSym is Block for symmetric taps h[k] = h[L−1−k]. With
// A = x[n−k], B = x[n−L+1+k] and θₖ = ω(c − k), c = (L−1)/2,
//
//	h[k]·(e^{jωk}·A + e^{jω(L−1−k)}·B) = h[k]·e^{jωc}·(cos θₖ·(A+B) − j·sin θₖ·(A−B)),
//
// so each pair costs four real multiplications instead of eight and the
// common factor e^{jωc} joins the output rotation.
func (s *ShiftDecimator) blockSym(dst, win []complex64, n int64, cnt int) []complex64 {
	l := s.l
	p := phasor(s.base+uint64(n)*s.step) * s.post
	pr, pi := real(p), imag(p)
	rr, ri := real(s.rot), imag(s.rot)
	pa, pb := s.pa, s.pb[:len(s.pa)]
	np := len(pa)
	hc := s.hc
	odd := l%2 == 1
	for m := range cnt {
		w := win[m*s.d : m*s.d+l]
		lo := w[:np]
		hi := w[l-np:]
		hi = hi[:len(lo)]
		var ar, ai float32
		if odd {
			xc := w[np]
			ar, ai = hc*real(xc), hc*imag(xc)
		}
		var br, bi float32
		for k := range lo {
			x0, x1 := hi[np-1-k], lo[k]
			sr, si := real(x0)+real(x1), imag(x0)+imag(x1)
			dr, di := real(x0)-real(x1), imag(x0)-imag(x1)
			ca, cb := pa[k], pb[k]
			ar += ca * sr
			br += cb * di
			ai += ca * si
			bi -= cb * dr
		}
		ar += br
		ai += bi
		fr, fi := float32(pr), float32(pi)
		dst = append(dst, complex(ar*fr-ai*fi, ar*fi+ai*fr))
		pr, pi = pr*rr-pi*ri, pr*ri+pi*rr
	}
	return dst
}

// Decimator is a polyphase low-pass decimator of complex samples with real
// taps, y[m] = Σₖ h[k]·x[m·d + phase − k], computing only the kept
// outputs (Crochiere & Rabiner, 1983, sec. 3.3). float32 arithmetic on
// real and imaginary parts, written by hand like FIR, in the AVX2 kernel
// of channel_kernel.go where there is one. With d = 1 it is a plain FIR
// filter (the receive chain's channel filter).
type Decimator struct {
	kt    *kernelTaps  // rev for the assembly kernel (nil without it)
	st    *realSymTaps // rev for the symmetric kernel (nil without it or for asymmetric taps)
	rev   []float32    // taps reversed
	l, d  int
	phase int
	next  int // index in the coming input of the next output (window end)
	buf   []complex64
}

// NewDecimator returns a decimator by d with the given taps (copied); its
// output m is taken at input index m·d + phase. It panics if taps is
// empty, d < 1 or phase is not in [0, d).
func NewDecimator(taps []float64, d, phase int) *Decimator {
	if len(taps) == 0 || d < 1 || phase < 0 || phase >= d {
		panic("modem: invalid decimator parameters")
	}
	f := &Decimator{rev: reverse32(taps), l: len(taps), d: d, phase: phase, next: phase}
	if haveKernels {
		f.kt = newKernelTaps(f.rev, nil)
		f.st = newRealSymTaps(f.rev)
	}
	f.buf = make([]complex64, f.l-1, 2*(f.l-1))
	return f
}

// Delay returns the group delay in input samples, (L−1)/2 − phase.
func (f *Decimator) Delay() float64 { return float64(f.l-1)/2 - float64(f.phase) }

// Reset clears the history and the phase.
func (f *Decimator) Reset() {
	clear(f.buf[:f.l-1])
	f.buf = f.buf[:f.l-1]
	f.next = f.phase
}

// MaxOut returns the most outputs n inputs can give.
func (f *Decimator) MaxOut(n int) int { return n/f.d + 1 }

// Process decimates src, appending the outputs to dst[:0] (reallocated
// when its capacity is below MaxOut(len(src))), and returns it. dst must
// not overlap src. Only the outputs whose window reaches into the history
// read a copy (the history then the first L−1 inputs); the others read
// src in place, so the input is not copied.
func (f *Decimator) Process(dst, src []complex64) []complex64 {
	if cap(dst) < f.MaxOut(len(src)) {
		dst = make([]complex64, 0, f.MaxOut(len(src)))
	}
	dst = dst[:0]
	l, n := f.l, len(src)
	hd := min(l-1, n)
	head := append(f.buf[:l-1], src[:hd]...)
	j := f.next
	if j < hd { // windows head[j : j+l]
		cnt := (hd-1-j)/f.d + 1
		dst = f.dot(dst, head[j:], cnt)
		j += cnt * f.d
	}
	if j < n { // j ≥ l−1: windows src[j−l+1 : j+1]
		cnt := (n-1-j)/f.d + 1
		dst = f.dot(dst, src[j-(l-1):], cnt)
		j += cnt * f.d
	}
	f.next = j - n
	if n >= l-1 {
		copy(f.buf[:l-1], src[n-(l-1):])
	} else {
		copy(f.buf[:l-1], head[n:])
	}
	return dst
}

// dot appends cnt outputs of windows x[i·d : i·d+L] to dst, which has
// the capacity.
func (f *Decimator) dot(dst, x []complex64, cnt int) []complex64 {
	k := len(dst)
	out := dst[k : k+cnt]
	if f.st != nil {
		f.st.dot(out, x, f.d)
	} else if f.kt != nil {
		f.kt.dotReal(out, x, f.d)
	} else {
		dotRealGo(out, x, f.d, f.rev)
	}
	return dst[:k+cnt]
}

// Interpolator raises the rate by an integer factor u with a polyphase
// low-pass, y[n·u + p] = Σᵢ u·h[p + i·u]·x[n − i] (Crochiere & Rabiner,
// 1983, sec. 3.3), h designed at the output rate with unity DC gain. On
// amd64 with AVX2 and FMA four phases run per vector instruction
// (interpAVX2, channel_kernel.go).
type Interpolator struct {
	ph  [][]float32 // ph[p][i] = u·h[p + i·u], reversed in i
	phq [][]float32 // the same for the imaginary parts: ph, but in an ssbDetector
	kt  *interpTaps // ph, phq for the assembly kernel (nil without it)
	u   int
	k   int // taps per phase
	l   int
	buf []complex64
}

// NewInterpolator returns an interpolator by u with the low-pass taps h
// (at the output rate, unity DC gain, copied). It panics if u < 1 or h is
// empty.
func NewInterpolator(h []float64, u int) *Interpolator {
	return newInterpolatorIQ(h, h, u)
}

// newInterpolatorIQ is NewInterpolator with the taps hq (same length as
// h) for the imaginary parts of the samples: y[n·u + p] = Σᵢ u·(h[p +
// i·u]·re x[n−i] + j·hq[p + i·u]·im x[n−i]).
func newInterpolatorIQ(h, hq []float64, u int) *Interpolator {
	if u < 1 || len(h) == 0 || len(hq) != len(h) {
		panic("modem: invalid interpolator parameters")
	}
	k := (len(h) + u - 1) / u
	it := &Interpolator{u: u, k: k, l: len(h)}
	rows := func(h []float64) [][]float32 {
		var ph [][]float32
		for p := range u {
			row := make([]float32, k)
			for i := range k {
				if j := p + i*u; j < len(h) {
					row[k-1-i] = float32(float64(u) * h[j])
				}
			}
			ph = append(ph, row)
		}
		return ph
	}
	it.ph = rows(h)
	it.phq = it.ph
	if &hq[0] != &h[0] {
		it.phq = rows(hq)
	}
	if haveKernels {
		it.kt = newInterpTapsIQ(it.ph, it.phq, k)
	}
	it.buf = make([]complex64, k-1, 2*(k-1))
	return it
}

// Delay returns the group delay in output samples, (len(h)−1)/2.
func (it *Interpolator) Delay() float64 { return float64(it.l-1) / 2 }

// Reset clears the history.
func (it *Interpolator) Reset() {
	clear(it.buf[:it.k-1])
	it.buf = it.buf[:it.k-1]
}

// Process interpolates src into dst[:len(src)·u] (reallocated when short)
// and returns it. dst must not overlap src. As in Decimator.Process, only
// the first K−1 inputs read a copy after the history.
func (it *Interpolator) Process(dst, src []complex64) []complex64 {
	n := len(src)
	if cap(dst) < n*it.u {
		dst = make([]complex64, n*it.u)
	}
	dst = dst[:n*it.u]
	it.windows(src, func(from, to int, x []complex64) { it.run(dst[from*it.u:to*it.u], x) })
	return dst
}

// windows calls run for the inputs from … to−1 of src whose windows start
// at x: the first K−1 in a copy after the history, the rest in src
// itself; then keeps the last K−1 inputs as the history.
func (it *Interpolator) windows(src []complex64, run func(from, to int, x []complex64)) {
	n, k := len(src), it.k
	hd := min(k-1, n)
	head := append(it.buf[:k-1], src[:hd]...)
	run(0, hd, head)
	if n > hd { // inputs i ≥ K−1: windows src[i−K+1 : i+1]
		run(hd, n, src)
	}
	if n >= k-1 {
		copy(it.buf[:k-1], src[n-(k-1):])
	} else {
		copy(it.buf[:k-1], head[n:])
	}
}

// processReal is Process with the two parts of each output summed,
// dst[m] = re y[m] + im y[m] (ssbDetector: Re c·Re z + (−Im c)·Im z), into
// dst[:len(src)·u] (reallocated when short).
func (it *Interpolator) processReal(dst []float32, src []complex64) []float32 {
	n := len(src)
	if cap(dst) < n*it.u {
		dst = make([]float32, n*it.u)
	}
	dst = dst[:n*it.u]
	it.windows(src, func(from, to int, x []complex64) { it.runReal(dst[from*it.u:to*it.u], x) })
	return dst
}

// interpRealMasks[r] selects the first r of four float32 outputs, for
// interpRealAVX2's last partial group of phases.
var interpRealMasks = [4][4]int32{{}, {-1}, {-1, -1}, {-1, -1, -1}}

// runReal is run for processReal.
func (it *Interpolator) runReal(out []float32, x []complex64) {
	n := len(out) / it.u
	if n == 0 {
		return
	}
	if it.kt != nil {
		if len(x) < n+it.k-1 {
			panic("modem: interpolation kernel size mismatch")
		}
		t := it.kt
		interpRealAVX2(&out[0], &x[0], n, &t.taps[0], it.k, t.full+t.part, it.u, t.part, &interpRealMasks[it.u%4])
		return
	}
	interpRealGo(out, x, it.ph, it.phq)
}

// interpRealGo is the reference loop of interpRealAVX2: for each input j
// < len(dst)/u and phase p, dst[j·u + p] = Σₜ ph[p][t]·re x[j+t] +
// phq[p][t]·im x[j+t].
func interpRealGo(dst []float32, x []complex64, ph, phq [][]float32) {
	interpSums(len(dst), x, ph, phq, func(o int, r, i float32) { dst[o] = r + i })
}

// run computes the outputs out of the inputs whose windows start at x.
func (it *Interpolator) run(out, x []complex64) {
	if it.kt != nil {
		it.kt.interp(out, x)
	} else {
		interpIQGo(out, x, it.ph, it.phq)
	}
}
