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

func TestInterpRealKernelMatchesGo(t *testing.T) {
	// interpRealAVX2 against its Go twin on random taps and samples, for
	// four and eight phases and odd and even tap counts. Tolerance:
	// float32 rounding of k multiply-adds (the kernel fuses them),
	// 1e-5 (common practice).
	if !haveKernels {
		t.Skip("no AVX2/FMA kernels in this build")
	}
	const tol = 1e-5
	r := gaussNoise(4000, 1, 9)
	for _, u := range []int{4, 6, 8, 12, 5, 3} {
		for _, k := range []int{1, 10, 11} {
			ph := make([][]float32, u)
			phq := make([][]float32, u)
			for p := range u {
				ph[p] = make([]float32, k)
				phq[p] = make([]float32, k)
				for i := range k {
					ph[p][i] = real(r[p*k+i])
					phq[p][i] = imag(r[p*k+i])
				}
			}
			for _, n := range []int{1, 3, 64, 67} {
				x := gaussNoise(n+k, 1, uint64(u*k))
				want := make([]float32, n*u)
				got := make([]float32, n*u+1) // one past, which must stay untouched
				interpRealGo(want, x, ph, phq)
				tp := newInterpTapsIQ(ph, phq, k)
				interpRealAVX2(&got[0], &x[0], n, &tp.taps[0], k, tp.full+tp.part, u, tp.part, &interpRealMasks[u%4])
				for i := range want {
					if math.Abs(float64(got[i]-want[i])) > tol {
						t.Fatalf("u=%d k=%d n=%d: output %d = %g, want %g", u, k, n, i, got[i], want[i])
					}
				}
				if got[n*u] != 0 {
					t.Fatalf("u=%d k=%d n=%d: wrote past the end", u, k, n)
				}
			}
		}
	}
}
