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
	for _, tc := range []struct{ m, d int }{{32, 16}, {64, 32}, {128, 50}, {128, 64}, {256, 100}, {256, 128}, {512, 200}} {
		m := tc.m
		c, err := NewChanneliser(ChanneliserSpec{Rate: 2.4e6, Bands: m, Decim: tc.d, Pass: 2.4e6/float64(2*m) + 1425})
		if err != nil {
			b.Fatal(err)
		}
		bands := make([]int, min(32, m))
		for i := range bands {
			bands[i] = (i * 7) % m
		}
		b.Run(fmt.Sprintf("M=%d/D=%d/rows=%d", m, c.d, c.rows), func(b *testing.B) {
			b.SetBytes(8 * n)
			dst := c.Process(nil, bands, x)
			for b.Loop() {
				dst = c.Process(dst, bands, x)
			}
		})
	}
}

// BenchmarkBankFold times the fold of four windows (M = 256, D = 100).
func BenchmarkBankFold(b *testing.B) {
	c, err := NewChanneliser(ChanneliserSpec{Rate: 2.4e6, Bands: 256, Decim: 100, Pass: 2.4e6/512 + 1425})
	if err != nil {
		b.Fatal(err)
	}
	win := gaussNoise(c.rows*c.m, 1, 1)
	vb := make([]complex64, 4*c.m)
	b.Run("go", func(b *testing.B) {
		for b.Loop() {
			bankFoldGo(vb, win, c.g, c.m, c.d, 3, 4)
		}
	})
	if haveKernels {
		b.Run("avx2", func(b *testing.B) {
			for b.Loop() {
				bankFoldAVX2(&vb[0], &win[0], &c.gp[2*3*c.d], c.m, c.d, c.rows, 3)
			}
		})
	}
}
