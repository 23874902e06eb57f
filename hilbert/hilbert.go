package hilbert

import (
	"fmt"
	"math"
	"strings"
)

// Spec describes one phase-splitter design. The zero value is not valid;
// New checks every field.
type Spec struct {
	// Design is one of Designs.
	Design string
	// Taps is the FIR length (odd, at least 3) for the windowed and
	// equiripple designs, the low-pass length (odd) for "weaver" and the
	// FFT block size (at least 8) for "fft".
	Taps int
	// Sections is the number of all-pass sections for "allpass". A section
	// is a first-order all-pass in z⁻², (a − z⁻²)/(1 − a·z⁻²): one
	// multiplication per sample. The pair's total order is 2·Sections+1.
	Sections int
	// Rate is the sample rate in Hz.
	Rate float64
	// Low and High bound the audio band in Hz the design is optimised and
	// analysed for: 0 < Low < High < Rate/2.
	Low, High float64
	// Bits, when not 0, quantises the coefficients to signed Bits-bit
	// fractions (MinBits to MaxBits) with the largest power-of-two scale
	// that keeps the largest coefficient in range; the all-pass pair
	// then also filters in integer arithmetic. See Fixed and Quantized.
	Bits int
}

// Designs lists the valid design names in order.
var Designs = []string{"rect", "hamming", "blackman", "kaiser", "equiripple", "allpass", "fft", "weaver"}

// Limits on lengths accepted by New; beyond them the designs are of no
// practical use and the design arithmetic loses accuracy.
const (
	MaxTaps     = 8191
	MaxRemez    = 2047 // equiripple taps
	MaxSections = 16
	MinFFT      = 8
	MaxFFT      = 1 << 20
)

// Splitter is a designed phase splitter: two real paths I and Q whose
// combination I + j·Q passes positive frequencies and rejects negative ones.
type Splitter interface {
	// Spec returns the design parameters.
	Spec() Spec
	// Response returns the analytic filter H(f) = I(f) + j·Q(f) at f Hz
	// (negative f allowed). It is unnormalised: about 2 at positive f in
	// the band and about 0 at negative f.
	Response(f float64) complex128
	// Delay returns the delay of the streaming filter in samples (for the
	// all-pass pair: the group delay at the band centre).
	Delay() float64
	// MACs returns the real multiply-adds per input sample of the
	// streaming filter.
	MACs() float64
	// NewFilter returns a new streaming filter in its initial state.
	NewFilter() Filter
}

// Filter turns a real signal into its analytic signal, streaming:
// dst[n] ≈ x[n−D] + j·H{x}[n−D] with D the splitter's Delay, so that a real
// tone a·cos(ωn) becomes a·e^{jω(n−D)}. It is linear and time-invariant
// with frequency response Splitter.Response (up to float32 rounding).
type Filter interface {
	// Process filters src into dst and returns dst. A nil dst is
	// allocated; otherwise len(dst) must equal len(src). dst and src do
	// not alias. Process panics if len(dst) != len(src) for a non-nil dst.
	Process(dst []complex64, src []float32) []complex64
	// Reset returns the filter to its initial (all-zero) state.
	Reset()
}

// New designs the splitter described by s. It returns an error, listing
// the allowed values, for an unknown design, a length out of range or a
// band outside (0, Rate/2).
func New(s Spec) (Splitter, error) {
	if err := validate(s); err != nil {
		return nil, err
	}
	var sp Splitter
	switch s.Design {
	case "rect", "hamming", "blackman", "kaiser":
		sp = newWindowed(s)
	case "equiripple":
		e, err := newEquiripple(s)
		if err != nil {
			return nil, err
		}
		sp = e
	case "allpass":
		sp = newAllpass(s)
	case "fft":
		sp = newFFT(s)
	case "weaver":
		sp = newWeaver(s)
	default:
		panic("hilbert: unreachable design")
	}
	if s.Bits != 0 {
		applyBits(sp, s.Bits)
	}
	return sp, nil
}

func validate(s Spec) error {
	known := false
	for _, d := range Designs {
		if s.Design == d {
			known = true
		}
	}
	if !known {
		return fmt.Errorf("unknown design %q (allowed: %s)", s.Design, strings.Join(Designs, ", "))
	}
	if !(s.Rate > 0) || math.IsInf(s.Rate, 0) {
		return fmt.Errorf("rate must be a positive number of Hz, got %g", s.Rate)
	}
	if !(s.Low > 0 && s.Low < s.High && s.High < s.Rate/2) {
		return fmt.Errorf("band %g:%g Hz must satisfy 0 < low < high < rate/2 = %g Hz", s.Low, s.High, s.Rate/2)
	}
	if s.Bits != 0 && (s.Bits < MinBits || s.Bits > MaxBits) {
		return fmt.Errorf("coefficient bits must be %d to %d, got %d", MinBits, MaxBits, s.Bits)
	}
	switch s.Design {
	case "allpass":
		if s.Sections < 1 || s.Sections > MaxSections {
			return fmt.Errorf("allpass sections must be 1 to %d, got %d", MaxSections, s.Sections)
		}
	case "fft":
		if s.Taps < MinFFT || s.Taps > MaxFFT {
			return fmt.Errorf("fft block size must be %d to %d, got %d", MinFFT, MaxFFT, s.Taps)
		}
	default:
		max := MaxTaps
		if s.Design == "equiripple" {
			max = MaxRemez
		}
		if s.Taps < 3 || s.Taps%2 == 0 || s.Taps > max {
			return fmt.Errorf("%s taps must be odd, 3 to %d, got %d", s.Design, max, s.Taps)
		}
	}
	return nil
}

// edge returns the design band edge fe = min(Low, Rate/2 − High): the
// designs are symmetric about Rate/4 and cover [fe, Rate/2 − fe].
func edge(s Spec) float64 { return math.Min(s.Low, s.Rate/2-s.High) }

// Analysis summarises a splitter over an audio band.
type Analysis struct {
	// SuppressionMinDB and SuppressionMeanDB are the minimum and the mean
	// of 20·log10(|H(f)|/|H(−f)|) in dB over a uniform grid of the band.
	SuppressionMinDB, SuppressionMeanDB float64
	// RippleDB is the peak-to-peak variation of 20·log10|H(f)| over the
	// band (wanted sideband).
	RippleDB float64
	// DelaySamples and DelayMS are the splitter's delay.
	DelaySamples, DelayMS float64
	// MACsPerSample is the streaming cost in real multiply-adds a sample.
	MACsPerSample float64
}

// MaxSuppressionDB caps reported suppression: an exact zero at −f (or a
// residue below float64 rounding) would otherwise give +Inf.
const MaxSuppressionDB = 300

// gridPoints is the number of uniform grid points Analyze uses over the
// band; local minima are then refined by golden-section search so the
// minimum is right to far better than 0.05 dB.
const gridPoints = 1025

// Analyze evaluates s over [low, high] Hz (positive audio frequencies): the
// suppression 20·log10(|H(f)|/|H(−f)|) (minimum and mean of the dB values
// on a uniform grid), the wanted-sideband ripple and the cost. The minimum
// is refined between grid points and is right to better than 0.05 dB.
// It panics if !(0 < low < high).
func Analyze(s Splitter, low, high float64) Analysis {
	if !(low > 0 && low < high) {
		panic("hilbert: Analyze band must satisfy 0 < low < high")
	}
	b := analyzeBand(s, low, high)
	d := s.Delay()
	b.DelaySamples = d
	b.DelayMS = 1000 * d / s.Spec().Rate
	b.MACsPerSample = s.MACs()
	return b
}

// responder is anything with an analytic response H(f): the digital
// splitters and the analog networks.
type responder interface {
	Response(f float64) complex128
}

// analyzeBand fills the suppression and ripple fields of an Analysis of r
// over [low, high].
func analyzeBand(s responder, low, high float64) Analysis {
	var (
		freq, pos, neg [gridPoints]float64
		ratio          [gridPoints]float64 // |H(f)|/|H(−f)|, capped
		step           = (high - low) / (gridPoints - 1)
	)
	for i := range freq {
		freq[i] = low + float64(i)*step
	}
	freq[gridPoints-1] = high
	magnitudes(s, freq[:], pos[:], neg[:])
	var (
		sum        float64
		rmin       = math.Inf(1)
		gmin, gmax = math.Inf(1), math.Inf(-1)
	)
	// The dB values are summed as logarithms of products of groups of
	// eight ratios: each ratio lies in [1/capRatio, capRatio], so a
	// product stays far inside float64 range, and one logarithm does for
	// eight.
	prod := 1.0
	for i := range ratio {
		r := capped(pos[i], neg[i])
		ratio[i] = r
		rmin = math.Min(rmin, r)
		prod *= r
		if i%8 == 7 || i == gridPoints-1 {
			sum += 20 * math.Log10(prod)
			prod = 1
		}
		gmin = math.Min(gmin, pos[i])
		gmax = math.Max(gmax, pos[i])
	}
	// Refine each grid local minimum within 1 dB of the lowest: the true
	// minimum lies between its neighbours.
	var fb, pb, nb [1]float64
	supp := func(f float64) float64 {
		fb[0] = f
		magnitudes(s, fb[:], pb[:], nb[:])
		return ratioDB(pb[0], nb[0])
	}
	minDB := ratioDB(rmin, 1)
	oneDB := rmin * math.Pow(10, 1.0/20)
	for i, v := range ratio {
		if v > oneDB {
			continue
		}
		if i > 0 && ratio[i-1] < v || i < gridPoints-1 && ratio[i+1] < v {
			continue
		}
		a := low + float64(max(i-1, 0))*step
		b := math.Min(high, low+float64(min(i+1, gridPoints-1))*step)
		minDB = math.Min(minDB, goldenMin(supp, a, b))
	}
	return Analysis{
		SuppressionMinDB:  minDB,
		SuppressionMeanDB: sum / gridPoints,
		RippleDB:          20 * math.Log10(gmax/gmin),
	}
}

// SuppressionAt returns the suppression 20·log10(|H(f)|/|H(−f)|) in dB at
// f Hz, capped at MaxSuppressionDB.
func SuppressionAt(s Splitter, f float64) float64 {
	return ratioDB(cmplxAbs(s.Response(f)), cmplxAbs(s.Response(-f)))
}

// capRatio is 10^(MaxSuppressionDB/20), the largest ratio reported.
const capRatio = 1e15

// ratioDB returns 20·log10(p/n) capped at MaxSuppressionDB.
func ratioDB(p, n float64) float64 {
	if n <= p/capRatio {
		return MaxSuppressionDB
	}
	return 20 * math.Log10(p/n)
}

// capped returns p/n capped at capRatio, as ratioDB does in dB.
func capped(p, n float64) float64 {
	if n <= p/capRatio {
		return capRatio
	}
	return p / n
}

func cmplxAbs(c complex128) float64 { return math.Hypot(real(c), imag(c)) }

// goldenMin returns the minimum of f over [a, b] found by golden-section
// search, including the end values.
func goldenMin(f func(float64) float64, a, b float64) float64 {
	const r = 0.6180339887498949 // (√5 − 1)/2
	best := math.Min(f(a), f(b))
	x1 := b - r*(b-a)
	x2 := a + r*(b-a)
	f1, f2 := f(x1), f(x2)
	for range 40 {
		if f1 < f2 {
			b, x2, f2 = x2, x1, f1
			x1 = b - r*(b-a)
			f1 = f(x1)
		} else {
			a, x1, f1 = x1, x2, f2
			x2 = a + r*(b-a)
			f2 = f(x2)
		}
		if b-a < 1e-9*math.Abs(a+b) {
			break
		}
	}
	return math.Min(best, math.Min(f1, f2))
}

// SuppressionDB returns the opposite-sideband suppression in dB of a
// splitter whose Q path has gain g relative to the I path and departs from
// quadrature by ε radians:
//
//	10·log10((1 + 2g·cos ε + g²) / (1 − 2g·cos ε + g²)).
//
// It follows from H(±f) = 1 ± g·e^{jε}; with g = 1 it is 20·log10(cot(ε/2)).
func SuppressionDB(gain, phaseErrRad float64) float64 {
	c := 2 * gain * math.Cos(phaseErrRad)
	g2 := gain * gain
	return 10 * math.Log10((1+c+g2)/(1-c+g2))
}

// Coefficients returns the I and Q path taps of an FIR splitter (the
// windowed, equiripple and FFT designs, and the Weaver design's equivalent
// pair of band-pass filters), in convolution order (k = 0 weights the newest input): output
// n = Σ_k i[k]·x[n−k] + j·Σ_k q[k]·x[n−k]. For "fft" these are the taps of
// the FIR applied by overlap-save, without the block latency. ok is false
// for the all-pass design (see Sections).
func Coefficients(s Splitter) (i, q []float64, ok bool) {
	switch t := s.(type) {
	case *firSplitter:
		i, q = t.taps()
		return i, q, true
	case *fftSplitter:
		i, q = t.fir.taps()
		return i, q, true
	case *weaverSplitter:
		i, q = t.taps()
		return i, q, true
	}
	return nil, nil, false
}

// Sections returns the all-pass coefficients of the I and Q paths of an
// "allpass" splitter. Each coefficient a is one section
// (a − z⁻²)/(1 − a·z⁻²); the Q path has one extra sample of delay z⁻¹ in
// front. ok is false for the other designs.
func Sections(s Splitter) (i, q []float64, ok bool) {
	t, ok := s.(*allpassSplitter)
	if !ok {
		return nil, nil, false
	}
	return append([]float64(nil), t.ai...), append([]float64(nil), t.aq...), true
}

// checkDst returns dst, allocated if nil, for a Filter.Process of src. It
// panics if a non-nil dst differs in length from src.
func checkDst(dst []complex64, src []float32) []complex64 {
	if dst == nil {
		return make([]complex64, len(src))
	}
	if len(dst) != len(src) {
		panic("hilbert: dst length differs from src")
	}
	return dst
}
