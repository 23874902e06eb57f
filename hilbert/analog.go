package hilbert

import (
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/mathext"
)

// Analog is a continuous-time 90° phase-difference network: two chains of
// first-order all-pass sections
//
//	T(s) = (1 − s/ωp)/(1 + s/ωp),   ωp = 2π·p,
//
// one chain for the I path and one for the Q path, driven by the same
// audio. Each section's phase falls from 0 to −180° through −90° at its
// pole frequency p; the Q chain lags the I chain by 90° over the band.
// Its analytic response H(f) = I(f) + j·Q(f) is scaled like a Splitter's:
// about 2 at positive audio frequencies and about 0 at negative ones, so
// the suppression at f is 20·log10(|H(f)|/|H(−f)|).
//
// An op-amp realises one section with a resistor R and a capacitor C that
// set p = 1/(2πRC), and two equal resistors that set the gain; the sign
// of a section (lag or lead form) does not change the phase difference
// of the pair.
type Analog struct {
	// I and Q hold the pole frequencies in Hz of each path's sections,
	// ascending.
	I, Q []float64
}

// MaxAnalogRatio bounds the band ratio high/low of NewAnalog: six decades,
// far beyond audio, and within what the elliptic functions resolve in
// float64 (k = (1 − κ)/(1 + κ) must stay distinguishable from 1).
const MaxAnalogRatio = 1e6

// NewAnalog designs the equiripple 90° pair of n first-order sections in
// all (both paths together) for the band [low, high] Hz: the phase
// difference departs from 90° by at most ε over the band, with n+1
// alternating extrema of ±ε (minimax, by the alternation theorem).
//
// With κ = low/high, k = (1 − κ)/(1 + κ), K = K(k) the complete elliptic
// integral and f₀ = √(low·high), the n pole frequencies are
//
//	p_i = f₀·tan(π/4 − am(u_i, k)/2),   u_i = (2i − n − 1)·K/n,  i = 1…n,
//
// am the Jacobi amplitude; sorted ascending, the first, third, … go to
// the Q path and the second, fourth, … to the I path. The minimum
// suppression over the band is −10·log10(k_n), k_n the modulus of nome
// q(k)^{2n} (AnalogSuppressionDB).
//
// The problem is the classical one of wide-band two-phase networks
// (S. Darlington, "Realization of a constant phase difference", Bell
// Syst. Tech. J. 29, 1950; H. J. Orchard, "Synthesis of wideband two-phase
// networks", Wireless Engineer 27, 1950). The closed form above was
// derived for this package, not copied: for odd n the bilinear transform
// with its centre at f₀ maps the pair one to one onto the half-band
// elliptic all-pass pair of the "allpass" design (Gazsi's formulas),
// and Landen's ascending transformation (DLMF 22.7.ii) turns Gazsi's
// sn(2iK/N) of modulus tan²(ωp/2) into the amplitudes above; even n
// takes the same equal spacing of u. The tests check the equiripple
// alternation for every n and the bilinear correspondence for odd n.
//
// NewAnalog returns an error for n outside 1…MaxSections, a band not
// satisfying 0 < low < high < ∞, or a band ratio high/low above
// MaxAnalogRatio.
func NewAnalog(n int, low, high float64) (*Analog, error) {
	if n < 1 || n > MaxSections {
		return nil, fmt.Errorf("analog sections must be 1 to %d, got %d", MaxSections, n)
	}
	if !(low > 0 && low < high) || math.IsInf(high, 0) {
		return nil, fmt.Errorf("band %g:%g Hz must satisfy 0 < low < high < ∞", low, high)
	}
	if high/low > MaxAnalogRatio {
		return nil, fmt.Errorf("band %g:%g Hz spans a ratio of %.3g, more than %g", low, high, high/low, float64(MaxAnalogRatio))
	}
	kappa := low / high
	k := (1 - kappa) / (1 + kappa)
	m := k * k
	kk := mathext.CompleteK(m)
	f0 := math.Sqrt(low) * math.Sqrt(high)
	p := make([]float64, n)
	for i := 1; i <= n; i++ {
		u := float64(2*i-n-1) * kk / float64(n)
		p[i-1] = f0 * math.Tan(math.Pi/4-jacobiAm(u, m, kk)/2)
	}
	sort.Float64s(p)
	a := &Analog{}
	for i, v := range p {
		if i%2 == 0 {
			a.Q = append(a.Q, v)
		} else {
			a.I = append(a.I, v)
		}
	}
	return a, nil
}

// jacobiAm returns the Jacobi amplitude φ = am(u | m), the inverse of
// Legendre's F(φ | m) (gonum's mathext.EllipticF), for |u| ≤ K = K(m): by
// Newton's method on F with dF/dφ = 1/√(1 − m·sin²φ), kept inside a
// bisection bracket. gonum has the integrals but not their inverse.
func jacobiAm(u, m, k float64) float64 {
	if u == 0 {
		return 0
	}
	if u < 0 {
		return -jacobiAm(-u, m, k)
	}
	lo, hi := 0.0, math.Pi/2
	phi := math.Pi / 2 * math.Min(u/k, 1)
	for range 100 {
		g := mathext.EllipticF(phi, m) - u
		if g > 0 {
			hi = phi
		} else {
			lo = phi
		}
		s := math.Sin(phi)
		next := phi - g*math.Sqrt(1-m*s*s)
		if !(next > lo && next < hi) {
			next = (lo + hi) / 2
		}
		if math.Abs(next-phi) <= 1e-16*math.Max(1, phi) {
			return next
		}
		phi = next
	}
	return phi
}

// AnalogSuppressionDB returns the minimum suppression over [low, high] of
// the n-section design of NewAnalog in closed form, −10·log10(k_n) with
// k_n the modulus whose nome is q(k)^{2n}, k = (1 − κ)/(1 + κ),
// κ = low/high, q(k) = exp(−π·K(√(1−k²))/K(k)); k_n = (θ₂(0,·)/θ₃(0,·))².
func AnalogSuppressionDB(n int, low, high float64) float64 {
	kappa := low / high
	k := (1 - kappa) / (1 + kappa)
	kc2 := 4 * kappa / ((1 + kappa) * (1 + kappa)) // 1 − k²
	q := math.Exp(-math.Pi * mathext.CompleteK(kc2) / mathext.CompleteK(k*k))
	qn := math.Pow(q, float64(2*n))
	// θ₂(0)/θ₃(0) = θ₁(π/2)/θ₄(π/2) = √k_n.
	r := thetaRatio(math.Pi/2, qn)
	return math.Min(-20*math.Log10(r), MaxSuppressionDB)
}

// Sections returns the number of first-order sections of both paths.
func (a *Analog) Sections() int { return len(a.I) + len(a.Q) }

// Paths returns the I and Q path responses at f Hz (negative f allowed).
func (a *Analog) Paths(f float64) (i, q complex128) {
	return chain(a.I, f), chain(a.Q, f)
}

// chain returns Π (p − jf)/(p + jf) over the poles p (Hz).
func chain(poles []float64, f float64) complex128 {
	h := complex(1, 0)
	for _, p := range poles {
		h *= complex(p, -f) / complex(p, f)
	}
	return h
}

// Response returns the analytic response H(f) = I(f) + j·Q(f) at f Hz.
func (a *Analog) Response(f float64) complex128 {
	i, q := a.Paths(f)
	return i + complex(0, 1)*q
}

// GroupDelay returns the group delay of H in seconds at f Hz: the mean
// of the two paths' delays, Σ 2τ/(1 + (ωτ)²) with τ = 1/(2πp) over each
// path's sections (exact for two all-pass paths, |I| = |Q|).
func (a *Analog) GroupDelay(f float64) float64 {
	w := 2 * math.Pi * f
	var d float64
	for _, ps := range [2][]float64{a.I, a.Q} {
		for _, p := range ps {
			t := 1 / (2 * math.Pi * p)
			x := w * t
			d += 2 * t / (1 + x*x)
		}
	}
	return d / 2
}

// Analyze evaluates the network over [low, high] Hz as Analyze does a
// Splitter: minimum and mean suppression, wanted-sideband ripple (0 for
// all-pass paths, up to rounding), DelayMS the group delay at the band
// centre. DelaySamples and MACsPerSample are 0: an analog network has no
// samples and no multiplications. It panics if !(0 < low < high).
func (a *Analog) Analyze(low, high float64) Analysis {
	if !(low > 0 && low < high) {
		panic("hilbert: Analyze band must satisfy 0 < low < high")
	}
	r := analyzeBand(a, low, high)
	r.DelayMS = 1000 * a.GroupDelay((low+high)/2)
	return r
}

// AnalogSectionsFor returns the fewest sections (1…MaxSections) whose
// NewAnalog design reaches target dB over [low, high], and false if even
// MaxSections does not.
func AnalogSectionsFor(target, low, high float64) (int, bool) {
	for n := 1; n <= MaxSections; n++ {
		if AnalogSuppressionDB(n, low, high) >= target {
			return n, true
		}
	}
	return MaxSections, false
}
