package modem

import "testing"

// BenchmarkTuneEstimator measures the estimator on one second of a
// voiced channel at 6 kHz (the receive chain's usual work rate) and on
// one second of noise (no voiced frames).
func BenchmarkTuneEstimator(b *testing.B) {
	const rate = 6000
	voice, _ := synthVoice(voiceSpec{Rate: rate, Seconds: 10, Pitch: 140, Mode: USB, Carrier: -1450, SNR: 20, Seed: 9})
	noise := testSignal(10*rate, 3)
	for _, tc := range []struct {
		name string
		x    []complex64
	}{{"voice", voice}, {"noise", noise}} {
		b.Run(tc.name, func(b *testing.B) {
			e, err := NewTuneEstimator(TuneConfig{Rate: rate, Carrier: -1500, Mode: USB})
			if err != nil {
				b.Fatal(err)
			}
			var ests []TuneEstimate
			b.SetBytes(rate * 8)
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				k := (i % 10) * rate
				ests = e.Process(ests[:0], tc.x[k:k+rate])
			}
			// milliseconds of work per second of channel
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/1e6, "ms/s")
		})
	}
}
