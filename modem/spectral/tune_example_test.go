package spectral_test

import (
	"fmt"
	"math"

	"ssbkit/modem/spectral"
	"ssbkit/samples"
)

// Signals detected in 8 s of the demo scene, their SSB carriers then found
// from the voices in a second pass: each within a few hertz of the
// scene's, where the spectrum's edge had put them tens of hertz off.
func ExampleCarrierRefiner() {
	cfg := samples.DefaultBandConfig()
	cfg.Seconds = 8
	band, err := samples.NewBand(cfg)
	if err != nil {
		panic(err)
	}
	x := band.ReadAll()
	n := spectral.FFTSizeFor(cfg.Rate, 50)
	acc := spectral.NewAccumulatorOptions(n, cfg.Rate, spectral.Options{Hop: n / 2})
	acc.Add(x)
	signals := spectral.Detect(acc.PSD(), cfg.Rate, spectral.DetectOptions{})
	acc.Close()

	r := spectral.NewCarrierRefiner(cfg.Rate, signals, 0)
	r.Write(x) // the second pass (a file is read again)
	r.Refine(signals)
	for _, s := range signals {
		if s.Kind != spectral.KindUSB && s.Kind != spectral.KindLSB {
			continue
		}
		for _, st := range band.Truth().Stations {
			if mid := st.OffsetHz + st.DriftHz/2; st.Mode == s.Kind && math.Abs(mid-s.EdgeOffsetHz) < 300 {
				fmt.Printf("%s at %+6.0f Hz: edge estimate off by more than 20 Hz: %v, from the voice within 5 Hz: %v\n",
					s.Kind, mid, math.Abs(s.EdgeOffsetHz-mid) > 20, math.Abs(s.OffsetHz-mid) < 5)
			}
		}
	}
	// Output:
	// lsb at -17000 Hz: edge estimate off by more than 20 Hz: true, from the voice within 5 Hz: true
	// lsb at  -9488 Hz: edge estimate off by more than 20 Hz: true, from the voice within 5 Hz: true
	// usb at  +5000 Hz: edge estimate off by more than 20 Hz: true, from the voice within 5 Hz: true
	// usb at +12500 Hz: edge estimate off by more than 20 Hz: true, from the voice within 5 Hz: true
}
