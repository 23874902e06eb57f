package iq

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// toneImage runs a real tone a·cos(2πf n/fs) through a, and returns the
// wanted (at +f) and image (at −f) amplitudes measured by a DFT over a
// whole number of periods after the start-up transient.
func toneImage(a *Analytic, f, fs float64, n int) (wanted, image float64) {
	a.Reset()
	d := a.Delay()
	x := make([]float32, n+2*d)
	for i := range x {
		x[i] = float32(0.5 * math.Cos(2*math.Pi*f*float64(i)/fs))
	}
	y := a.Process(nil, x)
	seg := y[2*d : 2*d+n]
	var sp, sn complex128
	for i, v := range seg {
		ph := 2 * math.Pi * f * float64(i+2*d-d) / fs // output i lags input by d
		e := cmplx.Exp(complex(0, -ph))
		sp += complex128(v) * e
		sn += complex128(v) * cmplx.Conj(e)
	}
	return cmplx.Abs(sp) / float64(n) / 0.5, cmplx.Abs(sn) / float64(n) / 0.5
}

// TestAnalyticImage checks the real-to-analytic conversion: a real tone at
// f becomes a complex tone at +f of the same amplitude (the analytic
// signal, Oppenheim & Schafer, Discrete-Time Signal Processing, 3rd ed.,
// Sec. 12.4) with the image at −f more than 80 dB down (the floor)
// over the band DefaultAnalyticTaps documents.
func TestAnalyticImage(t *testing.T) {
	const (
		fs       = 48000.0
		n        = 48000 // one second: every integer-hertz tone has whole periods
		minImage = 80.0  // dB
		gainTol  = 0.001 // dB of passband ripple
	)
	a := NewAnalytic(DefaultAnalyticTaps)
	worst := math.Inf(1)
	for _, f := range []float64{48, 200, 300, 1000, 2700, 6000, 12000, 20000, 23952} {
		w, im := toneImage(a, f, fs, n)
		rej := 20 * math.Log10(w/im)
		if rej < minImage || math.Abs(20*math.Log10(w)) > gainTol {
			t.Errorf("f=%v Hz: gain %.4f dB, image %.1f dB down; want |gain| < %v dB and image > %v dB", f, 20*math.Log10(w), rej, gainTol, minImage)
		}
		worst = math.Min(worst, rej)
	}
	t.Logf("image at least %.1f dB down from 48 Hz to 23952 Hz at 48 kHz", worst)
}

// TestAnalyticBlocks checks that block-wise processing equals the whole
// signal at once for many block sizes (streaming, common practice).
func TestAnalyticBlocks(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	x := make([]float32, 20000)
	for i := range x {
		x[i] = float32(rng.NormFloat64())
	}
	a := NewAnalytic(255)
	whole := a.Process(nil, x)
	for _, bs := range []int{1, 7, 64, 255, 256, 257, 1000, 4096, 19999} {
		a.Reset()
		var got []complex64
		buf := make([]complex64, bs)
		for i := 0; i < len(x); i += bs {
			got = append(got, a.Process(buf, x[i:min(i+bs, len(x))])...)
		}
		for i := range whole {
			if got[i] != whole[i] {
				t.Fatalf("block size %d: sample %d differs: %v vs %v", bs, i, got[i], whole[i])
			}
		}
	}
}

func TestAnalyticAllocs(t *testing.T) {
	a := NewAnalytic(DefaultAnalyticTaps)
	src := make([]float32, 5000)
	dst := make([]complex64, 5000)
	if n := testing.AllocsPerRun(20, func() { a.Process(dst, src) }); n != 0 {
		t.Errorf("Analytic.Process allocates %v times per call", n)
	}
}

// TestSourceRealAligned checks that Open's analytic signal of a real file
// has the file's length and is time-aligned: the real part equals the
// input exactly (it is the input, delayed and re-aligned).
func TestSourceRealAligned(t *testing.T) {
	const fs = 8000.0
	rng := rand.New(rand.NewPCG(5, 6))
	x := make([]float32, 12345)
	for i := range x {
		x[i] = float32(rng.Float64() - 0.5)
	}
	for _, bs := range []int{1, 100, 4096, 50000} {
		s, err := Open("-", Options{Format: RF32, Rate: fs, Stdin: bytesReader(lef32(x...))})
		if err != nil {
			t.Fatal(err)
		}
		var y []complex64
		buf := make([]complex64, bs)
		for {
			n, err := s.Read(buf)
			y = append(y, buf[:n]...)
			if err != nil {
				break
			}
		}
		if len(y) != len(x) {
			t.Fatalf("block %d: %d samples out, %d in", bs, len(y), len(x))
		}
		for i := range x {
			if real(y[i]) != x[i] {
				t.Fatalf("block %d: sample %d real part %v, input %v", bs, i, real(y[i]), x[i])
			}
		}
	}
}
