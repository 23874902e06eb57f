package hilbert

import "math"

// Band analysis evaluates |H(f)| and |H(−f)| on a grid of about a thousand
// frequencies for every row of a sweep, so the designs whose magnitudes
// have a cheap closed form provide them in batches: the FIR splitters
// from one sine series A(ω) (|H(±f)| = |1 ± A|), the Weaver splitter from
// one cosine series at ω ∓ ω₀. Each series is summed by its three-term
// recurrence, and four frequencies run in lock step: one recurrence is a
// chain of dependent multiply-subtracts, four independent ones keep the
// floating-point units busy. Each lane does exactly the arithmetic of the
// one-frequency code, so the series are the same to the last bit; the
// magnitudes differ from |Response| only by the rounding of Response's
// phase factor e^{−jωD}.

// magnituder is implemented by splitters that give |H(f)| and |H(−f)|
// faster than two calls of Response.
type magnituder interface {
	// mags sets pos[i] = |H(f[i])| and neg[i] = |H(−f[i])|; the three
	// slices have one length.
	mags(f, pos, neg []float64)
}

// magnitudes sets pos[i] = |H(f[i])| and neg[i] = |H(−f[i])|.
func magnitudes(s responder, f, pos, neg []float64) {
	if m, ok := s.(magnituder); ok {
		m.mags(f, pos, neg)
		return
	}
	for i, v := range f {
		pos[i] = cmplxAbs(s.Response(v))
		neg[i] = cmplxAbs(s.Response(-v))
	}
}

func (f *firSplitter) mags(freq, pos, neg []float64) {
	f.magsAt(freq, pos, neg)
}

func (f *fftSplitter) mags(freq, pos, neg []float64) {
	f.fir.magsAt(freq, pos, neg)
}

// magsAt sets pos[i] = |1 + A(ω_i)| and neg[i] = |1 − A(ω_i)| at
// ω_i = 2π·freq[i]/rate; A is odd, so A(−ω) = −A(ω).
func (f *firSplitter) magsAt(freq, pos, neg []float64) {
	r := f.spec.Rate
	w := func(i int) float64 { return 2 * math.Pi * freq[i] / r } // as in Response
	i := 0
	for ; i+4 <= len(freq); i += 4 {
		a := f.amplitude4([4]float64{w(i), w(i + 1), w(i + 2), w(i + 3)})
		for j, v := range a {
			pos[i+j] = math.Abs(1 + v)
			neg[i+j] = math.Abs(1 - v)
		}
	}
	for ; i < len(freq); i++ {
		v := f.amplitude(w(i))
		pos[i] = math.Abs(1 + v)
		neg[i] = math.Abs(1 - v)
	}
}

// amplitude4 is amplitude at four frequencies at once.
func (f *firSplitter) amplitude4(w [4]float64) [4]float64 {
	var s, c [4]float64
	for j := range w {
		s[j], c[j] = math.Sincos(w[j])
	}
	var a0, a1, a2, a3 float64
	h := f.h
	if f.odd {
		// sin((m+2)ω) = 2cos 2ω·sin(mω) − sin((m−2)ω).
		k0 := 2 * (c[0]*c[0] - s[0]*s[0])
		k1 := 2 * (c[1]*c[1] - s[1]*s[1])
		k2 := 2 * (c[2]*c[2] - s[2]*s[2])
		k3 := 2 * (c[3]*c[3] - s[3]*s[3])
		p0, p1, p2, p3 := -s[0], -s[1], -s[2], -s[3]
		q0, q1, q2, q3 := s[0], s[1], s[2], s[3]
		for m := 1; m <= f.m; m += 2 {
			v := h[m]
			a0 += v * q0
			a1 += v * q1
			a2 += v * q2
			a3 += v * q3
			p0, q0 = q0, k0*q0-p0
			p1, q1 = q1, k1*q1-p1
			p2, q2 = q2, k2*q2-p2
			p3, q3 = q3, k3*q3-p3
		}
	} else {
		// sin((m+1)ω) = 2cos ω·sin(mω) − sin((m−1)ω).
		k0, k1, k2, k3 := 2*c[0], 2*c[1], 2*c[2], 2*c[3]
		var p0, p1, p2, p3 float64
		q0, q1, q2, q3 := s[0], s[1], s[2], s[3]
		for m := 1; m <= f.m; m++ {
			v := h[m]
			a0 += v * q0
			a1 += v * q1
			a2 += v * q2
			a3 += v * q3
			p0, q0 = q0, k0*q0-p0
			p1, q1 = q1, k1*q1-p1
			p2, q2 = q2, k2*q2-p2
			p3, q3 = q3, k3*q3-p3
		}
	}
	return [4]float64{2 * a0, 2 * a1, 2 * a2, 2 * a3}
}

// mags evaluates the low-pass amplitude at ν = ±ω − ω₀: two frequencies
// of the grid make the four lanes.
func (w *weaverSplitter) mags(freq, pos, neg []float64) {
	r := w.spec.Rate
	om := func(i int) float64 { return 2 * math.Pi * freq[i] / r } // as in Response
	i := 0
	for ; i+2 <= len(freq); i += 2 {
		a := w.lowpass4([4]float64{
			om(i) - w.w0, -om(i) - w.w0,
			om(i+1) - w.w0, -om(i+1) - w.w0,
		})
		pos[i], neg[i] = math.Abs(a[0]), math.Abs(a[1])
		pos[i+1], neg[i+1] = math.Abs(a[2]), math.Abs(a[3])
	}
	for ; i < len(freq); i++ {
		a := w.lowpass4([4]float64{om(i) - w.w0, -om(i) - w.w0})
		pos[i], neg[i] = math.Abs(a[0]), math.Abs(a[1])
	}
}

// lowpass4 returns A(ν) = h[M] + 2·Σ_{k≥1} h[M−k]·cos(kν) at four ν, by
// cos((k+1)ν) = 2cos ν·cos(kν) − cos((k−1)ν) as in Response.
func (w *weaverSplitter) lowpass4(nu [4]float64) [4]float64 {
	c0, c1, c2, c3 := math.Cos(nu[0]), math.Cos(nu[1]), math.Cos(nu[2]), math.Cos(nu[3])
	h := w.h
	m := w.m
	a0, a1, a2, a3 := h[m], h[m], h[m], h[m]
	p0, p1, p2, p3 := 1.0, 1.0, 1.0, 1.0
	q0, q1, q2, q3 := c0, c1, c2, c3
	for k := 1; k <= m; k++ {
		v := 2 * h[m-k]
		a0 += v * q0
		a1 += v * q1
		a2 += v * q2
		a3 += v * q3
		p0, q0 = q0, 2*c0*q0-p0
		p1, q1 = q1, 2*c1*q1-p1
		p2, q2 = q2, 2*c2*q2-p2
		p3, q3 = q3, 2*c3*q3-p3
	}
	return [4]float64{a0, a1, a2, a3}
}
