package modem_test

import (
	"fmt"
	"math"
	"math/cmplx"

	"ssbkit/modem"
)

// A tone 1 kHz above 120 kHz in a 2.4 MS/s capture, narrowed to 48 kHz
// around 120 kHz: it comes out at +1 kHz with its amplitude.
func ExampleNarrower() {
	const rate = 2.4e6
	x := make([]complex64, 1<<16)
	for i := range x {
		x[i] = complex64(cmplx.Rect(0.5, 2*math.Pi*121e3*float64(i)/rate))
	}
	nr, err := modem.NewNarrower(rate, 120e3, 48000, 8000, 80)
	if err != nil {
		fmt.Println(err)
		return
	}
	y := nr.Process(nil, x)
	fmt.Printf("%.0f Hz (÷%d), %d outputs, first %d settling\n", nr.Rate(), nr.Decim(), len(y), nr.Settle())
	// the phase advance per output sample is 2π·1000/48000
	last, prev := complex128(y[len(y)-1]), complex128(y[len(y)-2])
	fmt.Printf("|y| = %.4f, %.1f Hz\n", cmplx.Abs(last), cmplx.Phase(last/prev)/(2*math.Pi)*nr.Rate())
	// Output:
	// 48000 Hz (÷50), 1311 outputs, first 11 settling
	// |y| = 0.5000, 1000.0 Hz
}
