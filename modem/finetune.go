package modem

import (
	"fmt"
	"math"
)

// fineSlew bounds how fast FineTuner's correction may move, Hz per
// second: a drift of the trade's oscillators is a few hertz a minute to
// a hertz a second (common practice), while a first estimate that arrives
// late (voice only after a silence) is reached over a few seconds rather
// than with a sudden sweep.
const fineSlew = 50.0

// fineChunk is the number of samples over which FineTuner's phasor runs
// by recursion between exact restarts (the frequency is held within it).
const fineChunk = 64

// FineTuneReport summarises the corrections a FineTuner applied, in Hz:
// the true carrier minus the tuned one.
type FineTuneReport struct {
	// Start and End are the corrections at the first and last sample of
	// the signal, Largest the one of the largest magnitude.
	Start, End, Largest float64
	// Windows is the number of analysis windows, Accepted those that gave
	// an estimate (TuneEstimate.OK).
	Windows, Accepted int
}

// FineTuner follows and removes the carrier error of an SSB voice
// channel in its complex baseband, before the channel filter (a mistuned
// voice sits off the filter's pass band). A TuneEstimator analyses the
// input as it arrives; the signal itself waits in a delay line of one
// analysis window, so that each estimate (made for a window's middle) is
// known before the signal of that time leaves. The output is
//
//	y[n] = x[n − D]·e^{−j2π·φ(n)},  φ(n+1) = φ(n) + δ(n)/rate,
//
// δ the correction in Hz: constant at the first estimate until that
// window's middle, then linear from each window's estimate to the next
// one's (a linear drift is followed exactly), held through windows
// without voice and after the last one, and never moving faster than
// 50 Hz/s. The phase φ is the integral of δ, so the correction has no
// phase step and its frequency no jump. Until the first estimate δ is 0:
// a channel without voice passes unchanged, only delayed by D.
type FineTuner struct {
	est  *TuneEstimator
	ests []TuneEstimate
	// analyse is est.Process (a test runs the estimator on another signal)
	analyse func(dst []TuneEstimate, src []complex64) []TuneEstimate
	rate    float64
	d       int
	ring    []complex64 // the last d inputs; ring[pos] is the oldest
	pos     int
	in      int64 // inputs taken
	out     int64 // outputs given (the first d are the line's initial zeros)

	knots   []fineKnot // estimates not yet reached
	started bool
	f       float64 // the correction now, Hz
	ramp    bool    // moving from (ta, fa) to (tb, fb)
	ta, fa  float64 // the ramp's start: time (samples of signal) and correction
	tb, fb  float64 // its end
	phase   float64 // cycles at the current chunk's start, in [0, 1)
	pr, pi  float64 // the phasor e^{−j2π·phase} now
	sr, si  float64 // its step per sample, e^{−j2π·f/rate}
	rep     FineTuneReport
	seen    bool // a signal sample has left (rep.Start is set)
}

// fineKnot is one accepted window estimate.
type fineKnot struct {
	t     float64 // the window's middle, samples of signal
	f     float64 // correction, Hz
	avail int64   // the first signal sample that may use it
}

// NewFineTuner returns a fine tuner for cfg (see TuneConfig: the
// baseband's rate, the assumed carrier's place in it, USB or LSB), whose
// delay line holds delay samples; delay 0 means one analysis window, the
// least that gives every estimate in time. It returns an error when cfg
// does not suit a TuneEstimator or the delay is shorter than a window.
func NewFineTuner(cfg TuneConfig, delay int) (*FineTuner, error) {
	est, err := NewTuneEstimator(cfg)
	if err != nil {
		return nil, err
	}
	if delay == 0 {
		delay = est.WindowSamples()
	}
	if delay < est.WindowSamples() {
		return nil, fmt.Errorf("fine tuning delay %d shorter than a window of %d samples", delay, est.WindowSamples())
	}
	t := &FineTuner{est: est, rate: cfg.Rate, d: delay, ring: make([]complex64, delay), pr: 1, sr: 1}
	t.analyse = est.Process
	return t, nil
}

// MinDelay returns the shortest delay line for cfg (one analysis window),
// or 0 when cfg does not suit a TuneEstimator.
func MinDelay(cfg TuneConfig) int {
	est, err := NewTuneEstimator(cfg)
	if err != nil {
		return 0
	}
	return est.WindowSamples()
}

// Reset returns the tuner to its initial state.
func (t *FineTuner) Reset() {
	t.est.Reset()
	clear(t.ring)
	t.pos, t.in, t.out = 0, 0, 0
	t.knots = t.knots[:0]
	t.started, t.ramp, t.seen = false, false, false
	t.f, t.phase = 0, 0
	t.pr, t.pi, t.sr, t.si = 1, 0, 1, 0
	t.rep = FineTuneReport{}
}

// Delay returns the delay in samples.
func (t *FineTuner) Delay() int { return t.d }

// Report returns the corrections so far.
func (t *FineTuner) Report() FineTuneReport { return t.rep }

// Process corrects src and writes the output, delayed by Delay samples,
// to dst[:len(src)] (reallocated when short), returning it. dst must not
// overlap src.
func (t *FineTuner) Process(dst, src []complex64) []complex64 {
	if cap(dst) < len(src) {
		dst = make([]complex64, len(src))
	}
	dst = dst[:len(src)]
	t.ests = t.analyse(t.ests[:0], src)
	t.addKnots()
	t.delayLine(dst, src)
	t.in += int64(len(src))
	t.correct(dst)
	return dst
}

// Drain ends the stream: it writes the Delay samples still in the line,
// corrected, to dst[:Delay] (reallocated when short) and returns it.
func (t *FineTuner) Drain(dst []complex64) []complex64 {
	if cap(dst) < t.d {
		dst = make([]complex64, t.d)
	}
	dst = dst[:t.d]
	t.ests = t.est.Flush(t.ests[:0])
	t.addKnots()
	t.delayLine(dst, nil)
	t.correct(dst)
	return dst
}

// delayLine writes to dst the samples d behind those of src, which enter
// the line (zeros for a nil src); dst must not overlap src.
func (t *FineTuner) delayLine(dst, src []complex64) {
	for len(dst) > 0 {
		k := min(len(dst), t.d-t.pos)
		r := t.ring[t.pos : t.pos+k]
		copy(dst, r)
		if src != nil {
			copy(r, src[:k])
			src = src[k:]
		} else {
			clear(r)
		}
		dst = dst[k:]
		if t.pos += k; t.pos == t.d {
			t.pos = 0
		}
	}
}

// addKnots turns the new window estimates into knots.
func (t *FineTuner) addKnots() {
	for _, e := range t.ests {
		t.rep.Windows++
		if !e.OK {
			continue
		}
		t.rep.Accepted++
		end := int64(math.Round(e.End * t.rate))
		t.knots = append(t.knots, fineKnot{t: e.Time() * t.rate, f: e.OffsetHz, avail: end - int64(t.d)})
	}
}

// correct applies the correction to out, the next outputs. The signal
// time is cut into chunks of fineChunk samples from its start: each takes
// the scheduled correction at its first sample and restarts the phasor
// from the exact phase, so the output does not depend on how the stream
// is cut into blocks.
func (t *FineTuner) correct(out []complex64) {
	for len(out) > 0 {
		n := t.out - int64(t.d) // signal time of out[0]
		if n < 0 {
			// the line's initial zeros: before the signal
			k := min(len(out), int(-n))
			t.out += int64(k)
			out = out[k:]
			continue
		}
		at := int(n % fineChunk)
		if at == 0 {
			t.newChunk(n)
		}
		k := min(len(out), fineChunk-at)
		if t.f != 0 || t.phase != 0 {
			pr, pi := t.pr, t.pi
			sr, si := t.sr, t.si
			for i, v := range out[:k] {
				xr, xi := float64(real(v)), float64(imag(v))
				out[i] = complex(float32(xr*pr-xi*pi), float32(xr*pi+xi*pr))
				pr, pi = pr*sr-pi*si, pr*si+pi*sr
			}
			t.pr, t.pi = pr, pi
		}
		t.out += int64(k)
		out = out[k:]
	}
}

// newChunk starts the chunk at signal time n: the phase advanced over the
// last chunk, the correction scheduled for n, and the report.
func (t *FineTuner) newChunk(n int64) {
	if n > 0 {
		t.phase += fineChunk * t.f / t.rate
		t.phase -= math.Floor(t.phase)
	}
	t.schedule(n)
	if !t.seen {
		t.seen = true
		t.rep.Start = t.f
	}
	t.rep.End = t.f
	if math.Abs(t.f) > math.Abs(t.rep.Largest) {
		t.rep.Largest = t.f
	}
	s, c := math.Sincos(-2 * math.Pi * t.phase)
	t.pr, t.pi = c, s
	s, c = math.Sincos(-2 * math.Pi * t.f / t.rate)
	t.sr, t.si = c, s
}

// schedule sets t.f for signal time n (samples).
func (t *FineTuner) schedule(n int64) {
	x := float64(n)
	if !t.started {
		if len(t.knots) == 0 || t.knots[0].avail > n {
			return // no estimate yet: no correction
		}
		// start at the first estimate, held until its time
		t.started = true
		t.f = t.knots[0].f
		t.ta, t.fa, t.tb, t.fb, t.ramp = x, t.f, math.Max(x, t.knots[0].t), t.f, true
		t.knots = t.knots[1:]
	}
	for {
		if t.ramp && x >= t.tb {
			t.ramp = false
			t.f = t.fb
		}
		if t.ramp || len(t.knots) == 0 || t.knots[0].avail > n {
			break
		}
		k := t.knots[0]
		t.knots = t.knots[1:]
		t.ta, t.fa, t.fb = x, t.f, k.f
		t.tb = math.Max(k.t, x+math.Abs(k.f-t.f)/fineSlew*t.rate)
		t.ramp = t.tb > x
		if !t.ramp {
			t.f = k.f
		}
	}
	if t.ramp {
		t.f = t.fa + (t.fb-t.fa)*(x-t.ta)/(t.tb-t.ta)
	}
}
