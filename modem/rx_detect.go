package modem

// ssbDetector is the integer interpolator to the audio rate with the SSB
// product detector folded into its taps: the audio
//
//	a[m] = Re(e^{jω(m−D)}·Σᵢ u·h[p + i·u]·z[n − i]),  m = n·u + p,
//
// (SSBDemod after Interpolator; ω = 2π·shift/fa, D the chain's delay, to
// which the detector's phase is aligned) is, since e^{jω(m−D)} =
// e^{jω(p + i·u)}·e^{jω(u·(n−i) − D)},
//
//	a[m] = Σᵢ Re(c[p + i·u]·z′[n − i]),  c[l] = u·h[l]·e^{jωl},
//	z′[n] = z[n]·e^{jω(u·n − D)},
//
// a premix at the work rate (u times slower than the detector's mixer)
// and real output of complex taps, Re(c·z′) = Re c·Re z′ − Im c·Im z′:
// the interpolator's kernel with the taps Re c for the real parts of its
// input and −Im c for the imaginary parts, whose two lanes summed are the
// audio (the modulation identity as in mixInterp). The phases are the
// Oscillator's 64-bit fixed point, so the detector's phase at every
// output is that of SSBDemod's; the audio is SSBDemod's to float32
// rounding, for a quarter of the work at the audio rate (no mixer runs
// there).
type ssbDetector struct {
	it   *Interpolator
	osc  *Oscillator // the premix, at the work rate
	run0 uint64      // its accumulator at input 0
	zm   []complex64 // premixed input
}

// newSSBDetector returns the detector for the low-pass h (at the audio
// rate fa, unity DC gain) interpolating by u, shift Hz the pass band's
// centre from the carrier (as NewSSBDemod), with audio sample m holding
// the detector phase of m − delay.
func newSSBDetector(h []float64, u int, shift, fa float64, delay int) *ssbDetector {
	step := phaseStep(shift / fa)
	hr := make([]float64, len(h))
	hq := make([]float64, len(h))
	for l, v := range h {
		p := phasor(uint64(l) * step)
		hr[l], hq[l] = v*real(p), -v*imag(p)
	}
	d := &ssbDetector{it: newInterpolatorIQ(hr, hq, u), osc: NewOscillator(0, fa/float64(u))}
	d.osc.setStep(step * uint64(u))
	d.run0 = -uint64(delay) * step
	d.Reset()
	return d
}

// Delay returns the interpolator's group delay in audio samples.
func (d *ssbDetector) Delay() float64 { return d.it.Delay() }

// Reset clears the history and returns the phase to that of input 0.
func (d *ssbDetector) Reset() {
	d.it.Reset()
	d.osc.run, d.osc.k, d.osc.base = d.run0, 0, phasor(d.run0)
}

// Process detects the work-rate samples src into u·len(src) audio
// samples, dst[:u·len(src)] (reallocated when short), and returns it.
func (d *ssbDetector) Process(dst []float32, src []complex64) []float32 {
	d.zm = d.osc.Mix(d.zm, src)
	return d.it.processReal(dst, d.zm)
}
