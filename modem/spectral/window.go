package spectral

import (
	"math"

	"gonum.org/v1/gonum/dsp/window"
)

// Window selects the taper applied to each FFT segment.
type Window int

const (
	// Hann is the default window for densities and band powers: first
	// side lobe −31.5 dB, falling 18 dB per octave, ENBW 1.5 bins.
	Hann Window = iota
	// FlatTop is the five-term flat-top window of gonum's window.FlatTop:
	// its main lobe is flat to about 0.01 dB over ±0.5 bin, so the peak of
	// a tone reads its level wherever the tone falls between bins
	// (ENBW ≈ 3.77 bins, side lobes below −90 dB).
	FlatTop
	// BlackmanHarris is the four-term Blackman–Harris window (side lobes
	// −92 dB, ENBW ≈ 2.0 bins).
	BlackmanHarris
)

// String returns the window's name.
func (w Window) String() string {
	switch w {
	case Hann:
		return "hann"
	case FlatTop:
		return "flattop"
	case BlackmanHarris:
		return "blackmanharris"
	}
	return "unknown"
}

func (w Window) fn() func([]float64) []float64 {
	switch w {
	case Hann:
		return window.Hann
	case FlatTop:
		return window.FlatTop
	case BlackmanHarris:
		return window.BlackmanHarris
	}
	panic("spectral: unknown window")
}

// Coefficients returns the n periodic ("DFT-even") weights of w: the
// symmetric window of length n+1 with its last point dropped, as Harris
// recommends for spectral analysis (F. J. Harris, "On the use of windows
// for harmonic analysis with the discrete Fourier transform", Proc. IEEE
// 66(1), 1978, section II). scipy.signal.get_window builds the same
// periodic windows by default.
//
// It panics if n < 1 or w is unknown.
func (w Window) Coefficients(n int) []float64 {
	if n < 1 {
		panic("spectral: window length < 1")
	}
	seq := make([]float64, n+1)
	for i := range seq {
		seq[i] = 1
	}
	w.fn()(seq)
	return seq[:n]
}

// windowSums returns Σw and Σw² of the weights.
func windowSums(w []float64) (s1, s2 float64) {
	for _, v := range w {
		s1 += v
		s2 += v * v
	}
	return s1, s2
}

// ENBW returns the equivalent noise bandwidth of the n-point window in
// bins: n·Σw²/(Σw)² (Harris 1978, eq. 11).
func (w Window) ENBW(n int) float64 {
	s1, s2 := windowSums(w.Coefficients(n))
	return float64(n) * s2 / (s1 * s1)
}

// nextPow2 returns the smallest power of two ≥ n (n ≥ 1).
func nextPow2(n int) int {
	p := 1
	for p < n {
		p <<= 1
	}
	return p
}

// FFTSizeFor returns the power-of-two FFT length whose bin spacing
// rate/n is no coarser than resolution Hz. It panics if rate or
// resolution is not positive.
func FFTSizeFor(rate, resolution float64) int {
	if !(rate > 0) || !(resolution > 0) {
		panic("spectral: rate and resolution must be positive")
	}
	n := math.Ceil(rate / resolution)
	if n > 1<<24 {
		n = 1 << 24
	}
	return nextPow2(int(n))
}
