package modem

import "math"

// SSBDemod turns a complex channel centred on the middle of an SSB pass
// band into audio: a[n] = Re(z[n]·e^{j2π·shift·n/rate}), shift being the
// pass band's centre relative to the carrier (positive for USB, negative
// for LSB). After a channel filter that keeps only the wanted sideband
// this is coherent product detection (Haykin, Communication Systems, 4th
// ed., sec. 2.6): a USB component a·e^{j2π(f−shift)t} becomes a·cos(2πft);
// for LSB (shift < 0) a component a·e^{−j2π(f+shift)t} becomes a·cos(2πft).
type SSBDemod struct {
	osc *Oscillator
}

// NewSSBDemod returns the demodulator for a channel whose centre lies
// shift Hz from the carrier at the given rate.
func NewSSBDemod(shift, rate float64) *SSBDemod {
	return &SSBDemod{osc: NewOscillator(shift, rate)}
}

// Advance moves the oscillator by n samples (negative: back), to align its
// phase with the time of the first output.
func (d *SSBDemod) Advance(n int) { d.osc.Advance(n) }

// Reset returns the oscillator to phase 0.
func (d *SSBDemod) Reset() { d.osc.Reset() }

// Process demodulates src into dst[:len(src)] (reallocated when short) and
// returns it. It computes only the real part of Oscillator.Mix's product,
// with the same float32 arithmetic (the same audio, half the work and no
// intermediate buffer).
func (d *SSBDemod) Process(dst []float32, src []complex64) []float32 {
	if cap(dst) < len(src) {
		dst = make([]float32, len(src))
	}
	dst = dst[:len(src)]
	out := dst
	for len(src) > 0 {
		b, tab := d.osc.next(len(src))
		n := len(tab)
		k0 := 0
		if haveKernels && n >= 8 {
			k0 = n &^ 7
			mixRealAVX2(&dst[0], &src[0], &tab[0], k0, b)
		}
		mixRealGo(dst[k0:n], src[k0:n], tab[k0:], b)
		src, dst = src[n:], dst[n:]
	}
	return out
}

// mixRealGo is the loop of SSBDemod.Process: o[k] = Re(s[k]·float32(b·tab[k]))
// (mixRealAVX2 on amd64, bit for bit).
func mixRealGo(o []float32, s []complex64, tab []complex128, b complex128) {
	for k := range o {
		or, oi := phasor32(b, tab[k])
		x := s[k]
		o[k] = real(x)*or - imag(x)*oi
	}
}

// dcBlockHz is the corner of the DC blocker after AM detection (common
// practice: well below the 300 Hz speech band).
const dcBlockHz = 5

// dcBlocker is the one-pole high-pass y[n] = x[n] − x[n−1] + a·y[n−1],
// a = e^{−2π·fc/rate} (common practice), run in float64.
type dcBlocker struct {
	a, x1, y1 float64
}

func newDCBlocker(rate float64) dcBlocker {
	return dcBlocker{a: math.Exp(-2 * math.Pi * dcBlockHz / rate)}
}

func (b *dcBlocker) step(x float64) float64 {
	y := x - b.x1 + b.a*b.y1
	b.x1, b.y1 = x, y
	return y
}

// AMDemod is the envelope detector with the mean removed:
// a[n] = HP{|z[n]|}, HP the DC blocker (corner 5 Hz). For a channel
// centred on the carrier, z = A(1 + m·cos 2πft)·e^{jφ} gives A·m·cos 2πft.
type AMDemod struct {
	dc dcBlocker
}

// NewAMDemod returns an envelope detector at rate Hz.
func NewAMDemod(rate float64) *AMDemod { return &AMDemod{dc: newDCBlocker(rate)} }

// Reset clears the DC blocker.
func (d *AMDemod) Reset() { d.dc.x1, d.dc.y1 = 0, 0 }

// Process demodulates src into dst[:len(src)] (reallocated when short) and
// returns it.
func (d *AMDemod) Process(dst []float32, src []complex64) []float32 {
	if cap(dst) < len(src) {
		dst = make([]float32, len(src))
	}
	dst = dst[:len(src)]
	for i, v := range src {
		r, q := float64(real(v)), float64(imag(v))
		dst[i] = float32(d.dc.step(math.Sqrt(r*r + q*q)))
	}
	return dst
}

// SAM loop parameters (common practice for a carrier-recovery loop of a
// synchronous AM detector): natural frequency 20 Hz, damping 1/√2.
const (
	samLoopHz   = 20.0
	samDamping  = math.Sqrt2 / 2
	samLockTau  = 0.05 // s, smoothing of the lock indicator
	samLockHigh = 0.9  // lock indicator above which the loop counts as locked
	samMaxPull  = 300  // Hz, clamp of the loop's frequency
)

// SAMDemod is a synchronous AM detector: a second-order phase-locked loop
// tracks the carrier of a channel centred on it (phase detector
// e = arg(z·e^{−jθ}), proportional-plus-integral loop filter with
// Kp = 2ζωₙT, Ki = (ωₙT)², Gardner, Phaselock Techniques, 3rd ed.,
// sec. 4.3 for the loop equations), and the output is the in-phase part
// Re(z·e^{−jθ}) with its mean removed, A·m·cos 2πft for an AM signal.
//
// Locked reports whether the loop holds a carrier: a low-pass of
// cos e (time constant 50 ms) above 0.9.
type SAMDemod struct {
	rate       float64
	kp, ki     float64
	theta, w   float64
	lock, la   float64
	dc         dcBlocker
	n, lockedN int64 // samples seen; first sample at which lock held (−1: never)
}

// NewSAMDemod returns a synchronous AM detector at rate Hz.
func NewSAMDemod(rate float64) *SAMDemod {
	wt := 2 * math.Pi * samLoopHz / rate
	d := &SAMDemod{rate: rate, kp: 2 * samDamping * wt, ki: wt * wt,
		la: 1 - math.Exp(-1/(samLockTau*rate)), dc: newDCBlocker(rate)}
	d.Reset()
	return d
}

// Reset returns the loop to phase and frequency 0 and unlocked.
func (d *SAMDemod) Reset() {
	d.theta, d.w, d.lock, d.n, d.lockedN = 0, 0, 0, 0, -1
	d.dc.x1, d.dc.y1 = 0, 0
}

// Locked reports whether the loop holds a carrier now.
func (d *SAMDemod) Locked() bool { return d.lock > samLockHigh }

// LockTime returns the time in seconds from the first sample to the first
// lock, or −1 if the loop never locked.
func (d *SAMDemod) LockTime() float64 {
	if d.lockedN < 0 {
		return -1
	}
	return float64(d.lockedN) / d.rate
}

// Frequency returns the loop's estimate of the carrier offset in Hz.
func (d *SAMDemod) Frequency() float64 { return d.w * d.rate / (2 * math.Pi) }

// Process demodulates src into dst[:len(src)] (reallocated when short) and
// returns it.
func (d *SAMDemod) Process(dst []float32, src []complex64) []float32 {
	if cap(dst) < len(src) {
		dst = make([]float32, len(src))
	}
	dst = dst[:len(src)]
	wmax := 2 * math.Pi * samMaxPull / d.rate
	for i, v := range src {
		s, c := math.Sincos(d.theta)
		r, q := float64(real(v)), float64(imag(v))
		ir := r*c + q*s // z·e^{−jθ}
		iq := q*c - r*s
		e := math.Atan2(iq, ir)
		d.w += d.ki * e
		d.w = math.Max(-wmax, math.Min(wmax, d.w))
		d.theta += d.w + d.kp*e
		if d.theta > math.Pi {
			d.theta -= 2 * math.Pi
		} else if d.theta < -math.Pi {
			d.theta += 2 * math.Pi
		}
		ce := 0.0
		if m := math.Hypot(ir, iq); m > 0 {
			ce = ir / m
		}
		d.lock += d.la * (ce - d.lock)
		if d.lockedN < 0 && d.lock > samLockHigh {
			d.lockedN = d.n
		}
		d.n++
		dst[i] = float32(d.dc.step(ir))
	}
	return dst
}
