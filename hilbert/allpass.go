package hilbert

import (
	"math"
	"sort"

	"gonum.org/v1/gonum/mathext"
)

// allpassSplitter is the IIR phase splitter: two chains of first-order
// all-pass sections in z⁻², (a − z⁻²)/(1 − a·z⁻²), the Q chain behind one
// sample of delay. The coefficients come from the half-band elliptic
// low-pass G(z) = ½[A₀(z²) + z⁻¹A₁(z²)] (total odd order N = 2P+1, all
// poles on the imaginary axis) shifted by a quarter of the rate, z → −jz:
// 2·G(−jz) = A₀(−z²) + j·z⁻¹A₁(−z²) = I + j·Q.
//
// The half-band poles follow in closed form from Jacobi's nome q of the
// selectivity k = tan²(ωp/2), ωp = π/2 − 2π·fe/rate (the design band edge
// mirrored about rate/4): with the theta-function ratio
//
//	w_i = θ₁(πi/N, q)/θ₄(πi/N, q) = √k·sn(2iK/N, k),   i = 1…P,
//	σ_i = √((1 − k·w_i²)(1 − w_i²/k)) / (1 + w_i²),
//	a_i = (1 − σ_i)/(1 + σ_i),
//
// (the elliptic-function design of half-band wave digital filters,
// L. Gazsi, "Explicit formulas for lattice wave digital filters", IEEE
// Trans. Circuits Syst. CAS-32(1), 1985; the quarter-rate shift to a 90°
// pair as in P. A. Regalia, S. K. Mitra, P. P. Vaidyanathan, "The digital
// all-pass filter: a versatile signal processing building block", Proc.
// IEEE 76(1), 1988). Sorted ascending, a₁, a₃, … go to I and a₂, a₄, …
// to Q. The phase difference is 90° with equiripple error ε over
// [fe, rate/2 − fe], and the suppression −10·log10(k₁) with k₁ the
// modulus of nome q^N.
type allpassSplitter struct {
	spec   Spec
	ai, aq []float64
	delay  float64
	fixed  *Fixed // with Spec.Bits
}

// thetaRatio returns θ₁(x, q)/θ₄(x, q) by their series
// θ₁ = 2q^¼ Σ (−1)^m q^{m(m+1)} sin((2m+1)x), θ₄ = 1 + 2 Σ (−1)^m q^{m²} cos(2mx).
func thetaRatio(x, q float64) float64 {
	var num float64
	for m := 0; m < 64; m++ {
		t := math.Pow(q, float64(m*(m+1))) * math.Sin(float64(2*m+1)*x)
		if m%2 == 1 {
			t = -t
		}
		num += t
		if math.Pow(q, float64(m*(m+1))) < 1e-20 {
			break
		}
	}
	den := 1.0
	for m := 1; m < 64; m++ {
		p := math.Pow(q, float64(m*m))
		t := p * math.Cos(float64(2*m)*x)
		if m%2 == 1 {
			t = -t
		}
		den += 2 * t
		if p < 1e-20 {
			break
		}
	}
	return 2 * math.Pow(q, 0.25) * num / den
}

// allpassCoefficients returns the P half-band all-pass coefficients in
// ascending order for total order N = 2P+1 and design edge fe.
func allpassCoefficients(p int, fe, rate float64) []float64 {
	n := 2*p + 1
	wp := math.Pi/2 - 2*math.Pi*fe/rate
	t := math.Tan(wp / 2)
	k := t * t
	// Nome q = exp(−π·K(k′)/K(k)); gonum's CompleteK takes the parameter m = k².
	q := math.Exp(-math.Pi * mathext.CompleteK(1-k*k) / mathext.CompleteK(k*k))
	a := make([]float64, p)
	for i := 1; i <= p; i++ {
		w := thetaRatio(math.Pi*float64(i)/float64(n), q)
		w2 := w * w
		s := math.Sqrt(math.Max(0, (1-w2*k)*(1-w2/k))) / (1 + w2)
		a[i-1] = (1 - s) / (1 + s)
	}
	sort.Float64s(a)
	return a
}

func newAllpass(s Spec) *allpassSplitter {
	a := allpassCoefficients(s.Sections, edge(s), s.Rate)
	sp := &allpassSplitter{spec: s}
	for i, v := range a {
		if i%2 == 0 {
			sp.ai = append(sp.ai, v)
		} else {
			sp.aq = append(sp.aq, v)
		}
	}
	sp.delay = sp.groupDelay()
	return sp
}

// groupDelay returns the group delay at the band centre in samples, by a
// central difference of the phase.
func (s *allpassSplitter) groupDelay() float64 {
	w := 2 * math.Pi * (s.spec.Low + s.spec.High) / 2 / s.spec.Rate
	const d = 1e-6
	p1 := s.response(w + d)
	p0 := s.response(w - d)
	return -math.Atan2(imag(p1*conj(p0)), real(p1*conj(p0))) / (2 * d)
}

func conj(c complex128) complex128 { return complex(real(c), -imag(c)) }

func (s *allpassSplitter) Spec() Spec     { return s.spec }
func (s *allpassSplitter) Delay() float64 { return s.delay }

// MACs is one multiplication per section per sample.
func (s *allpassSplitter) MACs() float64 { return float64(len(s.ai) + len(s.aq)) }

func (s *allpassSplitter) Response(f float64) complex128 {
	return s.response(2 * math.Pi * f / s.spec.Rate)
}

func (s *allpassSplitter) response(w float64) complex128 {
	i, q := s.paths(w)
	return i + complex(0, 1)*q
}

// paths returns the I and Q path responses at ω rad/sample.
func (s *allpassSplitter) paths(w float64) (i, q complex128) {
	sn, cs := math.Sincos(-2 * w)
	z2 := complex(cs, sn) // z⁻²
	i = 1
	for _, a := range s.ai {
		i *= (complex(a, 0) - z2) / (1 - complex(a, 0)*z2)
	}
	sn, cs = math.Sincos(-w)
	q = complex(cs, sn)
	for _, a := range s.aq {
		q *= (complex(a, 0) - z2) / (1 - complex(a, 0)*z2)
	}
	return i, q
}

func (s *allpassSplitter) NewFilter() Filter {
	if s.fixed != nil {
		return s.newFixedFilter()
	}
	f := &allpassFilter{ai: s.ai, aq: s.aq}
	f.si = make([][4]float64, len(s.ai))
	f.sq = make([][4]float64, len(s.aq))
	return f
}

// allpassFilter runs the two chains in float64 (the poles lie close to the
// unit circle for many sections; float32 state would limit suppression).
// Each section computes y[n] = a·(x[n] + y[n−2]) − x[n−2]: one multiply.
type allpassFilter struct {
	ai, aq []float64
	si, sq [][4]float64 // x[n−1], x[n−2], y[n−1], y[n−2] per section
	prev   float64      // the Q chain's one-sample delay
}

func (f *allpassFilter) Reset() {
	clear(f.si)
	clear(f.sq)
	f.prev = 0
}

func (f *allpassFilter) Process(dst []complex64, src []float32) []complex64 {
	dst = checkDst(dst, src)
	for n, x := range src {
		v := float64(x)
		for k, a := range f.ai {
			st := &f.si[k]
			y := a*(v+st[3]) - st[1]
			st[1], st[0] = st[0], v
			st[3], st[2] = st[2], y
			v = y
		}
		u := f.prev
		f.prev = float64(x)
		for k, a := range f.aq {
			st := &f.sq[k]
			y := a*(u+st[3]) - st[1]
			st[1], st[0] = st[0], u
			st[3], st[2] = st[2], y
			u = y
		}
		dst[n] = complex(float32(v), float32(u))
	}
	return dst
}
