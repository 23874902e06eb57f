package spectral

import (
	"math"

	"gonum.org/v1/gonum/dsp/fourier"
)

// Options configures an Accumulator. The zero value is a Hann window with
// 50 % overlap.
type Options struct {
	// Window tapers each segment (default Hann).
	Window Window
	// Hop is the number of samples from one segment's start to the next:
	// 0 means half the FFT length (50 % overlap); a hop larger than the
	// FFT length skips samples between segments, which samples a long
	// capture evenly at a bounded cost.
	Hop int
}

// Accumulator averages the periodograms of windowed, possibly overlapping
// segments of a streamed complex signal: Welch's method (P. D. Welch,
// IEEE Trans. Audio Electroacoust. AU-15(2), 1967). Blocks of any length
// may be added; the segmentation does not depend on how the stream is cut.
// Memory is a few slices of the FFT length, whatever the stream's length.
type Accumulator struct {
	n, hop int
	rate   float64
	win    Window
	w      []float64
	s1, s2 float64
	fft    *fourier.CmplxFFT

	buf  []complex64 // the segment being filled
	fill int
	skip int // samples still to drop before the next segment (hop > n)

	work []complex128
	sum  []float64 // Σ|X_k|² in FFT order
	segs int

	// each, when set, sees every segment's |X_k|² (FFT order) as it is
	// added (the waterfall's rows).
	each func(p []float64)
	seg  []float64
}

// NewAccumulator returns a Welch accumulator with a Hann window and 50 %
// overlap for FFT length fftSize at the given sample rate (Hz).
// It panics if fftSize < 2 or rate ≤ 0.
func NewAccumulator(fftSize int, rate float64) *Accumulator {
	return NewAccumulatorOptions(fftSize, rate, Options{})
}

// NewAccumulatorOptions is NewAccumulator with a chosen window and hop.
// It panics if fftSize < 2, rate ≤ 0 or opt.Hop < 0.
func NewAccumulatorOptions(fftSize int, rate float64, opt Options) *Accumulator {
	if fftSize < 2 {
		panic("spectral: FFT length < 2")
	}
	if !(rate > 0) || math.IsInf(rate, 0) {
		panic("spectral: rate must be positive")
	}
	if opt.Hop < 0 {
		panic("spectral: negative hop")
	}
	hop := opt.Hop
	if hop == 0 {
		hop = fftSize / 2
	}
	a := &Accumulator{
		n: fftSize, hop: hop, rate: rate, win: opt.Window,
		w:    opt.Window.Coefficients(fftSize),
		fft:  fourier.NewCmplxFFT(fftSize),
		buf:  make([]complex64, fftSize),
		work: make([]complex128, fftSize),
		sum:  make([]float64, fftSize),
	}
	a.s1, a.s2 = windowSums(a.w)
	return a
}

// Len returns the FFT length.
func (a *Accumulator) Len() int { return a.n }

// Rate returns the sample rate in Hz.
func (a *Accumulator) Rate() float64 { return a.rate }

// Hop returns the samples between segment starts.
func (a *Accumulator) Hop() int { return a.hop }

// Segments returns the number of segments averaged so far.
func (a *Accumulator) Segments() int { return a.segs }

// Reset forgets every sample and segment.
func (a *Accumulator) Reset() {
	a.fill, a.skip, a.segs = 0, 0, 0
	clear(a.sum)
}

// Add feeds the next block of the stream. It does not allocate.
func (a *Accumulator) Add(block []complex64) {
	for len(block) > 0 {
		if a.skip > 0 {
			k := min(a.skip, len(block))
			a.skip -= k
			block = block[k:]
			continue
		}
		k := copy(a.buf[a.fill:], block)
		a.fill += k
		block = block[k:]
		if a.fill < a.n {
			return
		}
		a.segment()
		if a.hop < a.n {
			copy(a.buf, a.buf[a.hop:])
			a.fill = a.n - a.hop
		} else {
			a.fill = 0
			a.skip = a.hop - a.n
		}
	}
}

// segment windows, transforms and accumulates the full buffer.
func (a *Accumulator) segment() {
	w, work := a.w, a.work[:len(a.w)]
	for i, v := range a.buf[:len(w)] {
		work[i] = complex(float64(real(v))*w[i], float64(imag(v))*w[i])
	}
	a.fft.Coefficients(work, work)
	sum := a.sum[:len(work)]
	if a.each == nil {
		for k, c := range work {
			re, im := real(c), imag(c)
			sum[k] += re*re + im*im
		}
	} else {
		if a.seg == nil {
			a.seg = make([]float64, a.n)
		}
		seg := a.seg[:len(work)]
		for k, c := range work {
			re, im := real(c), imag(c)
			p := re*re + im*im
			seg[k] = p
			sum[k] += p
		}
		a.each(seg)
	}
	a.segs++
}

// densityScale turns a sum of |X_k|² over segs segments into power per Hz:
// P_k = Σ|X_k|² / (segs · rate · Σw²), the density scaling of Welch's
// estimate (scipy.signal.welch scaling="density" uses the same).
func (a *Accumulator) densityScale(segs int) float64 {
	return 1 / (float64(segs) * a.rate * a.s2)
}

// Spectrum returns the averaged power spectral density so far, centred
// (index 0 is −rate/2). It returns nil before the first full segment.
func (a *Accumulator) Spectrum() *Spectrum {
	if a.segs == 0 {
		return nil
	}
	s := &Spectrum{
		Rate: a.rate, Window: a.win, Segments: a.segs,
		ENBW:    float64(a.n) * a.s2 / (a.s1 * a.s1),
		Density: make([]float64, a.n),
	}
	centre(s.Density, a.sum, a.densityScale(a.segs))
	return s
}

// PSD returns the averaged power spectral density in (full-scale
// amplitude)² per Hz, centred: element j is the frequency
// (j − n/2)·rate/n, n the FFT length. It returns nil before the first
// full segment. Detect takes this slice.
func (a *Accumulator) PSD() []float64 {
	s := a.Spectrum()
	if s == nil {
		return nil
	}
	return s.Density
}

// centre writes src (FFT order) scaled by k into dst in centred order.
func centre(dst, src []float64, k float64) {
	n := len(src)
	h := n / 2
	for j := range dst {
		i := j - h
		if i < 0 {
			i += n
		}
		dst[j] = src[i] * k
	}
}

// Spectrum is an averaged power spectral density in centred order.
type Spectrum struct {
	// Rate is the sample rate in Hz; the spectrum covers [−Rate/2, Rate/2).
	Rate float64
	// Density[j] is the power per Hz at Freq(j), in (full-scale
	// amplitude)² per Hz: white noise with E|x|² = σ² reads σ²/Rate.
	Density []float64
	// Window is the segment taper and ENBW its equivalent noise bandwidth
	// in bins.
	Window Window
	ENBW   float64
	// Segments is the number of averaged segments.
	Segments int
}

// Len returns the number of bins.
func (s *Spectrum) Len() int { return len(s.Density) }

// BinHz returns the bin spacing in Hz.
func (s *Spectrum) BinHz() float64 { return s.Rate / float64(len(s.Density)) }

// Freq returns the frequency of bin j in Hz.
func (s *Spectrum) Freq(j int) float64 {
	return float64(j-len(s.Density)/2) * s.BinHz()
}

// Index returns the fractional bin index of frequency f.
func (s *Spectrum) Index(f float64) float64 {
	return f/s.BinHz() + float64(len(s.Density)/2)
}

// BandPower returns the power between lo and hi Hz: the integral of the
// density, each bin standing for a band one bin wide around its frequency
// (edge bins count in proportion to their overlap). Frequencies outside
// the spectrum are ignored.
func (s *Spectrum) BandPower(lo, hi float64) float64 {
	if hi < lo {
		lo, hi = hi, lo
	}
	b := s.BinHz()
	j0 := max(0, int(math.Floor(s.Index(lo)-0.5)))
	j1 := min(len(s.Density)-1, int(math.Ceil(s.Index(hi)+0.5)))
	var p float64
	for j := j0; j <= j1; j++ {
		f := s.Freq(j)
		ov := math.Min(hi, f+b/2) - math.Max(lo, f-b/2)
		if ov > 0 {
			p += s.Density[j] * ov
		}
	}
	return p
}

// BinPower returns the power a tone centred on bin j would have:
// Density[j]·BinHz·ENBW. Read from a FlatTop spectrum it is the tone's
// power wherever the tone falls within the bin.
func (s *Spectrum) BinPower(j int) float64 {
	return s.Density[j] * s.BinHz() * s.ENBW
}

// Tone returns the strongest bin within ±search Hz of f as a tone: its
// frequency (refined by a parabola through the dB values of the peak and
// its neighbours) and its power (BinPower). ok is false when the range
// holds no bin.
func (s *Spectrum) Tone(f, search float64) (freq, power float64, ok bool) {
	j0 := max(0, int(math.Ceil(s.Index(f-search))))
	j1 := min(len(s.Density)-1, int(math.Floor(s.Index(f+search))))
	if j1 < j0 {
		// search narrower than a bin: the nearest bin
		j := int(math.Round(s.Index(f)))
		if j < 0 || j >= len(s.Density) {
			return 0, 0, false
		}
		j0, j1 = j, j
	}
	best := j0
	for j := j0 + 1; j <= j1; j++ {
		if s.Density[j] > s.Density[best] {
			best = j
		}
	}
	freq = s.Freq(best)
	if best > 0 && best < len(s.Density)-1 {
		a, b, c := dB(s.Density[best-1]), dB(s.Density[best]), dB(s.Density[best+1])
		if d := a - 2*b + c; d < 0 {
			freq += 0.5 * (a - c) / d * s.BinHz()
		}
	}
	return freq, s.BinPower(best), true
}

// dB returns 10·log10(p), with a floor at −400 dB for p ≤ 0.
func dB(p float64) float64 {
	if p <= 0 {
		return -400
	}
	return 10 * math.Log10(p)
}

// DB is 10·log10(p) with −400 dB for zero or negative p.
func DB(p float64) float64 { return dB(p) }
