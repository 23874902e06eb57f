package iq

import (
	"encoding/binary"
	"math"
	"unsafe"
)

// nativeLE reports whether this machine stores a float32 little-endian,
// in which case a []complex64 in memory already is cf32_le bytes.
var nativeLE = binary.NativeEndian.Uint16([]byte{1, 0}) == 1

// cf32View returns the bytes of src as they lie in memory (no copy); on a
// little-endian machine they are src encoded as cf32_le.
func cf32View(src []complex64) []byte {
	return unsafe.Slice((*byte)(unsafe.Pointer(unsafe.SliceData(src))), 8*len(src))
}

// floatView returns the components of src, I and Q alternating, without
// a copy.
func floatView(src []complex64) []float32 {
	return unsafe.Slice((*float32)(unsafe.Pointer(unsafe.SliceData(src))), 2*len(src))
}

// IEEE 754 binary32: a value is NaN or ±Inf exactly when its eight
// exponent bits are all ones (IEEE Std 754-2019, clause 3.4). The masks
// below handle the two float32 halves of a 64-bit word at once.
const (
	expBits  = 0x7f800000_7f800000 // exponent fields of both halves
	expCarry = 0x00800000_00800000 // one unit of each exponent field
	topBits  = 0x80000000_80000000 // bit 31 of each half
)

// finiteCF32 reports whether every component of the cf32_le bytes b
// (a multiple of 8 long) is finite. For each half h of a word,
// (h & 0x7f800000) + 0x00800000 reaches bit 31 only when the exponent
// field is all ones, and never carries into the other half; so the OR of
// these sums over all words has a top bit set exactly when some
// component is NaN or ±Inf. Branch-free, four words a step.
func finiteCF32(b []byte) bool {
	var a0, a1, a2, a3 uint64
	le := binary.LittleEndian
	for len(b) >= 32 {
		w := b[:32:32]
		a0 |= le.Uint64(w[0:8])&expBits + expCarry
		a1 |= le.Uint64(w[8:16])&expBits + expCarry
		a2 |= le.Uint64(w[16:24])&expBits + expCarry
		a3 |= le.Uint64(w[24:32])&expBits + expCarry
		b = b[32:]
	}
	for len(b) >= 8 {
		a0 |= le.Uint64(b[:8])&expBits + expCarry
		b = b[8:]
	}
	return (a0|a1|a2|a3)&topBits == 0
}

// encodeCF32 writes src to dst as cf32_le, NaN and ±Inf components as 0,
// and returns how many there were. On a little-endian machine the memory
// of src already is the encoding: one scan for non-finite values and a
// memmove (copy) replace the per-component loop; only a block that
// holds a non-finite value takes the reference loop encodeCF32Go.
func encodeCF32(dst []byte, src []complex64) (nonfinite int) {
	if !nativeLE {
		return encodeCF32Go(dst, src)
	}
	b := cf32View(src)
	if !finiteCF32(b) {
		return encodeCF32Go(dst, src)
	}
	copy(dst[:len(b):len(b)], b)
	return 0
}

// encodeCF32Go is the reference loop of encodeCF32: each component is
// tested (x − x ≠ 0 exactly for NaN and ±Inf) and stored little-endian.
func encodeCF32Go(dst []byte, src []complex64) (nonfinite int) {
	n := len(src)
	dst = dst[: 8*n : 8*n]
	for i, v := range src {
		a, b := real(v), imag(v)
		if a-a != 0 {
			a = 0
			nonfinite++
		}
		if b-b != 0 {
			b = 0
			nonfinite++
		}
		s := dst[8*i : 8*i+8 : 8*i+8]
		binary.LittleEndian.PutUint32(s[0:4], math.Float32bits(a))
		binary.LittleEndian.PutUint32(s[4:8], math.Float32bits(b))
	}
	return nonfinite
}
