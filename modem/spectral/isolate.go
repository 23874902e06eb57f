package spectral

import (
	"math"

	"gonum.org/v1/gonum/dsp/window"

	"ssbkit/internal/fft"
)

// bandIsolator passes the band centre ± half Hz through a linear-phase FIR
// (a Blackman–Harris windowed sinc shifted to the centre) by overlap-save
// FFT convolution, and keeps the peak of |y|² over the outputs for which
// the filter was full. The FIR is hand-written because it lives only to
// isolate the measured signal for its envelope peak; windowed-sinc design
// is the textbook method (Oppenheim & Schafer, Discrete-Time Signal
// Processing, 3rd ed., section 7.5).
//
// Both transforms are the package's radix-4 FFT, whose bins come out
// digit-reversed: the filter's transform is kept in the same order, the
// product is put back in frequency order, and a second forward transform
// stands for the inverse, since DFT(Y)[i] = m·y[(m − i) mod m] — only
// |y|² is needed, so the order of its outputs does not matter once each
// position knows its time index.
type bandIsolator struct {
	l, m   int
	fft    *fft.Radix4
	h      []complex128 // filter transform (digit-reversed), scaled by 1/m
	tIdx   []int32      // time index of each position of the second transform
	buf    []complex128
	y, nat []complex128
	fill   int
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
	b := &bandIsolator{
		l: l, m: m, fft: fft.NewRadix4(m), buf: make([]complex128, m),
		y: make([]complex128, m), nat: make([]complex128, m), tIdx: make([]int32, m),
	}
	b.fft.Transform(taps)
	b.h = taps
	k := 1 / (dc * float64(m)) // unity gain in the passband
	for i := range b.h {
		b.h[i] *= complex(k, 0)
	}
	for p, bin := range b.fft.Perm() {
		b.tIdx[p] = int32((m - int(bin)) % m)
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
			b.block(b.m)
		}
	}
}

// block filters the buffer and takes the peak over the valid outputs
// below end: outputs l−1 … m−1 are valid convolution results
// (overlap-save), and the stream's first l−1 outputs are skipped (filter
// filling). It keeps the last l−1 inputs as the next block's history.
func (b *bandIsolator) block(end int) {
	y := b.y
	copy(y, b.buf)
	b.fft.Transform(y)
	h := b.h[:len(y)]
	for i, v := range y {
		y[i] = v * h[i]
	}
	nat := b.nat[:len(y)]
	for p, bin := range b.fft.Perm() {
		nat[bin] = y[p]
	}
	b.fft.Transform(nat)
	start := b.l - 1
	if !b.primed {
		start += b.l - 1
		b.primed = true
	}
	tIdx := b.tIdx[:len(nat)]
	for p, v := range nat {
		if t := int(tIdx[p]); t >= start && t < end {
			re, im := real(v), imag(v)
			if q := re*re + im*im; q > b.peak {
				b.peak = q
			}
		}
	}
	copy(b.buf, b.buf[b.m-b.l+1:])
	b.fill = b.l - 1
}

// flush filters what is left; outputs whose window reaches past the end
// of the stream are not counted.
func (b *bandIsolator) flush() {
	if b.fill <= b.l-1 {
		return
	}
	clear(b.buf[b.fill:])
	b.block(b.fill)
}
