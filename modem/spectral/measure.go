package spectral

import (
	"errors"
	"fmt"
	"math"
	"sort"

	"ssbkit/modem"
)

// Sidebands for MeasureOptions.Sideband and Result.Sideband.
const (
	Upper = "upper"
	Lower = "lower"
	Auto  = "auto"
)

// MeasureOptions describes the transmission to measure. The zero value
// measures a carrier at 0 Hz, the stronger sideband, over 300–2700 Hz at
// 5 Hz resolution.
type MeasureOptions struct {
	// CarrierHz is the (suppressed) carrier's offset from the capture
	// centre.
	CarrierHz float64
	// Sideband is Upper, Lower, or Auto/"" for the stronger.
	Sideband string
	// BandLow and BandHigh are the audio band in Hz (default 300, 2700).
	BandLow, BandHigh float64
	// Resolution is the largest FFT bin spacing in Hz (default 5).
	Resolution float64
}

func (o MeasureOptions) withDefaults() MeasureOptions {
	if o.BandLow == 0 && o.BandHigh == 0 {
		o.BandLow, o.BandHigh = 300, 2700
	}
	if o.Resolution == 0 {
		o.Resolution = 5
	}
	if o.Sideband == "" {
		o.Sideband = Auto
	}
	return o
}

// FFTSize returns the FFT length the options give at rate Hz (the
// measuring rate: see NarrowRate).
func (o MeasureOptions) FFTSize(rate float64) int {
	return FFTSizeFor(rate, o.withDefaults().Resolution)
}

// Narrowing: a capture at least narrowMinDecim times wider than
// narrowRate is first brought down, around the carrier, to the lowest
// integer fraction of its rate that is at least narrowRate (the receive
// chain's decimators, modem.Narrower), and measured there.
const (
	// narrowRate keeps the envelope well sampled for PEP: a band of
	// ±2.85 kHz sampled at 48 kHz misses a peak between samples by at
	// most 1 − cos²(π·2850/48000) ≈ 0.15 dB, where 19.2 kHz could miss
	// 0.96 dB.
	narrowRate     = 48000
	narrowMinDecim = 4
	// narrowAttenDB keeps aliases of other signals in a wide capture
	// below what the figures resolve (IMD products near −110 dBc from a
	// clean modulator).
	narrowAttenDB = 100
	// narrowMarginHz widens the protected band beyond the widest figure.
	narrowMarginHz = 200
)

// protectHz returns the half-width around the carrier that the figures
// read: the occupied-bandwidth span ±2·HIGH, the fifth-order products of
// two tones inside the band (up to 3·HIGH − 2·LOW from the carrier) and
// the PEP filter's stop edge, plus a margin.
func (o MeasureOptions) protectHz() float64 {
	return max(2*o.BandHigh, 3*o.BandHigh-2*o.BandLow, o.BandHigh+isoPass+isoTransition) + narrowMarginHz
}

// narrower returns the narrowing chain for a capture at rate Hz, or nil
// when the capture is already narrow or the protected band does not fit.
func (o MeasureOptions) narrower(rate float64) *modem.Narrower {
	p := o.protectHz()
	minRate := math.Max(narrowRate, 2.5*p)
	if rate < narrowMinDecim*minRate || math.Abs(o.CarrierHz)+p >= rate/2 {
		return nil
	}
	nr, err := modem.NewNarrower(rate, o.CarrierHz, minRate, p, narrowAttenDB)
	if err != nil || nr.Decim() < narrowMinDecim {
		return nil
	}
	return nr
}

// NarrowRate returns the rate at which a capture at rate Hz is measured:
// rate itself, or the narrowed rate (see Measurer).
func (o MeasureOptions) NarrowRate(rate float64) float64 {
	o = o.withDefaults()
	if nr := o.narrower(rate); nr != nil {
		return nr.Rate()
	}
	return rate
}

// Check returns an error, saying what would work, when the options do not
// fit a capture at rate Hz with the given number of samples (< 0:
// unknown).
func (o MeasureOptions) Check(rate float64, samples int64) error {
	o = o.withDefaults()
	if !(rate > 0) {
		return errors.New("sample rate unknown or not positive")
	}
	nyq := rate / 2
	switch o.Sideband {
	case Upper, Lower, Auto:
	default:
		return fmt.Errorf("sideband %q: want upper, lower or auto", o.Sideband)
	}
	if !(o.BandLow >= 0 && o.BandHigh > o.BandLow) {
		return fmt.Errorf("band %g:%g Hz: want 0 ≤ LOW < HIGH", o.BandLow, o.BandHigh)
	}
	if !(o.Resolution > 0) {
		return fmt.Errorf("resolution %g Hz: want a positive value", o.Resolution)
	}
	if math.Abs(o.CarrierHz) >= nyq {
		return fmt.Errorf("carrier offset %g Hz is outside the capture, which covers %g to %g Hz around its centre",
			o.CarrierHz, -nyq, nyq)
	}
	if o.BandHigh >= nyq {
		return fmt.Errorf("band %g:%g Hz is wider than the capture (rate %g Hz covers ±%g Hz): use a HIGH below %g",
			o.BandLow, o.BandHigh, rate, nyq, math.Floor(nyq-math.Abs(o.CarrierHz)))
	}
	if room := nyq - math.Abs(o.CarrierHz); o.BandHigh >= room {
		return fmt.Errorf("both sidebands of %g:%g Hz around a carrier at %g Hz do not fit in the capture (±%g Hz): use a HIGH below %g or a carrier nearer the centre",
			o.BandLow, o.BandHigh, o.CarrierHz, nyq, math.Floor(room))
	}
	if samples >= 0 {
		if nr := o.narrower(rate); nr != nil {
			return shortness(rate, samples, o.Resolution, nr.Rate(), nr.Decim(), nr.Settle())
		}
		return shortness(rate, samples, o.Resolution, rate, 1, 0)
	}
	return nil
}

// shortness returns tooShort's error when samples at rate do not give one
// FFT segment at the measuring rate mrate = rate/decim after settle
// outputs are dropped, and nil otherwise.
func shortness(rate float64, samples int64, res, mrate float64, decim, settle int) error {
	n := FFTSizeFor(mrate, res)
	need := int64(n+settle) * int64(decim)
	if samples >= need {
		return nil
	}
	usable := max(samples/int64(decim)-int64(settle), 2)
	coarser := mrate / float64(nextPow2Floor(int(usable)))
	return fmt.Errorf("capture has %d samples (%.3g s); a resolution of %g Hz needs at least %d (%.3g s): use a resolution of %.3g Hz or coarser",
		samples, float64(samples)/rate, res, need, float64(need)/rate, coarser)
}

// nextPow2Floor returns the largest power of two ≤ n (n ≥ 1).
func nextPow2Floor(n int) int {
	p := 1
	for p*2 <= n {
		p *= 2
	}
	return p
}

// Measurer measures one SSB or AM transmission in a streamed capture: a
// Hann Welch spectrum for band powers and occupied bandwidth, a flat-top
// one for tone and carrier levels, and the envelope peak of the signal
// isolated around its carrier.
//
// A wide capture (at least four times 48 kHz, or 2.5 times the protected
// band when that is wider) is first narrowed: the band around the carrier
// is shifted to zero and decimated to the lowest integer fraction of the
// capture rate that is at least 48 kHz by modem.Narrower (aliases 100 dB
// down, ripple below 0.01 dB), and measured there; the outputs during the
// chain's start are dropped. The figures are the same (the tests hold
// both paths to the same tolerances); the spectra then cover the
// measuring rate around the carrier.
type Measurer struct {
	opt     MeasureOptions
	rate    float64 // capture rate
	mrate   float64 // measuring rate
	hann    *Accumulator
	flat    *Accumulator
	iso     *bandIsolator
	peak    float64 // of the measured samples, when no isolation is needed
	samples int64

	narrow  *modem.Narrower
	nbuf    []complex64
	drop    int     // narrowed outputs still to drop (chain settling)
	centre  float64 // capture frequency at the measured spectra's centre
	carrier float64 // carrier offset at the measuring rate
}

// isolation margins around the band for the PEP filter: pass to
// BandHigh+150 Hz, stop from BandHigh+850 Hz.
const (
	isoPass       = 150
	isoTransition = 700
)

// NewMeasurer returns a Measurer for a capture at rate Hz; samples is the
// capture length if known (< 0 otherwise), used only to report a too
// short capture before reading it.
func NewMeasurer(rate float64, samples int64, opt MeasureOptions) (*Measurer, error) {
	if err := opt.Check(rate, samples); err != nil {
		return nil, err
	}
	opt = opt.withDefaults()
	m := &Measurer{opt: opt, rate: rate, mrate: rate, carrier: opt.CarrierHz}
	if m.narrow = opt.narrower(rate); m.narrow != nil {
		m.mrate = m.narrow.Rate()
		m.drop = m.narrow.Settle()
		m.centre, m.carrier = opt.CarrierHz, 0
	}
	n := opt.FFTSize(m.mrate)
	m.hann = NewAccumulatorOptions(n, m.mrate, Options{Window: Hann})
	m.flat = NewAccumulatorOptions(n, m.mrate, Options{Window: FlatTop})
	half := opt.BandHigh + isoPass
	if stop := half + isoTransition; math.Abs(m.carrier)+stop < m.mrate/2 {
		m.iso = newBandIsolator(m.mrate, m.carrier, half, isoTransition)
	}
	return m, nil
}

// MeasureRate returns the rate in Hz at which the capture is measured:
// the capture's, or the narrowed rate.
func (m *Measurer) MeasureRate() float64 { return m.mrate }

// valid returns the frequencies, as offsets from the capture centre, that
// the measured spectra hold without the narrowing's transition bands.
func (m *Measurer) valid() (lo, hi float64) {
	if m.narrow == nil {
		return -m.rate / 2, m.rate / 2
	}
	p := m.opt.protectHz()
	return m.centre - p, m.centre + p
}

// Add feeds the next block of the capture.
func (m *Measurer) Add(block []complex64) {
	m.samples += int64(len(block))
	if m.narrow != nil {
		for len(block) > 0 {
			c := min(len(block), 1<<16)
			m.nbuf = m.narrow.Process(m.nbuf, block[:c])
			block = block[c:]
			y := m.nbuf
			k := min(m.drop, len(y))
			m.drop -= k
			m.add(y[k:])
		}
		return
	}
	m.add(block)
}

// add feeds samples at the measuring rate.
func (m *Measurer) add(block []complex64) {
	m.hann.Add(block)
	m.flat.Add(block)
	if m.iso != nil {
		m.iso.add(block)
		return
	}
	for _, v := range block {
		re, im := real(v), imag(v)
		if p := float64(re*re + im*im); p > m.peak {
			m.peak = p
		}
	}
}

// Tone is one spectral line: its offset from the carrier in Hz (positive
// above the carrier) and its power in dBFS.
type Tone struct {
	OffsetHz float64
	DBFS     float64
}

// Result holds the figures of one transmission. Levels are dBFS (0 dB is
// |x| = 1), relative levels dB.
type Result struct {
	RateHz          float64
	CarrierOffsetHz float64
	Sideband        string // upper or lower
	BandHz          [2]float64
	Samples         int64

	WantedDBFS, UnwantedDBFS float64
	SuppressionDB            float64
	PEPDBFS                  float64
	CarrierDBc               float64
	CarrierDBFS              float64
	// MeasureRateHz is the rate the spectra were measured at (RateHz, or
	// the narrowed rate around the carrier).
	MeasureRateHz float64

	// OccupiedBandwidthHz is the 99 % bandwidth; OccupiedLowHz and
	// OccupiedHighHz its edges as offsets from the carrier.
	OccupiedBandwidthHz           float64
	OccupiedLowHz, OccupiedHighHz float64
	// NoiseDBFSPerHz is the noise floor density of the capture.
	NoiseDBFSPerHz float64
	// UnwantedAtNoise, CarrierAtNoise, IMD3AtNoise and IMD5AtNoise are set
	// when that power is within 3 dB of the noise in the same band (the
	// band for a sideband, one flat-top bin for a line): the figure then
	// measures the noise and is only a bound (suppression at least, the
	// others at most).
	UnwantedAtNoise, CarrierAtNoise bool
	IMD3AtNoise, IMD5AtNoise        bool

	// TwoTone is set when two tones dominate the wanted sideband; then
	// Tones holds them (lower first) and the IMD figures are set, with
	// Products the third- and fifth-order lines measured.
	TwoTone              bool
	Tones                []Tone
	IMD3DBc, IMD5DBc     float64
	IMD3DBPEP, IMD5DBPEP float64
	Products             []Tone

	// Spectrum (Hann) and Lines (flat-top) are the averaged spectra.
	Spectrum, Lines *Spectrum
}

// ErrNoSignal reports a capture whose band holds nothing above the noise.
var ErrNoSignal = errors.New("no signal")

// atNoise is the ratio to the noise power (3 dB) below which a figure is
// flagged as measuring the noise.
const atNoise = 2

// minSignalDB is how far the stronger sideband must rise above the noise
// power in the same band to count as a signal.
const minSignalDB = 6

// Result computes the figures from everything added. It returns an error
// if the capture was shorter than one FFT segment, or wraps ErrNoSignal
// when neither sideband rises minSignalDB above the noise.
func (m *Measurer) Result() (*Result, error) {
	o := m.opt
	if m.hann.Segments() == 0 {
		decim, settle := 1, 0
		if m.narrow != nil {
			decim, settle = m.narrow.Decim(), m.narrow.Settle()
		}
		if err := shortness(m.rate, m.samples, o.Resolution, m.mrate, decim, settle); err != nil {
			return nil, err
		}
		return nil, errors.New("no complete FFT segment")
	}
	if m.iso != nil {
		m.iso.flush()
		m.peak = m.iso.peak
	}
	hs, fs := m.hann.Spectrum(), m.flat.Spectrum()
	hs.Centre, fs.Centre = m.centre, m.centre
	c := o.CarrierHz
	r := &Result{
		RateHz: m.rate, MeasureRateHz: m.mrate, CarrierOffsetHz: c, BandHz: [2]float64{o.BandLow, o.BandHigh},
		Samples: m.samples, Spectrum: hs, Lines: fs,
	}
	vlo, vhi := m.valid()
	j0 := max(0, int(math.Ceil(hs.Index(vlo))))
	j1 := min(hs.Len(), int(math.Floor(hs.Index(vhi)))+1)
	floor := NoiseFloor(hs.Density[j0:j1], hs.BinHz()*float64(j1-j0), 60)
	r.NoiseDBFSPerHz = dB(floor)
	up := hs.BandPower(c+o.BandLow, c+o.BandHigh)
	lo := hs.BandPower(c-o.BandHigh, c-o.BandLow)
	side := o.Sideband
	if side == Auto {
		side = Upper
		if lo > up {
			side = Lower
		}
	}
	r.Sideband = side
	want, unwant := up, lo
	if side == Lower {
		want, unwant = lo, up
	}
	noiseBand := floor * (o.BandHigh - o.BandLow)
	if dB(math.Max(up, lo))-dB(noiseBand) < minSignalDB {
		return nil, fmt.Errorf("%w around carrier offset %g Hz: the sidebands over %g–%g Hz are within %d dB of the noise floor (%.1f dBFS/Hz)",
			ErrNoSignal, c, o.BandLow, o.BandHigh, minSignalDB, r.NoiseDBFSPerHz)
	}
	r.WantedDBFS, r.UnwantedDBFS = dB(want), dB(unwant)
	r.SuppressionDB = r.WantedDBFS - r.UnwantedDBFS
	r.PEPDBFS = dB(m.peak)
	_, pc, _ := fs.Tone(c, fs.BinHz())
	r.CarrierDBFS = dB(pc)
	r.CarrierDBc = r.CarrierDBFS - r.PEPDBFS
	lineNoise := floor * fs.BinHz() * fs.ENBW
	r.UnwantedAtNoise = unwant <= atNoise*noiseBand
	r.CarrierAtNoise = pc <= atNoise*lineNoise

	// occupied bandwidth over the carrier ± 2·BandHigh, within the capture
	span := 2 * o.BandHigh
	a, z := math.Max(c-span, vlo), math.Min(c+span, vhi)
	if l, h, ok := hs.OccupiedBandwidth(a, z, 0.99); ok {
		r.OccupiedLowHz, r.OccupiedHighHz = l-c, h-c
		r.OccupiedBandwidthHz = h - l
	}
	m.twoTone(r, side, want, floor)
	return r, nil
}

// twoTone looks for two dominant tones in the wanted band and measures
// the intermodulation products.
func (m *Measurer) twoTone(r *Result, side string, want, floor float64) {
	o, fs := m.opt, r.Lines
	c := o.CarrierHz
	sign := 1.0
	if side == Lower {
		sign = -1
	}
	// local maxima of the flat-top spectrum over the wanted band: a bin
	// higher than every bin within ±guard (the flat-top main lobe is ±5
	// bins wide)
	const guard = 5
	j0 := int(math.Ceil(fs.Index(math.Min(c+sign*o.BandLow, c+sign*o.BandHigh))))
	j1 := int(math.Floor(fs.Index(math.Max(c+sign*o.BandLow, c+sign*o.BandHigh))))
	type pk struct {
		j int
		p float64
	}
	var peaks []pk
	for j := max(j0, 0); j <= j1 && j < fs.Len(); j++ {
		d := fs.Density[j]
		top := true
		for k := max(0, j-guard); k <= min(fs.Len()-1, j+guard); k++ {
			if fs.Density[k] > d || (fs.Density[k] == d && k < j) {
				top = false
				break
			}
		}
		if top {
			peaks = append(peaks, pk{j, fs.BinPower(j)})
		}
	}
	if len(peaks) < 2 {
		return
	}
	sort.Slice(peaks, func(a, b int) bool { return peaks[a].p > peaks[b].p })
	p1, p2 := peaks[0], peaks[1]
	// two tones dominate: together 80 % of the wanted band's power, and
	// within 6 dB of each other (common practice for a two-tone test)
	if p1.p+p2.p < 0.8*want || dB(p1.p)-dB(p2.p) > 6 {
		return
	}
	f1, _, _ := fs.Tone(fs.Freq(p1.j), fs.BinHz())
	f2, _, _ := fs.Tone(fs.Freq(p2.j), fs.BinHz())
	a1, a2 := sign*(f1-c), sign*(f2-c) // audio frequencies
	t1, t2 := Tone{f1 - c, dB(p1.p)}, Tone{f2 - c, dB(p2.p)}
	if a1 > a2 {
		a1, a2 = a2, a1
		t1, t2 = t2, t1
	}
	r.TwoTone = true
	r.Tones = []Tone{t1, t2}
	ref := (p1.p + p2.p) / 2 // one tone: the mean of the two
	level := func(audio float64) (Tone, bool) {
		f := c + sign*audio
		if lo, hi := m.valid(); f < lo || f >= hi {
			return Tone{}, false
		}
		_, p, ok := fs.Tone(f, fs.BinHz())
		return Tone{f - c, dB(p)}, ok
	}
	lineNoise := dB(floor * fs.BinHz() * fs.ENBW)
	worst := func(orders ...float64) (float64, bool) {
		best := math.Inf(-1)
		for _, a := range orders {
			if t, ok := level(a); ok {
				r.Products = append(r.Products, t)
				best = math.Max(best, t.DBFS)
			}
		}
		return best, best <= lineNoise+10*math.Log10(atNoise)
	}
	p3, n3 := worst(2*a1-a2, 2*a2-a1)
	p5, n5 := worst(3*a1-2*a2, 3*a2-2*a1)
	r.IMD3AtNoise, r.IMD5AtNoise = n3, n5
	r.IMD3DBc = p3 - dB(ref)
	r.IMD5DBc = p5 - dB(ref)
	r.IMD3DBPEP = p3 - r.PEPDBFS
	r.IMD5DBPEP = p5 - r.PEPDBFS
}
