package spectral

import (
	"math"
	"math/cmplx"
	"math/rand/v2"

	"gonum.org/v1/gonum/dsp/fourier"
)

// line is one complex exponential a·e^{j(2πft+φ)}.
type line struct {
	f, amp, phase float64
}

// lines returns n samples at rate of the sum of ls.
func lines(n int, rate float64, ls ...line) []complex64 {
	x := make([]complex64, n)
	for i := range x {
		var v complex128
		for _, l := range ls {
			v += cmplx.Rect(l.amp, 2*math.Pi*l.f*float64(i)/rate+l.phase)
		}
		x[i] = complex64(v)
	}
	return x
}

// addNoise adds circular complex Gaussian noise with E|n|² = variance.
func addNoise(x []complex64, variance float64, seed uint64) []complex64 {
	r := rand.New(rand.NewPCG(seed, 7))
	s := math.Sqrt(variance / 2)
	for i := range x {
		x[i] += complex(float32(s*r.NormFloat64()), float32(s*r.NormFloat64()))
	}
	return x
}

// bandNoise returns n samples whose spectrum is shape(f) (amplitude) with
// random phases, built bin by bin and inverse-transformed, scaled to mean
// power p. A circular construction: the spectrum is exactly the shape.
func bandNoise(n int, rate, p float64, seed uint64, shape func(f float64) float64) []complex128 {
	r := rand.New(rand.NewPCG(seed, 11))
	fft := fourier.NewCmplxFFT(n)
	spec := make([]complex128, n)
	for k := range spec {
		f := fft.Freq(k) * rate
		if a := shape(f); a > 0 {
			spec[k] = cmplx.Rect(a, 2*math.Pi*r.Float64())
		}
	}
	x := fft.Sequence(nil, spec)
	var e float64
	for _, v := range x {
		e += real(v)*real(v) + imag(v)*imag(v)
	}
	k := math.Sqrt(p * float64(n) / e)
	for i := range x {
		x[i] *= complex(k, 0)
	}
	return x
}

// voiceShape is a speech-like long-term amplitude spectrum over audio
// frequency f ≥ 0: flat from 300 to 500 Hz, falling as (500/f)^1.5 above
// (speech energy concentrates below 1 kHz, common practice), zero outside
// 300–2700 Hz (the transmitter's band).
func voiceShape(f float64) float64 {
	switch {
	case f < 300 || f > 2700:
		return 0
	case f < 500:
		return 1
	}
	return math.Pow(500/f, 1.5)
}

// syllabic returns a slow envelope 0.25…1 at about 4 Hz (speech
// syllable rate, common practice).
func syllabic(i int, rate float64) float64 {
	t := float64(i) / rate
	return 0.25 + 0.75*math.Abs(math.Sin(2*math.Pi*2*t+0.3*math.Sin(2*math.Pi*0.7*t)))
}

// dBdiff returns |a − b|.
func dBdiff(a, b float64) float64 { return math.Abs(a - b) }
