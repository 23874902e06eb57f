package modem

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// kernelBound is the rounding bound of a float32 dot product of n terms,
// 2·γₙ·Σ|tₖ||xₖ| with γₙ = n·u/(1 − n·u), u = 2⁻²⁴, for the difference of
// two evaluations in different orders (Higham, Accuracy and Stability of
// Numerical Algorithms, 2nd ed., sec. 3.1, eq. 3.5, from memory). A
// complex term counts as two real products and one more addition.
func kernelBound(n int, mag float64) float64 {
	u := math.Ldexp(1, -24)
	g := float64(n) * u / (1 - float64(n)*u)
	return 2 * g * mag
}

// rotationBound is the relative difference allowed between two
// rotations of a float32 sum by the same unit phasor: each rounds the
// phasor to float32 (2u relative) and multiplies in float32 (√5·u,
// Brent, Percival & Zimmermann, Math. Comp. 76, 2007, thm. 1, from
// memory), u = 2⁻²⁴; twice that for the difference of two.
var rotationBound = 2 * (2 + math.Sqrt(5)) * math.Ldexp(1, -24)

// TestKernelsMatchGo compares the assembly kernels with their Go twins
// (the reference loops) on seeded random taps and samples, for tap
// counts covering every partial group, several steps and output counts.
// The samples after the last window are NaN: a kernel that read past
// its windows (the masked last group) would return NaN.
func TestKernelsMatchGo(t *testing.T) {
	if !haveKernels {
		t.Skip("no assembly kernels in this build (purego, another architecture or no AVX2/FMA)")
	}
	r := rand.New(rand.NewPCG(5, 6))
	for _, l := range []int{1, 2, 3, 4, 5, 7, 8, 9, 13, 16, 31, 53, 75, 128} {
		for _, step := range []int{1, 5, 16} {
			for _, cnt := range []int{1, 2, 7, 23, 37, 64} {
				name := fmt.Sprintf("L%d_step%d_n%d", l, step, cnt)
				cr := make([]float32, l)
				ci := make([]float32, l)
				for k := range l {
					cr[k] = float32(r.NormFloat64())
					ci[k] = float32(r.NormFloat64())
				}
				need := (cnt-1)*step + l
				x := testSignal(need+8, uint64(l*1000+step*10+cnt))
				for i := need; i < len(x); i++ {
					x[i] = complex(float32(math.NaN()), float32(math.NaN()))
				}
				x = x[:need]
				kt := newKernelTaps(cr, ci)
				got := make([]complex64, cnt)
				want := make([]complex64, cnt)
				p := phasor(r.Uint64())
				rot := phasor(r.Uint64())
				kt.dotRotate(got, x, step, p, rot)
				dotComplexGo(want, x, step, cr, ci)
				rotate(want, p, rot)
				ktr := newKernelTaps(cr, nil)
				gotR := make([]complex64, cnt)
				wantR := make([]complex64, cnt)
				ktr.dotReal(gotR, x, step)
				dotRealGo(wantR, x, step, cr)
				for m := range cnt {
					var mag, magR float64
					for k := range l {
						v := x[m*step+k]
						ax := math.Abs(float64(real(v))) + math.Abs(float64(imag(v)))
						mag += (math.Abs(float64(cr[k])) + math.Abs(float64(ci[k]))) * ax
						magR += math.Abs(float64(cr[k])) * ax
					}
					// The rotation by a unit phasor adds at most
					// rotationBound·|y| (see there).
					tol := kernelBound(l+1, mag) + rotationBound*cabs(want[m])
					if d := cabs(got[m] - want[m]); !(d <= tol) {
						t.Errorf("%s complex output %d: kernel %v, Go %v (difference %.3g > %.3g)", name, m, got[m], want[m], d, tol)
					}
					tolR := kernelBound(l, magR)
					if d := cabs(gotR[m] - wantR[m]); !(d <= tolR) {
						t.Errorf("%s real output %d: kernel %v, Go %v (difference %.3g > %.3g)", name, m, gotR[m], wantR[m], d, tolR)
					}
				}
			}
		}
	}
}

// TestInterpKernelMatchesGo compares interpAVX2 with interpGo for
// every phase count modulo 4 and odd and even taps per phase; the output
// after the last input's phases is NaN beforehand and must stay so (the
// masked store of the last partial group writes nothing past it).
func TestInterpKernelMatchesGo(t *testing.T) {
	if !haveKernels {
		t.Skip("no assembly kernels in this build (purego, another architecture or no AVX2/FMA)")
	}
	r := rand.New(rand.NewPCG(7, 8))
	nan := complex(float32(math.NaN()), float32(math.NaN()))
	for _, u := range []int{1, 2, 3, 4, 5, 6, 7, 8, 9, 12} {
		for _, k := range []int{1, 2, 3, 10, 11} {
			ph := make([][]float32, u)
			for p := range ph {
				ph[p] = make([]float32, k)
				for i := range ph[p] {
					ph[p][i] = float32(r.NormFloat64())
				}
			}
			const n = 37
			x := testSignal(n+k-1, uint64(100*u+k))
			got := make([]complex64, n*u+4)
			for i := range got {
				got[i] = nan
			}
			want := make([]complex64, n*u)
			newInterpTaps(ph, k).interp(got[:n*u], x)
			interpGo(want, x, ph)
			for o := range want {
				j, p := o/u, o%u
				var mag float64
				for i := range k {
					v := x[j+i]
					mag += math.Abs(float64(ph[p][i])) * (math.Abs(float64(real(v))) + math.Abs(float64(imag(v))))
				}
				// kernelBound: Higham, 2nd ed., eq. 3.5 (from memory)
				if d := cabs(got[o] - want[o]); !(d <= kernelBound(k, mag)) {
					t.Errorf("u=%d k=%d output %d: kernel %v, Go %v", u, k, o, got[o], want[o])
				}
			}
			for o := n * u; o < len(got); o++ {
				if !cmplxIsNaN(got[o]) {
					t.Errorf("u=%d k=%d: kernel wrote %v past its outputs at %d", u, k, got[o], o)
				}
			}
		}
	}
}

func cmplxIsNaN(z complex64) bool { return real(z) != real(z) }

func cabs(z complex64) float64 { return math.Hypot(float64(real(z)), float64(imag(z))) }

// TestKernelPanics checks the bounds check before the assembly.
func TestKernelPanics(t *testing.T) {
	kt := newKernelTaps(make([]float32, 8), make([]float32, 8))
	defer func() {
		if recover() != "modem: kernel window too short" {
			t.Error("no panic for a short window")
		}
	}()
	kt.dotRotate(make([]complex64, 3), make([]complex64, 2*5+7), 5, 1, 1)
}

// BenchmarkKernels measures the first-stage dot products of the 2.4 MS/s
// USB plan (31 taps every 16 samples), a Kaiser stage (53 taps every 5)
// and the ×8 interpolation to 48 kHz (10 taps a phase), by kernel and Go
// twin; bytes are counted as 2 (cu8) per sample of the stage's input.
func BenchmarkKernels(b *testing.B) {
	run := func(name string, bytes int, f func()) {
		b.Run(name, func(b *testing.B) {
			b.SetBytes(int64(bytes))
			b.ReportAllocs()
			for b.Loop() {
				f()
			}
		})
	}
	const n = 1 << 16
	for _, p := range []struct{ l, d int }{{31, 16}, {31, 5}, {53, 5}, {71, 1}} {
		cr := testReal(p.l, 1)
		ci := testReal(p.l, 2)
		hs := slices.Clone(cr) // symmetric, as the Kaiser stages' taps
		for k := range p.l / 2 {
			hs[p.l-1-k] = hs[k]
		}
		x := testSignal(n+p.l, 3)
		dst := make([]complex64, n/p.d)
		kt := newKernelTaps(cr, ci)
		ktr := newKernelTaps(cr, nil)
		sfx := fmt.Sprintf("_L%d_d%d", p.l, p.d)
		run("complexGo"+sfx, 2*n, func() { dotComplexGo(dst, x, p.d, cr, ci); rotate(dst, 1, 1) })
		run("realGo"+sfx, 2*n, func() { dotRealGo(dst, x, p.d, cr) })
		if haveKernels {
			st := newRealSymTaps(hs)
			run("complexAVX2"+sfx, 2*n, func() { kt.dotRotate(dst, x, p.d, 1, 1) })
			run("realAVX2"+sfx, 2*n, func() { ktr.dotReal(dst, x, p.d) })
			run("realSymAVX2"+sfx, 2*n, func() { st.dot(dst, x, p.d) })
		}
	}
	ph := make([][]float32, 8)
	for i := range ph {
		ph[i] = testReal(10, uint64(10+i))
	}
	const m = 1 << 12
	xi := testSignal(m+9, 4)
	yi := make([]complex64, 8*m)
	run("interpGo_u8_k10", 2*m, func() { interpGo(yi, xi, ph) })
	if haveKernels {
		it := newInterpTaps(ph, 10)
		run("interpAVX2_u8_k10", 2*m, func() { it.interp(yi, xi) })
	}
}

// TestStagesBlockwise runs a Decimator and an Interpolator over one
// signal in blocks of many sizes (shorter and longer than the history)
// and compares every output with the direct sums of their definitions,
// y[m] = Σₖ h[k]·x[m·d + phase − k] and y[n·u + p] = Σᵢ u·h[p + i·u]·x[n − i]
// with x = 0 before the start (Crochiere & Rabiner, Multirate Digital
// Signal Processing, 1983, sec. 3.3), within the float32 rounding bound
// kernelBound (Higham, 2nd ed., eq. 3.5, from memory) plus 2⁻²³·Σ|h||x|
// for rounding the float64 reference to float32; and the steady
// state allocates nothing.
func TestStagesBlockwise(t *testing.T) {
	h := KaiserLowpass(0.1, 0.1, 1, 80)
	x := testSignal(3000, 21)
	at := func(i int) complex128 {
		if i < 0 || i >= len(x) {
			return 0
		}
		return complex128(x[i])
	}
	for _, d := range []int{1, 3, 5} {
		for _, bs := range []int{1, 2, 7, len(h) - 2, len(h), 100, 3000} {
			f := NewDecimator(h, d, d-1)
			var got []complex64
			var dst []complex64
			for i := 0; i < len(x); i += bs {
				dst = f.Process(dst, x[i:min(i+bs, len(x))])
				got = append(got, dst...)
			}
			if want := (len(x)-d)/d + 1; len(got) != want {
				t.Fatalf("decimator d=%d block %d: %d outputs, want %d", d, bs, len(got), want)
			}
			for m, g := range got {
				var s complex128
				var mag float64
				for k, v := range h {
					xv := at(m*d + d - 1 - k)
					s += complex(v, 0) * xv
					mag += math.Abs(v) * (math.Abs(real(xv)) + math.Abs(imag(xv)))
				}
				if e := cabs(g - complex64(s)); !(e <= kernelBound(len(h), mag)+math.Ldexp(mag, -23)) {
					t.Fatalf("decimator d=%d block %d output %d: %v, want %v", d, bs, m, g, s)
				}
			}
		}
	}
	const u = 4
	for _, bs := range []int{1, 2, 5, 100, 3000} {
		it := NewInterpolator(h, u)
		var got, dst []complex64
		for i := 0; i < len(x); i += bs {
			dst = it.Process(dst, x[i:min(i+bs, len(x))])
			got = append(got, dst...)
		}
		for o, g := range got {
			n, p := o/u, o%u
			var s complex128
			var mag float64
			for i := 0; p+i*u < len(h); i++ {
				xv := at(n - i)
				c := u * h[p+i*u]
				s += complex(c, 0) * xv
				mag += math.Abs(c) * (math.Abs(real(xv)) + math.Abs(imag(xv)))
			}
			if e := cabs(g - complex64(s)); !(e <= kernelBound(len(h), mag)+math.Ldexp(mag, -23)) {
				t.Fatalf("interpolator block %d output %d: %v, want %v", bs, o, g, s)
			}
		}
	}
	f := NewDecimator(h, 5, 0)
	it := NewInterpolator(h, u)
	dst := make([]complex64, 0, 1024*u)
	if a := testing.AllocsPerRun(10, func() {
		dst = f.Process(dst, x[:1000])
		dst = it.Process(dst, x[:1000])
	}); a != 0 {
		t.Errorf("%v allocations per block, want 0", a)
	}
}

// TestSymKernelMatchesGo compares dotSymAVX2 with blockSym, its Go twin,
// for odd and even tap counts, every output count parity and several
// steps, through ShiftDecimator.Block (the kernel then the Go loop on the
// same decimator).
func TestSymKernelMatchesGo(t *testing.T) {
	if !haveKernels {
		t.Skip("no assembly kernels in this build (purego, another architecture or no AVX2/FMA)")
	}
	r := rand.New(rand.NewPCG(9, 10))
	for _, l := range []int{8, 9, 13, 16, 19, 31, 32, 53, 63} {
		for _, d := range []int{1, 5, 16} {
			taps := make([]float64, l)
			for k := range (l + 1) / 2 {
				v := r.NormFloat64()
				taps[k], taps[l-1-k] = v, v
			}
			s := NewShiftDecimator(taps, d, 0, 123.4e3, 2.4e6)
			if s.st == nil {
				t.Fatalf("L=%d: no symmetric kernel layout", l)
			}
			for _, cnt := range []int{1, 2, 7, 64} {
				nb := (cnt-1)*d + 1
				win := testSignal(l-1+nb, uint64(l*100+d*10+cnt))
				a := int64(r.IntN(1 << 20))
				a -= a % int64(d)
				got := s.Block(nil, win, a)
				want := s.blockSym(nil, win, a, cnt) // a ≡ phase 0 (mod d): the first window is win's
				if len(got) != cnt || len(want) != cnt {
					t.Fatalf("L=%d d=%d: %d and %d outputs, want %d", l, d, len(got), len(want), cnt)
				}
				for m := range cnt {
					var mag float64
					for k := range l {
						v := win[m*d+k]
						mag += 2 * math.Abs(taps[k]) * (math.Abs(float64(real(v))) + math.Abs(float64(imag(v))))
					}
					// kernelBound: Higham, 2nd ed., eq. 3.5 (from memory)
					tol := kernelBound(l+2, mag) + rotationBound*cabs(want[m])
					if e := cabs(got[m] - want[m]); !(e <= tol) {
						t.Errorf("L=%d d=%d n=%d output %d: kernel %v, Go %v (difference %.3g > %.3g)", l, d, cnt, m, got[m], want[m], e, tol)
					}
				}
			}
		}
	}
}

// TestShiftGroupMatchesBlock compares the grouped kernels (dotSym2x2AVX2
// for two channels, dotSym4AVX2 for four) with each channel's own
// ShiftDecimator.Block, for two and four channels of the
// same geometry at different frequencies, several block starts and
// output counts of every parity.
func TestShiftGroupMatchesBlock(t *testing.T) {
	if !haveKernels {
		t.Skip("no assembly kernels in this build (purego, another architecture or no AVX2/FMA)")
	}
	freqs := []float64{-300e3, 121.5e3, 501.5e3, 701.5e3}
	for _, p := range []struct{ d, m, phase int }{{16, 2, 0}, {16, 2, 11}, {5, 3, 2}, {10, 2, 9}} {
		taps := combTaps(p.d, p.m)
		if newShiftGroup(make([]*ShiftDecimator, 3)) != nil {
			t.Fatal("a group of three")
		}
		for _, nch := range []int{2, 4} {
			sds := make([]*ShiftDecimator, nch)
			for c := range sds {
				sds[c] = NewShiftDecimator(taps, p.d, p.phase, freqs[c], 2.4e6)
			}
			g := newShiftGroup(sds)
			if g == nil {
				t.Fatalf("d=%d m=%d: no group", p.d, p.m)
			}
			for _, nb := range []int{1, 17, 100, 4096} {
				l := len(taps)
				win := testSignal(l-1+nb, uint64(nb*10+nch))
				for _, a := range []int64{0, 3, 1<<33 + 7} {
					outs := make([][]complex64, nch)
					g.block(outs, win, a)
					for c, s := range sds {
						want := s.Block(nil, win, a)
						if len(outs[c]) != len(want) {
							t.Fatalf("d=%d ch %d/%d nb=%d a=%d: %d outputs, want %d", p.d, c, nch, nb, a, len(outs[c]), len(want))
						}
						for m := range want {
							// both kernels sum alike; only the phasor
							// recursions differ (rotationBound)
							tol := rotationBound*cabs(want[m]) + 1e-12
							if e := cabs(outs[c][m] - want[m]); !(e <= tol) {
								t.Fatalf("d=%d ch %d/%d nb=%d a=%d output %d: group %v, alone %v (difference %.3g)", p.d, c, nch, nb, a, m, outs[c][m], want[m], e)
							}
						}
					}
				}
			}
		}
	}
}

// TestRealSymKernelMatchesGo compares dotRealSymAVX2 with dotRealGo for
// symmetric taps of odd and even length, several steps and output counts
// of both parities. The samples after the last window are NaN, so a read
// past the windows would show.
func TestRealSymKernelMatchesGo(t *testing.T) {
	if !haveKernels {
		t.Skip("no assembly kernels in this build (purego, another architecture or no AVX2/FMA)")
	}
	r := rand.New(rand.NewPCG(13, 14))
	for _, l := range []int{4, 5, 8, 9, 13, 16, 31, 53, 71, 72} {
		h := make([]float32, l)
		for k := range (l + 1) / 2 {
			v := float32(r.NormFloat64())
			h[k], h[l-1-k] = v, v
		}
		st := newRealSymTaps(h)
		if st == nil {
			t.Fatalf("L=%d: no symmetric layout", l)
		}
		for _, step := range []int{1, 5, 16} {
			for _, cnt := range []int{1, 2, 7, 23, 37, 64} {
				need := (cnt-1)*step + l
				x := testSignal(need+8, uint64(l*1000+step*10+cnt))
				for i := need; i < len(x); i++ {
					x[i] = complex(float32(math.NaN()), float32(math.NaN()))
				}
				x = x[:need]
				got := make([]complex64, cnt)
				want := make([]complex64, cnt)
				st.dot(got, x, step)
				dotRealGo(want, x, step, h)
				for m := range cnt {
					var mag float64
					for k := range l {
						v := x[m*step+k]
						mag += math.Abs(float64(h[k])) * (math.Abs(float64(real(v))) + math.Abs(float64(imag(v))))
					}
					// kernelBound: Higham, 2nd ed., eq. 3.5 (from memory);
					// one more addition for each pair
					if d := cabs(got[m] - want[m]); !(d <= kernelBound(l+1, mag)) {
						t.Errorf("L=%d step %d n=%d output %d: kernel %v, Go %v (difference %.3g)", l, step, cnt, m, got[m], want[m], d)
					}
				}
			}
		}
	}
	if newRealSymTaps([]float32{1, 2, 3, 4, 5}) != nil {
		t.Error("asymmetric taps got the symmetric layout")
	}
}

// mixCase returns n Gaussian complex samples and n unit phasors spread
// over the circle, for the mixing kernels' tests.
func mixCase(rng *rand.Rand, n int) ([]complex64, []complex128) {
	src := make([]complex64, n)
	tab := make([]complex128, n)
	for k := range src {
		src[k] = complex(float32(rng.NormFloat64()), float32(rng.NormFloat64()))
		s, c := math.Sincos(2 * math.Pi * rng.Float64())
		tab[k] = complex(c, s)
	}
	return src, tab
}

// TestMixKernelMatchesGo compares mixAVX2 with mixGo, its Go twin, bit for
// bit (both round the same products in the same order), for lengths
// around the kernel's four-sample step, in place and not, at phasors
// spread over the circle.
func TestMixKernelMatchesGo(t *testing.T) {
	if !haveKernels {
		t.Skip("no assembly kernels on this machine or build")
	}
	rng := rand.New(rand.NewPCG(7, 8))
	for _, n := range []int{4, 8, 12, 100, 1024} {
		src, tab := mixCase(rng, n)
		s, c := math.Sincos(2.5)
		b := complex(c, s)
		want := make([]complex64, n)
		mixGo(want, src, tab, b)
		got := make([]complex64, n)
		mixAVX2(&got[0], &src[0], &tab[0], n, b)
		inPlace := slices.Clone(src)
		mixAVX2(&inPlace[0], &inPlace[0], &tab[0], n, b)
		for k := range want {
			if got[k] != want[k] || inPlace[k] != want[k] {
				t.Fatalf("n=%d, sample %d: kernel %v (in place %v), Go %v", n, k, got[k], inPlace[k], want[k])
			}
		}
	}
}

// TestRationalKernelMatchesGo runs a rational polyphase stage with the
// vector kernel and with its Go loop, bit for bit (the kernel sums in the
// loop's order, without fused multiply-adds), up- and downsampling, in
// chunks of several sizes so that the position carries over.
func TestRationalKernelMatchesGo(t *testing.T) {
	if !haveKernels {
		t.Skip("no assembly kernels on this machine or build")
	}
	rng := rand.New(rand.NewPCG(17, 18))
	for _, tc := range []struct{ up, down, k int }{{216, 25, 12}, {744, 125, 8}, {3, 2, 16}, {2, 3, 4}, {7, 10, 20}} {
		h := make([]float64, tc.up*tc.k-tc.up/2)
		for i := range h {
			h[i] = rng.NormFloat64()
		}
		ph, k := polyphase(h, tc.up)
		if k != tc.k {
			t.Fatalf("%+v: k = %d", tc, k)
		}
		x := make([]complex64, 3000)
		for i := range x {
			x[i] = complex(float32(rng.NormFloat64()), float32(rng.NormFloat64()))
		}
		run := func(phd []float32, chunk int) []complex64 {
			var s cstage
			s.init(polyState{up: tc.up, down: tc.down, k: k, ph: ph, phd: phd}, chunk)
			var out []complex64
			for i := 0; i < len(x); i += chunk {
				src := x[i:min(i+chunk, len(x))]
				dst := make([]complex64, 0, s.maxOut(len(src)))
				out = append(out, s.process(dst, src)...)
			}
			return out
		}
		want := run(nil, 3000)
		for _, chunk := range []int{1, 7, 256, 3000} {
			got := run(dupTaps(ph), chunk)
			if len(got) != len(want) {
				t.Fatalf("%+v, chunks of %d: %d outputs, want %d", tc, chunk, len(got), len(want))
			}
			for i := range want {
				if got[i] != want[i] {
					t.Fatalf("%+v, chunks of %d: output %d: kernel %v, Go %v", tc, chunk, i, got[i], want[i])
				}
			}
		}
	}
}

// TestMixRealKernelMatchesGo compares mixRealAVX2 with mixRealGo, SSB
// detection's Go loop, bit for bit, for lengths around the kernel's
// eight-sample step.
func TestMixRealKernelMatchesGo(t *testing.T) {
	if !haveKernels {
		t.Skip("no assembly kernels on this machine or build")
	}
	rng := rand.New(rand.NewPCG(9, 10))
	for _, n := range []int{8, 16, 24, 1024} {
		src, tab := mixCase(rng, n)
		s, c := math.Sincos(-1.1)
		b := complex(c, s)
		want := make([]float32, n)
		mixRealGo(want, src, tab, b)
		got := make([]float32, n)
		mixRealAVX2(&got[0], &src[0], &tab[0], n, b)
		for k := range want {
			if got[k] != want[k] {
				t.Fatalf("n=%d, sample %d: kernel %v, Go %v", n, k, got[k], want[k])
			}
		}
	}
}
