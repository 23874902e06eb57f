package modem_test

import (
	"fmt"
	"math"

	"ssbkit/modem"
)

// A voiced USB signal heard through a receiver tuned 37 Hz below its
// carrier: harmonics of a pitch that wanders between 90 and 130 Hz,
// within the 300–2700 Hz voice band, in a 6 kHz baseband whose assumed
// carrier sits at −1500 Hz (where rx puts it). Each 3 s window finds the
// 37 Hz.
func ExampleTuneEstimator() {
	const rate = 6000
	x := voicedUSB(rate, 8, 37, -1500)
	e, err := modem.NewTuneEstimator(modem.TuneConfig{Rate: rate, Carrier: -1500, Mode: modem.USB})
	if err != nil {
		panic(err)
	}
	for _, est := range e.Process(nil, x) {
		fmt.Printf("%.1f–%.1f s: accepted %v, within 2 Hz of +37 Hz: %v\n",
			est.Start, est.End, est.OK, math.Abs(est.OffsetHz-37) < 2)
	}
	// Output:
	// 0.0–3.1 s: accepted true, within 2 Hz of +37 Hz: true
	// 1.0–4.1 s: accepted true, within 2 Hz of +37 Hz: true
	// 2.0–5.1 s: accepted true, within 2 Hz of +37 Hz: true
	// 3.1–6.1 s: accepted true, within 2 Hz of +37 Hz: true
	// 4.1–7.2 s: accepted true, within 2 Hz of +37 Hz: true
}

// A voice tuned 37 Hz low through a fine tuner: the output is the input
// delayed by one analysis window and moved down by the carrier error
// found from the voice, which the report gives at the start and the end.
func ExampleFineTuner() {
	const rate = 6000
	x := voicedUSB(rate, 8, 37, -1500)
	ft, err := modem.NewFineTuner(modem.TuneConfig{Rate: rate, Carrier: -1500, Mode: modem.USB}, 0)
	if err != nil {
		panic(err)
	}
	var out []complex64
	for k := 0; k < len(x); k += 1000 { // blocks as they arrive
		out = append(out, ft.Process(nil, x[k:min(len(x), k+1000)])...)
	}
	out = append(out, ft.Drain(nil)...)
	r := ft.Report()
	fmt.Printf("delay %d samples (%.3f s), %d samples out\n", ft.Delay(), float64(ft.Delay())/rate, len(out))
	fmt.Printf("correction within 2 Hz of +37 Hz at the start: %v, at the end: %v; %d of %d windows\n",
		math.Abs(r.Start-37) < 2, math.Abs(r.End-37) < 2, r.Accepted, r.Windows)
	// Output:
	// delay 18432 samples (3.072 s), 66432 samples out
	// correction within 2 Hz of +37 Hz at the start: true, at the end: true; 6 of 6 windows
}

// voicedUSB returns seconds of a voiced USB signal at rate: the harmonics
// within 300–2700 Hz of a pitch wandering between 90 and 130 Hz, each of
// amplitude 1/k, heard errHz above the assumed carrier at carrier Hz.
func voicedUSB(rate, seconds, errHz, carrier float64) []complex64 {
	x := make([]complex64, int(seconds*rate))
	var phase float64
	for n := range x {
		t := float64(n) / rate
		f0 := 110 + 20*math.Sin(2*math.Pi*0.4*t)
		phase += 2 * math.Pi * f0 / rate
		var v complex128
		for k := 1; float64(k)*f0 < 2700; k++ {
			if float64(k)*f0 > 300 {
				s, c := math.Sincos(float64(k)*phase + 2*math.Pi*(errHz+carrier)*t)
				v += complex(c, s) / complex(float64(k), 0)
			}
		}
		x[n] = complex64(v)
	}
	return x
}
