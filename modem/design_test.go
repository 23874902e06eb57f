package modem

import (
	"encoding/json"
	"math"
	"math/cmplx"
	"os"
	"slices"
	"testing"
)

type kaiserGolden struct {
	ScipyVersion string `json:"scipy_version"`
	Cases        []struct {
		Cutoff       float64   `json:"cutoff"`
		Transition   float64   `json:"transition"`
		Rate         float64   `json:"rate"`
		AttenDB      float64   `json:"atten_db"`
		ScipyNumtaps int       `json:"scipy_numtaps"`
		Beta         float64   `json:"beta"`
		Taps         []float64 `json:"taps"`
	} `json:"cases"`
}

// TestKaiserGolden compares β, the length and the taps with scipy 1.10.1
// (kaiserord, kaiser_beta, firwin; testdata/gen_kaiser.py).
func TestKaiserGolden(t *testing.T) {
	const (
		tolBeta = 1e-12
		tolTap  = 1e-12
	)
	b, err := os.ReadFile("testdata/kaiser_golden.json")
	if err != nil {
		t.Fatal(err)
	}
	var g kaiserGolden
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	for _, c := range g.Cases {
		if beta := KaiserBeta(c.AttenDB); math.Abs(beta-c.Beta) > tolBeta {
			t.Errorf("A=%g: β %v, scipy %v", c.AttenDB, beta, c.Beta)
		}
		want := c.ScipyNumtaps
		if want%2 == 0 {
			want++ // KaiserOrder rounds the order up to even
		}
		if n := KaiserOrder(c.Transition, c.Rate, c.AttenDB) + 1; n != want {
			t.Errorf("A=%g tw=%g: %d taps, scipy %d → %d", c.AttenDB, c.Transition, n, c.ScipyNumtaps, want)
		}
		// The formula design, before KaiserLowpass's check and tightening.
		h := windowedSinc(KaiserOrder(c.Transition, c.Rate, c.AttenDB), c.Cutoff/c.Rate, KaiserBeta(c.AttenDB), 0)
		if len(h) != len(c.Taps) {
			t.Errorf("length %d, golden %d", len(h), len(c.Taps))
			continue
		}
		for i := range h {
			if math.Abs(h[i]-c.Taps[i]) > tolTap {
				t.Errorf("A=%g: tap %d = %v, scipy firwin %v", c.AttenDB, i, h[i], c.Taps[i])
				break
			}
		}
	}
}

// bandExtremes returns the largest deviation of |H| from 1 over
// [0, pass] and the largest |H| over [stop, rate/2], on a grid of 20000
// points.
func bandExtremes(h []float64, pass, stop, rate float64) (ripple, stopGain float64) {
	const grid = 20000
	for i := 0; i <= grid; i++ {
		f := rate / 2 * float64(i) / grid
		a := cmplx.Abs(FreqResponse(h, f, rate))
		if f <= pass {
			ripple = math.Max(ripple, math.Abs(a-1))
		}
		if f >= stop {
			stopGain = math.Max(stopGain, a)
		}
	}
	return
}

// TestKaiserLowpassSpec checks that the designs meet their figures: ripple
// and stop-band gain at most δ = 10^(−A/20) (the design equations of
// Oppenheim & Schafer, 3rd ed., eq. 7.74–7.76, which equal ripple in both
// bands for the window method), and −6 dB at the cutoff.
func TestKaiserLowpassSpec(t *testing.T) {
	const tolCutoffDB = 0.05 // the window method's gain at cutoff is ≈ 1/2
	for _, c := range []struct{ cutoff, tw, rate, atten float64 }{
		{1000, 400, 8000, 60},
		{3000, 1000, 48000, 80},
		{12000, 2000, 48000, 100},
		{2000, 1600, 8000, 70},
		{24000, 36000, 2.4e6, 90},
		{1500, 1000, 8000, 40},
	} {
		h := KaiserLowpass(c.cutoff, c.tw, c.rate, c.atten)
		if len(h)%2 != 1 {
			t.Errorf("even length %d", len(h))
		}
		delta := math.Pow(10, -c.atten/20)
		rip, sg := bandExtremes(h, c.cutoff-c.tw/2, c.cutoff+c.tw/2, c.rate)
		t.Logf("A=%g: %d taps, ripple %.3g (δ %.3g), stop %.1f dB", c.atten, len(h), rip, delta, 20*math.Log10(sg))
		if rip > delta || sg > delta {
			t.Errorf("A=%g tw=%g: ripple %.3g, stop gain %.3g (%.2f dB), want ≤ δ = %.3g", c.atten, c.tw, rip, sg, 20*math.Log10(sg), delta)
		}
		if g := 20 * math.Log10(cmplx.Abs(FreqResponse(h, c.cutoff, c.rate))); math.Abs(g+6.02) > tolCutoffDB {
			t.Errorf("gain at cutoff %.3f dB, want −6.02", g)
		}
	}
}

// TestKaiserBandpass checks the band-pass against its figures.
func TestKaiserBandpass(t *testing.T) {
	h := KaiserBandpass(300, 2700, 200, 8000, 70)
	delta := math.Pow(10, -70.0/20)
	const grid = 8000
	for i := 0; i <= grid; i++ {
		f := 4000 * float64(i) / grid
		a := cmplx.Abs(FreqResponse(h, f, 8000))
		switch {
		case f >= 400 && f <= 2600 && math.Abs(a-1) > 2*delta:
			// two overlapping low-pass ripples: 2δ (common practice)
			t.Fatalf("pass band %g Hz: |H| = %v", f, a)
		case (f <= 200 || f >= 2800) && a > 2*delta:
			t.Fatalf("stop band %g Hz: |H| = %v (%.1f dB)", f, a, 20*math.Log10(a))
		}
	}
}

// TestKaiserCache checks that a remembered design is the same as a fresh
// one and that callers get their own copy.
func TestKaiserCache(t *testing.T) {
	a := KaiserLowpass(3000, 1000, 48000, 80)
	want := kaiserDesign(3000.0/48000, 1000.0/48000, 80)
	a[0] = 42
	b := KaiserLowpass(3000, 1000, 48000, 80)
	if len(b) != len(want) {
		t.Fatalf("cached design has %d taps, fresh %d", len(b), len(want))
	}
	for i := range b {
		if b[i] != want[i] {
			t.Fatalf("tap %d: cached %g, fresh %g", i, b[i], want[i])
		}
	}
}

func TestKaiserShifted(t *testing.T) {
	// kaiserMeetShift delays the Kaiser low-pass's response by a fraction
	// of a sample: its pass band follows the ideal delayed low-pass,
	// H(f) = e^{−j2πf(M/2 + shift)} (the window method's target,
	// Oppenheim & Schafer, 3rd ed., sec. 7.5.3, with the sinc and the
	// window moved together), to the design ripple δ in magnitude and δ
	// rad in phase, and its stop band keeps δ = 10^(−A/20). Its length
	// is the unshifted design's plus two whatever the shift.
	const fc, tw, atten = 1200.0 / 6000, 450.0 / 6000, 80.0
	delta := math.Pow(10, -atten/20)
	base := len(kaiserMeetShift(fc, tw, atten, 0))
	for _, shift := range []float64{0.3, -0.5, 0.97, -1} {
		h := kaiserMeetShift(fc, tw, atten, shift)
		if len(h) != base+2 {
			t.Fatalf("shift %g: %d taps, want %d", shift, len(h), base+2)
		}
		c := float64(len(h)-1)/2 + shift
		var worstMag, worstPh, worstStop float64
		for f := 0.0; f <= fc-tw/2; f += 0.0005 {
			for _, ff := range []float64{f, -f} {
				g := FreqResponse(h, ff, 1)
				worstMag = max(worstMag, math.Abs(cmplx.Abs(g)-1))
				ph := cmplx.Phase(g * cmplx.Exp(complex(0, 2*math.Pi*ff*c)))
				worstPh = max(worstPh, math.Abs(ph))
			}
		}
		for f := fc + tw/2; f <= 0.5; f += 0.0005 {
			worstStop = max(worstStop, cmplx.Abs(FreqResponse(h, f, 1)))
		}
		if worstMag > delta || worstPh > delta || worstStop > delta {
			t.Errorf("shift %g: ripple %.2e, phase error %.2e rad, stop band %.2e, want each ≤ %.0e", shift, worstMag, worstPh, worstStop, delta)
		}
	}
}

// TestZeroPhaseResponse checks the Chebyshev-recurrence amplitude of
// symmetric taps against |H(f)| summed directly (FreqResponse): odd and
// even lengths, short and long, at low, middle and high frequencies.
func TestZeroPhaseResponse(t *testing.T) {
	const tol = 1e-12 // relative to Σ|h| (float64 rounding of ~3000 terms)
	for _, l := range []int{1, 2, 7, 64, 65, 130, 2805} {
		h := KaiserWindow(l, 6)
		var sum float64
		for _, v := range h {
			sum += v
		}
		if !symmetricTaps(h) {
			t.Fatalf("L=%d: Kaiser window not symmetric", l)
		}
		fs := []float64{0, 1e-4, 0.0025, 0.1, 0.2499, 0.37, 0.5}
		got := make([]float64, len(fs))
		zeroPhaseResponses(got, h, fs)
		for i, f := range fs {
			want := cmplx.Abs(FreqResponse(h, f, 1))
			if got := math.Abs(got[i]); math.Abs(got-want) > tol*sum {
				t.Errorf("L=%d f=%g: |A| = %.15g, |H| = %.15g", l, f, got, want)
			}
		}
	}
	if symmetricTaps([]float64{1, 2, 1.000001}) {
		t.Error("asymmetric taps reported symmetric")
	}
}

// TestMeetSearchMatchesLinear: the doubling-and-halving search of the
// design attenuation finds the design a step-by-step search from attenDB
// finds (the first on the 0.25 dB grid whose edges meet the target), for
// receive-chain and channeliser designs of 47 to 2805 taps.
func TestMeetSearchMatchesLinear(t *testing.T) {
	linear := func(fc, tw, atten float64) []float64 {
		delta := math.Pow(10, -atten/20)
		var h []float64
		for i := range meetTries {
			a := atten + 0.25*float64(i)
			h = windowedSinc(KaiserOrder(tw, 1, a), fc, KaiserBeta(a), 0)
			if edgeError(h, fc-tw/2, fc+tw/2) <= 0.95*delta {
				break
			}
		}
		return h
	}
	for _, c := range []struct{ fc, tw, atten float64 }{
		{6000 / 2.4e6, (12000 - 2*3768.75) / 2.4e6, 80}, // bank prototype, M = 512
		{20000 / 2.4e6, (40000 - 2*10800) / 2.4e6, 80},  // M = 128
		{1350.0 / 8000, 300.0 / 8000, 80},               // channel filter
		{4000.0 / 48000, 5300.0 / 48000, 80},            // interpolator
		{0.25, 0.1, 60},
		{0.05, 0.02, 100},
	} {
		want := linear(c.fc, c.tw, c.atten)
		got := kaiserDesign(c.fc, c.tw, c.atten)
		if !slices.Equal(got, want) {
			t.Errorf("fc %g, tw %g, %g dB: %d taps, the linear search %d", c.fc, c.tw, c.atten, len(got), len(want))
		}
	}
}
