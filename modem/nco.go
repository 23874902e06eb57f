package modem

import (
	"math"
	"sync"
	"sync/atomic"
)

// oscTableLen is the number of precomputed rotations e^{j2πk·step/2⁶⁴},
// k = 0…oscTableLen−1; the base phasor is recomputed every oscTableLen
// samples from the exact phase accumulator.
const oscTableLen = 1024

// Oscillator is a phase-continuous complex exponential
//
//	o[n] = e^{jφ[n]},  φ[n+1] = φ[n] + 2π·f/fs  (mod 2π)
//
// The phase is a 64-bit fixed-point accumulator (2⁶⁴ ≙ one cycle), so it
// never drifts: after n samples it is exactly n·step mod 2⁶⁴, with step the
// frequency rounded to 2⁻⁶⁴ cycles per sample (a frequency error below
// fs·2⁻⁶⁵, 6.5·10⁻¹⁴ Hz at 2.4 MS/s). Each sample is the product of a base
// phasor computed with math.Sincos from the accumulator and a table entry
// e^{j2π·k·step/2⁶⁴} for k < 1024 computed the same way, both in float64,
// so the error of every sample is a few float64 roundings whatever n is —
// unlike a rotation recursion whose error grows with n. The result is
// rounded to complex64.
//
// Written by hand: no library offers a streaming oscillator.
type Oscillator struct {
	rate, freq float64
	run        uint64 // accumulator at the start of the current table run
	k          int    // position in the run: the next sample is run + k·step
	base       complex128
	step       uint64
	tab        []complex128 // e^{j2π·k·step/2⁶⁴}: shared read-only (oscTable), or own
	own        []complex128 // the table of a step set after construction, not shared
}

// NewOscillator returns an oscillator at freq Hz (negative for a clockwise
// phasor) for sample rate rate, starting at phase 0. Frequencies outside
// ±rate/2 alias as sampling dictates. It panics if rate is not positive and
// finite or freq is not finite.
func NewOscillator(freq, rate float64) *Oscillator {
	if !(rate > 0) || math.IsInf(rate, 0) {
		panic("modem: oscillator rate must be positive")
	}
	if math.IsNaN(freq) || math.IsInf(freq, 0) {
		panic("modem: oscillator frequency must be finite")
	}
	o := &Oscillator{rate: rate, base: 1}
	o.setStep(phaseStep(freq / rate))
	return o
}

// SetFrequency changes the frequency, keeping the phase continuous: the
// next sample continues from the current phase. It recomputes a table of
// 1024 entries (unless one of the step is shared), so it is meant for
// occasional retuning, not per sample. It panics if freq is not finite.
func (o *Oscillator) SetFrequency(freq float64) {
	if math.IsNaN(freq) || math.IsInf(freq, 0) {
		panic("modem: oscillator frequency must be finite")
	}
	step := phaseStep(freq / o.rate)
	t, ok := oscTables.Load(step)
	if ok {
		o.retune(step, t.([]complex128))
	} else {
		// a step of its own (a drifting oscillator retuned block after
		// block, say): computed into a table of its own, allocated once,
		// and not shared
		if o.own == nil {
			o.own = make([]complex128, oscTableLen)
		}
		fillOscTable(o.own, step)
		o.retune(step, o.own)
	}
	o.freq = freq
}

// setStep sets the accumulator step (2⁻⁶⁴ cycles per sample) directly,
// keeping the phase continuous, with the step's shared table. An
// interpolator by U that carries a mixer of step s in its taps premixes
// its input with step U·s (mod 2⁶⁴), so that the phase at every output
// is exactly that of the mixer.
func (o *Oscillator) setStep(step uint64) { o.retune(step, oscTable(step)) }

// retune moves to step and its table tab, keeping the phase continuous.
func (o *Oscillator) retune(step uint64, tab []complex128) {
	p := o.run + uint64(o.k)*o.step
	o.step = step
	o.freq = float64(int64(step)) / (1 << 64) * o.rate
	o.tab = tab
	o.run, o.k, o.base = p, 0, phasor(p)
}

// Frequency returns the frequency in Hz as set.
func (o *Oscillator) Frequency() float64 { return o.freq }

// Reset returns the phase to 0.
func (o *Oscillator) Reset() { o.run, o.k, o.base = 0, 0, 1 }

// Phase returns the phase of the next sample in radians, in [−π, π).
func (o *Oscillator) Phase() float64 {
	return float64(int64(o.run+uint64(o.k)*o.step)) * (2 * math.Pi / (1 << 64))
}

// SetPhase sets the phase of the next sample to phi radians.
func (o *Oscillator) SetPhase(phi float64) {
	c := phi / (2 * math.Pi)
	c -= math.Round(c)
	o.run, o.k = uint64(int64(math.Round(c*(1<<63))))*2, 0
	o.base = phasor(o.run)
}

// Advance moves the phase on by n samples without producing them.
func (o *Oscillator) Advance(n int) {
	t := uint64(o.k) + uint64(n)
	o.run += t / oscTableLen * oscTableLen * o.step
	o.k = int(t % oscTableLen)
	o.base = phasor(o.run)
}

// next returns the base phasor and the table entries for the next run of
// at most n samples, and moves the position on. Samples are base·tab[k]
// on a fixed grid of runs, so the output does not depend on how the
// caller splits it into blocks.
func (o *Oscillator) next(n int) (complex128, []complex128) {
	if o.k == oscTableLen {
		o.run += oscTableLen * o.step
		o.k = 0
		o.base = phasor(o.run)
	}
	m := min(n, oscTableLen-o.k)
	t := o.tab[o.k : o.k+m]
	o.k += m
	return o.base, t
}

// The channels of a receiver mix at a few steps (every SSB detector of
// one mode and rate premixes at the same one), and a table costs 1024
// Sincos calls and 16 KB, so tables are shared read-only, up to
// oscTablesMax of them per process.
var (
	oscTables      sync.Map // uint64 step → []complex128
	oscTablesCount atomic.Int64
)

const oscTablesMax = 512

// oscTable returns the table of the step, e^{j2π·k·step/2⁶⁴} for
// k < oscTableLen, which the caller must not modify.
func oscTable(step uint64) []complex128 {
	if t, ok := oscTables.Load(step); ok {
		return t.([]complex128)
	}
	t := make([]complex128, oscTableLen)
	fillOscTable(t, step)
	if oscTablesCount.Add(1) <= oscTablesMax {
		oscTables.Store(step, t)
	}
	return t
}

// fillOscTable writes e^{j2π·k·step/2⁶⁴} to t[k].
func fillOscTable(t []complex128, step uint64) {
	for k := range t {
		t[k] = phasor(uint64(k) * step)
	}
}

// phaseStep converts cycles per sample to the 2⁻⁶⁴-cycle accumulator step.
func phaseStep(cycles float64) uint64 {
	c := cycles - math.Round(cycles) // [−0.5, 0.5]
	if c >= 0.5 {
		c -= 1
	}
	return uint64(int64(math.Round(c * (1 << 64))))
}

// phasor returns e^{j2π·p/2⁶⁴}, p read as a signed fraction of a cycle so
// that the argument of Sincos stays within [−π, π).
func phasor(p uint64) complex128 {
	s, c := math.Sincos(float64(int64(p)) * (2 * math.Pi / (1 << 64)))
	return complex(c, s)
}

// Generate writes the next len(dst) samples of the oscillator to dst and
// returns it. A nil dst returns nil.
func (o *Oscillator) Generate(dst []complex64) []complex64 {
	out := dst
	for len(dst) > 0 {
		b, tab := o.next(len(dst))
		n := len(tab)
		br, bi := real(b), imag(b)
		d := dst[:n]
		for k, t := range tab {
			tr, ti := real(t), imag(t)
			d[k] = complex(float32(br*tr-bi*ti), float32(br*ti+bi*tr))
		}
		dst = dst[n:]
	}
	return out
}

// Mix multiplies src by the oscillator, dst[n] = src[n]·e^{jφ[n]}, and
// returns dst[:len(src)]. A nil or short dst is allocated; dst may be src
// itself (in-place mixing).
func (o *Oscillator) Mix(dst, src []complex64) []complex64 {
	if cap(dst) < len(src) {
		dst = make([]complex64, len(src))
	}
	dst = dst[:len(src)]
	out := dst
	for len(src) > 0 {
		b, tab := o.next(len(src))
		n := len(tab)
		k0 := 0
		if haveKernels && n >= 4 {
			k0 = n &^ 3
			mixAVX2(&dst[0], &src[0], &tab[0], k0, b)
		}
		mixGo(dst[k0:n], src[k0:n], tab[k0:], b)
		src = src[n:]
		dst = dst[n:]
	}
	return out
}

// mixGo is the loop of Mix: d[k] = s[k]·float32(b·tab[k]) (mixAVX2 on
// amd64, bit for bit).
func mixGo(d, s []complex64, tab []complex128, b complex128) {
	for k := range d {
		or, oi := phasor32(b, tab[k])
		x := s[k]
		xr, xi := real(x), imag(x)
		// float32 arithmetic written out: Go may evaluate a complex64
		// product through complex128.
		d[k] = complex(xr*or-xi*oi, xr*oi+xi*or)
	}
}

// phasor32 returns float32(b·t) as its real and imaginary parts: the
// complex128 product written out (two products, then one add or
// subtract), as the kernels of nco_amd64.s round it.
func phasor32(b, t complex128) (re, im float32) {
	br, bi, tr, ti := real(b), imag(b), real(t), imag(t)
	return float32(br*tr - bi*ti), float32(br*ti + bi*tr)
}

// MixReal multiplies a real signal by the oscillator,
// dst[n] = src[n]·e^{jφ[n]}, and returns dst[:len(src)] (allocated when
// nil or short).
func (o *Oscillator) MixReal(dst []complex64, src []float32) []complex64 {
	if cap(dst) < len(src) {
		dst = make([]complex64, len(src))
	}
	dst = dst[:len(src)]
	out := dst
	for len(src) > 0 {
		b, tab := o.next(len(src))
		n := len(tab)
		br, bi := real(b), imag(b)
		s := src[:n]
		d := dst[:n]
		for k, t := range tab {
			tr, ti := real(t), imag(t)
			x := s[k]
			d[k] = complex(x*float32(br*tr-bi*ti), x*float32(br*ti+bi*tr))
		}
		src = src[n:]
		dst = dst[n:]
	}
	return out
}
