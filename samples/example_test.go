package samples_test

import (
	"fmt"
	"io"
	"math"

	"ssbkit/samples"
)

// A two-tone test signal: the peak is twice one tone's amplitude, so each
// tone sits 6.02 dB below the peak envelope power.
func ExampleNewTwoTone() {
	const a = 0.25
	x := samples.NewTwoTone(700, 1900, a, 8000).Generate(make([]float32, 8000))
	var peak float64
	for _, v := range x {
		peak = math.Max(peak, math.Abs(float64(v)))
	}
	fmt.Printf("peak %.3f, one tone %.2f dB below PEP\n", peak, 20*math.Log10(peak/a))
	// Output:
	// peak 0.500, one tone 6.02 dB below PEP
}

// The reference word "PARIS" is 50 units long; at 20 words per minute a
// unit is 60 ms.
func ExampleNewKeyer() {
	const rate = 8000
	k := samples.NewKeyer("PARIS", 20, 0.005, rate)
	fmt.Printf("%.2f s per word, key down %.0f%% of the time\n", k.Period()/rate, 100*k.Duty())
	// Output:
	// 3.00 s per word, key down 44% of the time
}

// A synthetic talker, generated block by block.
func ExampleNewVoice() {
	v, err := samples.NewVoice(samples.VoiceConfig{Pitch: 180, Formants: 1.15, Seed: 7})
	if err != nil {
		fmt.Println(err)
		return
	}
	c := v.Config()
	block := make([]float32, 512)
	var peak float64
	for range 10 * int(c.Rate) / len(block) {
		for _, s := range v.Generate(block) {
			peak = math.Max(peak, math.Abs(float64(s)))
		}
	}
	fmt.Printf("%.0f Hz, pitch %.0f Hz, level %.2f, peak below 0.9: %v\n", c.Rate, c.Pitch, c.Level, peak < 0.9)
	// Output:
	// 8000 Hz, pitch 180 Hz, level 0.10, peak below 0.9: true
}

// The bench test and what a perfect measurement of it gives.
func ExampleNewBench() {
	b, err := samples.NewBench(samples.DefaultBenchConfig())
	if err != nil {
		fmt.Println(err)
		return
	}
	t := b.Truth()
	fmt.Printf("suppression %.1f dB, carrier %.1f dBc, IMD3 %.1f dBc, image rejection %.1f dB\n",
		t.SuppressionDB, t.CarrierDBc, t.IMD3DBc, t.ImageRejDB)
	// Output:
	// suppression 45.0 dB, carrier -40.2 dBc, IMD3 -35.0 dBc, image rejection 36.8 dB
}

// The band scene: its stations, then the capture read block by block.
func ExampleNewBand() {
	cfg := samples.DefaultBandConfig()
	cfg.Seconds = 1
	b, err := samples.NewBand(cfg)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, s := range b.Truth().Stations {
		fmt.Printf("%-7s %.3f MHz  %s\n", s.Mode, s.FreqHz/1e6, s.Label)
	}
	buf := make([]complex64, 4096)
	var n int64
	for {
		k, err := b.Read(buf)
		n += int64(k)
		if err == io.EOF {
			break
		}
	}
	fmt.Println(n, "samples")
	// Output:
	// lsb     7.133 MHz  net control, strong, low voice
	// lsb     7.141 MHz  portable station, drifting
	// am      7.147 MHz  AM broadcast-style station
	// usb     7.155 MHz  high voice, upper sideband
	// carrier 7.159 MHz  steady carrier
	// usb     7.162 MHz  weak distant station
	// carrier 7.170 MHz  keyed carrier sending TEST
	// 48000 samples
}
