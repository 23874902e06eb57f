package spectral

import (
	"fmt"
	"testing"
)

func BenchmarkAccumulatorAdd(b *testing.B) {
	x := addNoise(make([]complex64, 1<<16), 1, 40)
	for _, n := range []int{1024, 8192, 65536} {
		b.Run(fmt.Sprintf("fft=%d", n), func(b *testing.B) {
			a := NewAccumulatorOptions(n, 2.4e6, Options{Hop: n})
			b.SetBytes(int64(8 * len(x)))
			b.ReportAllocs()
			for b.Loop() {
				a.Add(x)
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
