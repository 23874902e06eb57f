package spectral

import (
	"errors"
	"fmt"
	"math"
	"sort"
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

// FFTSize returns the FFT length the options give at rate Hz.
func (o MeasureOptions) FFTSize(rate float64) int {
	return FFTSizeFor(rate, o.withDefaults().Resolution)
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
	n := o.FFTSize(rate)
	if samples >= 0 && samples < int64(n) {
		return tooShort(rate, samples, o.Resolution, n)
	}
	return nil
}

func tooShort(rate float64, samples int64, res float64, n int) error {
	coarser := rate / float64(nextPow2Floor(int(max(samples, 2))))
	return fmt.Errorf("capture has %d samples (%.3g s); a resolution of %g Hz needs at least %d (%.3g s): use a resolution of %.3g Hz or coarser",
		samples, float64(samples)/rate, res, n, float64(n)/rate, coarser)
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
type Measurer struct {
	opt     MeasureOptions
	rate    float64
	hann    *Accumulator
	flat    *Accumulator
	iso     *bandIsolator
	peak    float64 // of the raw samples, when no isolation is needed
	samples int64
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
	n := opt.FFTSize(rate)
	m := &Measurer{
		opt:  opt,
		rate: rate,
		hann: NewAccumulatorOptions(n, rate, Options{Window: Hann}),
		flat: NewAccumulatorOptions(n, rate, Options{Window: FlatTop}),
	}
	half := opt.BandHigh + isoPass
	if stop := half + isoTransition; math.Abs(opt.CarrierHz)+stop < rate/2 {
		m.iso = newBandIsolator(rate, opt.CarrierHz, half, isoTransition)
	}
	return m, nil
}

// Add feeds the next block of the capture.
func (m *Measurer) Add(block []complex64) {
	m.samples += int64(len(block))
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
	n := m.hann.Len()
	if m.hann.Segments() == 0 {
		return nil, tooShort(m.rate, m.samples, o.Resolution, n)
	}
	if m.iso != nil {
		m.iso.flush()
		m.peak = m.iso.peak
	}
	hs, fs := m.hann.Spectrum(), m.flat.Spectrum()
	c := o.CarrierHz
	r := &Result{
		RateHz: m.rate, CarrierOffsetHz: c, BandHz: [2]float64{o.BandLow, o.BandHigh},
		Samples: m.samples, Spectrum: hs, Lines: fs,
	}
	floor := NoiseFloor(hs.Density, m.rate, 60)
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
	a, z := math.Max(c-span, -m.rate/2), math.Min(c+span, m.rate/2)
	if l, h, ok := hs.OccupiedBandwidth(a, z, 0.99); ok {
		r.OccupiedLowHz, r.OccupiedHighHz = l-c, h-c
		r.OccupiedBandwidthHz = h - l
	}
	m.twoTone(r, side, want)
	return r, nil
}

// twoTone looks for two dominant tones in the wanted band and measures
// the intermodulation products.
func (m *Measurer) twoTone(r *Result, side string, want float64) {
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
		if math.Abs(f) >= m.rate/2 {
			return Tone{}, false
		}
		_, p, ok := fs.Tone(f, fs.BinHz())
		return Tone{f - c, dB(p)}, ok
	}
	lineNoise := dB(NoiseFloor(r.Spectrum.Density, m.rate, 60) * fs.BinHz() * fs.ENBW)
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
