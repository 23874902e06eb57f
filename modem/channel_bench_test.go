package modem

import (
	"fmt"
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
