package modem

import (
	"math"
	"math/cmplx"
	"testing"
)

// toneAmp returns the amplitude of the component at f Hz of x, by
// correlation over the whole slice (choose len(x) an integer number of
// periods so that other tones drop out).
func toneAmp(x []float32, f, rate float64) float64 {
	var s complex128
	for n, v := range x {
		s += complex(float64(v), 0) * cmplx.Exp(complex(0, -2*math.Pi*f*float64(n)/rate))
	}
	return 2 * cmplx.Abs(s) / float64(len(x))
}

// complexTone returns n samples of a·e^{j2πfn/rate}.
func complexTone(n int, a, f, rate float64) []complex64 {
	x := make([]complex64, n)
	for i := range x {
		s, c := math.Sincos(2 * math.Pi * f * float64(i) / rate)
		x[i] = complex(float32(a*c), float32(a*s))
	}
	return x
}

func db(x float64) float64 { return 20 * math.Log10(x) }

// decode runs cfg over src in one call and drops the chain delay.
func decode(t testing.TB, cfg RxConfig, src []complex64) []float32 {
	t.Helper()
	c, err := NewChannel(cfg)
	if err != nil {
		t.Fatal(err)
	}
	out := c.Process(nil, src)
	return out[c.Delay():]
}

func TestUnityConvention(t *testing.T) {
	// Unity convention of ../shared/DESIGN.md (rx): a usb complex
	// exponential of magnitude a at +f above the carrier gives a real tone
	// of amplitude a at f; lsb mirrored; AM with carrier A and depth m
	// gives A·m. Tolerance from the issue: ±0.1 dB.
	const tolDB = 0.1
	const rate = 2.4e6
	const n = 2400000 // 1 s
	for _, tc := range []struct {
		name   string
		mode   Mode
		offset float64
		f      float64 // tone offset from the carrier
	}{
		{"usb 1k", USB, 100e3, 1000},
		{"usb 600", USB, -250e3, 600},
		{"usb 2400", USB, 0, 2400},
		{"lsb 1k", LSB, 100e3, -1000},
		{"lsb 2400", LSB, -30e3, -2400},
	} {
		t.Run(tc.name, func(t *testing.T) {
			const a = 0.3
			x := complexTone(n, a, tc.offset+tc.f, rate)
			y := decode(t, RxConfig{Rate: rate, Offset: tc.offset, Mode: tc.mode}, x)
			seg := y[4800 : 4800+38400] // steady state, 0.8 s: whole periods of each f
			got := toneAmp(seg, math.Abs(tc.f), 48000)
			if d := db(got / a); math.Abs(d) > tolDB {
				t.Errorf("amplitude %.5f, want %.5f (%.3f dB)", got, a, d)
			}
		})
	}
}
