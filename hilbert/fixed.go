package hilbert

import (
	"math"
	"math/bits"
)

// Fixed-point coefficients (Spec.Bits). A splitter made with Bits = B
// stores its coefficients as signed B-bit integers c times a common scale
// 2^−F: F is the largest integer for which the largest coefficient
// magnitude still rounds to at most 2^(B−1) − 1, so the largest
// coefficient uses the whole word (block floating point; F = B−1, the
// Q(B−1) format, when that coefficient lies in [½, 1)). Rounding is to
// the nearest integer, halves away from zero; the FIR designs' Q taps are
// then re-rounded, each within 1.5 steps of its exact value, to the
// choice that keeps the band's suppression highest (refineTaps).
//
// What is quantised:
//   - windowed, equiripple and fft designs: the Q path's taps h[m] (the I
//     path is a delay, exact in any format); the streaming filter computes
//     in float32 as before, which holds taps of up to 24 bits exactly;
//   - weaver: the low-pass taps (its oscillators are computed, not
//     stored);
//   - allpass: the section coefficients a (kept below 1 in magnitude, so
//     a section stays stable), and the streaming filter runs the sections
//     in integer arithmetic (allpassFixed).
//
// The frequency response (Response, Analyze) is that of the quantised
// coefficients exactly.

// Limits on Spec.Bits.
const (
	MinBits = 2
	MaxBits = 32
)

// Fixed is the fixed-point form of a splitter made with Spec.Bits: each
// coefficient is an integer times 2^−Frac.
type Fixed struct {
	// Bits is the word length B; every integer lies in
	// [−2^(B−1), 2^(B−1) − 1].
	Bits int
	// Frac is the number of fraction bits F: value = integer·2^−F.
	Frac int
	// I and Q hold the integers of the I and Q paths in the order
	// Coefficients (FIR designs, convolution order) or Sections (allpass)
	// give them. For the windowed, equiripple and fft designs I is nil:
	// the I path is a pure delay of Delay samples.
	I, Q []int64
	// LowPass holds the Weaver design's low-pass taps (I and Q are nil).
	LowPass []int64
	// DataBits and AccBits describe the all-pass arithmetic (0 for the
	// other designs): signals are DataBits-bit words whose full scale ±1
	// leaves 2 bits of headroom, and each section's
	// y = a·(x + y[n−2]) − x[n−2] is formed exactly in an accumulator of
	// AccBits bits before rounding back to DataBits.
	DataBits, AccBits int
}

// Scale returns 2^−Frac, the value of one integer step.
func (f Fixed) Scale() float64 { return math.Ldexp(1, -f.Frac) }

// Quantized returns the fixed-point form of s, and false if s was made
// without Spec.Bits.
func Quantized(s Splitter) (Fixed, bool) {
	var fx *Fixed
	switch t := s.(type) {
	case *firSplitter:
		fx = t.fixed
	case *fftSplitter:
		fx = t.fir.fixed
	case *weaverSplitter:
		fx = t.fixed
	case *allpassSplitter:
		fx = t.fixed
	}
	if fx == nil {
		return Fixed{}, false
	}
	c := *fx
	c.I = append([]int64(nil), fx.I...)
	c.Q = append([]int64(nil), fx.Q...)
	c.LowPass = append([]int64(nil), fx.LowPass...)
	return c, true
}

// fracBits returns the scale exponent F for coefficients whose largest
// magnitude is m: the largest F (at most maxFrac) with round(m·2^F) ≤
// 2^(bits−1) − 1.
func fracBits(m float64, bits, maxFrac int) int {
	lim := math.Ldexp(1, bits-1) - 1
	if m == 0 {
		return min(bits-1, maxFrac)
	}
	f := int(math.Floor(math.Log2(lim / m)))
	for f > -1100 && math.Round(math.Ldexp(m, f)) > lim {
		f--
	}
	for f < maxFrac && math.Round(math.Ldexp(m, f+1)) <= lim {
		f++
	}
	return min(f, maxFrac)
}

// quantize rounds c in place to integers times 2^−F with the common F of
// fracBits and returns the integers and F.
func quantize(c []float64, bits, maxFrac int) ([]int64, int) {
	var m float64
	for _, v := range c {
		m = math.Max(m, math.Abs(v))
	}
	f := fracBits(m, bits, maxFrac)
	q := make([]int64, len(c))
	for i, v := range c {
		q[i] = int64(math.Round(math.Ldexp(v, f)))
		c[i] = math.Ldexp(float64(q[i]), -f)
	}
	return q, f
}

// noFracLimit is fracBits' maxFrac where the arithmetic sets none.
const noFracLimit = 1 << 20

// applyBits quantises the coefficients of sp to s.Bits bits.
func applyBits(sp Splitter, bits int) {
	switch t := sp.(type) {
	case *firSplitter:
		t.fixed = t.quantize(bits)
	case *fftSplitter:
		t.fir.fixed = t.fir.quantize(bits)
	case *weaverSplitter:
		ints, f := quantize(t.h, bits, noFracLimit)
		t.fixed = &Fixed{Bits: bits, Frac: f, LowPass: ints}
	case *allpassSplitter:
		t.quantize(bits)
	}
}

// quantize rounds h[1…M], refines the rounding (refineTaps) and returns
// the Q taps as integers in convolution order.
func (f *firSplitter) quantize(bits int) *Fixed {
	exact := append([]float64(nil), f.h[1:]...)
	ints, fr := quantize(f.h[1:], bits, noFracLimit)
	f.refineTaps(exact, ints, fr, bits)
	q := make([]int64, 2*f.m+1)
	for m := 1; m <= f.m; m++ {
		q[f.m+m] = ints[m-1]
		q[f.m-m] = -ints[m-1]
	}
	return &Fixed{Bits: bits, Frac: fr, Q: q}
}

// allpassDataBits returns the data word length of the fixed-point
// all-pass arithmetic for coefficient words of b bits: 16 (a
// microcontroller's samples) up to b = 16, b up to 24, 24 beyond (the
// widest audio converters; common practice).
func allpassDataBits(b int) int { return max(16, min(b, 24)) }

// allpassGuardBits is the headroom of the fixed-point all-pass signals:
// the input's full scale ±1 sits 2 bits (12 dB) below the data words'
// range, because the chains' internal signals can peak at up to about
// three times a broadband input (a section (a − z⁻²)/(1 − a·z⁻²) has an
// impulse response of absolute sum 1 + 2a).
const allpassGuardBits = 2

// allpassMaxFrac bounds the coefficient scale so that x[n−2]·2^F stays
// within the 63 bits of an int64 accumulator with data of d bits.
func allpassMaxFrac(d int) int { return 62 - d - 1 }

// quantize rounds the section coefficients with one common scale, keeps
// each below 1 in magnitude, and recomputes the delay.
func (s *allpassSplitter) quantize(bits int) {
	d := allpassDataBits(bits)
	all := append(append([]float64(nil), s.ai...), s.aq...)
	ints, f := quantize(all, bits, allpassMaxFrac(d))
	one := int64(1) << f
	for k, v := range ints {
		if v >= one { // a rounded to 1 would put a pole on the unit circle
			ints[k] = one - 1
			all[k] = math.Ldexp(float64(ints[k]), -f)
		}
	}
	ni := len(s.ai)
	copy(s.ai, all[:ni])
	copy(s.aq, all[ni:])
	s.fixed = &Fixed{Bits: bits, Frac: f, I: ints[:ni:ni], Q: ints[ni:], DataBits: d, AccBits: bits + d + 2}
	s.delay = s.groupDelay()
}

// allpassFixed runs the all-pass chains in integer arithmetic: signals
// are D-bit words scaled by 2^(D−1−G), so the input's full scale ±1
// leaves G = allpassGuardBits bits of headroom (the input is rounded and
// saturated to D bits), coefficients are B-bit integers A with scale
// 2^−F, and each section computes
//
//	acc = A·(x[n] + y[n−2]) − x[n−2]·2^F   (exact: B + D + 2 bits),
//	y[n] = saturate_D(⌊(acc + 2^(F−1)) / 2^F⌋)   (round half up),
//
// one multiplication per section and sample. The accumulator is an
// int64; the product needs B + D + 1 bits and the difference one more.
type allpassFixed struct {
	ai, aq []int64
	frac   uint
	dbits  uint
	si, sq [][4]int64 // x[n−1], x[n−2], y[n−1], y[n−2] per section
	prev   int64      // the Q chain's one-sample delay
}

func (s *allpassSplitter) newFixedFilter() Filter {
	fx := s.fixed
	return &allpassFixed{ai: fx.I, aq: fx.Q, frac: uint(fx.Frac), dbits: uint(fx.DataBits),
		si: make([][4]int64, len(fx.I)), sq: make([][4]int64, len(fx.Q))}
}

func (f *allpassFixed) Reset() {
	clear(f.si)
	clear(f.sq)
	f.prev = 0
}

func (f *allpassFixed) Process(dst []complex64, src []float32) []complex64 {
	dst = checkDst(dst, src)
	hi := int64(1)<<(f.dbits-1) - 1
	lo := -hi - 1
	full := math.Ldexp(1, int(f.dbits)-1-allpassGuardBits)
	var half int64
	if f.frac > 0 {
		half = 1 << (f.frac - 1)
	}
	sat := func(v int64) int64 { return min(max(v, lo), hi) }
	section := func(a int64, st *[4]int64, x int64) int64 {
		acc := a*(x+st[3]) - st[1]<<f.frac
		y := sat((acc + half) >> f.frac)
		st[1], st[0] = st[0], x
		st[3], st[2] = st[2], y
		return y
	}
	for n, v := range src {
		x := sat(int64(math.Round(float64(v) * full)))
		u := x
		for k, a := range f.ai {
			u = section(a, &f.si[k], u)
		}
		w := f.prev
		f.prev = x
		for k, a := range f.aq {
			w = section(a, &f.sq[k], w)
		}
		dst[n] = complex(float32(float64(u)/full), float32(float64(w)/full))
	}
	return dst
}

// refineTaps improves on plain rounding of the Q taps h[1…M] (which hold
// the rounded values of exact, as ints·2^−F). The band's suppression is
// set by the largest |1 − A(ω)|, A(ω) = 2·Σ h[m]·sin(mω), and the
// independent roundings of many taps add up to a peak error that can
// exceed the design's own ripple (plain Q15 rounding costs the 63-tap
// 300–2700 Hz design at 8 kHz 4.8 dB). So, on a grid of the band: with
// up to refineExhaustive non-zero taps every floor/ceiling choice is
// tried on every fourth grid point (refineGray; 2^16 choices for 63
// taps, about 10 ms); then a greedy local search on the whole grid moves
// one tap at a time by one step wherever that lowers the peak, until no
// single step does. Every tap stays within 1.5 steps of its exact value,
// and zero taps (even m of the half-band-like designs) stay zero. This is
// the discrete-coefficient minimax problem of common practice, solved by
// search rather than integer programming because the neighbourhood is
// small.
// refineExhaustive is the most non-zero taps whose floor/ceiling choices
// are all tried (2^16 = 65536 evaluations).
const refineExhaustive = 16

func (f *firSplitter) refineTaps(exact []float64, ints []int64, frac, bits int) {
	lo, hi := f.spec.Low, f.spec.High
	if !(lo > 0 && hi > lo) {
		return
	}
	m := len(ints)
	n := 16*m + 64 // grid points over the band: several per ripple of A
	step := math.Ldexp(1, -frac)
	lim := int64(1)<<(bits-1) - 1
	// s[k][i] = 2·sin((k+1)·ω_i)·step, the change of A(ω_i) for one step
	// of h[k+1]; e[i] = 1 − A(ω_i).
	s := make([][]float64, m)
	e := make([]float64, n)
	for k := range s {
		s[k] = make([]float64, n)
		for i := range n {
			w := 2 * math.Pi * (lo + (hi-lo)*float64(i)/float64(n-1)) / f.spec.Rate
			s[k][i] = 2 * math.Sin(float64(k+1)*w) * step
		}
	}
	setErr := func() {
		for i := range e {
			e[i] = 1
		}
		for k, sk := range s {
			for i, v := range sk {
				e[i] -= float64(ints[k]) * v
			}
		}
	}
	setErr()
	var free []int
	for k := range m {
		if exact[k] != 0 {
			free = append(free, k)
		}
	}
	if len(free) <= refineExhaustive {
		refineGray(exact, ints, free, frac, s, e)
		setErr()
	}
	peak := func(d float64, sk []float64) float64 {
		var p float64
		for i, v := range e {
			p = math.Max(p, math.Abs(v-d*sk[i]))
		}
		return p
	}
	best := peak(0, s[0])
	for pass := 0; pass < 64; pass++ {
		improved := false
		for _, k := range free {
			for _, d := range []int64{1, -1} {
				v := ints[k] + d
				if v > lim || v < -lim-1 || math.Abs(float64(v)-math.Ldexp(exact[k], frac)) >= 1.5 {
					continue
				}
				if p := peak(float64(d), s[k]); p < best {
					best = p
					ints[k] = v
					for i := range e {
						e[i] -= float64(d) * s[k][i]
					}
					improved = true
					break
				}
			}
		}
		if !improved {
			break
		}
	}
	for k, v := range ints {
		f.h[k+1] = math.Ldexp(float64(v), -frac)
	}
}

// refineGray sets ints[free] to the floor/ceiling choice of exact·2^frac
// with the smallest peak |e| on every fourth point of the grid (the
// greedy search that follows works on the whole grid), trying all
// 2^len(free) choices in Gray-code order so that each differs from the
// one before in one tap. s and e are as in refineTaps, for ints.
func refineGray(exact []float64, ints []int64, free []int, frac int, s [][]float64, e []float64) {
	const stride = 4
	nc := (len(e) + stride - 1) / stride
	ec := make([]float64, nc)
	sc := make([][]float64, len(free))
	dir := make([]int64, len(free))
	cur := make([]int64, len(free))
	for i := range ec {
		ec[i] = e[i*stride]
	}
	for j, k := range free {
		sc[j] = make([]float64, nc)
		for i := range sc[j] {
			sc[j][i] = s[k][i*stride]
		}
		cur[j] = ints[k]
		dir[j] = 1 // the other of floor and ceiling
		if math.Ldexp(exact[k], frac) < float64(ints[k]) {
			dir[j] = -1
		}
	}
	best := 0.0
	for _, v := range ec {
		best = math.Max(best, math.Abs(v))
	}
	refuse := 0 // the point that refused the last choice likely refuses the next
	for g := 1; g < 1<<len(free); g++ {
		j := bits.TrailingZeros(uint(g))
		d := dir[j]
		dir[j] = -d
		cur[j] += d
		fd := float64(d)
		for i, v := range sc[j] {
			ec[i] -= fd * v
		}
		if math.Abs(ec[refuse]) >= best {
			continue
		}
		p := 0.0
		for i, v := range ec {
			p = math.Max(p, math.Abs(v))
			if p >= best {
				refuse = i
				break
			}
		}
		if p < best {
			best = p
			for jj, k := range free {
				ints[k] = cur[jj]
			}
		}
	}
}
