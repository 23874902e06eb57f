package modem

import (
	"errors"
	"fmt"
	"math"

	"ssbkit/hilbert"
)

// Default transmit parameters.
const (
	// DefaultSplitterDesign and DefaultSplitterTaps give ≥ 60 dB of
	// opposite-sideband suppression over 300…2700 Hz at the 8 kHz internal
	// rate (81 dB predicted by hilbert.Analyze, checked in
	// TestTxDefaultSuppression).
	DefaultSplitterDesign = "equiripple"
	DefaultSplitterTaps   = 63
	// DefaultSuppressionDB is what a splitter whose length is left to the
	// default must reach over the band: the 60 dB of the design contract
	// plus a 10 dB margin for the float32 stream (common practice).
	DefaultSuppressionDB = 70
	// txAttenDB is the stop-band attenuation of the resamplers and the
	// band filter: images and aliases stay below the 60 dB suppression
	// goal by a wide margin.
	txAttenDB = 90
)

// TxConfig describes a modulator. Zero fields take the defaults noted.
type TxConfig struct {
	// Mode is "usb" (default), "lsb", "am" or "dsb".
	Mode string
	// Method is "phasing" (default) or "weaver" for usb/lsb.
	Method string
	// Splitter is the phase-splitter design for usb/lsb (Design, Taps,
	// Sections; Rate, Low and High are filled in from the internal rate
	// and the band). A zero Design means DefaultSplitterDesign with
	// DefaultSplitterTaps ("weaver" for Method "weaver"); a length left at
	// zero starts there and grows until the design reaches
	// DefaultSuppressionDB over the band.
	Splitter hilbert.Spec
	// BandLow, BandHigh is the audio pass band in Hz; both 0 means no band
	// filter (the band for the splitter is then 100 Hz … 0.45·rate, and
	// the default splitter an all-pass pair of 12 sections).
	BandLow, BandHigh float64
	// AudioRate is the input audio rate, OutRate the I/Q output rate (Hz).
	AudioRate, OutRate float64
	// Offset is where the (suppressed) carrier sits in the output
	// baseband, Hz.
	Offset float64
	// Carrier adds, for usb/lsb, a carrier CarrierDB (< 0) dB relative to
	// the PEP of the output (R3E/H3E); without it the carrier is
	// suppressed (J3E).
	Carrier   bool
	CarrierDB float64
	// Depth is the AM modulation depth reached at the audio's peak,
	// (0, 1]; 0 means 0.8.
	Depth float64
	// Gain is the linear gain applied to the audio; 0 means 1. Unity
	// convention: in usb an audio tone a·cos(2πft) becomes a·e^{j2πft}
	// above the carrier; in lsb its conjugate; in dsb the real a·cos; in
	// am Gain·(Levels.Peak/Depth + a·cos).
	Gain float64
	// Levels are the band-limited audio's peak figures (from a Survey);
	// AM depth and the SSB carrier level refer to them. Zero means
	// Peak = EnvelopePeak = 1 (full-scale audio).
	Levels AudioLevels
}

// AudioLevels are the peak figures of an audio signal after the band
// filter, as the modulator sees it.
type AudioLevels struct {
	// Peak is max |a|, Max and Min the extremes of the band-limited audio.
	Peak, Max, Min float64
	// EnvelopePeak is max |z| of its analytic signal (the SSB envelope at
	// unity gain).
	EnvelopePeak float64
}

// front is the audio end of the transmit chain, shared by Modulator and
// Survey: resampling to the internal rate, band filter, and for usb/lsb
// the phase splitter.
type front struct {
	cfg      TxConfig
	rate     float64 // internal rate
	pass     float64 // highest audio frequency kept
	in       *RealResampler
	band     *RealFIR
	split    hilbert.Filter
	splitter hilbert.Splitter
	delay    float64 // internal-rate samples
	a, b     []float32
}

// internalRate picks the rate the audio is processed at: the lowest of a
// few standard rates that holds the band with room for the resampler's
// transition, so that the splitter works where 300 Hz is not a tiny
// fraction of the rate.
func internalRate(high float64) float64 {
	for _, r := range []float64{8000, 12000, 16000, 24000, 32000, 48000, 96000, 192000} {
		if r >= 2*high+2600 {
			return r
		}
	}
	return 0
}

func normalise(cfg *TxConfig) error {
	if cfg.Mode == "" {
		cfg.Mode = "usb"
	}
	if cfg.Method == "" {
		cfg.Method = "phasing"
	}
	switch cfg.Mode {
	case "usb", "lsb", "am", "dsb":
	default:
		return fmt.Errorf("unknown mode %q (want usb, lsb, am or dsb)", cfg.Mode)
	}
	switch cfg.Method {
	case "phasing", "weaver":
	default:
		return fmt.Errorf("unknown method %q (want phasing or weaver)", cfg.Method)
	}
	if !(cfg.AudioRate > 0) || !(cfg.OutRate > 0) || math.IsInf(cfg.AudioRate, 0) || math.IsInf(cfg.OutRate, 0) {
		return errors.New("audio and output rates must be positive")
	}
	if cfg.Depth == 0 {
		cfg.Depth = 0.8
	}
	if !(cfg.Depth > 0 && cfg.Depth <= 1) {
		return fmt.Errorf("AM depth %g outside (0, 1]", cfg.Depth)
	}
	if cfg.Gain == 0 {
		cfg.Gain = 1
	}
	if cfg.Carrier && !(cfg.CarrierDB < 0) {
		return fmt.Errorf("carrier level %g dB must be below 0 dB relative to PEP", cfg.CarrierDB)
	}
	if cfg.Levels.Peak == 0 {
		cfg.Levels.Peak, cfg.Levels.Max, cfg.Levels.Min = 1, 1, -1
	}
	if cfg.Levels.EnvelopePeak == 0 {
		cfg.Levels.EnvelopePeak = 1
	}
	if cfg.BandLow == 0 && cfg.BandHigh == 0 {
		return nil
	}
	if !(cfg.BandLow > 0 && cfg.BandLow < cfg.BandHigh) {
		return fmt.Errorf("band %g:%g Hz: want 0 < LOW < HIGH", cfg.BandLow, cfg.BandHigh)
	}
	if cfg.BandHigh >= cfg.AudioRate/2 {
		return fmt.Errorf("band top %g Hz is not below half the audio rate (%g Hz)", cfg.BandHigh, cfg.AudioRate/2)
	}
	return nil
}

func newFront(cfg TxConfig) (*front, error) {
	f := &front{cfg: cfg}
	var low, high float64
	if cfg.BandHigh > 0 {
		low, high = cfg.BandLow, cfg.BandHigh
		f.rate = internalRate(high)
		if f.rate == 0 {
			return nil, fmt.Errorf("band top %g Hz is too high", high)
		}
		f.pass = high
	} else {
		f.rate = cfg.AudioRate
		low, high = 100, 0.45*f.rate
		f.pass = high
	}
	if f.pass >= cfg.OutRate/2 {
		return nil, fmt.Errorf("audio band up to %g Hz does not fit in the output rate %g Hz", f.pass, cfg.OutRate)
	}
	if cfg.AudioRate != f.rate {
		r, err := NewRealResamplerSpec(ResamplerSpec{InRate: cfg.AudioRate, OutRate: f.rate, Pass: math.Min(f.pass, 0.45*math.Min(cfg.AudioRate, f.rate)), AttenDB: txAttenDB})
		if err != nil {
			return nil, err
		}
		f.in = r
		f.delay += r.Delay()
	}
	if cfg.BandHigh > 0 {
		tw := math.Min(200, low)
		f.band = NewRealFIR(KaiserBandpass(low, high, tw, f.rate, 70))
		f.delay += f.band.Delay()
	}
	if cfg.Mode == "usb" || cfg.Mode == "lsb" {
		sp := cfg.Splitter
		if cfg.Method == "weaver" {
			sp.Design = "weaver"
		}
		if sp.Design == "" && cfg.BandHigh == 0 && sp.Taps == 0 {
			// Without a band the splitter must cover 100 Hz to 0.45·rate:
			// an all-pass pair does that cheaply (about 88 dB at 48 kHz
			// with 12 sections; hilbert.Analyze).
			sp.Design, sp.Sections = "allpass", 12
		}
		if sp.Design == "" {
			sp.Design = DefaultSplitterDesign
		}
		grow := sp.Taps == 0 && sp.Sections == 0
		if grow {
			switch sp.Design {
			case "allpass":
				sp.Sections = 6
			case "fft":
				sp.Taps = 1024
			default:
				sp.Taps = DefaultSplitterTaps
			}
		}
		sp.Rate, sp.Low, sp.High = f.rate, low, high
		s, err := hilbert.New(sp)
		if err != nil {
			return nil, err
		}
		// A length left to the default grows until the design meets
		// DefaultSuppressionDB over the band: a wider band (a lower low
		// edge above all) needs a longer splitter than 300–2700 Hz does.
		for grow && hilbert.Analyze(s, low, high).SuppressionMinDB < DefaultSuppressionDB {
			next, ok := longer(sp)
			if !ok {
				break
			}
			ns, err := hilbert.New(next)
			if err != nil {
				break
			}
			sp, s = next, ns
		}
		f.splitter = s
		f.split = s.NewFilter()
		f.delay += s.Delay()
	}
	return f, nil
}

// longer returns the next longer design of sp's family: about 1.5× the
// taps (kept odd), or one more all-pass section; false at the limit.
func longer(sp hilbert.Spec) (hilbert.Spec, bool) {
	switch sp.Design {
	case "allpass":
		if sp.Sections >= hilbert.MaxSections {
			return sp, false
		}
		sp.Sections++
	case "fft":
		if sp.Taps*2 > hilbert.MaxFFT {
			return sp, false
		}
		sp.Taps *= 2
	default:
		limit := hilbert.MaxTaps
		if sp.Design == "equiripple" {
			limit = hilbert.MaxRemez
		}
		if sp.Taps >= limit {
			return sp, false
		}
		sp.Taps = min(sp.Taps+sp.Taps/2|1, limit)
	}
	return sp, true
}

// realPart runs the real part of the front: resampling and band filter.
// The result aliases f's buffers.
func (f *front) realPart(src []float32) []float32 {
	x := src
	if f.in != nil {
		f.a = f.in.Process(f.a[:0], x)
		x = f.a
	}
	if f.band != nil {
		f.b = f.band.Process(f.b, x)
		x = f.b
	}
	return x
}

func (f *front) reset() {
	if f.in != nil {
		f.in.Reset()
	}
	if f.band != nil {
		f.band.Reset()
	}
	if f.split != nil {
		f.split.Reset()
	}
}

// Modulator turns audio into SSB, AM or DSB I/Q, streaming:
//
//	audio (AudioRate) → RealResampler → band-pass (Kaiser) → [usb/lsb:
//	phase splitter, conjugate for lsb; am: carrier + audio; dsb: audio]
//	→ gain → complex Resampler to OutRate → mix to Offset.
//
// When the resampler's last stage is an integer interpolation (8 kHz →
// 2.4 MHz is ×4 then ×75) and the CPU has AVX2 and FMA, the mix to Offset
// rides in that stage's taps (complex taps h[l]·e^{jωl} and a premix of
// its input at the low rate; see mixInterp), and the interpolation stages
// run on a vector kernel; the result is the same signal within float32
// rounding, with the carrier phase exactly that of the mixer. See the
// package documentation for the chain and its sources.
type Modulator struct {
	fr      *front
	cfg     TxConfig
	fold    *offsetResampler // resampler with the offset mixer in its taps
	out     *Resampler       // otherwise: resampler, then the mixer osc
	osc     *Oscillator
	carrier float32 // added to the baseband before gain (usb/lsb/am)
	phase0  float64 // initial oscillator phase
	z, y    []complex64
	delay   float64
}

// NewModulator returns a modulator for cfg, or an error naming the setting
// that is wrong.
func NewModulator(cfg TxConfig) (*Modulator, error) {
	if err := normalise(&cfg); err != nil {
		return nil, err
	}
	fr, err := newFront(cfg)
	if err != nil {
		return nil, err
	}
	m := &Modulator{fr: fr, cfg: cfg}
	if math.Abs(cfg.Offset)+fr.pass >= cfg.OutRate/2 {
		return nil, fmt.Errorf("offset %g Hz puts the signal (±%g Hz) beyond the output band ±%g Hz", cfg.Offset, fr.pass, cfg.OutRate/2)
	}
	spec := ResamplerSpec{InRate: fr.rate, OutRate: cfg.OutRate, Pass: fr.pass, AttenDB: txAttenDB}
	// The folded chain pays where the vector kernel runs; the plain Go
	// loop is slower than the real-tap stages plus a mixer.
	if useMixInterpAVX2 {
		if m.fold, err = newOffsetResampler(spec, cfg.Offset); err != nil {
			return nil, err
		}
	}
	if m.fold != nil {
		m.delay = fr.delay*cfg.OutRate/fr.rate + m.fold.delay
	} else {
		if m.out, err = NewResamplerSpec(spec); err != nil {
			return nil, err
		}
		m.delay = fr.delay*cfg.OutRate/fr.rate + m.out.Delay()
		if cfg.Offset != 0 {
			m.osc = NewOscillator(cfg.Offset, cfg.OutRate)
		}
	}
	switch cfg.Mode {
	case "am":
		m.carrier = float32(cfg.Levels.Peak / cfg.Depth)
	case "usb", "lsb":
		if cfg.Carrier {
			k := math.Pow(10, cfg.CarrierDB/20)
			m.carrier = float32(k * cfg.Levels.EnvelopePeak / (1 - k))
		}
	}
	return m, nil
}

// Config returns the configuration with defaults filled in.
func (m *Modulator) Config() TxConfig { return m.cfg }

// InternalRate returns the rate the audio is filtered and split at.
func (m *Modulator) InternalRate() float64 { return m.fr.rate }

// Splitter returns the phase splitter (nil for am and dsb).
func (m *Modulator) Splitter() hilbert.Splitter { return m.fr.splitter }

// Delay returns the delay from audio to I/Q in output samples: audio
// sample n (at AudioRate) appears at output n·OutRate/AudioRate + Delay().
func (m *Modulator) Delay() float64 { return m.delay }

// SetCarrierPhase sets the phase in radians of the carrier (the offset
// oscillator) at the next output sample; Reset returns to it. By default
// the carrier phase is 0 at the first output sample. A caller that drops
// the first d output samples to align the I/Q with the audio calls
// SetCarrierPhase(−2π·Offset·d/OutRate) first, so that a receiver starting
// at the first kept sample sees carrier phase 0.
func (m *Modulator) SetCarrierPhase(phi float64) {
	m.phase0 = phi
	if m.fold != nil {
		m.fold.last.setPhase(phi)
	}
	if m.osc != nil {
		m.osc.SetPhase(phi)
	}
}

// CarrierAmplitude returns the carrier amplitude in the output (after
// gain); 0 when suppressed.
func (m *Modulator) CarrierAmplitude() float64 { return float64(m.carrier) * m.cfg.Gain }

// MaxOut returns the most outputs Process gives for n audio samples.
func (m *Modulator) MaxOut(n int) int {
	if m.fr.in != nil {
		n = m.fr.in.MaxOut(n)
	}
	if m.fold != nil {
		return m.fold.MaxOut(n)
	}
	return m.out.MaxOut(n)
}

// Reset returns every stage to its initial state.
func (m *Modulator) Reset() {
	m.fr.reset()
	if m.fold != nil {
		m.fold.Reset()
		return
	}
	m.out.Reset()
	if m.osc != nil {
		m.osc.SetPhase(m.phase0)
	}
}

// Process modulates a block of audio and returns the I/Q samples it
// completes, dst[:n] with n ≤ MaxOut(len(src)); a nil or small dst is
// allocated. Levels are float32 full scale ±1.
func (m *Modulator) Process(dst []complex64, src []float32) []complex64 {
	x := m.fr.realPart(src)
	if cap(m.z) < len(x) {
		m.z = make([]complex64, len(x))
	}
	z := m.z[:len(x)]
	g := float32(m.cfg.Gain)
	c := m.carrier
	switch m.cfg.Mode {
	case "usb", "lsb":
		z = m.fr.split.Process(z, x)
		if m.cfg.Mode == "lsb" {
			for i, v := range z {
				z[i] = complex((real(v)+c)*g, -imag(v)*g)
			}
		} else {
			for i, v := range z {
				z[i] = complex((real(v)+c)*g, imag(v)*g)
			}
		}
	default: // am (c > 0), dsb (c = 0)
		for i, v := range x {
			z[i] = complex((v+c)*g, 0)
		}
	}
	if m.fold != nil {
		return m.fold.Process(dst, z)
	}
	need := m.out.MaxOut(len(z))
	if cap(dst) < need {
		dst = make([]complex64, 0, need)
	}
	dst = m.out.Process(dst[:0], z)
	if m.osc != nil {
		m.osc.Mix(dst, dst)
	}
	return dst
}

// Flush pushes zeros through the chain to drain the filters and returns
// the remaining outputs (about Delay() samples).
func (m *Modulator) Flush(dst []complex64) []complex64 {
	n := int(math.Ceil(m.delay*m.cfg.AudioRate/m.cfg.OutRate)) + 4
	zeros := make([]float32, n)
	return m.Process(dst, zeros)
}

// Survey measures the audio levels the modulator refers to (band-limited
// peak and extremes, SSB envelope peak). It runs the audio end of the
// chain and interpolates by 8 so that the peaks between samples are seen
// (the sampled peak of a band-limited signal at 8× its band falls short of
// the true peak by at most 1 − cos(π/16), 0.17 dB; common practice).
type Survey struct {
	fr *front
	up interface {
		Process(dst, src []complex64) []complex64
		Delay() float64
	}
	// env2 is the peak of |z|², hi and lo the extremes of its real part.
	env2, hi, lo float32
	z, y         []complex64
}

// NewSurvey returns a survey for cfg (the modulator's, without Levels).
// For usb and lsb it uses cfg's splitter, so EnvelopePeak is the envelope
// the modulator will produce (Max, Min and Peak are then those of the
// splitter's real part, the audio itself for FIR designs); for am and dsb
// it uses the default splitter, whose real part is the audio.
func NewSurvey(cfg TxConfig) (*Survey, error) {
	if err := normalise(&cfg); err != nil {
		return nil, err
	}
	if cfg.Mode != "usb" && cfg.Mode != "lsb" {
		// am and dsb need the audio's extremes: the default splitter's I
		// path is a pure delay, so the real part of its output is the
		// audio. usb/lsb keep their own splitter, whose envelope counts.
		cfg.Mode, cfg.Method, cfg.Splitter = "usb", "phasing", hilbert.Spec{}
	}
	fr, err := newFront(cfg)
	if err != nil {
		return nil, err
	}
	s := &Survey{fr: fr, hi: float32(math.Inf(-1)), lo: float32(math.Inf(1))}
	spec := ResamplerSpec{InRate: fr.rate, OutRate: 8 * fr.rate, Pass: fr.pass, AttenDB: txAttenDB}
	if useMixInterpAVX2 {
		// the vector interpolation kernel, where it runs
		if up, err := newOffsetResampler(spec, 0); err != nil {
			return nil, err
		} else if up != nil {
			s.up = up
		}
	}
	if s.up == nil {
		up, err := NewResamplerSpec(spec)
		if err != nil {
			return nil, err
		}
		s.up = up
	}
	return s, nil
}

// Process takes the next block of audio.
func (s *Survey) Process(src []float32) {
	x := s.fr.realPart(src)
	if cap(s.z) < len(x) {
		s.z = make([]complex64, len(x))
	}
	// The analytic signal; its real part is the audio itself, delayed
	// (the default splitter's I path is a pure delay).
	z := s.fr.split.Process(s.z[:len(x)], x)
	s.y = s.up.Process(s.y[:0], z)
	// |z|² and the extremes of the real part, compared in float32 (the
	// samples are float32); the square root is taken once, in Levels.
	e2, hi, lo := s.env2, s.hi, s.lo
	for _, v := range s.y {
		r, i := real(v), imag(v)
		if p := r*r + i*i; p > e2 {
			e2 = p
		}
		if r > hi {
			hi = r
		}
		if r < lo {
			lo = r
		}
	}
	s.env2, s.hi, s.lo = e2, hi, lo
}

// Levels returns the figures of the audio seen so far (after draining the
// filters with Flush).
func (s *Survey) Levels() AudioLevels {
	lv := AudioLevels{Max: float64(s.hi), Min: float64(s.lo), EnvelopePeak: math.Sqrt(float64(s.env2))}
	lv.Peak = math.Max(lv.Max, -lv.Min)
	if math.IsInf(lv.Peak, 0) {
		return AudioLevels{}
	}
	return lv
}

// Flush drains the filters into the figures.
func (s *Survey) Flush() {
	n := int(math.Ceil((s.fr.delay+s.up.Delay()/8)*s.fr.cfg.AudioRate/s.fr.rate)) + 4
	s.Process(make([]float32, n))
}

// LevelMeter measures a stream of I/Q samples as the transmit report
// needs it: the energy Σ|y|² (the average power is energy over count) and
// the peak of |y|² (the PEP, DESIGN.md definitions). The zero value is
// ready. Blocks of at most 1024 samples are summed in float32 (several
// partial sums) and added in float64, so the relative error of the energy
// stays near 1024·2⁻²⁴ (Higham, Accuracy and Stability of Numerical
// Algorithms, 2nd ed., sec. 4.2; from memory). NaN samples are ignored by
// the peak.
type LevelMeter struct {
	energy float64
	peak   float32
	n      int64
}

// Add measures a block.
func (l *LevelMeter) Add(y []complex64) {
	l.n += int64(len(y))
	for len(y) > 0 {
		c := y[:min(len(y), 1024)]
		y = y[len(c):]
		var s float32
		s, l.peak = levelKernel(c, l.peak)
		l.energy += float64(s)
	}
}

// Energy returns Σ|y|² so far.
func (l *LevelMeter) Energy() float64 { return l.energy }

// Peak returns the largest |y|² so far (the PEP).
func (l *LevelMeter) Peak() float64 { return float64(l.peak) }

// Count returns the number of samples measured.
func (l *LevelMeter) Count() int64 { return l.n }

// levelGo is the reference loop of the level statistics: the float32 sum
// of |y|² and the peak of |y|² starting from peak, in four lanes (no
// dependency between consecutive samples).
func levelGo(y []complex64, peak float32) (float32, float32) {
	var s0, s1, s2, s3 float32
	p0, p1, p2, p3 := peak, peak, peak, peak
	for len(y) >= 4 {
		v := y[:4:4]
		a := real(v[0])*real(v[0]) + imag(v[0])*imag(v[0])
		b := real(v[1])*real(v[1]) + imag(v[1])*imag(v[1])
		d := real(v[2])*real(v[2]) + imag(v[2])*imag(v[2])
		e := real(v[3])*real(v[3]) + imag(v[3])*imag(v[3])
		s0, s1, s2, s3 = s0+a, s1+b, s2+d, s3+e
		// compare and branch: the builtin max is several times slower
		// here (it orders NaN and ±0), and a new peak is rare
		if a > p0 {
			p0 = a
		}
		if b > p1 {
			p1 = b
		}
		if d > p2 {
			p2 = d
		}
		if e > p3 {
			p3 = e
		}
		y = y[4:]
	}
	for _, v := range y {
		a := real(v)*real(v) + imag(v)*imag(v)
		s0 += a
		if a > p0 {
			p0 = a
		}
	}
	if p1 > p0 {
		p0 = p1
	}
	if p3 > p2 {
		p2 = p3
	}
	if p2 > p0 {
		p0 = p2
	}
	return (s0 + s1) + (s2 + s3), p0
}
