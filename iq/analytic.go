package iq

import (
	"math"

	"gonum.org/v1/gonum/dsp/fourier"
	"gonum.org/v1/gonum/dsp/window"
)

// DefaultAnalyticTaps is the Hilbert filter length used by Open for real
// recordings. With the Blackman–Nuttall window the image of a real tone is
// more than 80 dB down from 0.001·fs to 0.499·fs (over 110 dB measured;
// TestAnalyticImage).
const DefaultAnalyticTaps = 4095

// Analytic turns a real signal x into its analytic signal x + j·H{x}, H
// the Hilbert transform, so that a real tone a·cos(ωn) becomes the complex
// tone a·e^{jωn} (positive frequency only).
//
// The Hilbert transformer is the ideal impulse response
//
//	h[k] = 2/(πk) for odd k, 0 for even k   (k = −D … D, D = (taps−1)/2)
//
// (the ideal discrete Hilbert transformer, Oppenheim & Schafer,
// Discrete-Time Signal Processing, 3rd ed., sec. 12.4; from memory; the
// formula is repeated rather than taken from package hilbert because iq
// imports nothing of the project, DEVELOPERS.md) truncated by a Blackman–Nuttall window from gonum's dsp/window. The
// real part is x delayed by D samples, exactly. The imaginary part is computed
// by FFT overlap-save convolution (gonum's dsp/fourier real FFT), so the
// cost per sample grows with log(taps), not taps; the overlap-save loop is
// written here because gonum has no streaming convolution.
//
// Process is streaming: blocks of any size give the same output as the
// whole signal at once. The output lags the input by Delay samples (D plus
// one FFT block); Open removes that lag so a real file's analytic signal is
// time-aligned with it and has the same number of samples.
type Analytic struct {
	taps, d, n, l int
	fft           *fourier.FFT
	hf            []complex128 // FFT of the zero-padded Hilbert taps, scaled 1/n
	hist          []float64    // [taps−1 previous inputs | l new inputs]
	fill          int          // new inputs in hist
	coef          []complex128
	seq           []float64
	out           []complex64 // outputs of the last block, read from outPos
	outPos        int
}

// NewAnalytic returns a real-to-analytic converter with a Hilbert filter
// of taps coefficients. It panics if taps is not odd or is less than 3.
func NewAnalytic(taps int) *Analytic {
	if taps < 3 || taps%2 == 0 {
		panic("iq: Hilbert filter length must be odd and at least 3")
	}
	n := 1
	for n < 2*taps {
		n <<= 1
	}
	a := &Analytic{taps: taps, d: (taps - 1) / 2, n: n, l: n - taps + 1}
	a.fft = fourier.NewFFT(n)
	h := make([]float64, n)
	for i := 0; i < taps; i++ {
		if k := i - a.d; k%2 != 0 {
			h[i] = 2 / (math.Pi * float64(k))
		}
	}
	w := window.BlackmanNuttall(ones(taps))
	for i := range w {
		h[i] *= w[i]
	}
	a.hf = a.fft.Coefficients(nil, h)
	for i := range a.hf {
		a.hf[i] /= complex(float64(n), 0)
	}
	a.hist = make([]float64, n)
	a.coef = make([]complex128, n/2+1)
	a.seq = make([]float64, n)
	a.out = make([]complex64, a.l)
	return a
}

func ones(n int) []float64 {
	s := make([]float64, n)
	for i := range s {
		s[i] = 1
	}
	return s
}

// Taps returns the Hilbert filter length.
func (a *Analytic) Taps() int { return a.taps }

// Delay returns the lag of Process's output behind its input in samples:
// the filter's group delay (taps−1)/2 plus one overlap-save block.
func (a *Analytic) Delay() int { return a.d + a.l }

// Reset clears the state, as if no sample had been processed.
func (a *Analytic) Reset() {
	clear(a.hist)
	clear(a.out)
	a.fill, a.outPos = 0, 0
}

// Process writes the analytic signal of src, delayed by Delay samples,
// to dst and returns it; dst must not overlap src. A nil or short dst is
// allocated. Process does not allocate otherwise.
func (a *Analytic) Process(dst []complex64, src []float32) []complex64 {
	if cap(dst) < len(src) {
		dst = make([]complex64, len(src))
	}
	dst = dst[:len(src)]
	head := a.taps - 1
	for i := 0; i < len(src); {
		k := min(len(src)-i, a.l-a.fill)
		copy(dst[i:i+k], a.out[a.outPos:a.outPos+k])
		in := a.hist[head+a.fill : head+a.fill+k]
		for j, v := range src[i : i+k] {
			in[j] = float64(v)
		}
		a.fill += k
		a.outPos += k
		i += k
		if a.fill == a.l {
			a.block()
		}
	}
	return dst
}

// block filters one full overlap-save block and shifts the history.
func (a *Analytic) block() {
	a.fft.Coefficients(a.coef, a.hist)
	for i, h := range a.hf {
		a.coef[i] *= h
	}
	a.fft.Sequence(a.seq, a.coef)
	head := a.taps - 1
	re := a.hist[a.d : a.d+a.l]
	im := a.seq[head : head+a.l]
	for k := range a.out {
		a.out[k] = complex(float32(re[k]), float32(im[k]))
	}
	copy(a.hist[:head], a.hist[a.l:])
	a.fill, a.outPos = 0, 0
}
