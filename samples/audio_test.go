package samples

import (
	"math"
	"math/cmplx"
	"testing"

	"gonum.org/v1/gonum/dsp/fourier"
)

// project returns the complex amplitude of the tone at f Hz in x sampled
// at rate: (2/N)·Σ x[n]·e^{−j2πfn/rate}, exact for a real tone with a whole
// number of cycles in x.
func project(x []float32, f, rate float64) complex128 {
	var s complex128
	for n, v := range x {
		s += complex(float64(v), 0) * cmplx.Exp(complex(0, -2*math.Pi*f*float64(n)/rate))
	}
	return 2 * s / complex(float64(len(x)), 0)
}

func TestTone(t *testing.T) {
	const tol = 1e-6 // float32 output
	tests := []struct {
		freq, amp, phase, rate float64
		skip                   int64 // samples already produced
	}{
		{1000, 0.5, 0, 8000, 0},
		{1000, 0.5, 0, 48000, 1_000_000_000}, // no drift after 1e9 samples
		{440, 1, math.Pi / 3, 44100, 123_456_789},
		{0, 0.25, 0, 8000, 0},
	}
	for _, tc := range tests {
		g := NewTone(tc.freq, tc.amp, tc.rate)
		g.Phase = tc.phase
		g.n = tc.skip
		got := g.Generate(make([]float32, 100))
		for i, v := range got {
			// Reference: the definition a·cos(2πfn/fs + φ). Every tone here
			// repeats after fs samples (whole Hz), so n is reduced modulo fs
			// in integers first, exactly.
			n := (tc.skip + int64(i)) % int64(tc.rate)
			want := tc.amp * math.Cos(2*math.Pi*tc.freq*float64(n)/tc.rate+tc.phase)
			if math.Abs(float64(v)-want) > tol {
				t.Fatalf("tone %+v sample %d = %v, want %v (definition)", tc, i, v, want)
			}
		}
	}
}

func TestTwoTonePeak(t *testing.T) {
	// Two equal tones of amplitude a peak at 2a, so one tone is 6.02 dB
	// below PEP (common practice for two-tone tests).
	const tol = 1e-6
	const a = 0.3
	x := NewTwoTone(1000, 1600, a, 8000).Generate(make([]float32, 8000))
	var peak float64
	for _, v := range x {
		peak = math.Max(peak, math.Abs(float64(v)))
	}
	if math.Abs(peak-2*a) > tol {
		t.Errorf("peak %v, want %v", peak, 2*a)
	}
	for _, f := range []float64{1000, 1600} {
		if got := cmplx.Abs(project(x, f, 8000)); math.Abs(got-a) > tol {
			t.Errorf("tone at %v Hz: amplitude %v, want %v", f, got, a)
		}
	}
}

func TestKeyerTiming(t *testing.T) {
	const tol = 1e-9
	// "PARIS" takes 50 units with its word space: the common-practice
	// reference word for speed in words per minute (unit 1.2/wpm s).
	// Element lengths from ITU-R M.1677-1: P .--. 11, A .- 5, R .-. 7,
	// I .. 3, S ... 5, four letter gaps 12, word gap 7.
	k := NewKeyer("paris", 20, 0.005, 8000)
	if got, want := k.Period(), 50*0.06*8000.0; math.Abs(got-want) > tol {
		t.Errorf("PARIS period %v samples, want %v", got, want)
	}
	// "E" is one dot and a word gap: duty 1/8.
	if got := NewKeyer("E", 20, 0.005, 8000).Duty(); math.Abs(got-1.0/8) > tol {
		t.Errorf("E duty %v, want 1/8", got)
	}
	// Raised-cosine edges keep the area: the mean envelope over whole
	// messages equals the duty (the ramps up and down are mirror images).
	const areaTol = 1e-3
	env := 0.0
	n := int(k.Period()) * 3
	k.Reset()
	for range n {
		env += k.Next()
	}
	if got := env / float64(n); math.Abs(got-k.Duty()) > areaTol {
		t.Errorf("mean envelope %v, want duty %v", got, k.Duty())
	}
}

func TestNoiseLevel(t *testing.T) {
	// The standard error of an RMS estimate from N Gaussian samples is
	// about rms/√(2N) (common practice); 1e5 samples → 0.22 %.
	const tol = 0.01
	x := NewNoise(0.1, 5).Generate(make([]float32, 100000))
	if got := rms(x); math.Abs(got/0.1-1) > tol {
		t.Errorf("noise RMS %v, want 0.1", got)
	}
}

func TestBandNoise(t *testing.T) {
	const (
		rate      = 8000.0
		low, high = 500.0, 1500.0
		n         = 1 << 17
		levelTol  = 0.1   // transitions widen the band by ~10 %
		outside   = -50.0 // dB of the power outside the band plus transitions
	)
	x := NewBandNoise(low, high, 0.1, rate, 9).Generate(make([]float32, n))
	if got := rms(x); math.Abs(got/0.1-1) > levelTol {
		t.Errorf("band noise RMS %v, want 0.1", got)
	}
	fft := fourier.NewFFT(n)
	in := make([]float64, n)
	for i, v := range x {
		in[i] = float64(v)
	}
	c := fft.Coefficients(nil, in)
	var pin, pout float64
	for k, v := range c {
		f := float64(k) * rate / n
		p := real(v)*real(v) + imag(v)*imag(v)
		if f > low-100 && f < high+100 { // the transition bands are 100 Hz wide
			pin += p
		} else {
			pout += p
		}
	}
	if got := 10 * math.Log10(pout/pin); got > outside {
		t.Errorf("power outside the band %.1f dB, want < %.0f dB (60 dB Kaiser design)", got, outside)
	}
}

func rms(x []float32) float64 {
	var s float64
	for _, v := range x {
		s += float64(v) * float64(v)
	}
	return math.Sqrt(s / float64(len(x)))
}

// TestSourcesBlockwise checks that every source gives the same samples
// whatever the block sizes, and after Reset.
func TestSourcesBlockwise(t *testing.T) {
	mk := map[string]func() Source{
		"tone":      func() Source { return NewTone(700, 0.5, 8000) },
		"two-tone":  func() Source { return NewTwoTone(700, 1900, 0.25, 8000) },
		"keyed":     func() Source { return NewKeyedTone(800, 0.5, "test", 25, 8000) },
		"noise":     func() Source { return NewNoise(0.1, 3) },
		"bandnoise": func() Source { return NewBandNoise(300, 2700, 0.1, 8000, 3) },
		"voice": func() Source {
			v, err := NewVoice(VoiceConfig{Seed: 4, Pitch: 180, Formants: 1.15})
			if err != nil {
				t.Fatal(err)
			}
			return v
		},
	}
	const n = 20000
	for name, f := range mk {
		whole := f().Generate(make([]float32, n))
		for _, bs := range []int{1, 7, 64, 1000, 4093} {
			s := f()
			got := make([]float32, 0, n)
			buf := make([]float32, bs)
			for len(got) < n {
				got = append(got, s.Generate(buf[:min(bs, n-len(got))])...)
			}
			for i := range whole {
				if got[i] != whole[i] {
					t.Fatalf("%s: block size %d: sample %d = %v, whole-signal %v", name, bs, i, got[i], whole[i])
				}
			}
		}
		s := f()
		s.Generate(make([]float32, 777))
		s.Reset()
		again := s.Generate(make([]float32, n))
		for i := range whole {
			if again[i] != whole[i] {
				t.Fatalf("%s: after Reset sample %d = %v, want %v", name, i, again[i], whole[i])
			}
		}
	}
}

func TestSourcesAllocs(t *testing.T) {
	v, _ := NewVoice(VoiceConfig{})
	srcs := map[string]Source{
		"tone": NewTone(700, 0.5, 8000), "two-tone": NewTwoTone(700, 1900, 0.25, 8000),
		"keyed": NewKeyedTone(800, 0.5, "test", 25, 8000), "noise": NewNoise(0.1, 3),
		"bandnoise": NewBandNoise(300, 2700, 0.1, 8000, 3), "voice": v,
	}
	buf := make([]float32, 512)
	for name, s := range srcs {
		s.Generate(buf)
		if a := testing.AllocsPerRun(20, func() { s.Generate(buf) }); a != 0 {
			t.Errorf("%s: %v allocations per block, want 0", name, a)
		}
	}
}

func BenchmarkSources(b *testing.B) {
	v, _ := NewVoice(VoiceConfig{})
	for _, c := range []struct {
		name string
		s    Source
	}{{"voice", v}, {"bandnoise", NewBandNoise(300, 2700, 0.1, 8000, 3)}, {"two-tone", NewTwoTone(700, 1900, 0.25, 8000)}} {
		b.Run(c.name, func(b *testing.B) {
			buf := make([]float32, 4096)
			b.SetBytes(4 * 4096)
			b.ReportAllocs()
			for b.Loop() {
				c.s.Generate(buf)
			}
		})
	}
}
