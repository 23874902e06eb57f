package modem

import (
	"errors"
	"fmt"
	"math"
)

// Mode is a receiver's demodulation.
type Mode int

// Demodulation modes.
const (
	USB Mode = iota // upper sideband, product detection
	LSB             // lower sideband, product detection
	AM              // envelope detection
	SAM             // synchronous AM: carrier-tracking loop
)

// String returns usb, lsb, am or sam.
func (m Mode) String() string {
	switch m {
	case USB:
		return "usb"
	case LSB:
		return "lsb"
	case AM:
		return "am"
	case SAM:
		return "sam"
	}
	return fmt.Sprintf("Mode(%d)", int(m))
}

// ParseMode parses usb, lsb, am or sam.
func ParseMode(s string) (Mode, error) {
	for m := USB; m <= SAM; m++ {
		if m.String() == s {
			return m, nil
		}
	}
	return 0, fmt.Errorf("unknown mode %q (usb, lsb, am, sam)", s)
}

// Receiver defaults (common practice for voice channels).
const (
	DefaultAudioRate = 48000
	DefaultSSBLow    = 300  // Hz, low edge of the SSB audio band
	DefaultSSBHigh   = 2700 // Hz, SSB audio bandwidth
	DefaultAMHigh    = 5000 // Hz, AM audio bandwidth
	DefaultRxAtten   = 80   // dB, alias and adjacent-channel rejection
	ssbTransition    = 450  // Hz, transition band of the SSB channel filter
	amTransitionFrac = 0.2  // AM channel transition as a fraction of the bandwidth
)

// RxConfig describes one receive channel. The zero value of every field
// but Rate is a default: USB, 300–2700 Hz, 48 kHz audio, AGC off, unity
// gain, 80 dB rejection.
type RxConfig struct {
	Rate   float64 // capture sample rate, Hz (required)
	Offset float64 // carrier (suppressed for SSB) relative to the capture centre, Hz
	Mode   Mode
	// Low and High bound the audio pass band in Hz: for SSB the band
	// Low…High above (USB) or below (LSB) the carrier, default 300…2700;
	// for AM and SAM High is the audio bandwidth (default 5000) and Low is
	// ignored.
	Low, High float64
	AudioRate float64 // Hz, default 48000
	AGC       AGCMode
	GainDB    float64 // fixed gain with AGC off (0 = unity)
	AttenDB   float64 // alias and adjacent-channel rejection, default 80
	// FineTune follows the carrier of a USB or LSB voice channel from the
	// voice itself (FineTuner, within ±DefaultTuneRange Hz of Offset) and
	// removes its error before the channel filter; AM and SAM ignore it.
	FineTune bool
}

// withDefaults fills the zero fields and validates.
func (c RxConfig) withDefaults() (RxConfig, error) {
	if !(c.Rate > 0) || math.IsInf(c.Rate, 0) {
		return c, errors.New("sample rate must be positive")
	}
	if c.AudioRate == 0 {
		c.AudioRate = DefaultAudioRate
	}
	if c.AttenDB == 0 {
		c.AttenDB = DefaultRxAtten
	}
	switch c.Mode {
	case USB, LSB:
		if c.Low == 0 {
			c.Low = DefaultSSBLow
		}
		if c.High == 0 {
			c.High = DefaultSSBHigh
		}
		if !(c.Low > 0) || !(c.High > c.Low+ssbTransition/2) {
			return c, fmt.Errorf("SSB audio band %g…%g Hz is too narrow or inverted", c.Low, c.High)
		}
	case AM, SAM:
		if c.High == 0 {
			c.High = DefaultAMHigh
		}
		if !(c.High > 0) {
			return c, fmt.Errorf("AM bandwidth %g Hz must be positive", c.High)
		}
	default:
		return c, fmt.Errorf("unknown mode %d", c.Mode)
	}
	if c.AudioRate > c.Rate {
		return c, &configError{fmt.Sprintf("audio rate %g Hz is above the capture rate %g Hz", c.AudioRate, c.Rate), ErrAudioRate}
	}
	if !(c.AudioRate >= 2*c.High) {
		return c, &configError{fmt.Sprintf("audio rate %g Hz cannot carry a %g Hz audio band", c.AudioRate, c.High), ErrAudioRate}
	}
	if math.Abs(c.Offset)+c.High > c.Rate/2 {
		return c, &configError{fmt.Sprintf("channel at %+g Hz (±%g Hz) lies outside the capture's band ±%g Hz", c.Offset, c.High, c.Rate/2), ErrOutsideCapture}
	}
	return c, nil
}

// channelShape returns where the channel is centred relative to the
// carrier (Hz), its half-width and the transition of its filter.
func (c RxConfig) channelShape() (shift, half, trans float64) {
	switch c.Mode {
	case USB:
		return (c.Low + c.High) / 2, (c.High - c.Low) / 2, ssbTransition
	case LSB:
		return -(c.Low + c.High) / 2, (c.High - c.Low) / 2, ssbTransition
	}
	return 0, c.High, amTransitionFrac * c.High
}

// Channel is the whole receive chain of one channel, from capture samples
// to audio:
//
//	ShiftDecimator (mix to the channel centre, comb-shaped first stage)
//	→ Kaiser Decimators → channel low-pass (the complex band-pass
//	Low…High of the sideband, shifted to zero) → Interpolator or Resampler
//	to the audio rate → demodulator → AGC or fixed gain.
//
// Output sample k represents the capture at time (k − Delay())/AudioRate:
// the chain's group delay is made a whole number of audio samples by the
// phases of the decimators, and the demodulator's oscillator is aligned
// with the capture's time.
type Channel struct {
	cfg    RxConfig
	plan   ChannelPlan
	first  *ShiftDecimator
	stages []*Decimator
	filt   *Decimator // the channel low-pass: a decimator by 1, for its kernel
	interp *Interpolator
	det    *ssbDetector // interpolator and product detector in one (SSB with an integer step to the audio rate)
	rs     *Resampler
	ssb    *SSBDemod
	am     *AMDemod
	sam    *SAMDemod
	agc    *AGC
	wagc   *workAGC // the AGC of an SSB channel with a detector (ssbDetector), instead of agc
	pagc   *preAGC  // the AGC of an SSB channel with a rational resampler, instead of agc
	gain   float32
	delay  int
	a      []complex64   // first-stage output (Process)
	sbuf   [][]complex64 // outputs of the Kaiser stages
	f, z   []complex64   // channel filter and rate converter outputs
	// fine tuning (RxConfig.FineTune): the tuner, its output, and its
	// delay in audio samples (part of delay)
	tuner     *FineTuner
	tb        []complex64
	tuneDelay int
}

// Configuration errors of the receive chain that callers tell apart with
// errors.Is (the command turns them into a usage error or names the band).
var (
	ErrOutsideCapture = errors.New("modem: channel outside the capture's band")
	ErrAudioRate      = errors.New("modem: audio rate unsuitable for the channel")
)

// configError carries its own message and unwraps to one of the sentinels.
type configError struct {
	msg  string
	kind error
}

func (e *configError) Error() string { return e.msg }
func (e *configError) Unwrap() error { return e.kind }

// NewChannel returns the receive chain for cfg.
func NewChannel(cfg RxConfig) (*Channel, error) {
	cfg, err := cfg.withDefaults()
	if err != nil {
		return nil, err
	}
	return buildChannel(cfg, chainInput{rate: cfg.Rate, offset: cfg.Offset})
}

// chainInput is what a Channel's chain reads: the capture itself, or one
// sub-band of a Channeliser.
type chainInput struct {
	rate   float64 // Hz
	offset float64 // the carrier relative to the input's centre, Hz
	// lag is the time (s) by which input sample j lags j/rate on the
	// capture's clock (a Channeliser's delay beyond its output grid).
	lag float64
	// fine puts the chain's delay on the audio grid exactly by a
	// fractional delay of the channel filter; without it the delay is
	// right to half an input sample, which for a capture is exact enough.
	fine bool
}

// buildChannel builds the chain of cfg (defaults filled) reading in.
func buildChannel(cfg RxConfig, in chainInput) (*Channel, error) {
	shift, half, trans := cfg.channelShape()
	protect := half + trans/2
	// A fine-tuned voice may lie up to DefaultTuneRange off the channel
	// until the fine tuner moves it back; the plan is not widened for it
	// (a wider protected band changes the first stage and costs more):
	// beyond 225 Hz of correction the band's outer 75 Hz comes from the
	// last decimator's transition band, its aliases ≥ 72 dB down instead
	// of 80 at 2.4 MS/s (TestFineTuneAliases).
	tune := cfg.FineTune && (cfg.Mode == USB || cfg.Mode == LSB)
	minWork := 4 * protect
	if tune {
		// the estimator's band, 200 − range … 2400 + range Hz from the
		// carrier (at −shift), must fit in the work rate with 10 % to
		// spare (it does for the default band; a narrow --bandwidth
		// gets a faster work rate)
		s := math.Copysign(1, shift)
		edge := math.Max(math.Abs(-shift+s*(tuneLowHz-DefaultTuneRange)), math.Abs(-shift+s*(tuneHighHz+DefaultTuneRange)))
		minWork = math.Max(minWork, 2.2*edge)
	}
	plan, err := planChannel(in.rate, cfg.AudioRate, minWork, protect, trans, cfg.AttenDB)
	if err != nil {
		return nil, err
	}
	c := &Channel{cfg: cfg, plan: plan}
	fs, fw, fa := in.rate, plan.WorkRate, cfg.AudioRate

	// Delays with every decimator phase 0, in seconds.
	first := combTaps(plan.First.Decim, plan.First.Order)
	t := -in.lag - float64(len(first)-1)/2/fs
	rate := fs / float64(plan.First.Decim)
	var stageTaps [][]float64
	for _, d := range plan.Stages {
		h := kaiserStageTaps(d, rate, protect, cfg.AttenDB)
		stageTaps = append(stageTaps, h)
		t -= float64(len(h)-1) / 2 / rate
		rate /= float64(d)
	}
	// With fine, the rest of the delay (within half an input sample) is
	// a fractional delay of the interpolator to the audio rate, or of the
	// channel filter when there is none (kaiserMeetShift: two taps more
	// than the plain design, whatever the shift).
	fineInterp := false
	filt := KaiserLowpass(half, trans, fw, cfg.AttenDB)
	filtLen := len(filt)
	up := fa / fw
	var ih []float64
	switch {
	case math.Abs(up-1) < 1e-9:
		// The work rate is the audio rate: no rate converter.
	case math.Abs(up-math.Round(up)) < 1e-9:
		ih = KaiserLowpass(fw/2, fw-2*protect, fa, cfg.AttenDB)
		ihLen := len(ih)
		if in.fine {
			fineInterp = true
			ihLen += 2
		}
		t -= float64(ihLen-1) / 2 / fa
	default:
		c.rs, err = NewResamplerSpec(ResamplerSpec{InRate: fw, OutRate: fa, Pass: protect, AttenDB: cfg.AttenDB})
		if err != nil {
			return nil, err
		}
		t -= c.rs.Delay() / fa
	}
	if in.fine && !fineInterp {
		filtLen += 2
	}
	t -= float64(filtLen-1) / 2 / fw
	// Choose the phases: advance the sampling grid by s input samples,
	// s < Decim, so that the total delay is a whole number of audio samples.
	k := math.Floor(-t*fa + 1e-9)
	s := int(math.Round((-k/fa - t) * fs))
	s = max(0, min(s, plan.Decim-1))
	t += float64(s) / fs
	c.delay = int(math.Round(-t * fa))
	// the rest, positive for a later response
	rest := float64(c.delay)/fa + t
	switch {
	case fineInterp:
		ih = kaiserMeetShift(0.5*fw/fa, (fw-2*protect)/fa, cfg.AttenDB, rest*fa)
	case in.fine:
		filt = kaiserMeetShift(half/fw, trans/fw, cfg.AttenDB, rest*fw)
	}
	if ih != nil && (cfg.Mode == USB || cfg.Mode == LSB) {
		c.det = newSSBDetector(ih, int(math.Round(up)), shift, fa, c.delay)
	} else if ih != nil {
		c.interp = NewInterpolator(ih, int(math.Round(up)))
	}
	// After a Channeliser a first stage that would only mix (the plan's
	// comb of one tap) takes the first Kaiser stage's taps instead: the
	// same filtering, with the mixer folded into it.
	stages, d1 := plan.Stages, plan.First.Decim
	if in.fine && d1 == 1 && len(stages) > 0 {
		first, d1 = symmetric(stageTaps[0]), stages[0]
		stages, stageTaps = stages[1:], stageTaps[1:]
	}
	ph := s % d1
	s /= d1
	c.first = NewShiftDecimator(first, d1, ph, in.offset+shift, fs)
	// Input sample j stands for time j/fs − lag: the mixer's phase
	// follows the capture's clock, as a mixer on the capture would.
	c.first.base = phaseStep((in.offset + shift) * in.lag)
	for i, d := range stages {
		c.stages = append(c.stages, NewDecimator(stageTaps[i], d, s%d))
		s /= d
	}
	c.filt = NewDecimator(filt, 1, 0)
	c.sbuf = make([][]complex64, len(c.stages))
	if tune {
		if err := c.newFineTuner(shift); err != nil {
			return nil, err
		}
	}

	if cfg.AGC != AGCOff && c.det == nil && c.rs != nil && (cfg.Mode == USB || cfg.Mode == LSB) {
		// before the resampler and the detector, whose phase counts its
		// delay
		if c.pagc = newPreAGC(cfg.AGC.Timing(), fw, fa); c.pagc != nil {
			c.delay += c.pagc.Delay()
		}
	}
	switch cfg.Mode {
	case USB, LSB:
		if c.det == nil {
			c.ssb = NewSSBDemod(shift, fa)
			c.ssb.Advance(-c.delay)
		}
	case AM:
		c.am = NewAMDemod(fa)
	case SAM:
		c.sam = NewSAMDemod(fa)
	}
	c.gain = float32(math.Pow(10, cfg.GainDB/20))
	switch {
	case cfg.AGC == AGCOff, c.pagc != nil:
	case c.det != nil:
		c.wagc = newWorkAGC(cfg.AGC.Timing(), fw, c.det.it.u)
		c.delay += c.wagc.Delay()
	default:
		c.agc = NewAGC(cfg.AGC.Timing(), fa)
		c.delay += c.agc.Delay()
	}
	c.delay += c.tuneDelay
	return c, nil
}

// symmetric returns h with each mirrored pair of taps replaced by its
// mean: a linear-phase design is symmetric but for the rounding of its
// window, and ShiftDecimator takes its paired kernel only for taps
// symmetric bit for bit.
func symmetric(h []float64) []float64 {
	l := len(h)
	s := make([]float64, l)
	for k := range h {
		s[k] = (h[k] + h[l-1-k]) / 2
	}
	return s
}

// ErrFineTune reports that a channel cannot be fine tuned (its work rate
// too low for the voice band and the search range, say).
var ErrFineTune = errors.New("modem: fine tuning unavailable")

// newFineTuner makes the channel's fine tuner: its baseband is the work
// rate with the carrier at −shift, and its delay line one analysis window
// rounded up to a whole number of audio samples.
func (c *Channel) newFineTuner(shift float64) error {
	fw, fa := c.plan.WorkRate, c.cfg.AudioRate
	tc := TuneConfig{Rate: fw, Carrier: -shift, Mode: c.cfg.Mode}
	least := MinDelay(tc)
	if least == 0 {
		_, err := NewTuneEstimator(tc)
		return &configError{"fine tuning: " + err.Error(), ErrFineTune}
	}
	// the smallest q with q·fa/fw whole (rates without one up to 10000
	// get a delay rounded to the audio sample)
	q := 1
	for ; q <= 10000; q++ {
		if v := float64(q) * fa / fw; math.Abs(v-math.Round(v)) < 1e-9 {
			break
		}
	}
	if q > 10000 {
		q = 1
	}
	d := (least + q - 1) / q * q
	t, err := NewFineTuner(tc, d)
	if err != nil {
		return &configError{"fine tuning: " + err.Error(), ErrFineTune}
	}
	c.tuner = t
	c.tuneDelay = int(math.Round(float64(d) * fa / fw))
	return nil
}

// FineTuner returns the channel's fine tuner (nil without
// RxConfig.FineTune, or for AM and SAM), for its report.
func (c *Channel) FineTuner() *FineTuner { return c.tuner }

// Flush ends the stream: with fine tuning it runs the samples still in
// the fine tuner's delay line through the rest of the chain and appends
// the audio to dst, returning it; without, it returns dst. Flushing with
// zeros at the capture rate (see Delay) then only needs to cover
// Delay − FineTuneDelay audio samples.
func (c *Channel) Flush(dst []float32) []float32 {
	if c.tuner == nil {
		return dst
	}
	c.tb = c.tuner.Drain(c.tb)
	for x := c.tb; len(x) > 0; {
		n := min(len(x), stageChunk)
		dst = c.processWork(dst, x[:n])
		x = x[n:]
	}
	return dst
}

// FineTuneDelay returns the fine tuner's share of Delay, in audio samples
// (0 without fine tuning).
func (c *Channel) FineTuneDelay() int { return c.tuneDelay }

// Config returns the configuration with defaults filled in.
func (c *Channel) Config() RxConfig { return c.cfg }

// Plan returns the decimation plan.
func (c *Channel) Plan() ChannelPlan { return c.plan }

// Delay returns the chain's delay in whole audio samples.
func (c *Channel) Delay() int { return c.delay }

// SAM returns the synchronous detector of a sam channel (nil otherwise),
// for its lock report.
func (c *Channel) SAM() *SAMDemod { return c.sam }

// First returns the first stage, which Receiver runs on several
// goroutines through its Block method.
func (c *Channel) First() *ShiftDecimator { return c.first }

// Reset returns the chain to its initial state.
func (c *Channel) Reset() {
	c.first.Reset()
	for _, s := range c.stages {
		s.Reset()
	}
	c.filt.Reset()
	if c.interp != nil {
		c.interp.Reset()
	}
	if c.det != nil {
		c.det.Reset()
	}
	if c.rs != nil {
		c.rs.Reset()
	}
	if c.ssb != nil {
		c.ssb.Reset()
		c.ssb.Advance(-c.delay + c.agcDelay())
	}
	if c.am != nil {
		c.am.Reset()
	}
	if c.sam != nil {
		c.sam.Reset()
	}
	if c.agc != nil {
		c.agc.Reset()
	}
	if c.wagc != nil {
		c.wagc.Reset()
	}
	if c.pagc != nil {
		c.pagc.Reset()
	}
	if c.tuner != nil {
		c.tuner.Reset()
	}
}

func (c *Channel) agcDelay() int {
	if c.agc == nil {
		return 0
	}
	return c.agc.Delay()
}

// Process runs capture samples src through the chain and appends the audio
// to dst[:0], returning it (dst grows as needed; its capacity is kept
// between calls by the caller for zero allocation).
func (c *Channel) Process(dst []float32, src []complex64) []float32 {
	dst = dst[:0]
	for len(src) > 0 {
		n := min(len(src), stageChunk)
		c.a = c.first.Process(c.a, src[:n])
		dst = c.processFirst(dst, c.a)
		src = src[n:]
	}
	return dst
}

// ProcessFirst runs outputs of the first stage (see First) through the
// rest of the chain, appending the audio to dst[:0] and returning it.
func (c *Channel) ProcessFirst(dst []float32, y []complex64) []float32 {
	dst = dst[:0]
	for len(y) > 0 {
		n := min(len(y), stageChunk)
		dst = c.processFirst(dst, y[:n])
		y = y[n:]
	}
	return dst
}

func (c *Channel) processFirst(dst []float32, y []complex64) []float32 {
	x := y
	for i, s := range c.stages {
		c.sbuf[i] = s.Process(c.sbuf[i], x)
		x = c.sbuf[i]
	}
	if c.tuner != nil {
		c.tb = c.tuner.Process(c.tb, x)
		x = c.tb
	}
	return c.processWork(dst, x)
}

// processWork runs work-rate samples x from the channel filter on.
func (c *Channel) processWork(dst []float32, x []complex64) []float32 {
	c.f = c.filt.Process(c.f, x)
	var out []float32
	if c.det != nil {
		m := len(c.f) * c.det.it.u
		dst, out = growAudio(dst, m)
		if c.wagc != nil {
			c.wagc.measure(c.f)
		}
		c.det.Process(out, c.f)
	} else {
		if c.pagc != nil {
			c.pagc.measure(c.f)
			c.pagc.apply(c.f)
		}
		switch {
		case c.interp != nil:
			c.z = c.interp.Process(c.z, c.f)
		case c.rs != nil:
			c.z = c.rs.Process(c.z, c.f)
		default:
			c.z = append(c.z[:0], c.f...)
		}
		z := c.z
		dst, out = growAudio(dst, len(z))
		switch {
		case c.ssb != nil:
			c.ssb.Process(out, z)
		case c.am != nil:
			c.am.Process(out, z)
		default:
			c.sam.Process(out, z)
		}
	}
	if c.wagc != nil {
		c.wagc.apply(out)
	} else if c.agc != nil {
		c.agc.Process(out, out)
	} else if c.gain != 1 {
		for i := range out {
			out[i] *= c.gain
		}
	}
	return dst
}

// growAudio extends dst by m samples, reallocating when its capacity is
// short, and returns it and the new part.
func growAudio(dst []float32, m int) (all, tail []float32) {
	n := len(dst)
	if cap(dst)-n < m {
		nd := make([]float32, n, 2*(n+m))
		copy(nd, dst)
		dst = nd
	}
	dst = dst[:n+m]
	return dst, dst[n:]
}
