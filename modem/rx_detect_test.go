package modem

import (
	"math"
	"testing"
)

func TestSSBDetectorMatchesDemod(t *testing.T) {
	// The folded detector against its definition: Interpolator then
	// SSBDemod advanced by the delay (USB and LSB, several delays and
	// block sizes). Tolerance: float32 rounding of the taps' phases and
	// the premix, 2e-6 of the input's level (common practice).
	const tol = 2e-6
	const fw, fa, u = 6000.0, 48000.0, 8
	h := KaiserLowpass(fw/2, fw-2*1425, fa, 80)
	x := gaussNoise(5000, 0.5, 3)
	for _, shift := range []float64{1500, -1500, 1234.5} {
		for _, delay := range []int{0, 377, 1001} {
			it := NewInterpolator(h, u)
			sd := NewSSBDemod(shift, fa)
			sd.Advance(-delay)
			want := sd.Process(nil, it.Process(nil, x))
			det := newSSBDetector(h, u, shift, fa, delay)
			for _, bs := range []int{5000, 1, 333} {
				det.Reset()
				var got, buf []float32
				for i := 0; i < len(x); i += bs {
					buf = det.Process(buf, x[i:min(len(x), i+bs)])
					got = append(got, buf...)
				}
				if len(got) != len(want) {
					t.Fatalf("%d samples, want %d", len(got), len(want))
				}
				for i := range got {
					if math.Abs(float64(got[i]-want[i])) > tol {
						t.Fatalf("shift %g delay %d block %d: sample %d = %g, want %g", shift, delay, bs, i, got[i], want[i])
					}
				}
			}
		}
	}
}
