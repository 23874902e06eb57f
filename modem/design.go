package modem

import (
	"math"
	"math/cmplx"
	"slices"
	"sync"
	"sync/atomic"

	"ssbkit/hilbert"
)

// KaiserBeta returns the Kaiser window shape parameter β for a stop-band
// attenuation (and pass-band ripple) of attenDB dB, by Kaiser's empirical
// formula (Oppenheim & Schafer, Discrete-Time Signal Processing, 3rd ed.,
// eq. 7.75), computed by hilbert.KaiserBeta:
//
//	β = 0.1102·(A − 8.7)                          A > 50
//	β = 0.5842·(A − 21)^0.4 + 0.07886·(A − 21)    21 ≤ A ≤ 50
//	β = 0                                          A < 21
func KaiserBeta(attenDB float64) float64 { return hilbert.KaiserBeta(attenDB) }

// KaiserOrder returns the even filter order M (the filter has M+1 taps)
// that a Kaiser-window low-pass needs for a transition band of transition
// Hz at sample rate rate and attenDB dB of stop-band attenuation, by
// Kaiser's formula with his constant 7.95, as scipy.signal.kaiserord
// uses it (Oppenheim & Schafer, 3rd ed., eq. 7.76, round it to 8; from
// memory), so that the lengths match scipy's (TestKaiserGolden):
//
//	M = ⌈(A − 7.95) / (2.285·Δω)⌉,  Δω = 2π·transition/rate,
//
// rounded up to even so that the filter is a type I linear-phase FIR with
// an integer delay of M/2 samples. It panics if transition or rate is not
// positive.
func KaiserOrder(transition, rate, attenDB float64) int {
	if !(transition > 0) || !(rate > 0) {
		panic("modem: transition and rate must be positive")
	}
	dw := 2 * math.Pi * transition / rate
	m := int(math.Ceil((attenDB - 7.95) / (2.285 * dw)))
	if m < 2 {
		m = 2
	}
	if m%2 == 1 {
		m++
	}
	return m
}

// KaiserWindow returns the n-point Kaiser window
//
//	w[k] = I₀(β·√(1 − (2k/(n−1) − 1)²)) / I₀(β),  k = 0…n−1
//
// (Oppenheim & Schafer, 3rd ed., eq. 7.72), computed by hilbert.Kaiser:
// the phase-splitter designs need the same window, and one I₀ series
// serves both packages.
func KaiserWindow(n int, beta float64) []float64 {
	w := make([]float64, n)
	for k := range w {
		w[k] = 1
	}
	return hilbert.Kaiser(w, beta)
}

// KaiserLowpass designs a linear-phase low-pass FIR by the Kaiser window
// method (Oppenheim & Schafer, 3rd ed., sec. 7.5.3): the ideal low-pass
// h[n] = 2fc/fs·sinc(2fc/fs·(n − M/2)) times a Kaiser window. cutoff is
// the centre of the transition band, where the gain is −6 dB; the pass
// band ends at cutoff − transition/2 and the stop band begins at
// cutoff + transition/2. The taps are scaled to unity gain at DC and their
// count is odd.
//
// Kaiser's formulas (KaiserBeta, KaiserOrder; the same as scipy's kaiserord
// and firwin) are empirical and miss the target by up to 2 dB for short
// filters, so the design is then checked: the response is evaluated near
// both band edges, where the window method's ripples are largest, and the
// design attenuation is raised in 0.25 dB steps until the ripple and the
// stop-band gain are both at most δ = 10^(−attenDB/20). It panics if cutoff
// is not within (0, rate/2) or transition, rate are not positive.
func KaiserLowpass(cutoff, transition, rate, attenDB float64) []float64 {
	if !(cutoff > 0) || !(cutoff < rate/2) {
		panic("modem: cutoff must lie between 0 and rate/2")
	}
	return kaiserMeet(cutoff/rate, transition/rate, attenDB)
}

// kaiserMeet designs the Kaiser low-pass for cutoff fc and transition tw
// (cycles per sample) meeting attenDB in both bands, as KaiserLowpass
// describes.
func kaiserMeet(fc, tw, attenDB float64) []float64 {
	return kaiserMeetShift(fc, tw, attenDB, 0)
}

// kaiserMeetShift is kaiserMeet with the impulse response (the sinc and
// its window) delayed by shift samples, |shift| ≤ 1, beyond the centre
// of its taps: a fractional delay that a receive chain fed by a
// Channeliser uses to put its audio on the capture's time grid. A
// shifted design has two taps more than the unshifted one whatever the
// shift (room for the moved window), so that the chain can plan with its
// length before it knows the shift; with shift 0 it is the unshifted
// design itself.
func kaiserMeetShift(fc, tw, attenDB, shift float64) []float64 {
	k := kaiserKey{fc, tw, attenDB, shift}
	if h, ok := kaiserCache.Load(k); ok {
		return slices.Clone(h.([]float64))
	}
	var h []float64
	if shift == 0 {
		h = kaiserDesign(fc, tw, attenDB)
	} else {
		m := len(kaiserMeetShift(fc, tw, attenDB, 0)) + 1
		h = kaiserFixed(m, fc, tw, attenDB, shift)
	}
	if kaiserCached.Add(1) <= kaiserCacheMax {
		kaiserCache.Store(k, slices.Clone(h))
	}
	return h
}

// The receive chains of several channels of one capture use the same
// filters, and kaiserMeet evaluates hundreds of responses per design
// (about 1 ms each), so designs are remembered, up to kaiserCacheMax of
// them per process.
var (
	kaiserCache  sync.Map // kaiserKey → []float64
	kaiserCached atomic.Int64
)

const kaiserCacheMax = 256

type kaiserKey struct{ fc, tw, atten, shift float64 }

// kaiserDesign is kaiserMeet without the cache.
func kaiserDesign(fc, tw, attenDB float64) []float64 {
	return meetSearch(attenDB, func(a float64) []float64 {
		return windowedSinc(KaiserOrder(tw, 1, a), fc, KaiserBeta(a), 0)
	}, fc-tw/2, fc+tw/2)
}

// kaiserFixed is kaiserDesign for a fixed order m and a shifted response:
// only the window's β rises until both bands meet attenDB.
func kaiserFixed(m int, fc, tw, attenDB, shift float64) []float64 {
	return meetSearch(attenDB, func(a float64) []float64 {
		return windowedSinc(m, fc, KaiserBeta(a), shift)
	}, fc-tw/2, fc+tw/2)
}

// meetTries bounds the design attenuations meetSearch tries: attenDB plus
// 0, 0.25, … 9.75 dB.
const meetTries = 40

// meetSearch returns design(a) for the least a = attenDB + 0.25·i,
// i < meetTries, whose edges (edgeError between pass and stop, with 5 %
// margin for the peaks between grid points) meet attenDB; the last try
// when none does. Kaiser's order and β formulas leave a design 0–10 dB
// short, so a step of 0.25 dB wastes few taps, and the steps are
// searched by doubling and then halving (about log₂ of the linear
// search's tries: 12 → 8 for the 2805-tap bank prototype, 30 → 11 for a
// short wide-band one), which finds the same step as the linear search
// wherever meeting the target is monotone in a, as it is for these
// designs.
func meetSearch(attenDB float64, design func(a float64) []float64, pass, stop float64) []float64 {
	delta := math.Pow(10, -attenDB/20)
	var best []float64 // the design of hi
	meets := func(i int) bool {
		h := design(attenDB + 0.25*float64(i))
		if edgeError(h, pass, stop) <= 0.95*delta {
			best = h
			return true
		}
		if i == meetTries-1 {
			best = h // none meets: the last try, as the linear search
		}
		return false
	}
	// lo fails (or is −1), hi meets
	lo, hi := -1, -1
	for i := 0; hi < 0; i = 2*i + 1 {
		i = min(i, meetTries-1)
		if meets(i) {
			hi = i
		} else if lo = i; i == meetTries-1 {
			return best
		}
	}
	for hi-lo > 1 {
		if mid := (lo + hi) / 2; meets(mid) {
			hi = mid
		} else {
			lo = mid
		}
	}
	return best
}

// edgeError returns the largest of |1 − |H(f)|| over the last six ripples
// of the pass band and |H(f)| over the first six of the stop band (pass and
// stop in cycles per sample), sampled at 32 points per ripple.
func edgeError(h []float64, pass, stop float64) float64 {
	span := 6 / float64(len(h))
	const pts = 192
	var fp, fstop []float64
	for i := 0; i <= pts; i++ {
		if f := pass - span*float64(i)/pts; f >= 0 {
			fp = append(fp, f)
		}
		if f := stop + span*float64(i)/pts; f <= 0.5 {
			fstop = append(fstop, f)
		}
	}
	sym := symmetricTaps(h)
	mag := func(fs []float64) []float64 {
		a := make([]float64, len(fs))
		if sym {
			zeroPhaseResponses(a, h, fs)
			for i := range a {
				a[i] = math.Abs(a[i])
			}
			return a
		}
		for i, f := range fs {
			a[i] = cmplx.Abs(FreqResponse(h, f, 1))
		}
		return a
	}
	var e float64
	for _, v := range mag(fp) {
		e = math.Max(e, math.Abs(1-v))
	}
	for _, v := range mag(fstop) {
		e = math.Max(e, v)
	}
	return e
}

// symmetricTaps reports whether h[k] and h[L−1−k] agree for every k to
// 10⁻¹³ of the largest tap: a symmetric design but for the rounding of
// its window (see symmetric).
func symmetricTaps(h []float64) bool {
	var big float64
	for _, v := range h {
		big = math.Max(big, math.Abs(v))
	}
	for k, l := 0, len(h)-1; k < l; k, l = k+1, l-1 {
		if !(math.Abs(h[k]-h[l]) <= 1e-13*big) {
			return false
		}
	}
	return true
}

// zeroPhaseResponses writes to a[i] the real amplitude A(fs[i]) of
// symmetric taps h (f in cycles per sample), H(f) = e^{−jπf(L−1)}·A(f):
// the pairs k, L−1−k sum to (h[k] + h[L−1−k])·cos(2πf(c−k)) about the
// centre c = (L−1)/2 (Oppenheim & Schafer, 3rd ed., sec. 5.7.3, type I
// and II linear-phase systems). The cosines come from the Chebyshev
// recurrence cos((n+1)θ) = 2cos θ·cos(nθ) − cos((n−1)θ), restarted
// exactly every 256 terms (its error grows as n·ε/sin θ, 10⁻¹⁰ at worst
// for the lengths and frequencies designed here), four frequencies a pass so that their
// recurrences overlap: a design evaluates hundreds of responses, at a
// tenth of FreqResponse's cost, with errors far below the 10⁻⁴ it tests
// against.
func zeroPhaseResponses(a, h, fs []float64) {
	l := len(h)
	half := l / 2
	var mid float64
	if l%2 == 1 {
		mid = h[half]
	}
	// pair n = 0, 1, …: taps half−1−n and l−half+n, at distance d0 + n
	// from the centre
	d0 := float64(l-1)/2 - float64(half-1)
	for i := 0; i < len(fs); i += 4 {
		var w, two, prev, cur, acc [4]float64
		for j := range 4 {
			if i+j < len(fs) {
				w[j] = 2 * math.Pi * fs[i+j]
			}
			two[j] = 2 * math.Cos(w[j])
			acc[j] = mid
		}
		for n0 := 0; n0 < half; n0 += 256 {
			for j := range 4 {
				prev[j] = math.Cos(w[j] * (d0 + float64(n0) - 1))
				cur[j] = math.Cos(w[j] * (d0 + float64(n0)))
			}
			for n := n0; n < min(n0+256, half); n++ {
				p := h[half-1-n] + h[l-half+n]
				acc[0] += p * cur[0]
				acc[1] += p * cur[1]
				acc[2] += p * cur[2]
				acc[3] += p * cur[3]
				prev[0], cur[0] = cur[0], two[0]*cur[0]-prev[0]
				prev[1], cur[1] = cur[1], two[1]*cur[1]-prev[1]
				prev[2], cur[2] = cur[2], two[2]*cur[2]-prev[2]
				prev[3], cur[3] = cur[3], two[3]*cur[3]-prev[3]
			}
		}
		for j := range 4 {
			if i+j < len(fs) {
				a[i+j] = acc[j]
			}
		}
	}
}

// windowedSinc returns the M+1 taps of a Kaiser-windowed ideal low-pass
// with cutoff fc cycles per sample, normalised to unity DC gain, its
// centre shift samples after M/2 (the window moved with the sinc: the
// window w(t) = I₀(β·√(1 − (2t/M)²))/I₀(β) at t = k − M/2 − shift, zero
// for |t| > M/2).
func windowedSinc(m int, fc, beta, shift float64) []float64 {
	var w []float64
	if shift == 0 {
		w = KaiserWindow(m+1, beta)
	} else {
		w = make([]float64, m+1)
		i0b := hilbert.BesselI0(beta)
		for k := range w {
			r := (float64(k) - float64(m)/2 - shift) / (float64(m) / 2)
			if math.Abs(r) <= 1 {
				w[k] = hilbert.BesselI0(beta*math.Sqrt(1-r*r)) / i0b
			}
		}
	}
	h := make([]float64, m+1)
	var sum float64
	for k := range h {
		t := float64(k) - float64(m)/2 - shift
		h[k] = 2 * fc * sinc(2*fc*t) * w[k]
		sum += h[k]
	}
	for k := range h {
		h[k] /= sum
	}
	return h
}

// KaiserBandpass designs a linear-phase band-pass FIR with −6 dB points at
// low and high Hz and transition bands of transition Hz at both edges, as
// the difference of two Kaiser-window low-passes of the same length
// (Oppenheim & Schafer, 3rd ed., sec. 7.6). The gain is unity in the middle
// of the pass band. It panics if 0 < low < high < rate/2 does not hold.
func KaiserBandpass(low, high, transition, rate, attenDB float64) []float64 {
	if !(low > 0) || !(high > low) || !(high < rate/2) {
		panic("modem: band edges must satisfy 0 < low < high < rate/2")
	}
	m := KaiserOrder(transition, rate, attenDB)
	beta := KaiserBeta(attenDB)
	w := KaiserWindow(m+1, beta)
	h := make([]float64, m+1)
	for k := range h {
		t := float64(k) - float64(m)/2
		fh, fl := high/rate, low/rate
		h[k] = (2*fh*sinc(2*fh*t) - 2*fl*sinc(2*fl*t)) * w[k]
	}
	g := cmplx.Abs(FreqResponse(h, (low+high)/2, rate))
	for k := range h {
		h[k] /= g
	}
	return h
}

// sinc is sin(πx)/(πx).
func sinc(x float64) float64 {
	if x == 0 {
		return 1
	}
	return math.Sin(math.Pi*x) / (math.Pi * x)
}

// FreqResponse returns H(f) = Σ h[n]·e^{−j2πfn/rate} of the FIR taps h.
// The phasor is advanced by rotation and recomputed exactly every 64
// taps, which keeps the error at float64 rounding level.
func FreqResponse(h []float64, f, rate float64) complex128 {
	w := 2 * math.Pi * f / rate
	ri, rr := math.Sincos(-w) // rotation e^{−jw}
	var re, im float64
	for n0 := 0; n0 < len(h); n0 += 64 {
		s, c := math.Sincos(-w * float64(n0))
		for _, v := range h[n0:min(n0+64, len(h))] {
			re += v * c
			im += v * s
			c, s = c*rr-s*ri, c*ri+s*rr
		}
	}
	return complex(re, im)
}
