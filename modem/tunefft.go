package modem

import (
	"math"
	"math/bits"
)

// fftPlan is an in-place decimation-in-time FFT of a power-of-two length
// n ≥ 4 in natural order (Cooley & Tukey 1965; the iterative form with the
// bit-reversal permutation first, E. O. Brigham, The Fast Fourier
// Transform and Its Applications, 1988, ch. 9). The first two radix-2
// passes, whose twiddle factors are 1 and −j, have no multiplications;
// the later ones go two at a time, as the radix-4 butterfly of a block of
// length L = 4h with quarters A, B, C, D (the bit-reversed order puts B
// and C the other way round from radix-4 digit reversal): with
// W = e^{−j2π/L} and k < h,
//
//	b = W^{2k}·B[k], c = W^k·C[k], d = W^{3k}·D[k],
//	A[k], B[k], C[k], D[k] ← (A+b) + (c+d), (A−b) − j(c−d), (A+b) − (c+d), (A−b) + j(c−d),
//
// three complex multiplications per four outputs instead of the four of
// two radix-2 passes; a last radix-2 pass when log₂n is odd.
// Hand-written for the tuning estimator's short frames: gonum's
// dsp/fourier is about ten times slower at these lengths (see
// modem/spectral/fft.go for figures), and the spectral package's radix-4
// transform cannot be imported from here.
type fftPlan struct {
	n     int
	rev   []int32           // bit-reversed index of i
	quads [][3][]complex128 // per radix-4 pass of block length L: W^k, W^{2k}, W^{3k}, k < L/4
	last  []complex128      // the final radix-2 pass's twiddles e^{−j2πk/n}, k < n/2 (odd log₂n)
}

func newFFTPlan(n int) *fftPlan {
	if n < 4 || n&(n-1) != 0 {
		panic("modem: FFT length not a power of two ≥ 4")
	}
	p := &fftPlan{n: n, rev: make([]int32, n)}
	shift := 64 - bits.Len(uint(n-1))
	for i := range p.rev {
		p.rev[i] = int32(bits.Reverse64(uint64(i)) >> shift)
	}
	tw := func(k, l int) complex128 {
		s, c := math.Sincos(-2 * math.Pi * float64(k) / float64(l))
		return complex(c, s)
	}
	size := 16
	for ; size <= n; size <<= 2 {
		var q [3][]complex128
		for k := range size / 4 {
			q[0] = append(q[0], tw(k, size))
			q[1] = append(q[1], tw(2*k, size))
			q[2] = append(q[2], tw(3*k, size))
		}
		p.quads = append(p.quads, q)
	}
	if size/2 == n {
		for k := range n / 2 {
			p.last = append(p.last, tw(k, n))
		}
	}
	return p
}

// forward replaces x (length n, natural order) by
// X[k] = Σ_i x[i]·e^{−j2πik/n}.
func (p *fftPlan) forward(x []complex128) {
	x = x[:p.n]
	for i, r := range p.rev {
		if j := int(r); i < j {
			x[i], x[j] = x[j], x[i]
		}
	}
	p.passes(x)
}

// passes runs the butterflies on x in bit-reversed order.
func (p *fftPlan) passes(x []complex128) {
	n := p.n
	x = x[:n]
	// blocks of 4: the passes of length 2 and 4 (twiddles 1 and −j)
	for s := 0; s+3 < n; s += 4 {
		b := x[s : s+4 : s+4]
		a0, a1 := b[0]+b[1], b[0]-b[1]
		a2, a3 := b[2]+b[3], b[2]-b[3]
		a3 = complex(imag(a3), -real(a3)) // ·(−j)
		b[0], b[2] = a0+a2, a0-a2
		b[1], b[3] = a1+a3, a1-a3
	}
	size := 16
	for _, q := range p.quads {
		h := size / 4
		w1, w2, w3 := q[0][:h], q[1][:h], q[2][:h]
		for s := 0; s < n; s += size {
			qa := x[s : s+h : s+h]
			qb := x[s+h : s+2*h : s+2*h]
			qc := x[s+2*h : s+3*h : s+3*h]
			qd := x[s+3*h : s+4*h : s+4*h]
			qb, qc, qd = qb[:len(qa)], qc[:len(qa)], qd[:len(qa)]
			for k := range qa {
				// complex products written out (Go's complex128
				// multiply also handles infinities, which costs here)
				br, bi := real(qb[k]), imag(qb[k])
				cr, ci := real(qc[k]), imag(qc[k])
				dr, di := real(qd[k]), imag(qd[k])
				t1, t2, t3 := w1[k], w2[k], w3[k]
				br, bi = br*real(t2)-bi*imag(t2), br*imag(t2)+bi*real(t2)
				cr, ci = cr*real(t1)-ci*imag(t1), cr*imag(t1)+ci*real(t1)
				dr, di = dr*real(t3)-di*imag(t3), dr*imag(t3)+di*real(t3)
				ar, ai := real(qa[k]), imag(qa[k])
				s0r, s0i := ar+br, ai+bi
				s1r, s1i := ar-br, ai-bi
				s2r, s2i := cr+dr, ci+di
				s3r, s3i := ci-di, dr-cr // −j·(c − d)
				qa[k] = complex(s0r+s2r, s0i+s2i)
				qc[k] = complex(s0r-s2r, s0i-s2i)
				qb[k] = complex(s1r+s3r, s1i+s3i)
				qd[k] = complex(s1r-s3r, s1i-s3i)
			}
		}
		size <<= 2
	}
	if p.last != nil {
		h := n / 2
		a, b := x[:h:h], x[h:]
		b = b[:len(a)]
		w := p.last[:len(a)]
		for k, t := range w {
			br, bi := real(b[k]), imag(b[k])
			tr, ti := br*real(t)-bi*imag(t), br*imag(t)+bi*real(t)
			ar, ai := real(a[k]), imag(a[k])
			b[k] = complex(ar-tr, ai-ti)
			a[k] = complex(ar+tr, ai+ti)
		}
	}
}
