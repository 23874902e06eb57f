package spectral

import (
	"math"

	"gonum.org/v1/gonum/dsp/fourier"
	"gonum.org/v1/gonum/dsp/window"
)

// bandIsolator passes the band centre ± half Hz through a linear-phase FIR
// (a Blackman–Harris windowed sinc shifted to the centre) by overlap-save
// FFT convolution, and keeps the peak of |y|² over the outputs for which
// the filter was full. The FIR is hand-written because it lives only to
// isolate the measured signal for its envelope peak; windowed-sinc design
// is the textbook method (Oppenheim & Schafer, Discrete-Time Signal
// Processing, 3rd ed., section 7.5).
type bandIsolator struct {
	l, m   int
	fft    *fourier.CmplxFFT
	h      []complex128 // FFT of the filter, scaled by 1/m
	buf    []complex128
	y      []complex128
	fill   int
	seen   int64 // input samples so far
	peak   float64
	primed bool
}

// newBandIsolator designs the filter: pass |f − centre| ≤ half, stop from
// half + transition, at sample rate rate.
func newBandIsolator(rate, centre, half, transition float64) *bandIsolator {
	l := int(math.Ceil(8*rate/transition)) | 1 // Blackman–Harris main lobe: 8 bins
	m := nextPow2(4 * l)
	fc := (half + transition/2) / rate // cut-off, cycles per sample
	w := make([]float64, l)
	for i := range w {
		w[i] = 1
	}
	window.BlackmanHarris(w)
	taps := make([]complex128, m)
	var dc float64
	mid := float64(l-1) / 2
	for i := range w {
		t := float64(i) - mid
		v := 2 * fc * w[i]
		if t != 0 {
			v = math.Sin(2*math.Pi*fc*t) / (math.Pi * t) * w[i]
		}
		dc += v
		s, c := math.Sincos(2 * math.Pi * centre / rate * float64(i))
		taps[i] = complex(v*c, v*s)
	}
	b := &bandIsolator{l: l, m: m, fft: fourier.NewCmplxFFT(m), buf: make([]complex128, m), y: make([]complex128, m)}
	b.h = b.fft.Coefficients(nil, taps)
	k := 1 / (dc * float64(m)) // unity gain in the passband
	for i := range b.h {
		b.h[i] *= complex(k, 0)
	}
	b.fill = l - 1 // the first block starts with l−1 zeros of history
	return b
}

// add feeds samples.
func (b *bandIsolator) add(x []complex64) {
	for len(x) > 0 {
		k := min(len(x), b.m-b.fill)
		for i, v := range x[:k] {
			b.buf[b.fill+i] = complex(float64(real(v)), float64(imag(v)))
		}
		b.fill += k
		x = x[k:]
		if b.fill == b.m {
			b.block()
		}
	}
}

// block filters a full buffer: outputs l−1 … m−1 are valid convolution
// results (overlap-save).
func (b *bandIsolator) block() {
	hist := b.buf[b.m-b.l+1:]
	// keep the last l−1 inputs for the next block
	y := b.fft.Coefficients(b.y, b.buf)
	for i := range y {
		y[i] *= b.h[i]
	}
	b.fft.Sequence(y, y)
	// outputs whose input window lies wholly in the stream: skip the
	// first l−1 of the stream (filter filling)
	start := b.l - 1
	if !b.primed {
		start += b.l - 1
		b.primed = true
	}
	for i := start; i < b.m; i++ {
		re, im := real(y[i]), imag(y[i])
		if p := re*re + im*im; p > b.peak {
			b.peak = p
		}
	}
	copy(b.buf, hist)
	b.fill = b.l - 1
}

// flush filters what is left; outputs whose window reaches past the end
// of the stream are not counted.
func (b *bandIsolator) flush() {
	if b.fill <= b.l-1 {
		return
	}
	valid := b.fill
	clear(b.buf[b.fill:])
	y := b.fft.Coefficients(b.y, b.buf)
	for i := range y {
		y[i] *= b.h[i]
	}
	b.fft.Sequence(y, y)
	start := b.l - 1
	if !b.primed {
		start += b.l - 1
		b.primed = true
	}
	for i := start; i < valid; i++ {
		re, im := real(y[i]), imag(y[i])
		if p := re*re + im*im; p > b.peak {
			b.peak = p
		}
	}
	b.fill = b.l - 1
}
