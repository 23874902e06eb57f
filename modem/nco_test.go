package modem

import (
	"math"
	"math/big"
	"math/cmplx"
	"testing"
)

// tolC64 is the rounding of a unit phasor to complex64 (2⁻²⁴ per part,
// with room for the float64 base·table product).
const tolC64 = 2e-7

// exactPhase returns 2π·frac(n·f/fs) computed with exact rational
// arithmetic, for f and fs given as decimal strings.
func exactPhase(t *testing.T, f, fs string, n int64) float64 {
	t.Helper()
	rf, ok1 := new(big.Rat).SetString(f)
	rs, ok2 := new(big.Rat).SetString(fs)
	if !ok1 || !ok2 {
		t.Fatalf("bad rational %q/%q", f, fs)
	}
	c := new(big.Rat).Quo(rf, rs)
	c.Mul(c, new(big.Rat).SetInt64(n))
	// frac(c) = c − floor(c)
	fl := new(big.Int).Quo(c.Num(), c.Denom())
	if c.Sign() < 0 {
		fl.Sub(fl, big.NewInt(1))
	}
	c.Sub(c, new(big.Rat).SetInt(fl))
	v, _ := c.Float64()
	return 2 * math.Pi * v
}

func phaseDiff(a, b float64) float64 {
	return math.Abs(math.Remainder(a-b, 2*math.Pi))
}

// TestOscillatorExact compares samples with e^{j2πfn/fs}, the definition
// of a complex exponential (Oppenheim & Schafer, Discrete-Time Signal
// Processing, 3rd ed., eq. 2.7), the phase computed exactly.
func TestOscillatorExact(t *testing.T) {
	cases := []struct{ f, fs string }{
		{"1000", "48000"},
		{"-3000", "8000"},
		{"0", "8000"},
		{"4000", "8000"}, // Nyquist: (−1)^n
		{"1234.5678", "2400000"},
		{"-599999.9", "2400000"},
		{"50000", "48000"}, // aliases to 2000 Hz
	}
	for _, c := range cases {
		f, _ := new(big.Rat).SetString(c.f)
		fs, _ := new(big.Rat).SetString(c.fs)
		ff, _ := f.Float64()
		ffs, _ := fs.Float64()
		o := NewOscillator(ff, ffs)
		const n = 5000
		got := o.Generate(make([]complex64, n))
		for i := 0; i < n; i += 97 {
			want := cmplx.Exp(complex(0, exactPhase(t, c.f, c.fs, int64(i))))
			if d := cmplx.Abs(complex128(got[i]) - want); d > tolC64 {
				t.Errorf("f=%s fs=%s n=%d: got %v want %v (|err| %.2g > %.2g)", c.f, c.fs, i, got[i], want, d, tolC64)
				break
			}
		}
	}
}

// TestOscillatorNoDrift runs 10⁷ samples and checks the last against the
// exact phase, then jumps to 10⁹ samples. The error budget: the step is
// f/fs rounded to float64 then to 2⁻⁶⁴ cycles, < 3·10⁻²⁰ cycles per sample
// at 1234.5678 Hz / 2.4 MS/s, so under 2·10⁻¹⁰ rad after 10⁹ samples
// (common practice for phase-accumulator oscillators).
func TestOscillatorNoDrift(t *testing.T) {
	const tolPhase = 1e-8 // rad after 10⁹ samples
	o := NewOscillator(1234.5678, 2.4e6)
	buf := make([]complex64, 4096)
	const n = 10_000_000
	var last complex64
	for done := 0; done < n; {
		b := o.Generate(buf[:min(len(buf), n-done)])
		done += len(b)
		last = b[len(b)-1]
	}
	want := exactPhase(t, "1234.5678", "2400000", n-1)
	if d := phaseDiff(cmplx.Phase(complex128(last)), want); d > 2*tolC64 {
		t.Errorf("sample 10⁷−1: phase error %.3g rad", d)
	}
	if d := phaseDiff(o.Phase(), exactPhase(t, "1234.5678", "2400000", n)); d > tolPhase {
		t.Errorf("after 10⁷ samples: phase error %.3g rad", d)
	}
	o.Advance(1_000_000_000 - n)
	d := phaseDiff(o.Phase(), exactPhase(t, "1234.5678", "2400000", 1_000_000_000))
	t.Logf("phase error after 1e9 samples: %.3g rad", d)
	if d > tolPhase {
		t.Errorf("after 10⁹ samples: phase error %.3g rad > %.g", d, tolPhase)
	}
	s := o.Generate(buf[:1])[0]
	if pd := phaseDiff(cmplx.Phase(complex128(s)), exactPhase(t, "1234.5678", "2400000", 1_000_000_000)); pd > 2*tolC64 {
		t.Errorf("sample 10⁹: phase error %.3g rad", pd)
	}
}

// TestOscillatorBlocks checks that Mix gives the same bits whatever the
// block sizes (common practice for streaming blocks).
func TestOscillatorBlocks(t *testing.T) {
	src := testSignal(20000, 1)
	whole := NewOscillator(-1234.5, 48000).Mix(nil, src)
	for _, bs := range []int{1, 3, 64, 1000, 1023, 1024, 1025, 4096, 7777} {
		o := NewOscillator(-1234.5, 48000)
		got := make([]complex64, 0, len(src))
		for off := 0; off < len(src); off += bs {
			got = append(got, o.Mix(nil, src[off:min(off+bs, len(src))])...)
		}
		for i := range whole {
			if got[i] != whole[i] {
				t.Fatalf("block %d: sample %d differs: %v vs %v", bs, i, got[i], whole[i])
			}
		}
	}
}

// TestOscillatorMix checks Mix, MixReal and in-place use against the
// product with Generate's phasor.
func TestOscillatorMix(t *testing.T) {
	const tol = 1e-6 // float32 product of unit-scale values
	src := testSignal(3000, 2)
	lo := NewOscillator(777, 8000).Generate(make([]complex64, len(src)))
	got := NewOscillator(777, 8000).Mix(nil, src)
	in := append([]complex64(nil), src...)
	NewOscillator(777, 8000).Mix(in, in)
	re := make([]float32, len(src))
	for i, v := range src {
		re[i] = real(v)
	}
	gr := NewOscillator(777, 8000).MixReal(nil, re)
	for i := range src {
		want := complex128(src[i]) * complex128(lo[i])
		if cmplx.Abs(complex128(got[i])-want) > tol || got[i] != in[i] {
			t.Fatalf("sample %d: Mix %v, in place %v, want %v", i, got[i], in[i], want)
		}
		if cmplx.Abs(complex128(gr[i])-complex(float64(re[i]), 0)*complex128(lo[i])) > tol {
			t.Fatalf("sample %d: MixReal %v", i, gr[i])
		}
	}
}

// TestOscillatorRetune checks phase continuity across SetFrequency: the
// first sample after the change continues from the old phase advanced by
// one old step (definition of a phase-continuous oscillator).
func TestOscillatorRetune(t *testing.T) {
	o := NewOscillator(1000, 8000)
	a := o.Generate(make([]complex64, 1500))
	o.SetFrequency(-2500)
	b := o.Generate(make([]complex64, 3))
	want := complex128(a[len(a)-1]) * cmplx.Exp(complex(0, 2*math.Pi*1000/8000))
	if d := cmplx.Abs(complex128(b[0]) - want); d > 4*tolC64 {
		t.Errorf("first sample after retune %v, want %v", b[0], want)
	}
	step := complex128(b[1]) / complex128(b[0])
	if d := cmplx.Abs(step - cmplx.Exp(complex(0, -2*math.Pi*2500/8000))); d > 4*tolC64 {
		t.Errorf("new step %v", step)
	}
	o.Reset()
	if c := o.Generate(make([]complex64, 1))[0]; c != 1 {
		t.Errorf("after Reset first sample %v, want 1", c)
	}
}

func TestOscillatorAllocs(t *testing.T) {
	o := NewOscillator(1000, 48000)
	src := testSignal(4096, 3)
	dst := make([]complex64, len(src))
	if a := testing.AllocsPerRun(20, func() { o.Mix(dst, src); o.Generate(dst) }); a != 0 {
		t.Errorf("%v allocations per block, want 0", a)
	}
}

func BenchmarkOscillatorMix(b *testing.B) {
	o := NewOscillator(1234.5, 2.4e6)
	src := testSignal(16384, 4)
	dst := make([]complex64, len(src))
	b.SetBytes(int64(8 * len(src)))
	b.ReportAllocs()
	for b.Loop() {
		o.Mix(dst, src)
	}
	b.ReportMetric(float64(b.N*len(src))/b.Elapsed().Seconds()/1e6, "MS/s")
}

// TestOscillatorSetPhase checks that the first sample after SetPhase is
// e^{jφ} (definition).
func TestOscillatorSetPhase(t *testing.T) {
	o := NewOscillator(1000, 8000)
	for _, phi := range []float64{0, 1, -2.5, math.Pi, 10} {
		o.SetPhase(phi)
		if d := cmplx.Abs(complex128(o.Generate(make([]complex64, 1))[0]) - cmplx.Exp(complex(0, phi))); d > tolC64 {
			t.Errorf("SetPhase(%g): error %.3g", phi, d)
		}
	}
}

// TestOscillatorSharedTable: oscillators of one step share a table, and
// retuning one (SetFrequency to a step of its own) changes neither the
// shared table nor the other's output, which stays e^{j2πfn/fs} (the
// definition, in float64, to complex64 rounding).
func TestOscillatorSharedTable(t *testing.T) {
	const f, fs, tol = 1234.5, 48000, 1e-6
	a, b := NewOscillator(f, fs), NewOscillator(f, fs)
	if &a.tab[0] != &b.tab[0] {
		t.Fatal("oscillators of one step do not share their table")
	}
	b.SetFrequency(777.7)
	b.Generate(make([]complex64, 3000))
	got := a.Generate(make([]complex64, 3000))
	for n, v := range got {
		s, c := math.Sincos(2 * math.Pi * f * float64(n) / fs)
		if e := cmplx.Abs(complex128(v) - complex(c, s)); e > tol {
			t.Fatalf("sample %d: %v, want %v (error %.2g)", n, v, complex(c, s), e)
		}
	}
	if c := NewOscillator(f, fs); &c.tab[0] != &a.tab[0] {
		t.Error("a new oscillator does not take the shared table")
	}
	// as the SSB detectors of a receiver's channels set their premix
	p, q := NewOscillator(0, fs), NewOscillator(0, fs)
	p.setStep(1 << 60)
	q.setStep(1 << 60)
	if &p.tab[0] != &q.tab[0] {
		t.Error("oscillators set to one step do not share their table")
	}
}
