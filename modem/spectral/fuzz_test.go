package spectral

import (
	"math"
	"testing"
)

// FuzzDetect feeds arbitrary spectra (each byte a bin level in dB) to
// Detect: it must not panic, and every signal must have ordered edges,
// a known kind and a carrier inside the capture band (SSB carriers may
// sit AudioLowHz outside the occupied band).
func FuzzDetect(f *testing.F) {
	f.Add([]byte{0, 0, 0, 0, 0, 0, 0, 0, 60, 60, 60, 0, 0, 0, 0, 0})
	f.Add([]byte("ssb ssb ssb ssb \x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\xff\x00\x00\x00"))
	f.Fuzz(func(t *testing.T, b []byte) {
		if len(b) > 1<<14 {
			return
		}
		psd := make([]float64, len(b))
		for i, v := range b {
			psd[i] = math.Pow(10, (float64(v)-200)/10)
		}
		const rate = 48000.0
		for _, s := range Detect(psd, rate, DetectOptions{}) {
			if !(s.LowHz < s.HighHz) || s.LowHz < -rate/2-rate || s.HighHz > rate/2+rate {
				t.Fatalf("edges %g…%g", s.LowHz, s.HighHz)
			}
			switch s.Kind {
			case KindUSB, KindLSB, KindAM, KindCarrier, KindUnknown:
			default:
				t.Fatalf("kind %q", s.Kind)
			}
			if math.IsNaN(s.OffsetHz) || math.IsNaN(s.SNRdB) {
				t.Fatalf("NaN in %+v", s)
			}
		}
	})
}
