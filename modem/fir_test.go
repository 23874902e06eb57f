package modem

import (
	"math"
	"math/cmplx"
	"testing"
)

// refConv is the convolution sum y[n] = Σ h[k]·x[n−k] in float64
// (Oppenheim & Schafer, 3rd ed., eq. 2.49), zero initial state.
func refConv(h []float64, x []complex64) []complex128 {
	y := make([]complex128, len(x))
	for n := range x {
		for k, v := range h {
			if n-k >= 0 {
				y[n] += complex(v, 0) * complex128(x[n-k])
			}
		}
	}
	return y
}

var blockSizes = []int{1, 2, 3, 7, 64, 100, 1000, 2047, 2048, 2049, 5000}

func TestFIR(t *testing.T) {
	const tol = 1e-5 // float32 sums of ~100 unit-scale products
	for _, n := range []int{1, 2, 5, 77, 249} {
		h := make([]float64, n)
		for i := range h {
			h[i] = math.Sin(float64(i+1)) / float64(n)
		}
		x := testSignal(6000, uint64(n))
		want := refConv(h, x)
		whole := NewFIR(h).Process(nil, x)
		for i := range want {
			if cmplx.Abs(complex128(whole[i])-want[i]) > tol {
				t.Fatalf("%d taps: y[%d] = %v, want %v", n, i, whole[i], want[i])
			}
		}
		for _, bs := range blockSizes {
			f := NewFIR(h)
			var got []complex64
			for off := 0; off < len(x); off += bs {
				got = append(got, f.Process(nil, x[off:min(off+bs, len(x))])...)
			}
			for i := range whole {
				if got[i] != whole[i] {
					t.Fatalf("%d taps, block %d: y[%d] = %v, whole-signal %v", n, bs, i, got[i], whole[i])
				}
			}
		}
		// in place, after Reset
		f := NewFIR(h)
		f.Process(nil, x[:100])
		f.Reset()
		in := append([]complex64(nil), x...)
		f.Process(in, in)
		for i := range in {
			if in[i] != whole[i] {
				t.Fatalf("%d taps in place: y[%d] differs", n, i)
			}
		}
	}
}

func TestRealFIR(t *testing.T) {
	// Against the float64 convolution: the float32 taps (relative error
	// u = 2⁻²⁴ each) and the float32 sum of len(h) products (Higham's
	// γ_k, see txGammaK) bound the error by (γ_k + u)·Σ|h[k]·x[n−k]|, and
	// rounding the result adds u·|y|.
	u := math.Ldexp(1, -24)
	h := KaiserLowpass(1000, 400, 8000, 60)
	x := testReal(7000, 5)
	xc := make([]complex64, len(x))
	for i, v := range x {
		xc[i] = complex(v, 0)
	}
	want := refConv(h, xc)
	whole := NewRealFIR(h).Process(nil, x)
	for i := range want {
		var mag float64
		for k := 0; k < len(h) && k <= i; k++ {
			mag += math.Abs(h[k] * float64(x[i-k]))
		}
		tol := (txGammaK(len(h))+u)*mag + u*math.Abs(real(want[i]))
		if math.Abs(float64(whole[i])-real(want[i])) > tol {
			t.Fatalf("y[%d] = %v, want %v (bound %.3g)", i, whole[i], real(want[i]), tol)
		}
	}
	for _, bs := range blockSizes {
		f := NewRealFIR(h)
		var got []float32
		for off := 0; off < len(x); off += bs {
			got = append(got, f.Process(nil, x[off:min(off+bs, len(x))])...)
		}
		for i := range whole {
			if got[i] != whole[i] {
				t.Fatalf("block %d: y[%d] differs", bs, i)
			}
		}
	}
	if d := NewRealFIR(h).Delay(); d != float64(len(h)-1)/2 {
		t.Errorf("delay %v", d)
	}
}

// TestFIRDelay checks that a symmetric filter delays a tone by (N−1)/2
// samples (linear phase, Oppenheim & Schafer, 3rd ed., sec. 5.7.3).
func TestFIRDelay(t *testing.T) {
	const tol = 2e-3 // ripple at 60 dB plus float32
	h := KaiserLowpass(1000, 400, 8000, 60)
	f := NewFIR(h)
	x := NewOscillator(300, 8000).Generate(make([]complex64, 2000))
	y := f.Process(nil, x)
	d := int(f.Delay())
	for n := len(h); n < len(y); n++ {
		if cmplx.Abs(complex128(y[n])-complex128(x[n-d])) > tol {
			t.Fatalf("y[%d] = %v, x[%d] = %v", n, y[n], n-d, x[n-d])
		}
	}
}

func TestFIRAllocs(t *testing.T) {
	f := NewFIR(KaiserLowpass(1000, 400, 8000, 60))
	rf := NewRealFIR(KaiserLowpass(1000, 400, 8000, 60))
	x := testSignal(5000, 1)
	xr := testReal(5000, 1)
	dst := make([]complex64, len(x))
	dr := make([]float32, len(x))
	if a := testing.AllocsPerRun(10, func() { f.Process(dst, x); rf.Process(dr, xr) }); a != 0 {
		t.Errorf("%v allocations per block", a)
	}
}

func BenchmarkFIR(b *testing.B) {
	for _, n := range []int{15, 63, 255} {
		h := make([]float64, n)
		for i := range h {
			h[i] = 1 / float64(n)
		}
		b.Run(itoa(n)+"taps", func(b *testing.B) {
			f := NewFIR(h)
			x := testSignal(8192, 1)
			dst := make([]complex64, len(x))
			b.SetBytes(int64(8 * len(x)))
			b.ReportAllocs()
			for b.Loop() {
				f.Process(dst, x)
			}
			b.ReportMetric(float64(b.N*len(x))/b.Elapsed().Seconds()/1e6, "MS/s")
		})
	}
}

// TestRealFIRKernel checks the real FIR as run (the vector kernel where the
// CPU has one) against the reference loop realFIRGo, output by output,
// within twice Higham's float32 inner-product bound γ_L·Σ|h||w| (see
// txGammaK), for lengths that leave partial groups.
func TestRealFIRKernel(t *testing.T) {
	for _, l := range []int{1, 3, 31, 173} {
		h := make([]float64, l)
		for i, v := range testReal(l, uint64(l)) {
			h[i] = float64(v) / float64(l)
		}
		for _, n := range []int{1, 31, 32, 33, 100, 2048} {
			x := testReal(n+l-1, uint64(n))
			f := NewRealFIR(h)
			got := make([]float32, n)
			want := make([]float32, n)
			if f.pad != nil {
				realFIRVec(got, x, f.rev, f.pad)
			} else {
				realFIRGo(got, x, f.rev)
			}
			realFIRGo(want, x, f.rev)
			for i := range got {
				var mag float64
				for k, c := range f.rev {
					mag += math.Abs(float64(c) * float64(x[i+k]))
				}
				if d := math.Abs(float64(got[i] - want[i])); d > 2*txGammaK(l)*mag {
					t.Fatalf("%d taps, %d outputs: y[%d] differs by %.3g (bound %.3g)", l, n, i, d, 2*txGammaK(l)*mag)
				}
			}
		}
	}
}

func BenchmarkRealFIR(b *testing.B) {
	for _, n := range []int{63, 173} {
		h := make([]float64, n)
		for i := range h {
			h[i] = 1 / float64(n)
		}
		b.Run(itoa(n)+"taps", func(b *testing.B) {
			f := NewRealFIR(h)
			x := testReal(8192, 1)
			dst := make([]float32, len(x))
			b.SetBytes(int64(4 * len(x)))
			b.ReportAllocs()
			for b.Loop() {
				f.Process(dst, x)
			}
			b.ReportMetric(float64(b.N*len(x))/b.Elapsed().Seconds()/1e6, "MS/s")
		})
	}
}
