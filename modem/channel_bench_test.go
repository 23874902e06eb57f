package modem

import (
	"fmt"
	"io"
	"testing"
)

// BenchmarkShiftDecimator measures the first stage of the 2.4 MS/s USB
// plan (comb², ÷16); bytes are counted as cu8 input (2 bytes a sample).
func BenchmarkShiftDecimator(b *testing.B) {
	for _, p := range []struct{ d, m int }{{16, 2}, {10, 2}, {5, 3}} {
		b.Run(fmt.Sprintf("d%d_m%d", p.d, p.m), func(b *testing.B) {
			s := NewShiftDecimator(combTaps(p.d, p.m), p.d, 0, 120e3, 2.4e6)
			x := complexTone(1<<16+s.l-1, 0.5, 121e3, 2.4e6)
			dst := make([]complex64, 0, s.MaxOut(1<<16))
			b.SetBytes(2 << 16)
			b.ReportAllocs()
			for i := 0; b.Loop(); i++ {
				dst = s.Block(dst[:0], x, int64(i)<<16)
			}
		})
	}
}

// memReader serves n samples, cycling through x.
type memReader struct {
	x    []complex64
	i, n int
}

func (m *memReader) Read(dst []complex64) (int, error) {
	if m.n == 0 {
		return 0, io.EOF
	}
	k := 0
	for k < len(dst) && m.n > 0 {
		c := copy(dst[k:min(len(dst), k+m.n)], m.x[m.i:])
		k += c
		m.n -= c
		m.i = (m.i + c) % len(m.x)
	}
	return k, nil
}

// BenchmarkReceiver decodes one and four USB channels (the bench/run.sh
// offsets) of 2²¹ samples of a 2.4 MS/s capture held in memory, the
// whole Receiver on all cores; bytes are counted as cu8 input. The
// ratio of the two times is the cost of four channels in single passes
// without the file reading and decoding.
func BenchmarkReceiver(b *testing.B) {
	const n = 1 << 21
	x := testSignal(1<<16, 9)
	offsets := []float64{-300e3, 120e3, 500e3, 700e3}
	for _, k := range []int{1, 4} {
		b.Run(fmt.Sprintf("channels%d", k), func(b *testing.B) {
			cfgs := make([]RxConfig, k)
			sinks := make([]func([]float32) error, k)
			for i := range cfgs {
				cfgs[i] = RxConfig{Rate: 2.4e6, Offset: offsets[i]}
				sinks[i] = func([]float32) error { return nil }
			}
			r, err := NewReceiver(cfgs)
			if err != nil {
				b.Fatal(err)
			}
			b.SetBytes(2 * n)
			b.ReportAllocs()
			for b.Loop() {
				for _, c := range r.Channels() {
					c.Reset()
				}
				if err := r.Run(&memReader{x: x, n: n}, sinks); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkShiftGroup measures the first stages of four channels of the
// 2.4 MS/s USB plan over one block, each decimator alone ("single") and
// in one pass of the four-channel kernel ("group"); bytes are counted as
// cu8 input.
func BenchmarkShiftGroup(b *testing.B) {
	const n = 1 << 12
	freqs := []float64{-300e3, 121.5e3, 501.5e3, 701.5e3}
	sds := make([]*ShiftDecimator, 4)
	for c := range sds {
		sds[c] = NewShiftDecimator(combTaps(16, 2), 16, 0, freqs[c], 2.4e6)
	}
	x := testSignal(n+sds[0].l-1, 3)
	outs := make([][]complex64, 4)
	b.Run("single", func(b *testing.B) {
		b.SetBytes(2 * n)
		for i := 0; b.Loop(); i++ {
			for c, s := range sds {
				outs[c] = s.Block(outs[c][:0], x, int64(i)*n)
			}
		}
	})
	if g2 := newShiftGroup(sds[:2]); g2 != nil {
		b.Run("single2", func(b *testing.B) {
			b.SetBytes(2 * n)
			for i := 0; b.Loop(); i++ {
				for c, s := range sds[:2] {
					outs[c] = s.Block(outs[c][:0], x, int64(i)*n)
				}
			}
		})
		b.Run("group2", func(b *testing.B) {
			b.SetBytes(2 * n)
			b.ReportAllocs()
			for i := 0; b.Loop(); i++ {
				for c := range outs {
					outs[c] = outs[c][:0]
				}
				g2.block(outs[:2], x, int64(i)*n)
			}
		})
	}
	g := newShiftGroup(sds)
	if g == nil {
		return
	}
	b.Run("group", func(b *testing.B) {
		b.SetBytes(2 * n)
		b.ReportAllocs()
		for i := 0; b.Loop(); i++ {
			for c := range outs {
				outs[c] = outs[c][:0]
			}
			g.block(outs, x, int64(i)*n)
		}
	})
}
