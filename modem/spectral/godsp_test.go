package spectral

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	dspfft "github.com/mjibson/go-dsp/fft"
	dspspectral "github.com/mjibson/go-dsp/spectral"
	dspwindow "github.com/mjibson/go-dsp/window"

	"ssbkit/internal/fft"
)

// github.com/mjibson/go-dsp, the design's listed DSP library, serves here
// as an independent reference for the hand-written parts: its FFT, its
// windows and its Welch estimator (spectral.Pwelch, after matplotlib's
// psd). It is used in tests only: its FFT allocates on every call and is
// 8 to 20 times slower than the radix-4 transform (table in
// ssbkit/internal/fft).

// TestRadix4AgainstGoDSP: the radix-4 FFT (AVX2 passes where the CPU has
// them) against go-dsp's fft.FFT. Both compute the unscaled forward DFT
// X[k] = Σ_i x[i]·e^{−j2πik/n}; Radix4 leaves bin Perm()[p] at position p.
func TestRadix4AgainstGoDSP(t *testing.T) {
	// Two float64 FFTs of the same sum differ by rounding growing as
	// ε·log₂n (Oppenheim & Schafer, Discrete-Time Signal Processing,
	// 3rd ed., sec. 9.7): far below this bound.
	const tol = 1e-12 // relative to the largest bin
	for lg := 0; lg <= 16; lg++ {
		n := 1 << lg
		x := randomComplex(n, 100+uint64(lg))
		want := dspfft.FFT(x)
		f := fft.NewRadix4(n)
		y := append([]complex128(nil), x...)
		f.Transform(y)
		var e, m float64
		for p, v := range y {
			b := f.Perm()[p]
			e = max(e, cmplx.Abs(v-want[b]))
			m = max(m, cmplx.Abs(want[b]))
		}
		if lg%4 == 0 {
			t.Logf("n=%d: largest difference %.2g of the largest bin", n, e/m)
		}
		if e > tol*m {
			t.Errorf("n=%d: largest difference %.3g of the largest bin, want ≤ %g", n, e/m, tol)
		}
	}
}

// TestWindowsAgainstGoDSP: our periodic windows against go-dsp's
// symmetric ones of one more point, last point dropped (the periodic
// "DFT-even" form, Harris 1978 sec. II). go-dsp's Hann is
// 0.5·(1 − cos(2πk/(L−1))) and its FlatTop uses the five coefficients of
// MATLAB's flattopwin (0.21557895, 0.41663158, 0.277263158, 0.083578947,
// 0.006947368), as gonum's window.FlatTop does.
func TestWindowsAgainstGoDSP(t *testing.T) {
	const tol = 1e-14 // a few float64 roundings of a cosine sum
	for _, c := range []struct {
		w   Window
		ref func(int) []float64
	}{
		{Hann, dspwindow.Hann},
		{FlatTop, dspwindow.FlatTop},
	} {
		for _, n := range []int{2, 3, 8, 63, 64, 1000, 4096} {
			got := c.w.Coefficients(n)
			want := c.ref(n + 1)[:n]
			for i := range got {
				if math.Abs(got[i]-want[i]) > tol {
					t.Errorf("%v n=%d: w[%d] = %.17g, go-dsp %.17g", c.w, n, i, got[i], want[i])
					break
				}
			}
		}
	}
}

// TestWelchAgainstGoDSP: the accumulator's power densities (what
// spectrum draws and detects on, and what measure integrates) against
// go-dsp's spectral.Pwelch on the same real signal, segmentation
// (n-point segments every n/2 samples, complete segments only) and
// window (go-dsp's Hann or FlatTop of n+1 points, last dropped).
//
// Scaling conventions: both divide the summed |X_k|² by the number of
// segments, the rate and Σw² (density in full-scale² per Hz). Pwelch
// returns the one-sided density of a real signal, bins 0…n/2, with the
// bins other than 0 and n/2 doubled; the accumulator returns the
// two-sided density of a complex signal, so for a real one
// P₁(f) = P₂(f) + P₂(−f) for 0 < f < rate/2 and P₁ = P₂ at 0 and rate/2.
func TestWelchAgainstGoDSP(t *testing.T) {
	// The accumulator reads complex64: the reference gets the same
	// float32 values. What differs is float64 rounding in two FFTs and
	// sums, so relative agreement per bin is close to ε.
	const tol = 1e-9 // relative, per bin
	const rate = 48000.0
	for _, c := range []struct {
		name string
		w    Window
		ref  func(int) []float64
		n    int
		len  int
	}{
		{"hann 1024", Hann, dspwindow.Hann, 1024, 48000},
		{"hann 4096, one segment and a half", Hann, dspwindow.Hann, 4096, 6144},
		{"flattop 2048", FlatTop, dspwindow.FlatTop, 2048, 30000},
	} {
		r := rand.New(rand.NewPCG(uint64(c.n), 7))
		x := make([]float64, c.len)
		z := make([]complex64, c.len)
		for i := range x {
			// a tone between bins over white noise
			v := float32(0.5*math.Cos(2*math.Pi*1234.5*float64(i)/rate) + 0.01*r.NormFloat64())
			x[i] = float64(v)
			z[i] = complex(v, 0)
		}
		ref := func(l int) []float64 { return c.ref(l + 1)[:l] }
		want, freqs := dspspectral.Pwelch(x, rate, &dspspectral.PwelchOptions{NFFT: c.n, Noverlap: c.n / 2, Window: ref})
		acc := NewAccumulatorOptions(c.n, rate, Options{Window: c.w})
		for i := 0; i < len(z); i += 1000 { // any blocking
			acc.Add(z[i:min(len(z), i+1000)])
		}
		s := acc.Spectrum()
		if wantSegs := (c.len-c.n)/(c.n/2) + 1; s.Segments != wantSegs {
			t.Errorf("%s: %d segments, go-dsp's segmentation gives %d", c.name, s.Segments, wantSegs)
		}
		h := c.n / 2
		worst := 0.0
		for j, p1 := range want {
			var got float64
			switch {
			case j == h:
				got = s.Density[0] // rate/2 is bin −n/2 in centred order
			case j == 0:
				got = s.Density[h]
			default:
				got = s.Density[h+j] + s.Density[h-j] // +f and −f
				if math.Abs(s.Freq(h+j)-freqs[j]) > 1e-9 {
					t.Fatalf("%s: bin %d at %g Hz, go-dsp's at %g Hz", c.name, j, s.Freq(h+j), freqs[j])
				}
			}
			worst = max(worst, math.Abs(got-p1)/p1)
		}
		t.Logf("%s: %d segments, largest relative difference %.2g", c.name, s.Segments, worst)
		if worst > tol {
			t.Errorf("%s: largest relative difference %.3g from go-dsp's Pwelch, want ≤ %g", c.name, worst, tol)
		}
		acc.Close()
	}
}
