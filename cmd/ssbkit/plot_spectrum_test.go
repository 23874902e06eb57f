package main

import (
	"io"
	"math/rand/v2"
	"testing"

	"ssbkit/modem/spectral"
)

// benchPicture is spectrum's picture of a 2.4 MS/s capture at the
// default 50 Hz resolution: 65536 bins, 600 waterfall rows of 1024
// columns, noise with three signals.
func benchPicture() *spectrumPicture {
	const n, rows, cols = 65536, 600, 1024
	r := rand.New(rand.NewPCG(1, 2))
	spec := &spectral.Spectrum{Rate: 2.4e6, Density: make([]float64, n), ENBW: 1.5, Segments: 4000}
	for j := range spec.Density {
		spec.Density[j] = 1e-8 * (1 + 0.1*r.NormFloat64())
	}
	z := make([][]float64, rows)
	for i := range z {
		z[i] = make([]float64, cols)
		for c := range z[i] {
			z[i][c] = 1e-8 * r.ExpFloat64()
		}
	}
	return &spectrumPicture{
		name: "bench.cu8", spec: spec, rows: z, rowSeconds: 0.1, lastRow: 0.1,
		axis: newFreqAxis(0, false, 2.4e6), floor: 1e-8,
		signals: []spectral.Signal{{OffsetHz: 120e3, LowHz: 120.3e3, HighHz: 122.7e3, SNRdB: 18, Kind: "usb"}},
	}
}

func BenchmarkSpectrumPNG(b *testing.B) {
	p := benchPicture()
	b.ReportAllocs()
	for b.Loop() {
		if err := writeSpectrumPNG(io.Discard, p, 1200, 900); err != nil {
			b.Fatal(err)
		}
	}
}
