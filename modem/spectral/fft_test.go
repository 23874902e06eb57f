package spectral

import (
	"math"
	"math/rand/v2"
	"testing"

	"ssbkit/internal/fft"
)

func randomComplex(n int, seed uint64) []complex128 {
	r := rand.New(rand.NewPCG(seed, 3))
	x := make([]complex128, n)
	for i := range x {
		x[i] = complex(r.NormFloat64(), r.NormFloat64())
	}
	return x
}

func TestSegmentPowerFused(t *testing.T) {
	// The fused first and last passes do the same arithmetic as window,
	// transform and square done apart; only the AVX2 passes' fused
	// multiply-adds round differently, in the last bits.
	const tol = 1e-13 // relative to the largest power
	for _, n := range []int{16, 64, 1024, 4096} {
		f := fft.NewRadix4(n)
		if !fused(f) {
			t.Fatalf("n=%d not fused", n)
		}
		x := addNoise(make([]complex64, n), 1, uint64(n))
		win := Hann.Coefficients(n)
		work := make([]complex128, n)
		want := make([]float64, n)
		for i, v := range x {
			work[i] = complex(float64(real(v))*win[i], float64(imag(v))*win[i])
		}
		f.Transform(work)
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
		segmentPower(f, work, x, win, got, false, cols, colOf)
		segmentPower(f, work, x, win, got, true, nil, nil) // adds the same again
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
	if fused(fft.NewRadix4(512)) || fused(fft.NewRadix4(8)) {
		t.Error("odd log₂n reported as fused")
	}
}
