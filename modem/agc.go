package modem

import (
	"fmt"
	"math"
)

// AGCMode selects the automatic gain control of a receiver. The zero value
// is AGCOff: a fixed gain.
type AGCMode int

// AGC modes.
const (
	AGCOff AGCMode = iota
	AGCSlow
	AGCMedium
	AGCFast
)

// String returns off, slow, medium or fast.
func (m AGCMode) String() string {
	switch m {
	case AGCOff:
		return "off"
	case AGCSlow:
		return "slow"
	case AGCMedium:
		return "medium"
	case AGCFast:
		return "fast"
	}
	return fmt.Sprintf("AGCMode(%d)", int(m))
}

// ParseAGC parses off, slow, medium or fast.
func ParseAGC(s string) (AGCMode, error) {
	for m := AGCOff; m <= AGCFast; m++ {
		if m.String() == s {
			return m, nil
		}
	}
	return 0, fmt.Errorf("unknown agc %q (off, slow, medium, fast)", s)
}

// AGCTiming is the time behaviour of an AGC: the envelope rises towards a
// louder peak with time constant Attack, holds for Hang after the last
// peak, then falls at Decay dB per second.
type AGCTiming struct {
	Attack float64 // s
	Hang   float64 // s
	Decay  float64 // dB/s
}

// Timing returns the figures of the mode (common practice for HF speech
// receivers; the zero AGCTiming for AGCOff):
//
//	slow    attack 2 ms, hang 1.0 s,  decay  6 dB/s
//	medium  attack 2 ms, hang 0.3 s,  decay 20 dB/s
//	fast    attack 2 ms, hang 0.1 s,  decay 60 dB/s
func (m AGCMode) Timing() AGCTiming {
	switch m {
	case AGCSlow:
		return AGCTiming{Attack: 0.002, Hang: 1.0, Decay: 6}
	case AGCMedium:
		return AGCTiming{Attack: 0.002, Hang: 0.3, Decay: 20}
	case AGCFast:
		return AGCTiming{Attack: 0.002, Hang: 0.1, Decay: 60}
	}
	return AGCTiming{}
}

// AGC targets and limits (common practice).
const (
	agcTargetPeak = 0.5 // output peak the AGC aims at, −6 dBFS
	agcMaxGainDB  = 80  // most gain the AGC applies
	// agcLookahead is the look-ahead in attack time constants: the audio is
	// delayed so long that the envelope has risen to 1 − e⁻⁵ (99.3 %) of a
	// sudden peak before the peak leaves the delay line.
	agcLookahead = 5
)

// AGC is a peak-following automatic gain control with look-ahead: the
// envelope e follows the peak of |x| over the look-ahead window (five
// attack time constants) up with the attack time constant, holds for the
// hang time, then decays exponentially at the decay rate; the output is
// x delayed by the look-ahead times target/e (at most agcMaxGainDB), so a
// peak has been seen for five time constants, and turned down to within
// 0.7 % of the target, when it leaves the delay line.
type AGC struct {
	aAttack      float64 // one-pole coefficient of the attack
	keep         float64 // 1 − aAttack
	decay        float64 // per-sample factor of the decay
	hangN, hangC int
	env          float64
	floor        float64 // env below which the gain saturates
	line         []float32
	pos          int
	// sliding maximum of |x| over the look-ahead, w = len(line) samples,
	// by van Herk's and Gil & Werman's blocks of w (M. van Herk, Pattern
	// Recognit. Lett. 13(7), 1992; J. Gil & M. Werman, IEEE Trans. PAMI
	// 15(5), 1993 — from memory): the maximum over
	// [i−w+1, i] is max(suf[p+1], pre), p = i mod w = pos, with pre the running
	// maximum of the current block and suf the suffix maxima of the
	// previous one (computed when it completes). Branch-free and exact;
	// a monotonic queue took a mispredicted branch or two per sample. The
	// values are kept as their IEEE 754 bit patterns, which for values
	// ≥ 0 order as the values (IEEE Std 754-2019, clause 3.4), so the
	// maxima are integer compares and conditional moves.
	vals []uint64 // the current block
	suf  []uint64 // suffix maxima of the previous block, then 0
	pre  uint64   // (the position in the block is pos, the delay line's)
}

// NewAGC returns an AGC with timing t at rate Hz. It panics if t.Attack or
// t.Decay is not positive.
func NewAGC(t AGCTiming, rate float64) *AGC {
	if !(t.Attack > 0) || !(t.Decay > 0) {
		panic("modem: AGC attack and decay must be positive")
	}
	a := &AGC{
		aAttack: 1 - math.Exp(-1/(t.Attack*rate)),
		decay:   math.Pow(10, -t.Decay/20/rate),
		hangN:   int(t.Hang * rate),
		floor:   agcTargetPeak * math.Pow(10, -agcMaxGainDB/20.0),
		line:    make([]float32, max(1, int(math.Round(agcLookahead*t.Attack*rate)))),
	}
	a.keep = 1 - a.aAttack
	a.vals = make([]uint64, len(a.line))
	a.suf = make([]uint64, len(a.line)+1)
	a.Reset()
	return a
}

// Delay returns the look-ahead delay in samples.
func (a *AGC) Delay() int { return len(a.line) }

// Reset clears the envelope and the delay line.
func (a *AGC) Reset() {
	a.env = a.floor
	a.hangC = 0
	a.pos = 0
	clear(a.line)
	clear(a.suf)
	a.pre = 0
}

// peak pushes v = |x| (≥ 0) at block position a.pos and returns the
// largest of the last len(line) values (of those seen, at the start).
// Process then stores x in the delay line at a.pos and advances it,
// calling endBlock when a block is complete.
func (a *AGC) peak(v float64) float64 {
	var pk uint64
	pk, a.pre = peakAt(a.vals, a.suf, a.pos, a.pre, math.Float64bits(v))
	return math.Float64frombits(pk)
}

// peakAt pushes b, the bits of a value ≥ 0, at block position pos and
// returns the bits of the largest of the last len(vals) values (of those
// seen, at the start), with pre, the running maximum of the current
// block, updated: the sliding maximum of AGC.peak and envelope.measure,
// which keep the position and running maximum in locals where they can;
// small enough to be inlined.
func peakAt(vals, suf []uint64, pos int, pre, b uint64) (peak, newPre uint64) {
	vals[pos] = b
	if pos == 0 {
		pre = b
	} else {
		pre = max(pre, b)
	}
	return max(suf[pos+1], pre), pre
}

// step moves the envelope env and the hang counter on by one sample of
// peak p: up towards a larger peak with the attack's one-pole filter,
// env + aAttack·(p − env) computed as env·(1 − aAttack) + aAttack·p (one
// multiply and one add on env, the chain each sample waits on while the
// peak leads), holding hangN samples after the last rise, then down by
// the decay factor to the floor.
func (a *AGC) step(p, env float64, hangC int) (float64, int) {
	switch {
	case p > env:
		return env*a.keep + a.aAttack*p, a.hangN
	case hangC > 0:
		return env, hangC - 1
	}
	return max(env*a.decay, a.floor), 0
}

// endBlock computes the suffix maxima of the block just completed, which
// serve the next one.
func (a *AGC) endBlock() {
	var s uint64
	for k := len(a.vals) - 1; k >= 0; k-- {
		s = max(s, a.vals[k])
		a.suf[k] = s
	}
}

// GainDB returns the gain now applied, in dB.
func (a *AGC) GainDB() float64 { return 20 * math.Log10(agcTargetPeak/a.env) }

// Process applies the AGC to src into dst[:len(src)] (reallocated when
// short; dst may be src) and returns it.
func (a *AGC) Process(dst, src []float32) []float32 {
	if cap(dst) < len(src) {
		dst = make([]float32, len(src))
	}
	dst = dst[:len(src)]
	env, hangC := a.env, a.hangC
	for i, x := range src {
		env, hangC = a.step(a.peak(math.Abs(float64(x))), env, hangC)
		y := a.line[a.pos]
		a.line[a.pos] = x
		a.pos++
		if a.pos == len(a.line) {
			a.endBlock()
			a.pos = 0
		}
		dst[i] = float32(float64(y) * agcTargetPeak / env)
	}
	a.env, a.hangC = env, hangC
	return dst
}

// workAGC is the AGC of an SSB channel whose detector interpolates by up
// from the work rate (ssbDetector): the envelope runs at the work rate on
// |z|, the magnitude of the channel's complex baseband after the channel
// filter — the analytic envelope of the audio the detector makes from it,
// so |audio| ≤ |z| at the work samples (between them the audio may peak
// a few percent higher: up to 6.8 % in TestChannelWorkRateAGC's noise
// bursts, 8.6 % on the demo's voices) — and the audio, delayed by
// the look-ahead in an audio-rate delay line, is multiplied by the gain
// of its work sample, interpolated linearly between work samples. The
// envelope's recursion and sliding maximum, the AGC's cost, run on a
// sixth or an eighth of the samples. The look-ahead is the AGC's, five
// attack time constants (len(line) = up·a.Delay()); the audio lags the
// work-rate samples by the detector's own delay besides, which only adds
// to it.
type workAGC struct {
	envelope
	up   int       // audio samples a work sample
	line []float32 // the audio's delay line
	pos  int
	g    float32   // the gain of the last work sample
	tmp  []float32 // scratch: a block's tail, the line's next contents
	ramp []float32 // (k+1)/up, k < up
}

// envelope is the work-rate half of workAGC and preAGC: an AGC's
// envelope (its delay line unused) run on |z|, and the gains of the
// last block's samples.
type envelope struct {
	a     *AGC
	gains []float32
}

// newWorkAGC returns the AGC of timing t for a channel of work rate fw
// whose detector interpolates by up.
func newWorkAGC(t AGCTiming, fw float64, up int) *workAGC {
	a := NewAGC(t, fw)
	w := &workAGC{envelope: envelope{a: a}, up: up, line: make([]float32, up*a.Delay()), ramp: make([]float32, up)}
	for k := range w.ramp {
		w.ramp[k] = float32(k+1) / float32(up)
	}
	w.Reset()
	return w
}

// Delay returns the look-ahead in audio samples.
func (w *workAGC) Delay() int { return len(w.line) }

// Reset clears the envelope and the delay line.
func (w *workAGC) Reset() {
	w.a.Reset()
	clear(w.line)
	w.pos = 0
	w.g = float32(agcTargetPeak / w.a.env)
}

// measure runs the envelope over the work-rate samples z, keeping the
// gain of each (agcTargetPeak/env) in w.gains.
func (w *envelope) measure(z []complex64) {
	if cap(w.gains) < len(z) {
		w.gains = make([]float32, len(z))
	}
	g := w.gains[:len(z)]
	a := w.a
	env, hangC := a.env, a.hangC
	pos, pre := a.pos, a.pre
	vals, suf := a.vals, a.suf
	n := len(vals)
	// the sliding maximum runs on |z|² (the same maximum, sqrt being
	// monotone) and the square root is taken only when the maximum
	// changes, which it does on a few samples in a window
	lastPk, p := uint64(math.MaxUint64), 0.0
	for i, v := range z {
		re, im := float64(real(v)), float64(imag(v))
		var pk uint64
		pk, pre = peakAt(vals, suf, pos, pre, math.Float64bits(re*re+im*im))
		if pk != lastPk {
			lastPk, p = pk, math.Sqrt(math.Float64frombits(pk))
		}
		env, hangC = a.step(p, env, hangC)
		if pos++; pos == n {
			a.endBlock()
			pos = 0
		}
		g[i] = float32(agcTargetPeak / env)
	}
	a.pos, a.pre = pos, pre
	a.env, a.hangC = env, hangC
}

// apply delays the audio of the work samples last measured (up of them
// a work sample, in place) and multiplies each by its gain, moving
// linearly from the last work sample's gain to this one's across the up
// samples. A block at least as long as the delay line is delayed by
// copies (the line's contents, then the block's head), the line keeping
// the block's tail; shorter ones go sample by sample.
func (w *workAGC) apply(audio []float32) {
	line, n, l := w.line, len(audio), len(w.line)
	if n >= l {
		w.tmp = append(w.tmp[:0], audio[n-l:]...)
		copy(audio[l:], audio[:n-l])
		k := copy(audio, line[w.pos:])
		copy(audio[k:l], line[:w.pos])
		copy(line, w.tmp)
		w.pos = 0
	} else {
		pos := w.pos
		for k, x := range audio {
			audio[k], line[pos] = line[pos], x
			if pos++; pos == l {
				pos = 0
			}
		}
		w.pos = pos
	}
	up, ramp := w.up, w.ramp
	g0 := w.g
	for j, g1 := range w.gains[:n/up] {
		// g0 + (g1 − g0)·(k+1)/up from a table, not by adding a step a
		// sample: that made every sample wait on the last
		dg := g1 - g0
		seg := audio[j*up : (j+1)*up]
		for k := range seg {
			seg[k] *= g0 + dg*ramp[k]
		}
		g0 = g1
	}
	w.g = g0
}

// preAGC is the AGC of an SSB channel that reaches the audio rate by a
// rational resampler (no detector folded into an interpolator): the
// envelope as workAGC's, at the work rate on |z|, and the gain applied
// there too, to the work-rate samples delayed by the look-ahead, before
// the resampler and the detector (which smooth it). The delay line is a
// whole number of audio samples long (Delay), so that the detector's
// phase can count it: the fewest work samples, at least the AGC's five
// attack time constants, that are.
type preAGC struct {
	envelope
	line []complex64
	pos  int
	da   int // the delay in audio samples
}

// newPreAGC returns the AGC of timing t for a channel of work rate fw
// and audio rate fa, or nil when no delay line of a whole number of
// audio samples fits within a second.
func newPreAGC(t AGCTiming, fw, fa float64) *preAGC {
	l, m, err := rateRatio(fw, fa) // fa/fw = l/m
	if err != nil {
		return nil
	}
	a := NewAGC(t, fw)
	lw := (a.Delay() + m - 1) / m * m
	if float64(lw) > fw {
		return nil
	}
	p := &preAGC{envelope: envelope{a: a}, line: make([]complex64, lw), da: lw / m * l}
	p.Reset()
	return p
}

// Delay returns the look-ahead in audio samples.
func (p *preAGC) Delay() int { return p.da }

// Reset clears the envelope and the delay line.
func (p *preAGC) Reset() {
	p.a.Reset()
	clear(p.line)
	p.pos = 0
}

// apply delays the work-rate samples z last measured (in place) and
// multiplies each by its gain.
func (p *preAGC) apply(z []complex64) {
	line, pos := p.line, p.pos
	for j, g := range p.gains[:len(z)] {
		y := line[pos]
		line[pos] = z[j]
		z[j] = complex(real(y)*g, imag(y)*g)
		if pos++; pos == len(line) {
			pos = 0
		}
	}
	p.pos = pos
}
