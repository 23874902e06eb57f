package spectral

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

func TestButterfliesAVX2(t *testing.T) {
	// The AVX2 kernel against its Go reference loop on random data; they
	// differ only by the rounding of fused multiply-adds (one or two
	// units in the last place of float64).
	if !haveAVX2 {
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

func TestSegmentPowerFused(t *testing.T) {
	// The fused first and last passes do the same arithmetic as window,
	// transform and square done apart; only the AVX2 passes' fused
	// multiply-adds round differently, in the last bits.
	const tol = 1e-13 // relative to the largest power
	for _, n := range []int{16, 64, 1024, 4096} {
		f := newRadix4(n)
		if !f.fused() {
			t.Fatalf("n=%d not fused", n)
		}
		x := addNoise(make([]complex64, n), 1, uint64(n))
		win := Hann.Coefficients(n)
		work := make([]complex128, n)
		want := make([]float64, n)
		for i, v := range x {
			work[i] = complex(float64(real(v))*win[i], float64(imag(v))*win[i])
		}
		f.transform(work)
		for p, c := range work {
			want[p] = real(c)*real(c) + imag(c)*imag(c)
		}
		colOf := make([]int32, n)
		for p := range colOf {
			colOf[p] = int32(p % 7)
		}
		wantCols := make([]float64, 7)
		for p, v := range want {
			wantCols[colOf[p]] += v
		}
		got := make([]float64, n)
		cols := make([]float64, 7)
		f.segmentPower(work, x, win, got, false, cols, colOf)
		f.segmentPower(work, x, win, got, true, nil, nil) // adds the same again
		var top float64
		for _, v := range want {
			top = math.Max(top, v)
		}
		for p := range got {
			if math.Abs(got[p]-2*want[p]) > 2*tol*top {
				t.Fatalf("n=%d position %d: %g, want %g", n, p, got[p], 2*want[p])
			}
		}
		for c := range cols {
			if math.Abs(cols[c]-wantCols[c]) > tol*float64(n)*top {
				t.Errorf("n=%d column %d: %g, want %g", n, c, cols[c], wantCols[c])
			}
		}
	}
	if newRadix4(512).fused() || newRadix4(8).fused() {
		t.Error("odd log₂n reported as fused")
	}
}
