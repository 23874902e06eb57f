package modem_test

import (
	"fmt"
	"math"
	"math/cmplx"

	"ssbkit/modem"
)

// A tone resampled from 8 kHz to 2.4 MHz keeps its frequency; the delay
// says where input sample 0 lands.
func ExampleNewResampler() {
	r, err := modem.NewResampler(8000, 2.4e6, 90)
	if err != nil {
		fmt.Println(err)
		return
	}
	x := modem.NewOscillator(1000, 8000).Generate(make([]complex64, 800))
	y := r.Process(nil, x)
	l, m := r.Ratio()
	fmt.Printf("ratio %d/%d, stages %v, %d samples out\n", l, m, r.Stages(), len(y))
	n := 100000 // well past the start
	want := cmplx.Exp(complex(0, 2*math.Pi*1000*(float64(n)-r.Delay())/2.4e6))
	fmt.Printf("error at sample %d below 1e-4: %v\n", n, cmplx.Abs(complex128(y[n])-want) < 1e-4)
	// Output:
	// ratio 300/1, stages [[2 1] [3 1] [50 1]], 240000 samples out
	// error at sample 100000 below 1e-4: true
}

// An audio tone of amplitude 0.5 at 1 kHz becomes, in USB, a complex
// exponential of magnitude 0.5 at +1 kHz from the carrier (the unity
// convention), here placed at +10 kHz in a 48 kHz capture.
func ExampleNewModulator() {
	m, err := modem.NewModulator(modem.TxConfig{
		Mode: "usb", AudioRate: 8000, OutRate: 48000, Offset: 10000,
		BandLow: 300, BandHigh: 2700,
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	audio := make([]float32, 8000)
	for i := range audio {
		audio[i] = float32(0.5 * math.Cos(2*math.Pi*1000*float64(i)/8000))
	}
	iq := m.Process(nil, audio)
	// Correlate the second half with e^{j2π·11 kHz·n/fs}.
	var acc complex128
	seg := iq[len(iq)/2:]
	for i, v := range seg {
		acc += complex128(v) * cmplx.Exp(complex(0, -2*math.Pi*11000*float64(i)/48000))
	}
	fmt.Printf("internal rate %g Hz, magnitude at +11 kHz %.4f\n", m.InternalRate(), cmplx.Abs(acc)/float64(len(seg)))
	// Output:
	// internal rate 8000 Hz, magnitude at +11 kHz 0.5000
}

// Two equal tones of amplitude 0.5 have a PEP of 1 (0 dBFS) and an average
// power of 0.5: the PEP-to-average ratio of the two-tone test, 3.01 dB
// (common practice).
func ExampleLevelMeter() {
	const rate = 48000
	a := modem.NewOscillator(1000, rate).Generate(make([]complex64, rate))
	b := modem.NewOscillator(2000, rate).Generate(make([]complex64, rate))
	var lv modem.LevelMeter
	for i := 0; i < rate; i += 4800 { // blocks, as a stream arrives
		blk := make([]complex64, 4800)
		for k := range blk {
			blk[k] = 0.5*a[i+k] + 0.5*b[i+k]
		}
		lv.Add(blk)
	}
	avg := lv.Energy() / float64(lv.Count())
	fmt.Printf("PEP %.2f dBFS, average %.2f dBFS, ratio %.2f dB\n",
		10*math.Log10(lv.Peak()), 10*math.Log10(avg), 10*math.Log10(lv.Peak()/avg))
	// Output:
	// PEP 0.00 dBFS, average -3.01 dBFS, ratio 3.01 dB
}
