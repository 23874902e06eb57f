package iq

import (
	"math"
	"math/cmplx"
)

// Imbalance describes the I/Q imbalance of a receiver or transmitter with
// the widely linear model
//
//	y = μ·x + ν·x*
//
// of an ideal signal x. With the I path as reference, a Q path of gain g
// relative to I and a phase error φ (Q lags I by 90° + φ), that is
// y = x_I + j·g·(x_Q·cos φ − x_I·sin φ),
//
//	μ = (1 + g·e^{−jφ})/2,   ν = (1 − g·e^{jφ})/2,
//
// and the image rejection ratio is
//
//	IRR = |μ|²/|ν|² = (1 + 2g·cos φ + g²)/(1 − 2g·cos φ + g²)
//
// (Razavi, RF Microelectronics, 2nd ed., Sec. 4.2.4, image-reject
// receivers with gain and phase mismatch).
type Imbalance struct {
	GainDB           float64    // 20·log10 g: Q path gain over I path gain
	PhaseDeg         float64    // φ in degrees: Q's departure from 90° after I
	ImageRejectionDB float64    // 10·log10 IRR; +Inf when no image is seen
	Mu, Nu           complex128 // the model's μ and ν
}

// ImbalanceOf returns the Imbalance of a Q path with gain g relative to I
// and phase error phiDeg degrees.
func ImbalanceOf(g, phiDeg float64) Imbalance {
	phi := phiDeg * math.Pi / 180
	mu := (1 + complex(g, 0)*cmplx.Exp(complex(0, -phi))) / 2
	nu := (1 - complex(g, 0)*cmplx.Exp(complex(0, phi))) / 2
	return Imbalance{
		GainDB:           20 * math.Log10(g),
		PhaseDeg:         phiDeg,
		ImageRejectionDB: 10 * math.Log10(sq(cmplx.Abs(mu))/sq(cmplx.Abs(nu))),
		Mu:               mu,
		Nu:               nu,
	}
}

func sq(x float64) float64 { return x * x }

// EstimateImbalance returns the blind estimate of the imbalance from the
// second-order moments of a DC-free capture, pow = E|y|² and
// sq = E[y²], assuming the ideal signal x is circular (E[x²] = 0), as
// noise, SSB speech and most multi-signal captures are. Following the
// frequency-independent case of Anttila, Valkama & Renfors,
// "Circularity-based I/Q imbalance compensation in wideband
// direct-conversion receivers", IEEE Trans. Vehicular Technology 57(4),
// 2008: the circularity coefficient of y is
//
//	ρ = E[y²]/E|y|² = 2r/(1 + |r|²),   r = ν/μ*,
//
// which this function inverts exactly, r = ρ·(1 − √(1 − |ρ|²))/|ρ|², rather
// than with the first-order r ≈ ρ/2. With μ + ν* = 1 (the I path as
// reference), μ = 1/(1 + r*) and ν = r·μ*. A capture of a non-circular
// signal (a real signal, or one strong carrier at 0 Hz) reads as
// imbalance. With pow = 0 the result has NaN fields.
func EstimateImbalance(pow float64, sqm complex128) Imbalance {
	if !(pow > 0) {
		nan := math.NaN()
		return Imbalance{GainDB: nan, PhaseDeg: nan, ImageRejectionDB: nan, Mu: cmplx.NaN(), Nu: cmplx.NaN()}
	}
	rho := sqm / complex(pow, 0)
	a := cmplx.Abs(rho)
	var r complex128
	if a >= 1 {
		r = rho / complex(a, 0) // a degenerate (real) signal: |r| = 1
	} else if a > 0 {
		r = rho * complex((1-math.Sqrt(1-a*a))/(a*a), 0)
	}
	mu := 1 / (1 + cmplx.Conj(r))
	nu := r * cmplx.Conj(mu)
	ge := 2*mu - 1 // g·e^{−jφ}
	return Imbalance{
		GainDB:           20 * math.Log10(cmplx.Abs(ge)),
		PhaseDeg:         -cmplx.Phase(ge) * 180 / math.Pi,
		ImageRejectionDB: -20 * math.Log10(cmplx.Abs(r)),
		Mu:               mu,
		Nu:               nu,
	}
}

// Corrector removes a DC offset and an I/Q imbalance from a stream:
//
//	x̂ = (y' − r·y'*)·(1 + r*)/(1 − |r|²),   y' = y − m,  r = ν/μ*,
//
// which returns x exactly when y = μx + νx* + m with μ + ν* = 1. It is
// memoryless, so blocks of any size give the same result.
type Corrector struct {
	dcR, dcI           float32
	a11, a12, a21, a22 float32
}

// NewCorrector returns a Corrector for DC offset dc and imbalance im. It
// panics if im has |ν| ≥ |μ| (no image rejection at all) or NaN fields.
func NewCorrector(dc complex128, im Imbalance) *Corrector {
	if cmplx.IsNaN(im.Mu) || cmplx.IsNaN(im.Nu) || cmplx.Abs(im.Nu) >= cmplx.Abs(im.Mu) {
		panic("iq: imbalance cannot be corrected")
	}
	r := im.Nu / cmplx.Conj(im.Mu)
	k := (1 + cmplx.Conj(r)) / complex(1-sq(cmplx.Abs(r)), 0)
	p, q := k, -k*r // x̂ = p·y' + q·y'*
	return &Corrector{
		dcR: float32(real(dc)), dcI: float32(imag(dc)),
		a11: float32(real(p) + real(q)), a12: float32(imag(q) - imag(p)),
		a21: float32(imag(p) + imag(q)), a22: float32(real(p) - real(q)),
	}
}

// Process writes the corrected src to dst and returns it; dst may be src.
// A nil or short dst is allocated. Process does not allocate otherwise.
func (c *Corrector) Process(dst, src []complex64) []complex64 {
	if cap(dst) < len(src) {
		dst = make([]complex64, len(src))
	}
	dst = dst[:len(src)]
	// Written out in float32: Go's complex64 product goes through float64.
	for i, v := range src {
		yr, yi := real(v)-c.dcR, imag(v)-c.dcI
		dst[i] = complex(c.a11*yr+c.a12*yi, c.a21*yr+c.a22*yi)
	}
	return dst
}

// Reset does nothing: a Corrector has no state. It is here for the
// streaming-block shape.
func (c *Corrector) Reset() {}

// Delay returns 0.
func (c *Corrector) Delay() int { return 0 }
