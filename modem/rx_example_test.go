package modem_test

import (
	"fmt"
	"io"
	"math"

	"ssbkit/modem"
)

// A USB signal 1 kHz above a suppressed carrier at +100 kHz in a
// 2.4 MS/s capture decodes to a 1 kHz tone of the same amplitude.
func ExampleChannel() {
	const rate = 2.4e6
	x := make([]complex64, 480000) // 0.2 s
	for n := range x {
		s, c := math.Sincos(2 * math.Pi * 101e3 * float64(n) / rate)
		x[n] = complex(float32(0.3*c), float32(0.3*s))
	}
	ch, err := modem.NewChannel(modem.RxConfig{Rate: rate, Offset: 100e3, Mode: modem.USB})
	if err != nil {
		panic(err)
	}
	audio := ch.Process(nil, x)[ch.Delay():] // sample k is the capture at k/48000 s
	var peak float32
	for _, v := range audio[2400:] {
		peak = max(peak, v)
	}
	fmt.Println(ch.Plan())
	fmt.Printf("%d audio samples, peak %.3f\n", len(audio), peak)
	// Output:
	// 2.4e+06 Hz ÷16 (comb^2, 31 taps) ÷5 ÷5 → 6000 Hz
	// 9232 audio samples, peak 0.300
}

// A capture demodulated block by block, as it arrives from a reader
// (iq.Source.Read): the channel keeps its state between calls, so the
// audio is the same as from one call over the whole capture, and the
// block buffers are reused (no allocation after the first block). The
// first Delay audio samples are the filters filling.
func ExampleChannel_Process() {
	const rate = 2.4e6
	ch, err := modem.NewChannel(modem.RxConfig{Rate: rate, Offset: -50e3, Mode: modem.LSB})
	if err != nil {
		panic(err)
	}
	osc := modem.NewOscillator(-50e3-700, rate) // LSB: 700 Hz below the carrier
	blk := make([]complex64, 30000)
	var audio []float32
	skip := ch.Delay()
	var got int
	var peak float32
	for range 16 { // 16 blocks of 12.5 ms
		for i, v := range osc.Generate(blk) {
			blk[i] = 0.25 * v
		}
		audio = ch.Process(audio, blk)
		for _, v := range audio {
			if got >= skip+2400 { // past the filters' settling, 50 ms in
				peak = max(peak, v)
			}
			got++
		}
	}
	fmt.Printf("%d audio samples (%d of delay), peak %.3f\n", got, skip, peak)
	// Output:
	// 9600 audio samples (368 of delay), peak 0.250
}

// Several channels of one capture, decoded in one pass on all cores.
func ExampleReceiver() {
	const rate = 2.4e6
	x := make([]complex64, 240000)
	for n := range x {
		s, c := math.Sincos(2 * math.Pi * (-200e3 - 800) * float64(n) / rate) // LSB, 800 Hz
		x[n] = complex(float32(0.2*c), float32(0.2*s))
	}
	r, err := modem.NewReceiver([]modem.RxConfig{
		{Rate: rate, Offset: -200e3, Mode: modem.LSB},
		{Rate: rate, Offset: 300e3, Mode: modem.USB},
	})
	if err != nil {
		panic(err)
	}
	var got [2][]float32
	err = r.Run(&samples{x}, []func([]float32) error{
		func(a []float32) error { got[0] = append(got[0], a...); return nil },
		func(a []float32) error { got[1] = append(got[1], a...); return nil },
	})
	var p0, p1 float32
	for i := 2400; i < 4000; i++ { // away from the ends, where the cut tone rings
		p0, p1 = max(p0, got[0][i]), max(p1, got[1][i])
	}
	fmt.Println(err, len(got[0]), len(got[1]))
	fmt.Printf("peaks %.2f %.2f\n", p0, p1)
	// Output:
	// <nil> 4800 4800
	// peaks 0.20 0.00
}

// samples reads a slice.
type samples struct{ x []complex64 }

func (s *samples) Read(dst []complex64) (int, error) {
	if len(s.x) == 0 {
		return 0, io.EOF
	}
	n := copy(dst, s.x)
	s.x = s.x[n:]
	return n, nil
}
