package modem

import (
	"fmt"
	"testing"

	"gonum.org/v1/gonum/dsp/fourier"
)

// BenchmarkBankFFT times four M-point transforms: the Channeliser's
// batched complex64 FFT against gonum's complex128 CmplxFFT run four times.
func BenchmarkBankFFT(b *testing.B) {
	for _, m := range []int{64, 256, 1024} {
		x := gaussNoise(4*m, 1, 1)
		b.Run(fmt.Sprintf("bank/M=%d", m), func(b *testing.B) {
			f := newBankFFT(m)
			for b.Loop() {
				f.transform(x)
			}
		})
		b.Run(fmt.Sprintf("gonum/M=%d", m), func(b *testing.B) {
			f := fourier.NewCmplxFFT(m)
			y := make([]complex128, m)
			for i := range y {
				y[i] = complex128(x[i])
			}
			for b.Loop() {
				for range 4 {
					f.Coefficients(y, y)
				}
			}
		})
	}
}

// BenchmarkChanneliser times the bank over 65536 samples at 2.4 MS/s
// with 32 sub-bands copied out, for several M (Pass for a USB channel).
func BenchmarkChanneliser(b *testing.B) {
	const n = 1 << 16
	x := gaussNoise(n, 1, 1)
	for _, m := range []int{32, 64, 128, 256, 512} {
		c, err := NewChanneliser(ChanneliserSpec{Rate: 2.4e6, Bands: m, Pass: 2.4e6/float64(2*m) + 1425})
		if err != nil {
			b.Fatal(err)
		}
		bands := make([]int, min(32, m))
		for i := range bands {
			bands[i] = (i * 7) % m
		}
		b.Run(fmt.Sprintf("M=%d/K=%d", m, c.k), func(b *testing.B) {
			b.SetBytes(8 * n)
			dst := c.Process(nil, bands, x)
			for b.Loop() {
				dst = c.Process(dst, bands, x)
			}
		})
	}
}

// BenchmarkBankFold times the fold of four windows (M = 256, K = 8).
func BenchmarkBankFold(b *testing.B) {
	const m, k = 256, 8
	g := make([]float32, k*m)
	for i := range g {
		g[i] = float32(i%7) - 3
	}
	win := gaussNoise(k*m+3*m/2, 1, 1)
	vb := make([]complex64, 4*m)
	b.Run("go", func(b *testing.B) {
		for b.Loop() {
			bankFoldGo(vb, win, m/2, m, g, 4)
		}
	})
	if haveKernels {
		gq := bankTapsLayout(g, m)
		b.Run("avx2", func(b *testing.B) {
			for b.Loop() {
				bankFoldAVX2(&vb[0], &win[0], &gq[0], m, k)
			}
		})
	}
}
