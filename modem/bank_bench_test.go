package modem

import (
	"bytes"
	"fmt"
	"math"
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

// BenchmarkReceiverFront times a Receiver over two seconds of a 2.4
// MS/s cu8-coded capture (RunRaw, the command's path) for several channel
// counts through each front end; the sinks discard the audio. With
// -cpu 1 the time per operation is the CPU time: the planner rule
// (ChanneliserMinChannels) is where the channeliser's column drops below the
// per-channel one. cpu-ms/op is the process's CPU time per operation
// (user and system, getrusage), steadier than the wall time on a shared
// machine.
func BenchmarkReceiverFront(b *testing.B) {
	const rate = 2.4e6
	const n = 2 * rate
	x := testCapture(n)
	raw := make([]byte, 2*n)
	for i, v := range x {
		raw[2*i] = byte(max(0, min(255, math.Round(float64(real(v))*127.5+127.5))))
		raw[2*i+1] = byte(max(0, min(255, math.Round(float64(imag(v))*127.5+127.5))))
	}
	var lut [256]float32
	for i := range lut {
		lut[i] = (float32(i) - 127.5) / 127.5
	}
	dec := func(dst []complex64, b []byte) {
		for i := range dst {
			dst[i] = complex(lut[b[2*i]], lut[b[2*i+1]])
		}
	}
	for _, nch := range []int{1, 2, 4, 6, 8, 12, 14, 16, 32, 64, 128} {
		cfgs := make([]RxConfig, nch)
		step := 2.3e6 / float64(nch)
		for i := range cfgs {
			cfgs[i] = RxConfig{Rate: rate, Offset: math.Round(-1.15e6 + step*(float64(i)+0.5))}
		}
		sinks := discard(nch)
		for _, front := range []FrontEnd{FrontPerChannel, FrontChanneliser} {
			b.Run(fmt.Sprintf("ch=%d/%v", nch, front), func(b *testing.B) {
				b.SetBytes(int64(len(raw)))
				if _, err := NewReceiverFront(cfgs, front); err != nil { // designs remembered
					b.Fatal(err)
				}
				c0 := cpuSeconds()
				for b.Loop() {
					r, err := NewReceiverFront(cfgs, front)
					if err != nil {
						b.Fatal(err)
					}
					if err := r.RunRaw(bytes.NewReader(raw), 2, dec, sinks); err != nil {
						b.Fatal(err)
					}
				}
				b.ReportMetric((cpuSeconds()-c0)/float64(b.N)*1e3, "cpu-ms/op")
			})
		}
	}
}

// BenchmarkReceiverBankPlans times 32 channels through Channelisers of
// several designs (M sub-bands, decimation D), to check planBank's
// choice against measured CPU time.
func BenchmarkReceiverBankPlans(b *testing.B) {
	const rate = 2.4e6
	const n = 2 * rate
	x := testCapture(n)
	const nch = 32
	cfgs := make([]RxConfig, nch)
	step := 2.3e6 / float64(nch)
	for i := range cfgs {
		cfgs[i] = RxConfig{Rate: rate, Offset: math.Round(-1.15e6 + step*(float64(i)+0.5))}
	}
	sinks := discard(nch)
	full := make([]RxConfig, nch)
	for i, c := range cfgs {
		full[i], _ = c.withDefaults()
	}
	auto, _ := planBank(full)
	defer func() { testBankPlan = nil }()
	for _, p := range []bankPlan{{m: 32, d: 16}, {m: 64, d: 25}, {m: 64, d: 32}, {m: 128, d: 50}, {m: 128, d: 60}, {m: 256, d: 100}, {m: 256, d: 125}, {m: 512, d: 200}} {
		p.pass = rate/float64(2*p.m) + 1425
		name := fmt.Sprintf("M=%d/D=%d", p.m, p.d)
		if p.m == auto.m && p.d == auto.d {
			name += "/planned"
		}
		b.Run(name, func(b *testing.B) {
			testBankPlan = &p
			r, err := NewReceiverFront(cfgs, FrontChanneliser)
			if err != nil {
				b.Skip(err)
			}
			c0 := cpuSeconds()
			for b.Loop() {
				r, _ = NewReceiverFront(cfgs, FrontChanneliser)
				if err := r.Run(&sliceReader{x, 1 << 16}, sinks); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric((cpuSeconds()-c0)/float64(b.N)*1e3, "cpu-ms/op")
		})
	}
}
