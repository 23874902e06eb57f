package modem

import (
	"math"
	"math/cmplx"
	"testing"

	"gonum.org/v1/gonum/dsp/fourier"
)

func TestFFTPlan(t *testing.T) {
	// Reference: gonum's dsp/fourier CmplxFFT (the same sign convention,
	// X[k] = Σ x[i]·e^{−j2πik/n}). Tolerance: float64 rounding over
	// log₂n passes, relative to the largest bin (common practice).
	const tol = 1e-12
	for _, n := range []int{4, 8, 16, 32, 64, 128, 512, 1024, 2048} {
		x := testSignal(n, uint64(n))
		a := make([]complex128, n)
		for i, v := range x {
			a[i] = complex128(v)
		}
		want := fourier.NewCmplxFFT(n).Coefficients(nil, a)
		p := newFFTPlan(n)
		p.forward(a)
		var peak, worst float64
		for k := range a {
			peak = math.Max(peak, cmplx.Abs(want[k]))
			worst = math.Max(worst, cmplx.Abs(a[k]-want[k]))
		}
		if worst > tol*peak {
			t.Errorf("n=%d: largest error %.3g of a peak %.3g", n, worst, peak)
		}
	}
}
