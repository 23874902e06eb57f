package modem

import (
	"errors"
	"fmt"
	"math"
	"sync"
	"sync/atomic"
)

// Resampler design limits.
const (
	// resampleChunk is the number of input samples pushed through all
	// stages at a time; it bounds the scratch buffers between stages.
	resampleChunk = 1024
	// maxStageTaps bounds the prototype filter of one stage.
	maxStageTaps = 1 << 18
	// maxRatioTerm bounds L and M of the reduced ratio L/M.
	maxRatioTerm = 1 << 20
	// stageOverhead is the cost, in multiply-adds per output sample, the
	// stage planner charges for each stage beyond its taps.
	stageOverhead = 4
)

// ResamplerSpec describes a rational resampler; zero fields take defaults.
type ResamplerSpec struct {
	InRate, OutRate float64 // Hz
	// Pass is the highest frequency (Hz, two-sided for complex signals:
	// |f| ≤ Pass) kept within the ripple; 0 means 0.4·min(InRate, OutRate).
	// Images and aliases that would fall on |f| ≤ Pass are attenuated by
	// AttenDB; between Pass and min(InRate, OutRate) − Pass they are not.
	Pass float64
	// AttenDB is the stop-band attenuation of every stage; its pass-band
	// ripple is ±10^(−AttenDB/20) (Kaiser window method). 0 means 100 dB.
	AttenDB float64
}

// stagePlan is one polyphase stage: rate change up/down, prototype taps at
// the rate inRate·up, with gain up.
type stagePlan struct {
	up, down        int
	inRate, outRate float64
	taps            []float64
	ph              []float32 // polyphase table of taps (polyphase), k taps a phase
	phd             []float32 // ph with every tap twice (dupTaps), for the rational kernel
	k               int
}

// rateRatio returns out/in as a reduced fraction L/M.
func rateRatio(in, out float64) (l, m int, err error) {
	if in == math.Trunc(in) && out == math.Trunc(out) && in < 1<<53 && out < 1<<53 {
		a, b := int64(out), int64(in)
		g := gcd(a, b)
		a, b = a/g, b/g
		if a > maxRatioTerm || b > maxRatioTerm {
			return 0, 0, fmt.Errorf("modem: rate ratio %d/%d is too complex to resample", a, b)
		}
		return int(a), int(b), nil
	}
	// Continued fraction of out/in.
	x := out / in
	h0, h1 := int64(0), int64(1)
	k0, k1 := int64(1), int64(0)
	r := x
	for range 64 {
		a := int64(math.Floor(r))
		h0, h1 = h1, a*h1+h0
		k0, k1 = k1, a*k1+k0
		if h1 > maxRatioTerm || k1 > maxRatioTerm {
			break
		}
		if math.Abs(float64(h1)/float64(k1)-x) <= 1e-12*x {
			return int(h1), int(k1), nil
		}
		f := r - float64(a)
		if f == 0 {
			break
		}
		r = 1 / f
	}
	return 0, 0, fmt.Errorf("modem: rate ratio %g/%g is not a simple fraction", out, in)
}

func gcd(a, b int64) int64 {
	for b != 0 {
		a, b = b, a%b
	}
	return a
}

// divisors returns the divisors of n in increasing order.
func divisors(n int) []int {
	var d []int
	for i := 1; i*i <= n; i++ {
		if n%i == 0 {
			d = append(d, i)
			if i != n/i {
				d = append(d, n/i)
			}
		}
	}
	// insertion sort: the lists are short
	for i := 1; i < len(d); i++ {
		for j := i; j > 0 && d[j] < d[j-1]; j-- {
			d[j], d[j-1] = d[j-1], d[j]
		}
	}
	return d
}

// factorings returns the ordered ways to write n as a product of at most
// two integers ≥ 2 (n itself, a·b); n = 1 gives one empty list.
func factorings(n int) [][]int {
	if n == 1 {
		return [][]int{nil}
	}
	out := [][]int{{n}}
	for _, a := range divisors(n) {
		if a >= 2 && a < n {
			out = append(out, []int{a, n / a})
		}
	}
	return out
}

// planStages chooses the cheapest chain of at most three polyphase stages
// for the ratio L/M: upsampling does its rational part first (at the low
// rate, where a narrow transition is cheap) and then integer stages with
// wide transitions; downsampling mirrors that. The cost of a stage is its
// multiply-adds per second, outRate·(taps per phase + stageOverhead).
func planStages(spec ResamplerSpec, l, m int) ([]stagePlan, error) {
	if l == 1 && m == 1 {
		return nil, nil
	}
	type ratio struct{ up, down int }
	var cands [][]ratio
	if l >= m {
		for _, d := range divisors(l) {
			if d == 1 && m == 1 {
				continue
			}
			for _, f := range factorings(l / d) {
				c := []ratio{{d, m}}
				for _, x := range f {
					c = append(c, ratio{x, 1})
				}
				cands = append(cands, c)
			}
		}
	} else {
		for _, e := range divisors(m) {
			if e == 1 && l == 1 {
				continue
			}
			for _, f := range factorings(m / e) {
				var c []ratio
				for _, x := range f {
					c = append(c, ratio{1, x})
				}
				cands = append(cands, append(c, ratio{l, e}))
			}
		}
	}
	best, bestCost := []stagePlan(nil), math.Inf(1)
	for _, c := range cands {
		rate := spec.InRate
		cost := 0.0
		plan := make([]stagePlan, 0, len(c))
		ok := true
		for _, r := range c {
			out := rate * float64(r.up) / float64(r.down)
			lo := math.Min(rate, out)
			tw := lo - 2*spec.Pass
			if !(tw > 0) {
				ok = false
				break
			}
			n := KaiserOrder(tw, rate*float64(r.up), spec.AttenDB) + 1
			if n > maxStageTaps {
				ok = false
				break
			}
			k := (n + r.up - 1) / r.up
			cost += out * float64(k+stageOverhead)
			plan = append(plan, stagePlan{up: r.up, down: r.down, inRate: rate, outRate: out})
			rate = out
		}
		if ok && cost < bestCost {
			best, bestCost = plan, cost
		}
	}
	if best == nil {
		return nil, fmt.Errorf("modem: cannot resample %g Hz to %g Hz keeping %g Hz within %g dB", spec.InRate, spec.OutRate, spec.Pass, spec.AttenDB)
	}
	for i := range best {
		s := &best[i]
		lo := math.Min(s.inRate, s.outRate)
		fast := s.inRate * float64(s.up)
		tw := lo - 2*spec.Pass
		h := kaiserMeet(lo/2/fast, tw/fast, spec.AttenDB)
		for k := range h {
			h[k] *= float64(s.up)
		}
		s.taps = h
	}
	return best, nil
}

func (spec *ResamplerSpec) check() error {
	if !(spec.InRate > 0) || !(spec.OutRate > 0) || math.IsInf(spec.InRate, 0) || math.IsInf(spec.OutRate, 0) {
		return errors.New("modem: resampler rates must be positive")
	}
	if spec.Pass == 0 {
		spec.Pass = 0.4 * math.Min(spec.InRate, spec.OutRate)
	}
	if spec.AttenDB == 0 {
		spec.AttenDB = 100
	}
	if !(spec.Pass > 0) || !(spec.Pass < 0.5*math.Min(spec.InRate, spec.OutRate)) {
		return fmt.Errorf("modem: resampler pass band %g Hz must lie below half of %g Hz", spec.Pass, math.Min(spec.InRate, spec.OutRate))
	}
	if !(spec.AttenDB >= 20) || spec.AttenDB > 200 {
		return fmt.Errorf("modem: resampler attenuation %g dB outside 20…200 dB", spec.AttenDB)
	}
	return nil
}

// polyphase splits the prototype h into up phases of k taps each, every
// phase reversed so that the convolution is a forward dot product with the
// k most recent inputs (oldest first): ph[p·k+i] = h[p + (k−1−i)·up].
// k is rounded up to a multiple of 4 (zero taps at the oldest end) so
// that the inner loop runs four taps at a time without a tail.
func polyphase(h []float64, up int) (ph []float32, k int) {
	k = (len(h) + up - 1) / up
	k = (k + 3) &^ 3
	ph = make([]float32, up*k)
	for p := range up {
		for i := range k {
			if n := p + (k-1-i)*up; n < len(h) {
				ph[p*k+i] = float32(h[n])
			}
		}
	}
	return ph, k
}

// dupTaps returns ph with every tap twice, h₀ h₀ h₁ h₁ …: the layout in
// which one vector multiply applies four taps to four complex samples.
func dupTaps(ph []float32) []float32 {
	d := make([]float32, 2*len(ph))
	for i, v := range ph {
		d[2*i], d[2*i+1] = v, v
	}
	return d
}

// polyState is the position of a polyphase stage: the next output uses
// input index j (relative to the next chunk; the k−1 inputs before it are
// in the history) and phase p.
type polyState struct {
	up, down, k int
	ph          []float32
	phd         []float32 // ph duplicated (dupTaps), or nil
	p, j        int
}

func newPolyState(s stagePlan) polyState {
	return polyState{up: s.up, down: s.down, k: s.k, ph: s.ph, phd: s.phd}
}

// maxOut bounds the outputs for n inputs: ⌈n·up/down⌉ + 1.
func (s *polyState) maxOut(n int) int { return (n*s.up+s.down-1)/s.down + 1 }

// polyBuf is a polyphase stage's position and its input buffer: k−1
// inputs of history, then the chunk being processed.
type polyBuf[T float32 | complex64] struct {
	polyState
	buf []T
}

// init sets the stage to ps with history for chunks of n inputs.
func (s *polyBuf[T]) init(ps polyState, n int) {
	s.polyState = ps
	s.buf = make([]T, ps.k-1, ps.k-1+n)
}

func (s *polyBuf[T]) reset() {
	s.p, s.j = 0, 0
	clear(s.buf[:s.k-1])
}

// cstage is a complex polyphase stage.
type cstage struct{ polyBuf[complex64] }

// process appends the outputs for src to dst (whose capacity must hold
// them) and returns it.
func (s *cstage) process(dst, src []complex64) []complex64 {
	k := s.k
	buf := append(s.buf[:k-1], src...)
	s.buf = buf[:k-1]
	n := len(dst)
	d := dst[:cap(dst)]
	c := len(src)
	j, p := s.j, s.p
	up, down := s.up, s.down
	if need := ((c-j)*up - p + down - 1) / down; j < c && n+need > len(d) {
		panic("modem: resampler dst too short")
	}
	if s.phd != nil && j < c {
		// a rational stage: one output a position, in the vector kernel
		st := [2]int{j, p}
		n += resampRationalAVX2(&d[n], &buf[0], c, &s.phd[0], k, up, down, &st)
		j, p = st[0], st[1]
	}
	for j < c {
		w := buf[j : j+k]
		// Interpolation: two phases per pass share the loads of the
		// window.
		for down == 1 && p+1 < up {
			h := s.ph[p*k : p*k+2*k]
			g := h[k:]
			h = h[:k]
			w := w[:len(h)]
			g = g[:len(h)]
			var r0, i0, r1, i1, q0, u0, q1, u1 float32
			for t := 0; t+1 < len(h); t += 2 {
				a, b := w[t], w[t+1]
				ar, ai, br, bi := real(a), imag(a), real(b), imag(b)
				h0, h1, g0, g1 := h[t], h[t+1], g[t], g[t+1]
				r0 += h0 * ar
				i0 += h0 * ai
				r1 += h1 * br
				i1 += h1 * bi
				q0 += g0 * ar
				u0 += g0 * ai
				q1 += g1 * br
				u1 += g1 * bi
			}
			d[n] = complex(r0+r1, i0+i1)
			d[n+1] = complex(q0+q1, u0+u1)
			n += 2
			p += 2
		}
		for p < up {
			h := s.ph[p*k : p*k+k]
			w := w[:len(h)]
			var r0, i0, r1, i1, r2, i2, r3, i3 float32
			for t := 0; t+3 < len(h); t += 4 {
				ww := w[t : t+4 : t+4]
				hh := h[t : t+4 : t+4]
				r0 += hh[0] * real(ww[0])
				i0 += hh[0] * imag(ww[0])
				r1 += hh[1] * real(ww[1])
				i1 += hh[1] * imag(ww[1])
				r2 += hh[2] * real(ww[2])
				i2 += hh[2] * imag(ww[2])
				r3 += hh[3] * real(ww[3])
				i3 += hh[3] * imag(ww[3])
			}
			d[n] = complex((r0+r1)+(r2+r3), (i0+i1)+(i2+i3))
			n++
			p += down
			if down != 1 {
				break
			}
		}
		for p >= up {
			p -= up
			j++
		}
	}
	s.j, s.p = j-c, p
	copy(buf[:k-1], buf[c:c+k-1])
	return d[:n]
}

// rstage is a real polyphase stage.
type rstage struct{ polyBuf[float32] }

func (s *rstage) process(dst, src []float32) []float32 {
	k := s.k
	buf := append(s.buf[:k-1], src...)
	s.buf = buf[:k-1]
	n := len(dst)
	d := dst[:cap(dst)]
	c := len(src)
	j, p := s.j, s.p
	up, down := s.up, s.down
	if need := ((c-j)*up - p + down - 1) / down; j < c && n+need > len(d) {
		panic("modem: resampler dst too short")
	}
	if up == 1 && useMixInterpAVX2 && j < c {
		// Decimation: every output is one dot product of the k inputs
		// from j on; the vector kernel does them all.
		m := (c - j + down - 1) / down
		decimRealVec(d[n:n+m], buf[j:], s.ph[:k], down)
		n += m
		j += m * down
	}
	for j < c {
		w := buf[j : j+k]
		for p < up {
			h := s.ph[p*k : p*k+k]
			w := w[:len(h)]
			var s0, s1, s2, s3 float32
			for t := 0; t+3 < len(h); t += 4 {
				ww := w[t : t+4 : t+4]
				hh := h[t : t+4 : t+4]
				s0 += hh[0] * ww[0]
				s1 += hh[1] * ww[1]
				s2 += hh[2] * ww[2]
				s3 += hh[3] * ww[3]
			}
			d[n] = (s0 + s1) + (s2 + s3)
			n++
			p += down
			if down != 1 {
				break
			}
		}
		for p >= up {
			p -= up
			j++
		}
	}
	s.j, s.p = j-c, p
	copy(buf[:k-1], buf[c:c+k-1])
	return d[:n]
}

// Resampler converts complex samples from one rate to another by a chain
// of rational polyphase stages (Crochiere & Rabiner, Multirate Digital
// Signal Processing, 1983, ch. 3 and 5), each an interpolate-by-L,
// filter, decimate-by-M with a Kaiser-window low-pass prototype. The
// polyphase loop is hand-written: gonum has no resampler.
type Resampler struct {
	l, m    int
	stages  []*cstage
	scratch [][]complex64
	delay   float64
}

// NewResampler returns a resampler from inRate to outRate Hz keeping
// 0.4·min(inRate, outRate) with attenDB of image and alias rejection
// (0 means 100 dB). See NewResamplerSpec.
func NewResampler(inRate, outRate, attenDB float64) (*Resampler, error) {
	return NewResamplerSpec(ResamplerSpec{InRate: inRate, OutRate: outRate, AttenDB: attenDB})
}

// NewResamplerSpec returns a resampler for spec. The ratio must reduce to
// L/M with L, M ≤ 2²⁰ (any ratio of integer rates in practice).
func NewResamplerSpec(spec ResamplerSpec) (*Resampler, error) {
	plans, l, m, err := plan(&spec)
	if err != nil {
		return nil, err
	}
	r := &Resampler{l: l, m: m, delay: chainDelay(plans, spec.OutRate)}
	r.stages, r.scratch = newChain[complex64, cstage](plans)
	return r, nil
}

// plan fills spec's defaults and returns its stages (taps and polyphase
// tables), reduced ratio L/M, remembered per process: the plans are read
// only once made, and a receiver of many channels builds one resampler
// of the same spec per channel (256 channels at 2.5 MS/s held 63 MB of
// identical polyphase tables, and planned each for about 1 ms).
func plan(spec *ResamplerSpec) ([]stagePlan, int, int, error) {
	key := *spec
	if v, ok := planCache.Load(key); ok {
		p := v.(*plannedSpec)
		*spec = p.spec
		return p.plans, p.l, p.m, nil
	}
	if err := spec.check(); err != nil {
		return nil, 0, 0, err
	}
	l, m, err := rateRatio(spec.InRate, spec.OutRate)
	if err != nil {
		return nil, 0, 0, err
	}
	plans, err := planStages(*spec, l, m)
	if err != nil {
		return nil, 0, 0, err
	}
	for i := range plans {
		plans[i].ph, plans[i].k = polyphase(plans[i].taps, plans[i].up)
		if haveKernels && plans[i].down > 1 {
			plans[i].phd = dupTaps(plans[i].ph)
		}
	}
	if planCached.Add(1) <= planCacheMax {
		planCache.Store(key, &plannedSpec{spec: *spec, plans: plans, l: l, m: m})
	}
	return plans, l, m, nil
}

// plannedSpec is a remembered plan: spec with its defaults filled, the
// stages and the ratio.
type plannedSpec struct {
	spec  ResamplerSpec
	plans []stagePlan
	l, m  int
}

var (
	planCache  sync.Map // ResamplerSpec as given → *plannedSpec
	planCached atomic.Int64
)

// planCacheMax bounds the remembered plans (a long-running program that
// resamples between many rates keeps planning the rest afresh).
const planCacheMax = 256

// chainDelay sums the stage delays in final output samples.
func chainDelay(plans []stagePlan, outRate float64) float64 {
	var d float64
	for _, p := range plans {
		d += float64(len(p.taps)-1) / 2 / float64(p.down) * outRate / p.outRate
	}
	return d
}

// Ratio returns the reduced rate ratio L/M = OutRate/InRate.
func (r *Resampler) Ratio() (l, m int) { return r.l, r.m }

// Stages returns the up/down factors of each stage, in order.
func (r *Resampler) Stages() [][2]int {
	var s [][2]int
	for _, st := range r.stages {
		s = append(s, [2]int{st.up, st.down})
	}
	return s
}

// Delay returns the group delay in output samples: an input sample at
// index n appears at output index n·L/M + Delay().
func (r *Resampler) Delay() float64 { return r.delay }

// MaxOut returns the largest number of outputs Process can produce for n
// inputs.
func (r *Resampler) MaxOut(n int) int { return chainMaxOut(r.stages, n) }

// Reset clears the history and the phase.
func (r *Resampler) Reset() { chainReset(r.stages) }

// Process resamples src into dst and returns dst[:n], n ≤ MaxOut(len(src)).
// A nil dst, or one whose capacity is below MaxOut(len(src)), is
// allocated. dst must not overlap src.
func (r *Resampler) Process(dst, src []complex64) []complex64 {
	return chainProcess(r.stages, r.scratch, dst, src)
}

// stage is one stage of a resampler chain on complex or real samples T:
// a polyphase stage (*cstage, *rstage) or the transmit chain's mixing
// interpolator (*mixInterp).
type stage[T float32 | complex64] interface {
	// process appends the outputs for src to dst, whose capacity must
	// hold maxOut(len(src)) more, and returns it.
	process(dst, src []T) []T
	maxOut(n int) int
	reset()
}

// newChain builds the polyphase stages of plans (S is cstage or rstage)
// for chunks of resampleChunk inputs, with a scratch slice after every
// stage but the last for its outputs.
func newChain[T float32 | complex64, S any, P interface {
	*S
	stage[T]
	init(ps polyState, n int)
}](plans []stagePlan) ([]P, [][]T) {
	stages := make([]P, len(plans))
	var scratch [][]T
	n := resampleChunk
	for i, p := range plans {
		st := P(new(S))
		st.init(newPolyState(p), n)
		n = st.maxOut(n)
		if i < len(plans)-1 {
			scratch = append(scratch, make([]T, 0, n))
		}
		stages[i] = st
	}
	return stages, scratch
}

// chainMaxOut bounds the outputs of the stages for n inputs.
func chainMaxOut[T float32 | complex64, P stage[T]](stages []P, n int) int {
	for _, st := range stages {
		n = st.maxOut(n)
	}
	return n
}

// chainReset resets every stage.
func chainReset[T float32 | complex64, P stage[T]](stages []P) {
	for _, st := range stages {
		st.reset()
	}
}

// chainProcess is Process of Resampler, RealResampler and the transmit
// chain's offsetResampler: src runs through the stages resampleChunk
// inputs at a time, each stage but the last writing into its scratch
// slice; no stages is a copy.
func chainProcess[T float32 | complex64, P stage[T]](stages []P, scratch [][]T, dst, src []T) []T {
	if len(stages) == 0 {
		if cap(dst) < len(src) {
			dst = make([]T, len(src))
		}
		dst = dst[:len(src)]
		copy(dst, src)
		return dst
	}
	if m := chainMaxOut(stages, len(src)); cap(dst) < m {
		dst = make([]T, 0, m)
	}
	dst = dst[:0]
	last := len(stages) - 1
	for off := 0; off < len(src); off += resampleChunk {
		x := src[off : off+min(resampleChunk, len(src)-off)]
		for i, st := range stages[:last] {
			x = st.process(scratch[i][:0], x)
		}
		dst = stages[last].process(dst, x)
	}
	return dst
}

// RealResampler is the Resampler for real samples.
type RealResampler struct {
	l, m    int
	stages  []*rstage
	scratch [][]float32
	delay   float64
}

// NewRealResampler returns a real resampler from inRate to outRate Hz; see
// NewResampler.
func NewRealResampler(inRate, outRate, attenDB float64) (*RealResampler, error) {
	return NewRealResamplerSpec(ResamplerSpec{InRate: inRate, OutRate: outRate, AttenDB: attenDB})
}

// NewRealResamplerSpec returns a real resampler for spec.
func NewRealResamplerSpec(spec ResamplerSpec) (*RealResampler, error) {
	plans, l, m, err := plan(&spec)
	if err != nil {
		return nil, err
	}
	r := &RealResampler{l: l, m: m, delay: chainDelay(plans, spec.OutRate)}
	r.stages, r.scratch = newChain[float32, rstage](plans)
	return r, nil
}

// Ratio returns the reduced rate ratio L/M = OutRate/InRate.
func (r *RealResampler) Ratio() (l, m int) { return r.l, r.m }

// Delay returns the group delay in output samples.
func (r *RealResampler) Delay() float64 { return r.delay }

// MaxOut returns the largest number of outputs Process can produce for n
// inputs.
func (r *RealResampler) MaxOut(n int) int { return chainMaxOut(r.stages, n) }

// Reset clears the history and the phase.
func (r *RealResampler) Reset() { chainReset(r.stages) }

// Process resamples src into dst and returns dst[:n]; see
// Resampler.Process.
func (r *RealResampler) Process(dst, src []float32) []float32 {
	return chainProcess(r.stages, r.scratch, dst, src)
}
