package spectral_test

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"

	"ssbkit/modem/spectral"
)

// A tone's level read from a flat-top Welch spectrum, wherever it falls
// between bins.
func ExampleAccumulator() {
	const rate = 48000.0
	x := make([]complex64, 1<<15)
	for i := range x {
		// amplitude 0.1 (−20 dBFS) at 1000.7 Hz
		x[i] = complex64(cmplx.Rect(0.1, 2*math.Pi*1000.7*float64(i)/rate))
	}
	acc := spectral.NewAccumulatorOptions(4096, rate, spectral.Options{Window: spectral.FlatTop})
	acc.Add(x)
	s := acc.Spectrum()
	f, p, _ := s.Tone(1000, 50)
	fmt.Printf("tone near %.0f Hz at %.2f dBFS, %d segments\n", math.Round(f/10)*10, spectral.DB(p), s.Segments)
	// Output:
	// tone near 1000 Hz at -20.00 dBFS, 15 segments
}

// Signals found in a capture: here a single unmodulated carrier.
func ExampleDetect() {
	const rate = 48000.0
	r := rand.New(rand.NewPCG(1, 2)) // seeded noise
	x := make([]complex64, 1<<16)
	for i := range x {
		x[i] = complex64(cmplx.Rect(0.01, 2*math.Pi*-6000*float64(i)/rate))
		x[i] += complex(float32(1e-4*r.NormFloat64()), float32(1e-4*r.NormFloat64()))
	}
	acc := spectral.NewAccumulator(1024, rate)
	acc.Add(x)
	for _, s := range spectral.Detect(acc.PSD(), rate, spectral.DetectOptions{}) {
		fmt.Printf("%s at %.0f Hz\n", s.Kind, s.OffsetHz)
	}
	// Output:
	// carrier at -6000 Hz
}
