package spectral

import (
	"fmt"
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
		f := newRadix4(n)
		y := append([]complex128(nil), x...)
		f.transform(y)
		var e, m float64
		seen := make([]bool, n)
		for p, v := range y {
			b := f.perm[p]
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

func BenchmarkFFT(b *testing.B) {
	for _, n := range []int{4096, 16384, 65536} {
		x := randomComplex(n, 1)
		b.Run(fmt.Sprintf("radix4/n=%d", n), func(b *testing.B) {
			f := newRadix4(n)
			b.SetBytes(int64(16 * n))
			b.ReportAllocs()
			for b.Loop() {
				f.transform(x)
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
