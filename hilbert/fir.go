package hilbert

import (
	"math"

	"gonum.org/v1/gonum/dsp/window"
)

// firSplitter is an odd-length linear-phase FIR splitter of N = 2M+1 taps:
// the I path is a delay of M samples, the Q path the antisymmetric kernel
// h[−m] = −h[m] centred on M. Its analytic response is
//
//	H(ω) = e^{−jωM}·(1 + A(ω)),   A(ω) = 2·Σ_{m=1}^{M} h[m]·sin(mω),
//
// so the suppression at f is 20·log10(|1+A|/|1−A|).
type firSplitter struct {
	spec Spec
	m    int       // half length M
	h    []float64 // h[0..M], h[0] = 0
	odd  bool      // h[m] = 0 for even m: only odd taps are stored in the filter
	// fixed is the fixed-point form (Spec.Bits); h then holds the
	// quantised taps.
	fixed *Fixed
}

// IdealTap returns the ideal discrete Hilbert transformer's coefficient
// h[n] = 2/(πn) for odd n and 0 for even n (Oppenheim & Schafer,
// Discrete-Time Signal Processing, 3rd ed., sec. 12.4.1, section number
// from memory; its response is
// −j·sgn(ω), −90° at positive frequencies).
func IdealTap(n int) float64 {
	if n%2 == 0 {
		return 0
	}
	return 2 / (math.Pi * float64(n))
}

// KaiserBeta returns the Kaiser window β for a stop-band attenuation of a
// dB by Kaiser's 1974 formula (Oppenheim & Schafer, 3rd ed., sec. 7.5.3,
// eq. 7.75; equation numbers from memory):
// 0.1102(a−8.7) above 50 dB, 0.5842(a−21)^0.4 + 0.07886(a−21) from 21 to
// 50 dB, and 0 below.
func KaiserBeta(a float64) float64 {
	switch {
	case a > 50:
		return 0.1102 * (a - 8.7)
	case a >= 21:
		return 0.5842*math.Pow(a-21, 0.4) + 0.07886*(a-21)
	}
	return 0
}

// kaiserAttenuation returns the attenuation a Kaiser design of n taps with
// transition width dw rad/sample reaches, from Kaiser's length formula
// n−1 = (a−8)/(2.285·Δω) (Oppenheim & Schafer, 3rd ed., eq. 7.76), capped
// at 300 dB where float64 arithmetic ends anyway.
func kaiserAttenuation(n int, dw float64) float64 {
	return math.Min(2.285*dw*float64(n-1)+8, 300)
}

// Kaiser multiplies seq in place by the Kaiser window
// w[k] = I0(β·√(1 − (2k/(N−1) − 1)²)) / I0(β) and returns it.
// gonum's dsp/window has no Kaiser window, hence this one.
func Kaiser(seq []float64, beta float64) []float64 {
	n := len(seq)
	if n == 1 {
		return seq
	}
	den := BesselI0(beta)
	for k := range seq {
		r := 2*float64(k)/float64(n-1) - 1
		seq[k] *= BesselI0(beta*math.Sqrt(math.Max(0, 1-r*r))) / den
	}
	return seq
}

// BesselI0 is the modified Bessel function of the first kind, order 0, by
// its power series Σ ((x/2)^k / k!)² (Abramowitz & Stegun 9.6.12), which
// converges for all x; neither the standard library nor gonum's mathext
// provides I0. Accurate to rounding for the |x| ≤ 40 used here.
func BesselI0(x float64) float64 {
	q := x * x / 4
	sum, term := 1.0, 1.0
	for k := 1; k < 500; k++ {
		term *= q / float64(k*k)
		sum += term
		if term < 1e-17*sum {
			break
		}
	}
	return sum
}

// newWindowed designs the windowed ideal Hilbert transformer
// h[m] = w[M+m]·2/(πm) for odd m.
func newWindowed(s Spec) *firSplitter {
	n := s.Taps
	w := make([]float64, n)
	for i := range w {
		w[i] = 1
	}
	switch s.Design {
	case "hamming":
		window.Hamming(w)
	case "blackman":
		window.Blackman(w)
	case "kaiser":
		Kaiser(w, KaiserBeta(kaiserAttenuation(n, 2*2*math.Pi*edge(s)/s.Rate)))
	}
	m := (n - 1) / 2
	h := make([]float64, m+1)
	for k := 1; k <= m; k++ {
		h[k] = IdealTap(k) * w[m+k]
	}
	return &firSplitter{spec: s, m: m, h: h, odd: true}
}

func (f *firSplitter) Spec() Spec     { return f.spec }
func (f *firSplitter) Delay() float64 { return float64(f.m) }

// MACs counts one multiply-add per non-zero tap pair h[m], h[−m]: the
// filter subtracts the two inputs first (antisymmetry) and skips the zero
// taps at even m.
func (f *firSplitter) MACs() float64 {
	if f.odd {
		return float64((f.m + 1) / 2)
	}
	return float64(f.m)
}

// amplitude returns A(ω) = 2·Σ h[m]·sin(mω), by the recurrence
// sin((m+1)ω) = 2cos ω·sin(mω) − sin((m−1)ω).
func (f *firSplitter) amplitude(w float64) float64 {
	sw, cw := math.Sincos(w)
	var a float64
	if f.odd {
		c2 := 2 * (cw*cw - sw*sw) // 2cos 2ω
		prev, cur := -sw, sw      // sin(−ω), sin(ω)
		for m := 1; m <= f.m; m += 2 {
			a += f.h[m] * cur
			prev, cur = cur, c2*cur-prev
		}
	} else {
		c1 := 2 * cw
		prev, cur := 0.0, sw
		for m := 1; m <= f.m; m++ {
			a += f.h[m] * cur
			prev, cur = cur, c1*cur-prev
		}
	}
	return 2 * a
}

func (f *firSplitter) Response(freq float64) complex128 {
	w := 2 * math.Pi * freq / f.spec.Rate
	a := f.amplitude(w)
	s, c := math.Sincos(-w * float64(f.m))
	return complex((1+a)*c, (1+a)*s)
}

// taps returns the causal I and Q taps of length 2M+1.
func (f *firSplitter) taps() (i, q []float64) {
	n := 2*f.m + 1
	i = make([]float64, n)
	q = make([]float64, n)
	i[f.m] = 1
	for m := 1; m <= f.m; m++ {
		q[f.m+m] = f.h[m]
		q[f.m-m] = -f.h[m]
	}
	return i, q
}

func (f *firSplitter) NewFilter() Filter {
	step := 1
	if f.odd {
		step = 2
	}
	var h []float32
	for m := 1; m <= f.m; m += step {
		h = append(h, float32(f.h[m]))
	}
	n := 2*f.m + firChunk
	return &firFilter{h: h, m: f.m, step: step, buf: make([]float32, n), rev: make([]float32, n)}
}

// firChunk is the number of samples the FIR filter copies into its history
// buffer at a time.
const firChunk = 1024

// firFilter is the streaming FIR splitter. Output n is
//
//	x[n−M] + j·Σ_m h[m]·(x[n−M−m] − x[n−M+m]),
//
// summed over the stored taps m = 1, 1+step, …, in float32 written out by
// hand: the antisymmetry halves the multiplications and, for the odd-only
// designs, the zero taps at even m halve them again.
type firFilter struct {
	h    []float32 // h[1], h[1+step], …
	m    int
	step int
	buf  []float32 // 2M samples of history followed by up to firChunk new ones
	rev  []float32 // buf reversed, for the odd-tap loop
}

func (f *firFilter) Reset() { clear(f.buf) }

func (f *firFilter) Process(dst []complex64, src []float32) []complex64 {
	dst = checkDst(dst, src)
	hist := 2 * f.m
	for off := 0; off < len(src); off += firChunk {
		c := min(firChunk, len(src)-off)
		copy(f.buf[hist:hist+c], src[off:off+c])
		out := dst[off : off+c]
		if f.step == 2 {
			f.odd(out)
		} else {
			f.all(out)
		}
		copy(f.buf, f.buf[c:c+hist])
	}
	return dst
}

// odd computes outputs for taps at odd m; window i of the buffer holds
// x[n−2M] … x[n]. The left half is read forwards from rev, the buffer
// reversed, so both halves are walked forwards with stride 2; the
// antisymmetry keeps one multiply per tap pair.
//
// Four outputs are computed together, each with its own accumulator: one
// tap h[j] serves all four, and output i+t reads L[3−t+2j] and R[t+2j]
// of common left and right windows, so a step to the next tap loads only
// two new samples on each side (the other two are the previous step's).
// Four independent sums also hide the latency of the additions, which
// bounds a single running sum. Every output, the ones left over at the
// end of a chunk included, sums the same terms in the same order into one
// float32 accumulator, so the result does not depend on block sizes.
func (f *firFilter) odd(out []complex64) {
	m := f.m
	h := f.h
	k := len(h)
	lb := 2*m + len(out) // valid length of buf and rev
	buf, rev := f.buf[:lb], f.rev[:lb]
	for t, v := range buf {
		rev[lb-1-t] = v
	}
	i := 0
	for ; i+4 <= len(out); i += 4 {
		// R[t+2j] = x[n_t−M+1+2j], L[3−t+2j] = x[n_t−M−1−2j] for
		// output n_t = n_i + t.
		r := buf[i+m+1 : i+m+3+2*k]
		l := rev[lb-i-m-3 : lb-i-m-1+2*k]
		var a0, a1, a2, a3 float32
		l0, l1, r0, r1 := l[0], l[1], r[0], r[1]
		for j, v := range h {
			ln := l[2*j+2 : 2*j+4]
			rn := r[2*j+2 : 2*j+4]
			l2, l3, r2, r3 := ln[0], ln[1], rn[0], rn[1]
			a0 += v * (l3 - r0)
			a1 += v * (l2 - r1)
			a2 += v * (l1 - r2)
			a3 += v * (l0 - r3)
			l0, l1, r0, r1 = l2, l3, r2, r3
		}
		o := out[i : i+4]
		c := buf[i+m : i+m+4]
		o[0] = complex(c[0], a0)
		o[1] = complex(c[1], a1)
		o[2] = complex(c[2], a2)
		o[3] = complex(c[3], a3)
	}
	for ; i < len(out); i++ {
		// x[n−M+1+2j] = buf[i+m+1+2j]; x[n−M−1−2j] = rev[lb−i−m+2j].
		right := buf[i+m+1 : i+m+2*k]
		left := rev[lb-i-m : lb-i-m+2*k-1]
		var a float32
		for j, v := range h {
			a += v * (left[2*j] - right[2*j])
		}
		out[i] = complex(buf[i+m], a)
	}
}

// all computes outputs for taps at every m ≥ 1.
func (f *firFilter) all(out []complex64) {
	m := f.m
	h := f.h
	for i := range out {
		w := f.buf[i : i+2*m+1]
		var a float32
		for j, v := range h {
			k := j + 1
			a += v * (w[m-k] - w[m+k])
		}
		out[i] = complex(w[m], a)
	}
}
