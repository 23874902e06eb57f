package fft

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/dsp/fourier"
)

func randomComplex(n int, seed uint64) []complex128 {
	r := rand.New(rand.NewPCG(seed, 3))
	x := make([]complex128, n)
	for i := range x {
		x[i] = complex(r.NormFloat64(), r.NormFloat64())
	}
	return x
}

func TestRadix4(t *testing.T) {
	// Every power-of-two length against gonum's dsp/fourier.CmplxFFT (a
	// general-purpose reference implementation of the same DFT sum);
	// the error of a float64 FFT grows as ε·log₂n (Oppenheim & Schafer,
	// Discrete-Time Signal Processing, 3rd ed., sec. 9.7), far below the
	// tolerance.
	const tol = 1e-12 // relative to the largest bin
	for lg := 0; lg <= 16; lg++ {
		n := 1 << lg
		x := randomComplex(n, uint64(lg))
		want := fourier.NewCmplxFFT(n).Coefficients(nil, x)
		f := NewRadix4(n)
		y := append([]complex128(nil), x...)
		f.Transform(y)
		var e, m float64
		seen := make([]bool, n)
		for p, v := range y {
			b := f.Perm()[p]
			seen[b] = true
			e = max(e, cmplx.Abs(v-want[b]))
			m = max(m, cmplx.Abs(want[b]))
		}
		for b, ok := range seen {
			if !ok {
				t.Fatalf("n=%d: bin %d not produced (perm is not a permutation)", n, b)
			}
		}
		if e > tol*m {
			t.Errorf("n=%d: largest error %.3g of the largest bin, want ≤ %g", n, e/m, tol)
		}
	}
}

func TestButterfliesAVX2(t *testing.T) {
	// The AVX2 kernel against its Go reference loop on random data; they
	// differ only by the rounding of fused multiply-adds (one or two
	// units in the last place of float64).
	if !HaveAVX2 {
		t.Skip("no AVX2/FMA")
	}
	const tol = 1e-15 // relative to the largest value
	for _, m := range []int{2, 4, 6, 64, 1000} {
		x := randomComplex(4*m, uint64(m))
		w := randomComplex(3*m, uint64(m)+1)
		a := append([]complex128(nil), x...)
		b := append([]complex128(nil), x...)
		butterfliesGo(a[:m], a[m:2*m], a[2*m:3*m], a[3*m:], w[:m], w[m:2*m], w[2*m:])
		butterfliesAVX2(&b[0], &b[m], &b[2*m], &b[3*m], &w[0], &w[m], &w[2*m], m)
		var e, top float64
		for i := range a {
			e = math.Max(e, cmplx.Abs(a[i]-b[i]))
			top = math.Max(top, cmplx.Abs(a[i]))
		}
		if e > tol*top {
			t.Errorf("m=%d: AVX2 and Go differ by %.3g of the largest value, want ≤ %g", m, e/top, tol)
		}
	}
}

func BenchmarkFFT(b *testing.B) {
	for _, n := range []int{4096, 16384, 65536} {
		x := randomComplex(n, 1)
		b.Run(fmt.Sprintf("radix4/n=%d", n), func(b *testing.B) {
			f := NewRadix4(n)
			b.SetBytes(int64(16 * n))
			b.ReportAllocs()
			for b.Loop() {
				f.Transform(x)
			}
		})
		b.Run(fmt.Sprintf("gonum/n=%d", n), func(b *testing.B) {
			f := fourier.NewCmplxFFT(n)
			b.SetBytes(int64(16 * n))
			b.ReportAllocs()
			for b.Loop() {
				f.Coefficients(x, x)
			}
		})
	}
}
