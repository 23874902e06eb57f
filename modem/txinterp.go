package modem

import "math"

// mixInterpGroup is the number of phases the interpolation kernel computes
// together: four complex64 outputs fill one 256-bit vector.
const mixInterpGroup = 4

// mixInterp is an integer polyphase interpolator by up whose taps carry
// a mixer: the last stage of the transmit chain, which both raises the
// rate to the output rate and moves the signal to the carrier offset.
//
// With the prototype h (length up·k after padding, gain up) and the mixer
// e^{jωm}, ω = 2π·offset/fout, output m = n·up + p is
//
//	y[m] = e^{jωm} Σᵢ h[p + i·up]·x[n − i]
//	     = Σᵢ (h[p + i·up]·e^{jω(p + i·up)}) · (x[n − i]·e^{jω·up·(n − i)})
//
// so the mixer folds exactly into complex taps c[l] = h[l]·e^{jωl} and a
// premix of the input at the low rate with step up·ω (Crochiere & Rabiner,
// Multirate Digital Signal Processing, 1983, sec. 3.3, the polyphase
// interpolator; the modulation identity is the shift theorem). The phases
// are computed in the Oscillator's 64-bit fixed point, so the carrier
// phase at output m is m·step exactly, as with a mixer at the output
// rate, while the work per output stays that of the filter: no mixer runs
// at the output rate (ssbkit's transmit benchmark: 2.4 MS/s).
//
// Taps are laid out for the kernel (mixInterpKernel): for each group of four
// phases g and each tap i (oldest input first), eight float32 real parts
// (each twice, for the I and Q lanes) and, when complex, eight imaginary
// parts. Phases beyond up in the last group are zero.
type mixInterp struct {
	up, k, groups int
	tail          int // positions at the end of a chunk done via scratch
	cplx          bool
	taps          []float32
	buf           []complex64 // k−1 inputs of history, then the chunk
	scratch       []complex64 // the last position's outputs
	osc           *Oscillator // premix at the input rate; nil without offset
	phase0        float64
}

// newMixInterp returns the interpolator for stage plan p (down must be
// 1) with the mixer at offset Hz folded in; outRate is p.outRate.
func newMixInterp(p stagePlan, offset float64) *mixInterp {
	if p.down != 1 {
		panic("modem: interpolator stage with decimation")
	}
	up := p.up
	k := (len(p.taps) + up - 1) / up
	k = (k + 3) &^ 3 // the kernel runs four taps at a time
	s := &mixInterp{up: up, k: k, groups: (up + mixInterpGroup - 1) / mixInterpGroup, cplx: offset != 0}
	var step uint64
	if s.cplx {
		step = phaseStep(offset / p.outRate)
		s.osc = NewOscillator(0, p.inRate)
		s.osc.setStep(step * uint64(up))
	}
	stride := 8
	if s.cplx {
		stride = 16
	}
	s.taps = make([]float32, s.groups*k*stride)
	for g := range s.groups {
		for i := range k {
			t := s.taps[(g*k+i)*stride : (g*k+i+1)*stride]
			for q := range mixInterpGroup {
				ph := g*mixInterpGroup + q
				// window position i holds x[n − (k−1−i)]: prototype index l.
				l := ph + (k-1-i)*up
				if ph >= up || l >= len(p.taps) {
					continue
				}
				c := complex(p.taps[l], 0)
				if s.cplx {
					c *= phasor(uint64(l) * step)
				}
				t[2*q], t[2*q+1] = float32(real(c)), float32(real(c))
				if s.cplx {
					t[8+2*q], t[8+2*q+1] = float32(imag(c)), float32(imag(c))
				}
			}
		}
	}
	s.buf = make([]complex64, k-1, k-1+resampleChunk)
	s.scratch = make([]complex64, mixInterpGroup*s.groups)
	spill := mixInterpGroup*s.groups - up
	s.tail = (spill + up - 1) / up
	return s
}

// maxOut returns the outputs for n inputs.
func (s *mixInterp) maxOut(n int) int { return n * s.up }

func (s *mixInterp) reset() {
	clear(s.buf[:s.k-1])
	if s.osc != nil {
		s.osc.SetPhase(s.phase0)
	}
}

// setPhase sets the mixer phase (radians) of the next output and makes it
// the phase Reset returns to. The history, premixed with the old phase, is
// turned by the difference, so the output is that of a mixer whose phase
// jumps at this output.
func (s *mixInterp) setPhase(phi float64) {
	s.phase0 = phi
	if s.osc == nil {
		return
	}
	d := phi - s.osc.Phase()
	s.osc.SetPhase(phi)
	sn, cs := math.Sincos(d)
	r := complex(float32(cs), float32(sn))
	for i, v := range s.buf[:s.k-1] {
		s.buf[i] = v * r
	}
}

// process appends the up·len(src) outputs for src to dst, whose capacity
// must hold them, and returns it. It panics if dst is too short.
func (s *mixInterp) process(dst, src []complex64) []complex64 {
	if cap(dst)-len(dst) < len(src)*s.up {
		panic("modem: resampler dst too short")
	}
	k := s.k
	for len(src) > 0 {
		c := min(len(src), resampleChunk)
		buf := append(s.buf[:k-1], src[:c]...)
		if s.osc != nil {
			s.osc.Mix(buf[k-1:], buf[k-1:])
		}
		n := len(dst)
		dst = dst[:n+c*s.up]
		// Each position writes a whole number of groups; the spill past
		// up lands on the following positions' outputs, which overwrite
		// it. The last positions, whose spill would pass the end, go
		// through scratch, so nothing is written beyond what is returned.
		direct := max(0, c-s.tail)
		if direct > 0 {
			mixInterpKernel(dst[n:], buf, s.taps, direct, k, s.groups, s.up, s.cplx)
		}
		for j := direct; j < c; j++ {
			mixInterpKernel(s.scratch, buf[j:], s.taps, 1, k, s.groups, s.up, s.cplx)
			copy(dst[n+j*s.up:], s.scratch[:s.up])
		}
		copy(buf[:k-1], buf[c:c+k-1])
		s.buf = buf[:k-1]
		src = src[c:]
	}
	return dst
}

// mixInterpGo is the reference loop of the interpolation kernel: for each of
// n input positions j, the window win[j : j+k] (oldest first) and each
// group g of four phases,
//
//	dst[j·up + 4g + q] = Σᵢ c_{4g+q}[i] · win[j+i],   q = 0…3,
//
// with c the taps laid out as mixInterp describes (real when cplx is
// false). It writes dst[: (n−1)·up + 4·groups].
func mixInterpGo(dst, win []complex64, taps []float32, n, k, groups, up int, cplx bool) {
	stride := 8
	if cplx {
		stride = 16
	}
	for j := range n {
		w := win[j : j+k]
		out := dst[j*up : j*up+mixInterpGroup*groups]
		for g := range groups {
			tg := taps[g*k*stride : (g+1)*k*stride]
			var acc [2 * mixInterpGroup]float32
			for i, x := range w {
				t := tg[i*stride : (i+1)*stride]
				xr, xi := real(x), imag(x)
				for q := range mixInterpGroup {
					cr := t[2*q]
					acc[2*q] += cr * xr
					acc[2*q+1] += cr * xi
					if cplx {
						ci := t[8+2*q]
						acc[2*q] -= ci * xi
						acc[2*q+1] += ci * xr
					}
				}
			}
			o := out[g*mixInterpGroup : (g+1)*mixInterpGroup]
			for q := range o {
				o[q] = complex(acc[2*q], acc[2*q+1])
			}
		}
	}
}

// offsetResampler is the transmit chain's resampler when its last stage is
// an integer interpolation: the earlier stages as in Resampler (integer
// interpolations also by mixInterp, with real taps), then a mixInterp
// carrying the offset mixer.
type offsetResampler struct {
	stages  []stage[complex64] // the last is last
	scratch [][]complex64
	last    *mixInterp
	delay   float64
}

// newOffsetResampler returns the resampler for spec with the mixer at
// offset Hz folded into its last stage, or nil when the chain does not end
// with an integer interpolation (the caller then resamples and mixes).
func newOffsetResampler(spec ResamplerSpec, offset float64) (*offsetResampler, error) {
	plans, _, _, err := plan(&spec)
	if err != nil {
		return nil, err
	}
	if len(plans) == 0 || plans[len(plans)-1].down != 1 || plans[len(plans)-1].up < 2 {
		return nil, nil
	}
	r := &offsetResampler{delay: chainDelay(plans, spec.OutRate)}
	n := resampleChunk
	last := len(plans) - 1
	for _, p := range plans[:last] {
		var st stage[complex64]
		if p.down == 1 && p.up >= 2 {
			st = newMixInterp(p, 0)
		} else {
			cs := new(cstage)
			cs.init(newPolyState(p), n)
			st = cs
		}
		n = st.maxOut(n)
		r.scratch = append(r.scratch, make([]complex64, 0, n))
		r.stages = append(r.stages, st)
	}
	r.last = newMixInterp(plans[last], offset)
	r.stages = append(r.stages, r.last)
	return r, nil
}

// MaxOut returns the most outputs Process gives for n inputs.
func (r *offsetResampler) MaxOut(n int) int { return chainMaxOut(r.stages, n) }

// Delay returns the group delay in output samples, as Resampler.Delay.
func (r *offsetResampler) Delay() float64 { return r.delay }

// Reset clears the history of every stage and returns the mixer to the
// phase last set (0 unless setPhase).
func (r *offsetResampler) Reset() { chainReset(r.stages) }

// Process resamples and mixes src into dst[:0] and returns it; a nil or
// short dst is allocated.
func (r *offsetResampler) Process(dst, src []complex64) []complex64 {
	return chainProcess(r.stages, r.scratch, dst, src)
}
