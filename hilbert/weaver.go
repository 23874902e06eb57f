package hilbert

import "math"

// weaverSplitter is the Weaver method seen as a splitter: shift the band
// centre f₀ = (Low+High)/2 to 0, low-pass with a Kaiser-windowed sinc h of
// N = 2M+1 taps, shift back:
//
//	y[n] = e^{jω₀(n−M)}·Σ_k h[k]·x[n−k]·e^{−jω₀(n−k)},
//	H(ω) = e^{−jωM}·A(ω − ω₀),   A(ν) = Σ_k h[k]·cos(ν(k−M)),
//
// with h scaled to A(0) = 2 like the other designs. The opposite sideband
// leaks through the low-pass's stop band at −f − f₀. The low-pass cut-off
// sits halfway between the pass edge (High−Low)/2 and the nearest image,
// a transition of 2·fe with fe = min(Low, Rate/2 − High).
type weaverSplitter struct {
	spec Spec
	m    int
	h    []float64 // N taps, symmetric
	w0   float64   // ω₀ rad/sample
	// fixed is the fixed-point form (Spec.Bits); h then holds the
	// quantised taps.
	fixed *Fixed
}

func newWeaver(s Spec) *weaverSplitter {
	n := s.Taps
	m := (n - 1) / 2
	fe := edge(s)
	fc := (s.High-s.Low)/2 + fe // halfway between pass edge and image
	h := make([]float64, n)
	for k := range h {
		x := float64(k - m)
		if x == 0 {
			h[k] = 2 * fc / s.Rate
		} else {
			h[k] = math.Sin(2*math.Pi*fc/s.Rate*x) / (math.Pi * x)
		}
	}
	Kaiser(h, KaiserBeta(kaiserAttenuation(n, 2*2*math.Pi*fe/s.Rate)))
	var sum float64
	for _, v := range h {
		sum += v
	}
	for k := range h {
		h[k] *= 2 / sum
	}
	return &weaverSplitter{spec: s, m: m, h: h, w0: math.Pi * (s.Low + s.High) / s.Rate}
}

func (w *weaverSplitter) Spec() Spec     { return w.spec }
func (w *weaverSplitter) Delay() float64 { return float64(w.m) }

// MACs: the folded symmetric low-pass on a complex signal takes 2(M+1),
// the down-mix 2, the up-mix 4 and the oscillator update 4.
func (w *weaverSplitter) MACs() float64 { return float64(2*(w.m+1) + 10) }

func (w *weaverSplitter) Response(f float64) complex128 {
	om := 2 * math.Pi * f / w.spec.Rate
	nu := om - w.w0
	// A(ν) = h[M] + 2·Σ_{k≥1} h[M−k]·cos(kν), cos(kν) by the recurrence
	// cos((k+1)ν) = 2cos ν·cos(kν) − cos((k−1)ν).
	c1 := math.Cos(nu)
	a := w.h[w.m]
	prev, cur := 1.0, c1
	for k := 1; k <= w.m; k++ {
		a += 2 * w.h[w.m-k] * cur
		prev, cur = cur, 2*c1*cur-prev
	}
	s, c := math.Sincos(-om * float64(w.m))
	return complex(a*c, a*s)
}

// taps returns the equivalent pair of real band-pass filters: the complex
// impulse response h[k]·e^{jω₀(k−M)} split into real and imaginary parts.
func (w *weaverSplitter) taps() (i, q []float64) {
	i = make([]float64, len(w.h))
	q = make([]float64, len(w.h))
	for k, v := range w.h {
		s, c := math.Sincos(w.w0 * float64(k-w.m))
		i[k] = v * c
		q[k] = v * s
	}
	return i, q
}

func (w *weaverSplitter) NewFilter() Filter {
	h := make([]float32, w.m+1)
	for k := range h {
		h[k] = float32(w.h[k])
	}
	s, c := math.Sincos(-w.w0)
	return &weaverFilter{
		h: h, m: w.m, w0: w.w0, step: complex(c, s),
		re: make([]float32, 2*w.m+firChunk),
		im: make([]float32, 2*w.m+firChunk),
	}
}

// weaverFilter mixes down with a phasor kept by recurrence and set exactly
// from the sample count every weaverResync samples (so the output does not
// depend on block sizes), filters I and Q with the folded symmetric
// low-pass in float32, and mixes back up.
type weaverFilter struct {
	h      []float32 // h[0..M]
	m      int
	w0     float64
	step   complex128 // e^{−jω₀}
	n      int64      // samples seen
	p      complex128 // e^{−jω₀n}
	re, im []float32
}

const weaverResync = 4096

func (f *weaverFilter) Reset() {
	clear(f.re)
	clear(f.im)
	f.n = 0
}

func (f *weaverFilter) phasor(n int64) complex128 {
	s, c := math.Sincos(-f.w0 * float64(n%(1<<40)))
	return complex(c, s)
}

func (f *weaverFilter) Process(dst []complex64, src []float32) []complex64 {
	dst = checkDst(dst, src)
	hist := 2 * f.m
	for off := 0; off < len(src); off += firChunk {
		c := min(firChunk, len(src)-off)
		out := dst[off : off+c]
		n0 := f.n
		p := f.p
		for i, x := range src[off : off+c] {
			n := n0 + int64(i)
			if n%weaverResync == 0 {
				p = f.phasor(n)
			}
			f.re[hist+i] = x * float32(real(p))
			f.im[hist+i] = x * float32(imag(p))
			// Up-mix phasor e^{jω₀(n−M)} = conj(p)·e^{−jω₀M}; p kept for later.
			out[i] = complex64(p)
			p *= f.step
		}
		f.p = p
		f.n = n0 + int64(c)
		ms, mc := math.Sincos(-f.w0 * float64(f.m))
		back := complex64(complex(mc, ms))
		m := f.m
		h := f.h
		for i := range out {
			r := f.re[i : i+hist+1]
			q := f.im[i : i+hist+1]
			ar, ai := h[m]*r[m], h[m]*q[m]
			for k := 0; k < m; k++ {
				ar += h[k] * (r[k] + r[hist-k])
				ai += h[k] * (q[k] + q[hist-k])
			}
			u := complex(real(out[i]), -imag(out[i])) * back
			ur, ui := real(u), imag(u)
			out[i] = complex(ar*ur-ai*ui, ar*ui+ai*ur)
		}
		copy(f.re, f.re[c:c+hist])
		copy(f.im, f.im[c:c+hist])
	}
	return dst
}
