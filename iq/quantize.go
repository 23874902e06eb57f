package iq

import (
	"encoding/binary"
	"math"
)

// QuantizeS16 writes the 16-bit little-endian codes of src to
// dst[:2·len(src)]: round(v·scale), rounding half away from zero, clamped
// to −32768 … 32767. It returns the number of finite samples clamped and
// the number of NaN or ±Inf samples, which are written as 0. It panics if
// dst is shorter than 2·len(src). Scale 32768 is the ci16_le/ri16_le
// convention, 32767 the usual one of 16-bit PCM audio (full scale ±1 maps
// to ±32767). On amd64 with AVX2 an assembly kernel does the work
// (quantize_amd64.s); quantizeS16Go is its reference loop. Hand-written:
// no library converts float32 to int16 with this rounding and these
// counts, and Go's scalar loop costs 7 times the kernel.
func QuantizeS16(dst []byte, src []float32, scale float64) (clipped, nonfinite int) {
	if len(dst) < 2*len(src) {
		panic("iq: QuantizeS16 destination too short")
	}
	return quantizeS16(dst, src, scale)
}

// quantizeS16Go is the reference loop of QuantizeS16. x = v·scale is
// exact in float64 (a 24-bit mantissa times a scale of at most 16 bits),
// and so is x ± 0.5 wherever truncation could go wrong, so truncating
// x + copysign(0.5, x) rounds half away from zero exactly as math.Round.
func quantizeS16Go(dst []byte, src []float32, scale float64) (clipped, nonfinite int) {
	dst = dst[:2*len(src)]
	for i, v := range src {
		x := float64(v) * scale
		if x-x != 0 {
			nonfinite++
			x = 0
		}
		x += math.Copysign(0.5, x)
		if !(x < 32768 && x > -32769) {
			clipped++
			x = math.Max(-32768, math.Min(32767, x))
		}
		binary.LittleEndian.PutUint16(dst[2*i:], uint16(int16(int32(x))))
	}
	return clipped, nonfinite
}
