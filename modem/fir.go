package modem

// firChunk is the number of input samples a FIR processes per inner pass;
// its working buffer holds len(taps)−1+firChunk samples whatever the block
// size the caller uses.
const firChunk = 2048

// FIR is a streaming convolution of complex samples with real taps,
//
//	y[n] = Σₖ h[k]·x[n−k],  k = 0…len(h)−1,
//
// keeping the last len(h)−1 inputs between calls. The arithmetic is
// float32 (taps rounded to float32), written out on real and imaginary
// parts: direct convolution by hand, since gonum has no streaming FIR and
// for the short filters of this package it beats FFT convolution.
type FIR struct {
	rev []float32   // taps reversed: rev[k] = h[L−1−k]
	buf []complex64 // history (L−1) then the current chunk
}

// NewFIR returns a FIR filter with the given taps (copied). It panics if
// taps is empty.
func NewFIR(taps []float64) *FIR {
	if len(taps) == 0 {
		panic("modem: FIR needs at least one tap")
	}
	f := &FIR{rev: reverse32(taps)}
	f.buf = make([]complex64, len(taps)-1, len(taps)-1+firChunk)
	return f
}

func reverse32(taps []float64) []float32 {
	r := make([]float32, len(taps))
	for k, v := range taps {
		r[len(taps)-1-k] = float32(v)
	}
	return r
}

// Len returns the number of taps.
func (f *FIR) Len() int { return len(f.rev) }

// Delay returns the group delay (len−1)/2 in samples, exact for the
// linear-phase (symmetric or antisymmetric) taps this package designs.
func (f *FIR) Delay() float64 { return float64(len(f.rev)-1) / 2 }

// Reset clears the history to zeros.
func (f *FIR) Reset() { clear(f.buf[:len(f.rev)-1]) }

// Process filters src into dst and returns dst[:len(src)]. A nil or short
// dst is allocated; dst may be src itself.
func (f *FIR) Process(dst, src []complex64) []complex64 {
	if cap(dst) < len(src) {
		dst = make([]complex64, len(src))
	}
	dst = dst[:len(src)]
	firBlocks(f.buf, dst, src, f.rev, firComplexGo)
	return dst
}

// firBlocks filters src into dst (len(dst) == len(src)) in chunks of
// firChunk, keeping the last len(h)−1 inputs in hist (capacity
// len(h)−1+firChunk) between calls; kernel computes one chunk's outputs
// from buf, which holds the history followed by the chunk.
func firBlocks[T any](hist, dst, src []T, h []float32, kernel func(out, buf []T, h []float32)) {
	L := len(h)
	for off := 0; off < len(src); off += firChunk {
		c := min(firChunk, len(src)-off)
		buf := append(hist[:L-1], src[off:off+c]...)
		kernel(dst[off:off+c], buf, h)
		copy(hist[:L-1], buf[c:c+L-1])
	}
}

// firComplexGo is FIR's inner loop: out[i] = Σₖ h[k]·buf[i+k], h reversed
// taps, two interleaved float32 sums per component.
func firComplexGo(out, buf []complex64, h []float32) {
	L := len(h)
	for i := range out {
		w := buf[i : i+L]
		w = w[:len(h)]
		var r0, i0, r1, i1 float32
		k := 0
		for ; k+1 < len(h); k += 2 {
			a, b := w[k], w[k+1]
			ha, hb := h[k], h[k+1]
			r0 += ha * real(a)
			i0 += ha * imag(a)
			r1 += hb * real(b)
			i1 += hb * imag(b)
		}
		if k < len(h) {
			r0 += h[k] * real(w[k])
			i0 += h[k] * imag(w[k])
		}
		out[i] = complex(r0+r1, i0+i1)
	}
}

// RealFIR is the FIR of real samples: y[n] = Σₖ h[k]·x[n−k] in float32.
// Where the CPU has AVX2 and FMA it runs a vector kernel (eight outputs
// per register; every output summed in the same order, so the result does
// not depend on the block size); elsewhere the plain loop realFIRGo.
type RealFIR struct {
	rev []float32
	buf []float32
	pad []float32 // the vector kernel's last partial group
}

// NewRealFIR returns a real FIR filter with the given taps (copied). It
// panics if taps is empty.
func NewRealFIR(taps []float64) *RealFIR {
	if len(taps) == 0 {
		panic("modem: FIR needs at least one tap")
	}
	f := &RealFIR{rev: reverse32(taps)}
	f.buf = make([]float32, len(taps)-1, len(taps)-1+firChunk)
	if useMixInterpAVX2 {
		f.pad = make([]float32, firVecGroup+len(taps)-1)
	}
	return f
}

// vec runs the vector kernel with f's padding buffer.
func (f *RealFIR) vec(out, buf, h []float32) { realFIRVec(out, buf, h, f.pad) }

// Len returns the number of taps.
func (f *RealFIR) Len() int { return len(f.rev) }

// Delay returns the group delay (len−1)/2 in samples.
func (f *RealFIR) Delay() float64 { return float64(len(f.rev)-1) / 2 }

// Reset clears the history to zeros.
func (f *RealFIR) Reset() { clear(f.buf[:len(f.rev)-1]) }

// Process filters src into dst and returns dst[:len(src)]. A nil or short
// dst is allocated; dst may be src itself.
func (f *RealFIR) Process(dst, src []float32) []float32 {
	if cap(dst) < len(src) {
		dst = make([]float32, len(src))
	}
	dst = dst[:len(src)]
	if f.pad != nil {
		firBlocks(f.buf, dst, src, f.rev, f.vec)
	} else {
		firBlocks(f.buf, dst, src, f.rev, realFIRGo)
	}
	return dst
}

// realFIRGo is the reference loop of the real FIR: out[i] = Σₖ h[k]·w[i+k]
// for the window w (oldest first) and the reversed taps h.
func realFIRGo(out, w, h []float32) {
	for i := range out {
		w := w[i : i+len(h)]
		var s0, s1, s2, s3 float32
		k := 0
		for ; k+3 < len(h); k += 4 {
			s0 += h[k] * w[k]
			s1 += h[k+1] * w[k+1]
			s2 += h[k+2] * w[k+2]
			s3 += h[k+3] * w[k+3]
		}
		for ; k < len(h); k++ {
			s0 += h[k] * w[k]
		}
		out[i] = (s0 + s1) + (s2 + s3)
	}
}
