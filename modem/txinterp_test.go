package modem

import (
	"math"
	"math/cmplx"
	"testing"
)

// txGammaK is Higham's bound factor γ_k = k·u/(1 − k·u) for a float32 sum
// of k products, u = 2⁻²⁴: |fl(xᵀy) − xᵀy| ≤ γ_k·|x|ᵀ|y| (Higham,
// Accuracy and Stability of Numerical Algorithms, 2nd ed., sec. 3.1; from
// memory). Two summation orders (the vector kernel's partial sums and
// FMA, the reference loop's running sum) differ by at most twice that.
func txGammaK(k int) float64 {
	u := math.Ldexp(1, -24)
	return float64(k) * u / (1 - float64(k)*u)
}

// mixInterpCase builds a stage for a random prototype of ntaps taps.
func mixInterpCase(ntaps, up int, offset, outRate float64) (*mixInterp, []float64) {
	x := testReal(ntaps, uint64(ntaps*1000+up))
	h := make([]float64, ntaps)
	for i, v := range x {
		h[i] = float64(v) / float64(ntaps)
	}
	p := stagePlan{up: up, down: 1, inRate: outRate / float64(up), outRate: outRate, taps: h}
	return newMixInterp(p, offset), h
}

// TestMixInterpKernel checks the vector kernel (where the CPU has one)
// against the reference loop mixInterpGo, output by output, within twice
// Higham's float32 inner-product bound.
func TestMixInterpKernel(t *testing.T) {
	if !useMixInterpAVX2 {
		t.Log("no vector kernel on this machine or build: mixInterpKernel is mixInterpGo")
	}
	for _, k := range []int{4, 8, 12, 20} {
		for _, up := range []int{1, 2, 3, 4, 5, 7, 75} {
			for _, off := range []float64{0, 123456.7} {
				s, _ := mixInterpCase(k*up-up/2, up, off, 2.4e6)
				if s.k != k {
					t.Fatalf("k %d, want %d", s.k, k)
				}
				const n = 37
				win := testSignal(n-1+k, uint64(k+up))
				out := mixInterpGroup * s.groups
				got := make([]complex64, (n-1)*up+out)
				want := make([]complex64, len(got))
				mixInterpKernel(got, win, s.taps, n, k, s.groups, up, s.cplx)
				mixInterpGo(want, win, s.taps, n, k, s.groups, up, s.cplx)
				stride := 8
				if s.cplx {
					stride = 16
				}
				tol := 2 * txGammaK(2*k) // complex products: 2k terms per part
				for j := range n {
					for ph := range up {
						// Σ|c|·|w| for this output bounds the rounding.
						var mag float64
						g, q := ph/mixInterpGroup, ph%mixInterpGroup
						for i := range k {
							tp := s.taps[(g*k+i)*stride:]
							c := complex(float64(tp[2*q]), 0)
							if s.cplx {
								c += complex(0, float64(tp[8+2*q]))
							}
							mag += cmplx.Abs(c) * cmplx.Abs(complex128(win[j+i]))
						}
						m := j*up + ph
						if d := cmplx.Abs(complex128(got[m] - want[m])); d > tol*mag+1e-30 {
							t.Fatalf("k %d up %d offset %g: output %d differs by %.3g (bound %.3g)", k, up, off, m, d, tol*mag)
						}
					}
				}
			}
		}
	}
}

// TestMixInterpDefinition checks the folded stage against the
// definition computed in float64: interpolate, then mix,
//
//	y[m] = e^{j(φ₀ + ωm)} Σᵢ h[p + i·up]·x[n − i],  m = n·up + p
//
// (Crochiere & Rabiner, Multirate Digital Signal Processing, 1983, eq.
// 3.52 for the polyphase form; from memory), with ω = 2π·offset/fout. The
// tolerance covers float32 taps, premix and sums: 4γ_{2k}·Σ|h||x| plus the
// rounding of two complex64 phasors (2⁻²³ each).
func TestMixInterpDefinition(t *testing.T) {
	for _, c := range []struct {
		ntaps, up       int
		offset, outRate float64
		phi             float64
	}{
		{571, 75, 100000, 2.4e6, 0},
		{571, 75, -333333.3, 2.4e6, 1.1},
		{80, 4, 0, 32000, 0},
		{37, 6, 12000, 48000, -2},
		{9, 1, 5000, 48000, 0.5},
	} {
		s, h := mixInterpCase(c.ntaps, c.up, c.offset, c.outRate)
		s.setPhase(c.phi)
		x := testSignal(3000, 7)
		y := s.process(make([]complex64, 0, s.maxOut(len(x))), x)
		if len(y) != len(x)*c.up {
			t.Fatalf("%d outputs, want %d", len(y), len(x)*c.up)
		}
		worst := 0.0 // largest error relative to its tolerance
		for m := range y {
			n, p := m/c.up, m%c.up
			var acc complex128
			var mag float64
			for i := 0; p+i*c.up < len(h) && n-i >= 0; i++ {
				v := complex128(x[n-i])
				acc += complex(h[p+i*c.up], 0) * v
				mag += math.Abs(h[p+i*c.up]) * cmplx.Abs(v)
			}
			// Phase in cycles mod 1, so that m·ω keeps its precision.
			cyc := math.Mod(c.offset/c.outRate*float64(m), 1)
			want := acc * cmplx.Exp(complex(0, c.phi+2*math.Pi*cyc))
			tol := (4*txGammaK(2*s.k)+2*math.Ldexp(1, -23))*mag + 1e-12
			d := cmplx.Abs(complex128(y[m]) - want)
			worst = math.Max(worst, d/tol)
			if d > tol {
				t.Fatalf("up %d offset %g: output %d off by %.3g (tol %.3g)", c.up, c.offset, m, d, tol)
			}
		}
		t.Logf("up %d offset %g: worst error %.2f of the tolerance", c.up, c.offset, worst)
	}
}

// TestOffsetResamplerBlocks checks that the folded chain gives the same
// samples whatever the block size, allocates nothing per block, and that
// Reset returns to the start (with the carrier phase set).
func TestOffsetResamplerBlocks(t *testing.T) {
	r, err := newOffsetResampler(ResamplerSpec{InRate: 8000, OutRate: 2.4e6, Pass: 2700, AttenDB: 90}, 100000)
	if err != nil || r == nil {
		t.Fatalf("no folded resampler: %v", err)
	}
	r.last.setPhase(0.3)
	x := testSignal(5000, 3)
	whole := append([]complex64(nil), r.Process(nil, x)...)
	for _, bs := range []int{1, 7, 256, 1023, 1024, 1025, 4999} {
		r.Reset()
		var got []complex64
		for off := 0; off < len(x); off += bs {
			got = append(got, r.Process(nil, x[off:min(off+bs, len(x))])...)
		}
		if len(got) != len(whole) {
			t.Fatalf("block %d: %d samples, whole %d", bs, len(got), len(whole))
		}
		for i := range got {
			if got[i] != whole[i] {
				t.Fatalf("block %d: sample %d differs", bs, i)
			}
		}
	}
	dst := make([]complex64, 0, r.MaxOut(4096))
	if a := testing.AllocsPerRun(5, func() { r.Process(dst, x[:4096]) }); a != 0 {
		t.Errorf("%v allocations per block", a)
	}
}

// TestOffsetResamplerTone checks a tone through the folded chain against
// its ideal form e^{j2π((f + offset)(m − D) + offset·D)/fout}: the
// frequency lands exactly at f + offset and the carrier phase is 0 at
// output 0. Error allowed as in TestResamplerTone (Kaiser ripple δ per
// stage, Oppenheim & Schafer, 3rd ed., eq. 7.74), plus float32 rounding.
func TestOffsetResamplerTone(t *testing.T) {
	const in, out, pass, atten, f, off = 8000.0, 2.4e6, 2700.0, 90.0, 1234.5, -250000.0
	r, err := newOffsetResampler(ResamplerSpec{InRate: in, OutRate: out, Pass: pass, AttenDB: atten}, off)
	if err != nil || r == nil {
		t.Fatalf("no folded resampler: %v", err)
	}
	x := NewOscillator(f, in).Generate(make([]complex64, 800))
	y := r.Process(nil, x)
	d := r.delay
	tol := float64(2*(len(r.stages))+1)*math.Pow(10, -atten/20) + 2e-6
	var worst float64
	for m := int(2*d) + 10; m < len(y)-10; m++ {
		// baseband tone delayed by D, then the mixer at output m
		ph := math.Mod(f*(float64(m)-d)/out, 1) + math.Mod(off*float64(m)/out, 1)
		worst = math.Max(worst, cmplx.Abs(complex128(y[m])-cmplx.Exp(complex(0, 2*math.Pi*ph))))
	}
	t.Logf("max error %.3g (tol %.3g), delay %.2f", worst, tol, d)
	if worst > tol {
		t.Errorf("max error %.3g > %.3g", worst, tol)
	}
}

func BenchmarkMixInterpKernel(b *testing.B) {
	for _, off := range []float64{0, 100000} {
		s, _ := mixInterpCase(571, 75, off, 2.4e6)
		const n = 1024
		win := testSignal(n-1+s.k, 1)
		dst := make([]complex64, (n-1)*s.up+mixInterpGroup*s.groups)
		name := "real"
		if s.cplx {
			name = "complex"
		}
		for _, kern := range []struct {
			name string
			f    func(dst, win []complex64, taps []float32, n, k, groups, up int, cplx bool)
		}{{"go", mixInterpGo}, {"kernel", mixInterpKernel}} {
			b.Run(name+"/"+kern.name, func(b *testing.B) {
				b.SetBytes(8 * n * int64(s.up)) // output bytes
				b.ReportAllocs()
				for b.Loop() {
					kern.f(dst, win, s.taps, n, s.k, s.groups, s.up, s.cplx)
				}
				b.ReportMetric(float64(b.N)*n*float64(s.up)/b.Elapsed().Seconds()/1e6, "MS/s_out")
			})
		}
	}
}
