package modem

import (
	"math"

	"ssbkit/internal/fft"
)

// bankFFT is the forward DFT of the Channeliser, four transforms at once:
//
//	X_j[k] = Σ_q x_j[q]·e^{−j2πqk/M},  j = 0…3,
//
// on the interleaved layout x[4q + j] (lane j holds transform j), so that
// every butterfly is the same operation on four lanes — one AVX2 register
// of four complex64 — and no data moves between lanes. The passes are
// radix-4 decimation in frequency (E. O. Brigham, The Fast Fourier
// Transform and Its Applications, 1988, ch. 10, as the radix-4 transform
// of internal/fft, which is complex128 and one transform at a time):
// one pass over a block of length L = 4m computes, for i < m and
// W_L = e^{−j2π/L},
//
//	y_q[i] = W_L^{iq} · Σ_{r=0}^{3} x[i + r·m]·(−j)^{rq},  q = 0…3,
//
// y_q being the input of the length-m transform that yields the bins
// X[4k + q]; a final radix-2 pass when log₂M is odd. The bins are left in
// digit-reversed order: bin k sits at position pos[k].
//
// Hand-written: gonum's fourier.CmplxFFT is complex128, one transform at
// a time, and several times slower at these lengths (BenchmarkBankFFT);
// the Channeliser needs float32 transforms of 32…1024 points, many per
// block.
type bankFFT struct {
	m   int
	tw  [][]complex64 // per pass with quarter length ≥ 2: W^i, W^{2i}, W^{3i} for i < m/4, interleaved
	pos []int32       // pos[k]: position of bin k after the passes
}

// newBankFFT returns the plan for length m, a power of two ≥ 4.
func newBankFFT(m int) *bankFFT {
	if m < 4 || m&(m-1) != 0 {
		panic("modem: bank FFT length not a power of two ≥ 4")
	}
	f := &bankFFT{m: m, pos: make([]int32, m)}
	for l := m; l >= 8; l /= 4 {
		q := l / 4
		t := make([]complex64, 3*q)
		for i := range q {
			for r := 1; r <= 3; r++ {
				s, c := math.Sincos(-2 * math.Pi * float64(r*i) / float64(l))
				t[3*i+r-1] = complex(float32(c), float32(s))
			}
		}
		f.tw = append(f.tw, t)
	}
	// the passes leave the bins in the digit-reversed order of
	// internal/fft's radix-4 transform (the same decimation in frequency,
	// radix-2 last when log₂M is odd)
	for p, k := range fft.NewRadix4(m).Perm() {
		f.pos[k] = int32(p)
	}
	return f
}

// transform computes the four DFTs of x[:4m] in place (digit-reversed).
func (f *bankFFT) transform(x []complex64) {
	x = x[:4*f.m]
	st := 0
	l := f.m
	for ; l >= 8; l /= 4 {
		if haveKernels {
			bankPassAVX2(&x[0], f.m, l, &f.tw[st][0])
		} else {
			bankPassGo(x, l, f.tw[st])
		}
		st++
	}
	if l == 4 {
		if haveKernels {
			bankLast4AVX2(&x[0], f.m)
		} else {
			bankLast4Go(x)
		}
	} else {
		if haveKernels {
			bankLast2AVX2(&x[0], f.m)
		} else {
			bankLast2Go(x)
		}
	}
}

// bankPassGo is one radix-4 pass over the blocks of length l (four lanes
// each) of x with the twiddles tw of that pass; the reference loop of
// bankPassAVX2. The complex products are written out on float32 parts.
func bankPassGo(x []complex64, l int, tw []complex64) {
	q := l / 4
	for s := 0; s < len(x); s += 4 * l {
		b := x[s : s+4*l]
		for i := range q {
			w1, w2, w3 := tw[3*i], tw[3*i+1], tw[3*i+2]
			for j := range 4 {
				i0, i1, i2, i3 := 4*i+j, 4*(i+q)+j, 4*(i+2*q)+j, 4*(i+3*q)+j
				y0, y1, y2, y3 := butterfly4(b[i0], b[i1], b[i2], b[i3])
				b[i0] = y0
				b[i1] = cmul32(y1, w1)
				b[i2] = cmul32(y2, w2)
				b[i3] = cmul32(y3, w3)
			}
		}
	}
}

// butterfly4 is the radix-4 butterfly without twiddles, the length-4 DFT
// y_q = Σ_r x_r·(−j)^{rq} of x = (a, b, c, d).
func butterfly4(a, b, c, d complex64) (y0, y1, y2, y3 complex64) {
	t0r, t0i := real(a)+real(c), imag(a)+imag(c)
	t1r, t1i := real(a)-real(c), imag(a)-imag(c)
	t2r, t2i := real(b)+real(d), imag(b)+imag(d)
	t3r, t3i := imag(b)-imag(d), real(d)-real(b) // −j·(b − d)
	return complex(t0r+t2r, t0i+t2i), complex(t1r+t3r, t1i+t3i),
		complex(t0r-t2r, t0i-t2i), complex(t1r-t3r, t1i-t3i)
}

// cmul32 is x·w on float32 parts.
func cmul32(x, w complex64) complex64 {
	return complex(real(x)*real(w)-imag(x)*imag(w), real(x)*imag(w)+imag(x)*real(w))
}

// bankLast4Go is the last radix-4 pass (blocks of four, no twiddles).
func bankLast4Go(x []complex64) {
	for s := 0; s < len(x); s += 16 {
		b := x[s : s+16]
		for j := range 4 {
			b[j], b[4+j], b[8+j], b[12+j] = butterfly4(b[j], b[4+j], b[8+j], b[12+j])
		}
	}
}

// bankLast2Go is the last radix-2 pass (blocks of two).
func bankLast2Go(x []complex64) {
	for s := 0; s < len(x); s += 8 {
		b := x[s : s+8]
		for j := range 4 {
			u, v := b[j], b[4+j]
			b[j] = complex(real(u)+real(v), imag(u)+imag(v))
			b[4+j] = complex(real(u)-real(v), imag(u)-imag(v))
		}
	}
}
