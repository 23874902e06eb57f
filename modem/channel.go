package modem

import (
	"errors"
	"fmt"
	"math"
)

// ChannelPlan is a decimation chain from a capture's rate down to a work
// rate, planned by PlanChannel. The chain is
//
//  1. a frequency-translating polyphase decimator by First.Decim whose
//     taps are the First.Order-fold convolution of a First.Decim-sample
//     boxcar (the comb response of Hogenauer's cascaded integrator-comb
//     decimator, computed as a plain FIR) with the mixer folded in;
//  2. Kaiser-window low-pass polyphase decimators by Stages[i];
//  3. the channel filter at WorkRate and an interpolator (×Up) or rational
//     resampler to the audio rate.
//
// Every stage keeps what would alias into ±Protect Hz at its output at
// least AttenDB below the signal.
type ChannelPlan struct {
	InRate   float64 // capture rate, Hz
	WorkRate float64 // rate of the channel filter, InRate / Decim
	Decim    int     // total integer decimation
	Protect  float64 // half-width of the band kept alias-free, Hz
	AttenDB  float64 // alias rejection of every stage, dB
	First    FirstStage
	Stages   []int // Kaiser decimation factors after the first stage
	// Cost is the estimated number of real multiplications per input
	// sample of the decimation chain (first stage and Kaiser stages).
	Cost float64
}

// FirstStage is the comb-shaped first stage of a ChannelPlan.
type FirstStage struct {
	Decim int // decimation factor (1: a plain mixer)
	Order int // number of boxcars convolved (taps: Order·(Decim−1)+1)
}

// Taps returns the number of taps of the first stage.
func (f FirstStage) Taps() int { return f.Order*(f.Decim-1) + 1 }

// String describes the chain, for example
// "2.4e+06 Hz ÷16 (comb^2, 31 taps) ÷5 ÷5 → 6000 Hz" (see ExampleChannel).
func (p ChannelPlan) String() string {
	s := fmt.Sprintf("%g Hz ÷%d (comb^%d, %d taps)", p.InRate, p.First.Decim, p.First.Order, p.First.Taps())
	for _, d := range p.Stages {
		s += fmt.Sprintf(" ÷%d", d)
	}
	return s + fmt.Sprintf(" → %g Hz", p.WorkRate)
}

// maxCombOrder bounds the first stage's order; beyond it a Kaiser stage is
// cheaper.
const maxCombOrder = 6

// combDroopDB is the largest pass-band droop allowed of the first stage
// over ±Protect (common practice: far below audible, 0.01 dB).
const combDroopDB = 0.01

// PlanChannel plans the integer decimation from inRate to a work rate of
// at least minWork Hz, keeping ±protect Hz free of aliases to attenDB dB.
// Among the decimations whose work rate divides the audio rate (so that an
// integer interpolator reaches it) it takes the largest; otherwise the
// largest with work rate ≥ minWork. It then chooses the first stage and
// the order of the Kaiser stages that cost the fewest multiplications per
// input sample.
func PlanChannel(inRate, audioRate, minWork, protect, attenDB float64) (ChannelPlan, error) {
	return planChannel(inRate, audioRate, minWork, protect, 0, attenDB)
}

// planChannel is PlanChannel knowing the channel filter's transition
// width trans (Hz, 0 when unknown), which weighs the work rates when a
// rational resampler must follow.
func planChannel(inRate, audioRate, minWork, protect, trans, attenDB float64) (ChannelPlan, error) {
	if !(inRate > 0) || !(audioRate > 0) || !(protect > 0) || !(minWork >= 2*protect) {
		return ChannelPlan{}, errors.New("modem: invalid channel plan request")
	}
	if minWork > inRate {
		minWork = inRate
	}
	dmax := int(math.Floor(inRate/minWork + 1e-9))
	if dmax < 1 {
		dmax = 1
	}
	d := 0
	for c := dmax; c >= 1; c-- {
		up := audioRate * float64(c) / inRate
		if math.Abs(up-math.Round(up)) < 1e-9 && math.Round(up) >= 1 {
			d = c
			break
		}
	}
	tooLow := fmt.Errorf("modem: capture rate %g Hz is too low for a ±%g Hz channel", inRate, protect)
	if d > 0 {
		p, ok := planDecimation(inRate, d, protect, attenDB)
		switch {
		case p.WorkRate < 2*protect:
			return ChannelPlan{}, tooLow
		case !ok:
			return ChannelPlan{}, errors.New("modem: no decimation chain found")
		}
		return p, nil
	}
	// No work rate reaches the audio rate by an integer step: a rational
	// resampler follows whatever the decimation. The largest decimation
	// may hold a large prime (2.5 MS/s: 438 = 6·73, one ÷73 stage of
	// hundreds of taps), so every decimation whose work rate is within
	// twice the least is costed in multiplications per input sample:
	// the chain, the channel filter (KaiserOrder(trans, fw) taps at fw)
	// and the resampler (resamplerTaps an output), two multiplications a
	// tap; the cheapest is taken, preferring those whose resampler has
	// few phases (cheapPhases).
	var p, pc ChannelPlan // the cheapest, the cheapest of few phases
	best, bestc := math.Inf(1), math.Inf(1)
	for c := dmax; c >= 1 && (c == dmax || inRate/float64(c) <= 2*minWork); c-- {
		q, ok := planDecimation(inRate, c, protect, attenDB)
		if !ok {
			continue
		}
		fw := q.WorkRate
		cost := q.Cost + 2*resamplerTaps(fw, protect, attenDB)*audioRate/inRate
		if trans > 0 {
			cost += 2 * float64(KaiserOrder(trans, fw, attenDB)+1) * fw / inRate
		}
		if cost < best {
			best, p = cost, q
		}
		if l, _, err := rateRatio(fw, audioRate); err == nil && l <= cheapPhases && cost < bestc {
			bestc, pc = cost, q
		}
	}
	if math.IsInf(best, 1) {
		if inRate/float64(dmax) < 2*protect {
			return ChannelPlan{}, tooLow
		}
		return ChannelPlan{}, errors.New("modem: no decimation chain found")
	}
	if !math.IsInf(bestc, 1) {
		return pc, nil
	}
	return p, nil
}

// resamplerTaps estimates the taps a polyphase resampler from the work
// rate fw to the audio rate takes an output sample: its prototype's
// transition is fw − 2·protect at fw·L, so about KaiserOrder(fw −
// 2·protect, fw) taps a phase whatever L (complex data: two
// multiplications a tap).
func resamplerTaps(fw, protect, attenDB float64) float64 {
	return float64(KaiserOrder(fw-2*protect, fw, attenDB) + 1)
}

// cheapPhases is the most phases of the rational resampler to the audio
// rate that a chain takes when it has the choice: about 12 taps a phase,
// so 48 KB of float32 taps, which stay in cache beside the chains' other
// state (a 5208-phase resampler, 250 KB, was half the CPU time of 32
// channels at 2.5 MS/s; 48000/6250 = 192/25 costs the same taps an
// output).
const cheapPhases = 1024

// planDecimation plans the decimation by d from inRate: the first stage (a
// comb of the cheapest order, or none) and the order of the Kaiser
// stages that cost the fewest multiplications per input sample. ok is
// false when no chain keeps ±protect free of aliases.
func planDecimation(inRate float64, d int, protect, attenDB float64) (ChannelPlan, bool) {
	p := ChannelPlan{InRate: inRate, Decim: d, WorkRate: inRate / float64(d), Protect: protect, AttenDB: attenDB}
	if p.WorkRate < 2*protect {
		return p, false
	}
	best := math.Inf(1)
	memo := map[[2]int]stageCost{}
	for d1 := 1; d1 <= d; d1++ {
		if d%d1 != 0 {
			continue
		}
		r1 := inRate / float64(d1)
		for m := 1; m <= maxCombOrder; m++ {
			if d1 == 1 && m > 1 {
				break
			}
			if d1 > 1 && !combOK(d1, m, inRate, protect, attenDB) {
				continue
			}
			n1 := m*(d1-1) + 1
			c := 4*float64(n1)/float64(d1) + 4/float64(d1)
			rest := bestStages(d/d1, d1, r1, protect, attenDB, memo)
			c += rest.cost / float64(d1)
			if c < best {
				best = c
				p.First = FirstStage{Decim: d1, Order: m}
				p.Stages = rest.stages
				p.Cost = c
			}
			break // higher orders of the same decimation cost more
		}
	}
	return p, !math.IsInf(best, 1)
}

// combOK reports whether the order-m comb decimating by d from rate keeps
// the alias bands k·rate/d ± protect attenDB down and droops at most
// combDroopDB at ±protect.
func combOK(d, m int, rate, protect, attenDB float64) bool {
	r1 := rate / float64(d)
	if protect >= r1/2 {
		return false
	}
	if -combGainDB(d, m, protect/rate) > combDroopDB {
		return false
	}
	for k := 1; k <= d/2; k++ {
		for _, f := range []float64{float64(k)*r1 - protect, float64(k)*r1 + protect} {
			if combGainDB(d, m, f/rate) > -attenDB {
				return false
			}
		}
	}
	return true
}

// combGainDB is the gain of the normalised order-m comb of length d at f
// cycles per sample: 20·m·log10|sin(πfd) / (d·sin(πf))|
// (Hogenauer, IEEE Trans. ASSP 29(2), 1981, eq. 7 with differential delay 1).
func combGainDB(d, m int, f float64) float64 {
	s := math.Sin(math.Pi * f)
	if s == 0 {
		return 0
	}
	g := math.Abs(math.Sin(math.Pi*f*float64(d)) / (float64(d) * s))
	return 20 * float64(m) * math.Log10(g)
}

type stageCost struct {
	cost   float64
	stages []int
}

// bestStages returns the cheapest ordered factorisation of d into Kaiser
// decimators from rate, cost in real multiplications per input sample of
// the first of them.
func bestStages(d, key int, rate, protect, attenDB float64, memo map[[2]int]stageCost) stageCost {
	if d == 1 {
		return stageCost{}
	}
	k := [2]int{d, key}
	if c, ok := memo[k]; ok {
		return c
	}
	best := stageCost{cost: math.Inf(1)}
	for f := 2; f <= d; f++ {
		if d%f != 0 {
			continue
		}
		out := rate / float64(f)
		if out <= 2*protect {
			continue
		}
		n := float64(KaiserOrder(out-2*protect, rate, attenDB) + 1)
		rest := bestStages(d/f, key*f, out, protect, attenDB, memo)
		c := 2*n/float64(f) + rest.cost/float64(f)
		if c < best.cost {
			best = stageCost{cost: c, stages: append([]int{f}, rest.stages...)}
		}
	}
	memo[k] = best
	return best
}

// combTaps returns the taps of the order-m comb of length d normalised to
// unity DC gain: the m-fold convolution of a d-sample boxcar.
func combTaps(d, m int) []float64 {
	h := []float64{1}
	for range m {
		g := make([]float64, len(h)+d-1)
		for i, v := range h {
			for j := range d {
				g[i+j] += v
			}
		}
		h = g
	}
	s := math.Pow(float64(d), float64(m))
	for i := range h {
		h[i] /= s
	}
	return h
}

// kaiserStageTaps designs the low-pass of a decimator by d from rate that
// passes ±protect and stops from rate/d − protect.
func kaiserStageTaps(d int, rate, protect, attenDB float64) []float64 {
	out := rate / float64(d)
	return KaiserLowpass(out/2, out-2*protect, rate, attenDB)
}
