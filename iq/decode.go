package iq

// DecodeComplex decodes the complex samples of datatype dt in src —
// interleaved I then Q, little-endian, scaled by the design's format
// table (cu8 (v − 127.5)/127.5, ci8 v/128, ci16_le v/32768, cf32_le as
// is) — into dst[:n], n = len(src)/dt.SampleSize(), and returns it. dst
// is reallocated when its capacity is below n; it must not overlap src.
// NaN and ±Inf components of cf32_le become 0, as when a Source reads
// them. It is the bulk decoder behind Source, for callers that read the
// bytes themselves, for example to decode on several goroutines.
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
	switch dt {
	case CU8, CI8:
		// The tables of decodeComplex without its count of rail codes,
		// which this function does not report: a third faster.
		tab := &cu8Table
		if dt == CI8 {
			tab = &ci8Table
		}
		src = src[: 2*n : 2*n]
		for i := range dst {
			dst[i] = complex(tab[src[2*i]], tab[src[2*i+1]])
		}
	default:
		decodeComplex(dt, dst, src)
	}
	return dst
}
