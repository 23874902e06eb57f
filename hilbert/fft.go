package hilbert

import (
	"math"

	"gonum.org/v1/gonum/dsp/fourier"
)

// fftSplitter is the FFT analytic-signal method run by overlap-save with a
// block of B = Taps samples. Zeroing the negative bins of a B-point DFT
// and doubling the positive ones (Nyquist bin dropped) is circular
// convolution with the periodic kernel
//
//	h_B[m] = (2/B)·Σ_{k=1}^{K} sin(2πkm/B) = (2/B)·sin(Km·π/B)·sin((K+1)m·π/B)/sin(πm/B),
//
// K = ⌈B/2⌉ − 1. Overlap-save applies an FIR exactly (linear, time-invariant)
// only if it is shorter than the block, so the kernel is cut to the
// L = 2M+1 ≤ B/2+1 taps around m = 0 and tapered by the Kaiser window of
// the "kaiser" design so the cut does not ring; each block then yields
// S = B − L + 1 new outputs. The streaming filter thus adds S samples of
// block latency to the kernel's M: Delay = M + S.
type fftSplitter struct {
	fir  *firSplitter
	b, s int
}

func newFFT(sp Spec) *fftSplitter {
	b := sp.Taps
	l := b/2 + 1
	if l%2 == 0 {
		l--
	}
	m := (l - 1) / 2
	w := make([]float64, l)
	for i := range w {
		w[i] = 1
	}
	Kaiser(w, KaiserBeta(kaiserAttenuation(l, 2*2*math.Pi*edge(sp)/sp.Rate)))
	kk := (b+1)/2 - 1
	h := make([]float64, m+1)
	for i := 1; i <= m; i++ {
		if b%2 == 0 && i%2 == 0 {
			continue // exactly zero for an even block
		}
		x := math.Pi * float64(i) / float64(b)
		h[i] = 2 / float64(b) * math.Sin(float64(kk)*x) * math.Sin(float64(kk+1)*x) / math.Sin(x) * w[m+i]
	}
	return &fftSplitter{fir: &firSplitter{spec: sp, m: m, h: h, odd: b%2 == 0}, b: b, s: b - l + 1}
}

func (f *fftSplitter) Spec() Spec     { return f.fir.spec }
func (f *fftSplitter) Delay() float64 { return float64(f.fir.m + f.s) }

// MACs estimates the cost per output sample: per block, a forward and an
// inverse real FFT of B points counted as B·log₂B multiply-adds each
// (common practice estimate for a split-radix real transform) and 4
// multiply-adds per bin for the spectral product, shared by S outputs.
func (f *fftSplitter) MACs() float64 {
	b := float64(f.b)
	return (2*b*math.Log2(b) + 4*(b/2+1)) / float64(f.s)
}

func (f *fftSplitter) Response(freq float64) complex128 {
	w := 2 * math.Pi * freq / f.fir.spec.Rate
	a := f.fir.amplitude(w)
	s, c := math.Sincos(-w * f.Delay())
	return complex((1+a)*c, (1+a)*s)
}

func (f *fftSplitter) NewFilter() Filter {
	b := f.b
	l := 2*f.fir.m + 1
	_, q := f.fir.taps()
	t := fourier.NewFFT(b)
	pad := make([]float64, b)
	copy(pad, q)
	k := t.Coefficients(nil, pad)
	for i := range k {
		k[i] /= complex(float64(b), 0) // the transform pair scales by B
	}
	return &fftFilter{
		t: t, kern: k, l: l, m: f.fir.m, s: f.s,
		in:   make([]float64, b),
		spec: make([]complex128, b/2+1),
		seq:  make([]float64, b),
		out:  make([]complex64, f.s),
	}
}

// fftFilter is the overlap-save streaming filter. in holds the last L−1
// samples of the previous block followed by the samples of the current
// one; out holds the previous block's S results, emitted one per input.
type fftFilter struct {
	t       *fourier.FFT
	kern    []complex128
	l, m, s int
	in      []float64
	spec    []complex128
	seq     []float64
	out     []complex64
	fill    int
}

func (f *fftFilter) Reset() {
	clear(f.in)
	clear(f.out)
	f.fill = 0
}

func (f *fftFilter) Process(dst []complex64, src []float32) []complex64 {
	dst = checkDst(dst, src)
	for n := 0; n < len(src); {
		c := min(f.s-f.fill, len(src)-n)
		base := f.l - 1 + f.fill
		for i, x := range src[n : n+c] {
			f.in[base+i] = float64(x)
		}
		copy(dst[n:n+c], f.out[f.fill:f.fill+c])
		f.fill += c
		n += c
		if f.fill == f.s {
			f.block()
		}
	}
	return dst
}

// block filters one full block and keeps the S valid outputs.
func (f *fftFilter) block() {
	f.t.Coefficients(f.spec, f.in)
	for i, k := range f.kern {
		f.spec[i] *= k
	}
	f.t.Sequence(f.seq, f.spec)
	for i := range f.out {
		p := f.l - 1 + i
		f.out[i] = complex(float32(f.in[p-f.m]), float32(f.seq[p]))
	}
	copy(f.in, f.in[f.s:])
	f.fill = 0
}
