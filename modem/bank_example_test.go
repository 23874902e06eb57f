package modem_test

import (
	"fmt"
	"math"
	"math/cmplx"

	"ssbkit/modem"
)

// Two tones in a 2.4 MS/s capture split into 256 sub-bands 9375 Hz apart:
// each comes out of its nearest sub-band, at its offset from the
// sub-band's centre and with its amplitude.
func ExampleChanneliser() {
	const rate = 2.4e6
	x := make([]complex64, 1<<17)
	for i := range x {
		t := float64(i) / rate
		x[i] = complex64(cmplx.Rect(0.5, 2*math.Pi*121e3*t) + cmplx.Rect(0.25, -2*math.Pi*300.5e3*t))
	}
	c, err := modem.NewChanneliser(modem.ChanneliserSpec{Rate: rate, Bands: 256})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d sub-bands at %.0f Hz, prototype of %d taps\n", c.Bands(), c.OutRate(), len(c.Taps()))
	var bands []int
	var offs []float64
	for _, f := range []float64{121e3, -300.5e3} {
		k, off := c.Nearest(f)
		bands = append(bands, k)
		offs = append(offs, off)
	}
	y := c.Process(nil, bands, x)
	for i, k := range bands {
		last, prev := complex128(y[i][len(y[i])-1]), complex128(y[i][len(y[i])-2])
		f := cmplx.Phase(last/prev) / (2 * math.Pi) * c.OutRate()
		fmt.Printf("sub-band %d (%+.0f Hz): tone at %+.1f Hz (%+.1f), |y| = %.4f\n", k, c.Centre(k), f, offs[i], cmplx.Abs(last))
	}
	// Output:
	// 256 sub-bands at 18750 Hz, prototype of 1341 taps
	// sub-band 13 (+121875 Hz): tone at -875.0 Hz (-875.0), |y| = 0.5000
	// sub-band 224 (-300000 Hz): tone at -500.0 Hz (-500.0), |y| = 0.2500
}
