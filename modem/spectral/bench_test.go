package spectral

import (
	"fmt"
	"testing"
)

func BenchmarkAccumulatorAdd(b *testing.B) {
	x := addNoise(make([]complex64, 1<<18), 1, 40)
	for _, n := range []int{1024, 8192, 65536} {
		for _, w := range []int{1, 2} {
			b.Run(fmt.Sprintf("fft=%d/workers=%d", n, w), func(b *testing.B) {
				a := NewAccumulatorOptions(n, 2.4e6, Options{Workers: w})
				defer a.Close()
				b.SetBytes(int64(8 * len(x)))
				b.ReportAllocs()
				for b.Loop() {
					a.Add(x)
				}
			})
		}
	}
}

func BenchmarkWaterfallAdd(b *testing.B) {
	// spectrum's default on a 2.4 MS/s capture: 50 Hz → 65536 bins,
	// 50 % overlap, 1024 columns
	x := addNoise(make([]complex64, 1<<18), 1, 42)
	for _, w := range []int{1, 2} {
		b.Run(fmt.Sprintf("workers=%d", w), func(b *testing.B) {
			wf := NewWaterfall(65536, 2.4e6, 300, 1024, Options{Workers: w})
			defer wf.Close()
			b.SetBytes(int64(8 * len(x)))
			b.ReportAllocs()
			for b.Loop() {
				wf.Add(x)
			}
		})
	}
}

func BenchmarkMeasurerAdd(b *testing.B) {
	x := addNoise(make([]complex64, 1<<16), 1, 41)
	m, err := NewMeasurer(48000, -1, MeasureOptions{})
	if err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(8 * len(x)))
	b.ReportAllocs()
	for b.Loop() {
		m.Add(x)
	}
}

// BenchmarkDetect times detection on the PSD of voiceCapture (three
// signals and noise) at two FFT lengths; bytes are the PSD's float64s.
func BenchmarkDetect(b *testing.B) {
	const rate = 48000.0
	x := voiceCapture(1<<17, rate, -15000, 4000, 14000)
	for _, n := range []int{1024, 8192} {
		a := NewAccumulator(n, rate)
		a.Add(x)
		psd := a.PSD()
		b.Run(fmt.Sprintf("fft=%d", n), func(b *testing.B) {
			b.SetBytes(int64(8 * len(psd)))
			b.ReportAllocs()
			for b.Loop() {
				Detect(psd, rate, DetectOptions{})
			}
		})
	}
}
