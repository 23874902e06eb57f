package hilbert_test

import (
	"fmt"
	"math"
	"math/cmplx"

	"ssbkit/hilbert"
)

// A 63-tap equiripple splitter for 300–2700 Hz audio at 8 kHz: its
// suppression, delay and cost.
func ExampleAnalyze() {
	sp, err := hilbert.New(hilbert.Spec{Design: "equiripple", Taps: 63, Rate: 8000, Low: 300, High: 2700})
	if err != nil {
		fmt.Println(err)
		return
	}
	a := hilbert.Analyze(sp, 300, 2700)
	fmt.Printf("min %.1f dB, delay %.0f samples (%.3f ms), %.0f multiply-adds a sample\n",
		a.SuppressionMinDB, a.DelaySamples, a.DelayMS, a.MACsPerSample)
	// Output:
	// min 81.3 dB, delay 31 samples (3.875 ms), 16 multiply-adds a sample
}

// The streaming filter turns a real tone into a complex one of the same
// amplitude at +f, delayed by Delay samples.
func ExampleFilter() {
	sp, _ := hilbert.New(hilbert.Spec{Design: "allpass", Sections: 6, Rate: 8000, Low: 300, High: 2700})
	f := sp.NewFilter()
	const hz, amp = 1000.0, 0.5
	w := 2 * math.Pi * hz / 8000
	src := make([]float32, 2000)
	for n := range src {
		src[n] = float32(amp * math.Cos(w*float64(n)))
	}
	dst := make([]complex64, len(src))
	f.Process(dst, src)
	last := complex128(dst[len(dst)-1])
	next := complex128(dst[len(dst)-2]) * cmplx.Rect(1, w) // one sample on at +f
	fmt.Printf("|y| = %.4f, turns at +%.0f Hz: %v\n", cmplx.Abs(last), hz, cmplx.Abs(last-next) < 1e-3)
	fmt.Printf("measured suppression at 1 kHz above 80 dB: %v\n", hilbert.MeasureDB(sp, hz) > 80)
	// Output:
	// |y| = 0.5000, turns at +1000 Hz: true
	// measured suppression at 1 kHz above 80 dB: true
}

// The all-pass pair: section coefficients for export.
func ExampleSections() {
	sp, _ := hilbert.New(hilbert.Spec{Design: "allpass", Sections: 3, Rate: 8000, Low: 300, High: 3700})
	i, q, _ := hilbert.Sections(sp)
	fmt.Printf("I %.4f\nQ %.4f (after one sample of delay)\n", i, q)
	fmt.Printf("%.1f dB\n", hilbert.Analyze(sp, 300, 3700).SuppressionMinDB)
	// Output:
	// I [0.1525 0.8215]
	// Q [0.4805] (after one sample of delay)
	// 47.0 dB
}

// An analog phasing network of six op-amp all-pass sections for
// 300–2700 Hz audio: the pole frequencies of each path and the ideal
// suppression.
func ExampleNewAnalog() {
	a, err := hilbert.NewAnalog(6, 300, 2700)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("I poles %.1f Hz\nQ poles %.1f Hz\n", a.I, a.Q)
	r := a.Analyze(300, 2700)
	fmt.Printf("min %.1f dB, delay %.3f ms at the band centre\n", r.SuppressionMinDB, r.DelayMS)
	// Output:
	// I poles [307.8 1257.9 8886.2] Hz
	// Q poles [91.2 643.9 2631.6] Hz
	// min 65.8 dB, delay 0.181 ms at the band centre
}

// Preferred values: the nearest E12 and E96 parts to a computed
// resistance.
func ExampleSnap() {
	e12, _ := hilbert.Series("E12")
	e96, _ := hilbert.Series("E96")
	r := 1 / (2 * math.Pi * 643.9 * 10e-9) // Ω for a 643.9 Hz pole with 10 nF
	fmt.Printf("%.0f Ω → E12 %.0f Ω, E96 %.0f Ω\n", r, hilbert.Snap(r, e12), hilbert.Snap(r, e96))
	// Output:
	// 24717 Ω → E12 27000 Ω, E96 24900 Ω
}

// Fixed-point coefficients for firmware: the 63-tap equiripple splitter
// with 16-bit taps, its scale and what the rounding costs.
func ExampleQuantized() {
	s := hilbert.Spec{Design: "equiripple", Taps: 63, Rate: 8000, Low: 300, High: 2700}
	exact, _ := hilbert.New(s)
	s.Bits = 16
	sp, _ := hilbert.New(s)
	fx, _ := hilbert.Quantized(sp)
	m := len(fx.Q) / 2
	fmt.Printf("Q taps × 2^-%d; the taps next to the centre: %d, %d\n", fx.Frac, fx.Q[m-1], fx.Q[m+1])
	fmt.Printf("exact %.1f dB, 16-bit %.1f dB\n", hilbert.Analyze(exact, 300, 2700).SuppressionMinDB, hilbert.Analyze(sp, 300, 2700).SuppressionMinDB)
	// Output:
	// Q taps × 2^-15; the taps next to the centre: -20792, 20792
	// exact 81.3 dB, 16-bit 79.4 dB
}

// From design to parts: six sections with 10 nF capacitors and E96
// resistors, and what 1 % resistors and 5 % capacitors leave of the
// suppression.
func ExampleNetwork_MonteCarlo() {
	a, _ := hilbert.NewAnalog(6, 300, 2700)
	e96, _ := hilbert.Series("E96")
	net := a.Build(hilbert.Parts{Value: 10e-9, Series: e96})
	fmt.Printf("first section: R %.0f Ω, C %.0f nF, pole %.1f Hz\n", net.Sections[0].R, net.Sections[0].C*1e9, net.Sections[0].Pole())
	fmt.Printf("snapped: %.1f dB\n", net.Analyze(300, 2700).SuppressionMinDB)
	r := net.MonteCarlo(hilbert.MonteCarlo{Low: 300, High: 2700, Trials: 2000, Seed: 1, Tol: hilbert.Tolerance{R: 0.01, C: 0.05}})
	fmt.Printf("median %.1f dB, 5th percentile %.1f dB, yield for 40 dB %.0f %%\n", r.Quantile(0.5), r.Quantile(0.05), 100*r.Yield(40))
	// Output:
	// first section: R 52300 Ω, C 10 nF, pole 304.3 Hz
	// snapped: 45.8 dB
	// median 31.8 dB, 5th percentile 25.9 dB, yield for 40 dB 5 %
}
