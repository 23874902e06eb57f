// Package fft holds the radix-4 fast Fourier transform shared by the
// receive chain's tuning estimator (package modem) and the spectra of
// package modem/spectral: complex128, in place, power-of-two lengths,
// bins left in digit-reversed order (Perm), with an AVX2/FMA kernel for
// its butterflies on amd64 and a plain Go loop as the reference.
package fft

import "math"

// Radix4 is a radix-4 decimation-in-frequency FFT for power-of-two
// lengths (a final radix-2 pass when log₂n is odd), in place, with the
// bins left in digit-reversed order. A Welch average only needs |X_k|²
// summed per bin, so the reordering is done once on the sum, not on every
// segment.
//
// One pass over a block of length L = 4m computes, for i < m and
// W_L = e^{−j2π/L},
//
//	y_q[i] = W_L^{iq} · Σ_{r=0}^{3} x[i + r·m]·(−j)^{rq},  q = 0…3,
//
// and y_q is the input of the length-m transform that yields the bins
// X[4k + q] (E. O. Brigham, The Fast Fourier Transform and Its
// Applications, 1988, ch. 10, radix-4 decimation in frequency).
//
// Hand-written because the libraries are slow at the lengths spectrum,
// measure and the tuning estimator use. Measured on the project's 2-core machine while it was
// shared (go test -bench, one core, complex128 in place; quieter runs):
//
//	n        gonum CmplxFFT   go-dsp fft.FFT          radix4 Go   radix4 AVX2
//	4096     0.31 ms          0.41 ms (34 allocs)     0.027 ms    0.011 ms
//	16384    1.56 ms          1.08 ms (37 allocs)     0.14 ms     0.048 ms
//	65536    7.4 ms           4.5 ms (2.6 MB, 41)     0.57 ms     0.22 ms
//
// (github.com/mjibson/go-dsp/fft also takes 32 ms at n = 49152, through
// Bluestein's algorithm, and allocates its output on every call.) On
// amd64 with AVX2 and FMA the passes run butterfliesAVX2 (fft_amd64.s);
// the build tag purego, or another CPU, keeps the Go loop, which is the
// reference. TestRadix4 checks Radix4 against gonum's transform.
type Radix4 struct {
	n int
	// per radix-4 pass st of quarter length m: tw1[st][i] = W^i,
	// tw2[st][i] = W^{2i}, tw3[st][i] = W^{3i}, i < m
	tw1, tw2, tw3 [][]complex128
	perm          []int32 // perm[p] is the bin (FFT order) left at position p
	last          int     // block length left for tail: 1, 2, 4 or 8
}

// NewRadix4 returns the plan for length n, a power of two ≥ 1.
func NewRadix4(n int) *Radix4 {
	if n < 1 || n&(n-1) != 0 {
		panic("fft: radix-4 length not a power of two")
	}
	f := &Radix4{n: n, perm: make([]int32, n)}
	l := n
	for ; l >= 16; l /= 4 {
		m := l / 4
		t := [3][]complex128{make([]complex128, m), make([]complex128, m), make([]complex128, m)}
		for i := range m {
			for q := 1; q <= 3; q++ {
				s, c := math.Sincos(-2 * math.Pi * float64(q*i) / float64(l))
				t[q-1][i] = complex(c, s)
			}
		}
		f.tw1 = append(f.tw1, t[0])
		f.tw2 = append(f.tw2, t[1])
		f.tw3 = append(f.tw3, t[2])
	}
	f.last = l
	for p := range f.perm {
		f.perm[p] = int32(digitReversed(p, n))
	}
	return f
}

// digitReversed returns the bin left at position p of a block of length l
// by the passes of Radix4: position p lies in quarter q = p/(l/4), which
// holds the bins ≡ q (mod 4).
func digitReversed(p, l int) int {
	switch l {
	case 1:
		return 0
	case 2:
		return p
	}
	m := l / 4
	return p/m + 4*digitReversed(p%m, m)
}

// Transform computes the DFT of x[:n] in place, digit-reversed.
func (f *Radix4) Transform(x []complex128) {
	n := f.n
	x = x[:n]
	l := n
	for st := 0; l >= 16; st, l = st+1, l/4 {
		f.Pass(x, l, st)
	}
	f.Tail(x, l)
}

// Pass is one radix-4 pass over the blocks of length l of x, with the
// twiddles of pass st.
func (f *Radix4) Pass(x []complex128, l, st int) {
	n := len(x)
	m := l / 4
	w1, w2, w3 := f.tw1[st][:m], f.tw2[st][:m], f.tw3[st][:m]
	for s := 0; s < n; s += l {
		b := x[s : s+l]
		x0, x1, x2, x3 := b[:m], b[m:2*m], b[2*m:3*m], b[3*m:4*m]
		if HaveAVX2 {
			butterfliesAVX2(&x0[0], &x1[0], &x2[0], &x3[0], &w1[0], &w2[0], &w3[0], m)
			continue
		}
		butterfliesGo(x0, x1, x2, x3, w1, w2, w3)
	}
}

// butterfliesGo computes, for i < len(x0), the four outputs y_q[i] of
// the radix-4 butterfly (see Radix4) in place of x0…x3[i], with the
// twiddles w1[i] = W^i, w2[i] = W^{2i}, w3[i] = W^{3i}. It is the
// reference for butterfliesAVX2.
func butterfliesGo(x0, x1, x2, x3, w1, w2, w3 []complex128) {
	x1, x2, x3 = x1[:len(x0)], x2[:len(x0)], x3[:len(x0)]
	w1, w2, w3 = w1[:len(x0)], w2[:len(x0)], w3[:len(x0)]
	for i := range x0 {
		y0, y1, y2, y3 := Butterfly4(x0[i], x1[i], x2[i], x3[i])
		x0[i], x1[i], x2[i], x3[i] = y0, Mul(y1, w1[i]), Mul(y2, w2[i]), Mul(y3, w3[i])
	}
}

// Butterfly4 returns the radix-4 butterfly of a, b, c, d before its
// twiddles: y_q = Σ_p x_p·(−j)^{pq}, as sums and differences of a ± c and
// b ± d (−j·(b − d) by swapping parts). Every Go radix-4 pass, here and
// in package spectral's fused passes, computes it so.
func Butterfly4(a, b, c, d complex128) (y0, y1, y2, y3 complex128) {
	t0, t1, t2 := a+c, a-c, b+d
	t3 := complex(imag(b)-imag(d), real(d)-real(b)) // −j·(b − d)
	return t0 + t2, t1 + t3, t0 - t2, t1 - t3
}

// Mul returns y·w with the float64 products written out (Go may fuse
// or reorder a complex product otherwise; the vector kernels round these
// the same way).
func Mul(y, w complex128) complex128 {
	return complex(real(y)*real(w)-imag(y)*imag(w), real(y)*imag(w)+imag(y)*real(w))
}

// Tail finishes blocks of length l ≤ 8 left by the radix-4 passes.
func (f *Radix4) Tail(x []complex128, l int) {
	n := len(x)
	switch l {
	case 8: // a radix-4 pass of length 8 then radix-2 pairs
		w1 := complex(math.Sqrt2/2, -math.Sqrt2/2)  // W_8
		w3 := complex(-math.Sqrt2/2, -math.Sqrt2/2) // W_8³
		for s := 0; s < n; s += 8 {
			b := x[s : s+8]
			for i := range 2 {
				b[i], b[i+2], b[i+4], b[i+6] = Butterfly4(b[i], b[i+2], b[i+4], b[i+6])
				if i == 1 {
					b[i+2] *= w1
					b[i+4] *= complex(0, -1)
					b[i+6] *= w3
				}
			}
			for i := 0; i < 8; i += 2 {
				b[i], b[i+1] = b[i]+b[i+1], b[i]-b[i+1]
			}
		}
	case 4:
		for s := 0; s < n; s += 4 {
			b := x[s : s+4]
			b[0], b[1], b[2], b[3] = Butterfly4(b[0], b[1], b[2], b[3])
		}
	case 2:
		for s := 0; s < n; s += 2 {
			b := x[s : s+2]
			b[0], b[1] = b[0]+b[1], b[0]-b[1]
		}
	}
}

// Len returns the transform length n.
func (f *Radix4) Len() int { return f.n }

// Perm returns the order Transform leaves the bins in: Perm()[p] is the
// bin at position p. The slice is the plan's own; callers must not
// change it.
func (f *Radix4) Perm() []int32 { return f.perm }

// Twiddles returns the twiddles of radix-4 pass st (quarter length m):
// W^i, W^{2i}, W^{3i} for i < m.
func (f *Radix4) Twiddles(st int) (w1, w2, w3 []complex128) {
	return f.tw1[st], f.tw2[st], f.tw3[st]
}

// Last returns the block length the radix-4 passes leave for Tail: 1, 2,
// 4 or 8.
func (f *Radix4) Last() int { return f.last }
