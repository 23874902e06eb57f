package iq

import (
	"encoding/binary"
	"math"
)

// DecodeComplex decodes the complex samples of datatype dt in src —
// interleaved I then Q, little-endian, scaled by the design's format
// table (cu8 (v − 127.5)/127.5, ci8 v/128, ci16_le v/32768, cf32_le as
// is) — into dst[:n], n = len(src)/dt.SampleSize(), and returns it. dst
// is reallocated when its capacity is below n; it must not overlap src.
// NaN and ±Inf components of cf32_le become 0, as when a Source reads
// them. It is the bulk decoder behind Source (the same code), for
// callers that read the bytes themselves, for example to decode on
// several goroutines.
//
// It panics if dt is not a complex datatype or src does not hold a whole
// number of samples.
func DecodeComplex(dst []complex64, src []byte, dt Datatype) []complex64 {
	if !dt.Valid() || dt.IsReal() {
		panic("iq: DecodeComplex of a real or unknown datatype")
	}
	size := dt.SampleSize()
	n := len(src) / size
	if n*size != len(src) {
		panic("iq: DecodeComplex of a partial sample")
	}
	if cap(dst) < n {
		dst = make([]complex64, n)
	}
	dst = dst[:n]
	decodeComplex(dt, dst, src)
	return dst
}

// decodeComplex decodes len(dst) complex samples of datatype d from b
// (which holds at least len(dst)*d.SampleSize() bytes) into dst. It
// returns the number of samples with a component at full scale (the rail
// codes for integers, |v| ≥ 1 for floats) and the number of components
// that were NaN or ±Inf, which are replaced by 0.
//
// Each datatype has a reference loop (decodeCU8Go, …) and, where the
// machine has one, a vector kernel that gives the same values and counts
// bit for bit (decode_amd64.s); decodeCU8 and its siblings choose.
func decodeComplex(d Datatype, dst []complex64, b []byte) (clipped, nonfinite int) {
	n := len(dst)
	if n == 0 {
		return 0, 0
	}
	switch d {
	case CU8:
		return decodeCU8(dst, b[:2*n:2*n]), 0
	case CI8:
		return decodeCI8(dst, b[:2*n:2*n]), 0
	case CI16:
		return decodeCI16(dst, b[:4*n:4*n]), 0
	case CF32:
		return decodeCF32(dst, b[:8*n:8*n])
	}
	panic("iq: decodeComplex of a real or unknown datatype")
}

// decodeCU8Go is the reference loop for cu8: a 256-entry table of
// (v − 127.5)/127.5 and one of the rail codes 0 and 255, so a sample
// costs two loads per component and no arithmetic. b holds 2·len(dst)
// bytes.
func decodeCU8Go(dst []complex64, b []byte) (clipped int) {
	b = b[: 2*len(dst) : 2*len(dst)]
	for i := range dst {
		i0, q0 := b[2*i], b[2*i+1]
		dst[i] = complex(cu8Table[i0], cu8Table[q0])
		clipped += int(cu8Rail[i0] | cu8Rail[q0])
	}
	return clipped
}

// decodeCI8Go is the reference loop for ci8 (v/128, rails −128 and 127).
func decodeCI8Go(dst []complex64, b []byte) (clipped int) {
	b = b[: 2*len(dst) : 2*len(dst)]
	for i := range dst {
		i0, q0 := b[2*i], b[2*i+1]
		dst[i] = complex(ci8Table[i0], ci8Table[q0])
		clipped += int(ci8Rail[i0] | ci8Rail[q0])
	}
	return clipped
}

// decodeCI16Go is the reference loop for ci16_le (v/32768, rails −32768
// and 32767).
func decodeCI16Go(dst []complex64, b []byte) (clipped int) {
	b = b[: 4*len(dst) : 4*len(dst)]
	for i := range dst {
		s := b[4*i : 4*i+4 : 4*i+4]
		vi := int16(binary.LittleEndian.Uint16(s[0:2]))
		vq := int16(binary.LittleEndian.Uint16(s[2:4]))
		dst[i] = complex(float32(vi)*ci16Scale, float32(vq)*ci16Scale)
		if vi == math.MaxInt16 || vi == math.MinInt16 || vq == math.MaxInt16 || vq == math.MinInt16 {
			clipped++
		}
	}
	return clipped
}

// decodeCF32Go is the reference loop for cf32_le: NaN and ±Inf
// components become 0 and are counted (x − x is 0 for finite x and NaN
// for NaN and ±Inf); a sample is clipped when a finite component has
// |v| ≥ 1.
func decodeCF32Go(dst []complex64, b []byte) (clipped, nonfinite int) {
	b = b[: 8*len(dst) : 8*len(dst)]
	for i := range dst {
		s := b[8*i : 8*i+8 : 8*i+8]
		vi := math.Float32frombits(binary.LittleEndian.Uint32(s[0:4]))
		vq := math.Float32frombits(binary.LittleEndian.Uint32(s[4:8]))
		if vi-vi != 0 {
			vi = 0
			nonfinite++
		}
		if vq-vq != 0 {
			vq = 0
			nonfinite++
		}
		if vi >= 1 || vi <= -1 || vq >= 1 || vq <= -1 {
			clipped++
		}
		dst[i] = complex(vi, vq)
	}
	return clipped, nonfinite
}

// decodeCF32Words is the portable fast path for cf32_le, for machines
// without the vector kernel: on a little-endian machine the bytes
// already are the []complex64, so decoding is one pass over the 64-bit
// words (one sample each) for the clip count and the non-finite test,
// then a copy (memmove). A block holding NaN or ±Inf takes the
// reference loop. The clip count is exact but taken in a second pass
// only over the 256-sample pieces that reach full scale. Plain Go rather
// than a library: no package offers this scan.
//
// For each 32-bit half h of a word, with m = h & 0x7fffffff its
// magnitude bits, m + 0x40800000 reaches bit 31 exactly when m ≥
// 0x3f800000, that is |v| ≥ 1 (IEEE Std 754-2019 clause 3.4: for
// non-negative binary32 values the bit patterns order as the values),
// and never carries into the other half; likewise m + 0x00800000
// reaches bit 31 exactly when m ≥ 0x7f800000, that is NaN or ±Inf (as in
// finiteCF32).
func decodeCF32Words(dst []complex64, b []byte) (clipped, nonfinite int) {
	if !nativeLE {
		return decodeCF32Go(dst, b)
	}
	const (
		magBits  = 0x7fffffff_7fffffff
		clipBias = 0x40800000_40800000
	)
	b = b[: 8*len(dst) : 8*len(dst)]
	le := binary.LittleEndian
	var bad uint64
	clip := 0
	// Pieces of 256 samples: one cheap pass ORs both tests; only a piece
	// with a component at |v| ≥ 1 (rare in a capture at a sane level) is
	// scanned again to count its clipped samples.
	for rest := b; len(rest) > 0; {
		piece := rest[:min(8*256, len(rest))]
		rest = rest[len(piece):]
		var reach uint64
		for p := piece; len(p) >= 8; p = p[8:] {
			m := le.Uint64(p[:8]) & magBits
			bad |= m + expCarry
			reach |= m + clipBias
		}
		if reach&topBits != 0 {
			for p := piece; len(p) >= 8; p = p[8:] {
				t := (le.Uint64(p[:8])&magBits + clipBias) & topBits
				clip += int((t | t<<32) >> 63) // bit 63: either half reached 1
			}
		}
	}
	if bad&topBits != 0 {
		return decodeCF32Go(dst, b)
	}
	copy(cf32View(dst), b)
	return clip, 0
}
