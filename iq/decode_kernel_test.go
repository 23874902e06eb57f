package iq

import (
	"encoding/binary"
	"math"
	"math/rand/v2"
	"testing"
)

// exactBits is the tolerance of the decoder checks: 0 ulp. Every value
// of the format table is its formula correctly rounded to float32
// (v/128 and v/32768 are exact; (v − 127.5)/127.5 evaluated in float64
// and rounded to float32 equals the float32 quotient because double
// rounding is innocuous for division when 53 ≥ 2·24 + 2: S. A.
// Figueroa, "When is double rounding innocuous?", ACM SIGNUM Newsletter
// 30(3), 1995, from memory), and every decoder must give exactly that:
// the cu8 kernel's reciprocal with one FMA correction is exact for its
// 256 operands, which TestDecodeAllCodes checks code by code.
const exactBits = 0

// sameBits reports whether a and b have the same float32 bit patterns
// within tol ulp (so −0 and +0 differ).
func sameBits(a, b complex64, tol int64) bool {
	d := func(x, y float32) int64 {
		v := int64(math.Float32bits(x)) - int64(math.Float32bits(y))
		return max(v, -v)
	}
	return d(real(a), real(b)) <= tol && d(imag(a), imag(b)) <= tol
}

// TestDecodeAllCodes decodes every code of each integer datatype through
// the bulk path (which takes the vector kernel where there is one) and
// checks it against the design's format table evaluated in float64 and
// rounded once (common practice: cu8 (v − 127.5)/127.5, ci8 v/128,
// ci16_le v/32768), with the rail codes counted as clipped. Sample k
// holds code k in I and its mirror in Q, so exactly two samples touch a
// rail.
func TestDecodeAllCodes(t *testing.T) {
	cases := []struct {
		dt    Datatype
		codes int
		put   func(b []byte, k int) // sample k: code k in I, its mirror in Q
		want  func(k int) float64   // the table's value of code k
	}{
		{CU8, 256, func(b []byte, k int) { b[2*k], b[2*k+1] = byte(k), byte(255-k) },
			func(k int) float64 { return (float64(k) - 127.5) / 127.5 }},
		{CI8, 256, func(b []byte, k int) { b[2*k], b[2*k+1] = byte(k-128), byte(127-k) },
			func(k int) float64 { return float64(k-128) / 128 }},
		{CI16, 65536, func(b []byte, k int) {
			binary.LittleEndian.PutUint16(b[4*k:], uint16(int16(k-32768)))
			binary.LittleEndian.PutUint16(b[4*k+2:], uint16(int16(32767-k)))
		}, func(k int) float64 { return float64(k-32768) / 32768 }},
	}
	for _, c := range cases {
		b := make([]byte, c.codes*c.dt.SampleSize())
		for k := range c.codes {
			c.put(b, k)
		}
		dst := make([]complex64, c.codes)
		clipped, nf := decodeComplex(c.dt, dst, b)
		if clipped != 2 || nf != 0 {
			t.Errorf("%s: clipped %d, non-finite %d; want 2, 0", c.dt, clipped, nf)
		}
		for k, v := range dst {
			want := complex(float32(c.want(k)), float32(c.want(c.codes-1-k)))
			if !sameBits(v, want, exactBits) {
				t.Fatalf("%s code %d: %v, want %v", c.dt, k, v, want)
			}
		}
	}
}

// kernelInputs returns random bytes for n samples of dt in which rail
// codes (and for cf32 the boundary values around 1, −0, subnormals and,
// when withNonFinite, NaN and ±Inf) are frequent, so every lane of a
// kernel sees them.
func kernelInputs(r *rand.Rand, dt Datatype, n int, withNonFinite bool) []byte {
	b := make([]byte, n*dt.SampleSize())
	switch dt {
	case CU8, CI8:
		rails := []byte{0, 255, 0x80, 0x7f}
		for i := range b {
			if r.IntN(8) == 0 {
				b[i] = rails[r.IntN(4)]
			} else {
				b[i] = byte(r.Uint32())
			}
		}
	case CI16:
		rails := []uint16{0x8000, 0x7fff, 0, 0xffff}
		for i := 0; i < len(b); i += 2 {
			v := uint16(r.Uint32())
			if r.IntN(8) == 0 {
				v = rails[r.IntN(4)]
			}
			binary.LittleEndian.PutUint16(b[i:], v)
		}
	case CF32:
		special := []uint32{0x3f800000, 0xbf800000, 0x3f7fffff, 0xbf7fffff, 0x80000000, 0x00000001, 0x7f7fffff, 0xff7fffff}
		bad := []uint32{0x7f800000, 0xff800000, 0x7fc00000, 0xffffffff}
		for i := 0; i < len(b); i += 4 {
			v := math.Float32bits(float32(r.NormFloat64() * 0.6))
			switch {
			case withNonFinite && r.IntN(50) == 0:
				v = bad[r.IntN(len(bad))]
			case r.IntN(8) == 0:
				v = special[r.IntN(len(special))]
			}
			binary.LittleEndian.PutUint32(b[i:], v)
		}
	}
	return b
}

// TestDecodeKernelsMatchReference: the chosen decoder (the AVX2 kernel
// plus the reference loop for the last len mod 16 samples, where the
// machine has the kernel), and for cf32_le also the portable word scan
// decodeCF32Words, give bit for bit the values and counts of the
// reference loops decodeCU8Go … decodeCF32Go, for every length up to
// 100 and some long ones, at misaligned starts of source and
// destination. Tolerance exactBits: the kernels do the reference loops'
// arithmetic (see exactBits).
func TestDecodeKernelsMatchReference(t *testing.T) {
	r := rand.New(rand.NewPCG(21, 22))
	ref := map[Datatype]func([]complex64, []byte) (int, int){
		CU8:  func(d []complex64, b []byte) (int, int) { return decodeCU8Go(d, b), 0 },
		CI8:  func(d []complex64, b []byte) (int, int) { return decodeCI8Go(d, b), 0 },
		CI16: func(d []complex64, b []byte) (int, int) { return decodeCI16Go(d, b), 0 },
		CF32: decodeCF32Go,
	}
	lengths := []int{1000, 1024, 4099, 16384}
	for n := range 101 {
		lengths = append(lengths, n)
	}
	for _, dt := range []Datatype{CU8, CI8, CI16, CF32} {
		for _, n := range lengths {
			for _, nonFinite := range []bool{false, dt == CF32} {
				off := r.IntN(4) * dt.ComponentSize()
				src := kernelInputs(r, dt, n+2, nonFinite)[off : off+n*dt.SampleSize()]
				doff := r.IntN(2)
				got := make([]complex64, n+1)[doff : doff+n]
				want := make([]complex64, n)
				wc, wnf := ref[dt](want, src)
				paths := map[string]func([]complex64, []byte) (int, int){
					"chosen": func(d []complex64, b []byte) (int, int) { return decodeComplex(dt, d, b) },
				}
				if dt == CF32 {
					paths["words"] = decodeCF32Words
				}
				for name, dec := range paths {
					clear(got)
					gc, gnf := dec(got, src)
					if gc != wc || gnf != wnf {
						t.Fatalf("%s %s n=%d: clipped %d non-finite %d, reference %d %d", dt, name, n, gc, gnf, wc, wnf)
					}
					for i := range want {
						if !sameBits(got[i], want[i], exactBits) {
							t.Fatalf("%s %s n=%d sample %d: %v, reference %v", dt, name, n, i, got[i], want[i])
						}
					}
				}
			}
		}
	}
}

// TestDecodeCF32ClipBoundary: a cf32 sample is clipped when a component
// has |v| ≥ 1 (iq/doc.go); the largest float32 below 1 in magnitude is
// not, ±1 and −1.5 are, in every lane of a kernel step (IEEE Std
// 754-2019 clause 3.4 for the bit patterns).
func TestDecodeCF32ClipBoundary(t *testing.T) {
	below := math.Float32frombits(0x3f7fffff)
	for _, c := range []struct {
		v    float32
		clip bool
	}{{below, false}, {-below, false}, {1, true}, {-1, true}, {-1.5, true}, {float32(math.MaxFloat32), true}} {
		for pos := range 32 {
			x := make([]complex64, 16)
			b := append([]byte(nil), cf32View(x)...)
			binary.LittleEndian.PutUint32(b[4*pos:], math.Float32bits(c.v))
			want := 0
			if c.clip {
				want = 1
			}
			if got, nf := decodeComplex(CF32, x, b); got != want || nf != 0 {
				t.Errorf("%v at component %d: clipped %d non-finite %d, want %d 0", c.v, pos, got, nf, want)
			}
		}
	}
}

// TestDecodeCF32SparseClips: in a long capture at a low level, samples
// pushed to full scale at chosen positions (at the edges of the 16-sample
// kernel steps and of the 256-sample pieces of the word scan, in I or in
// Q) are counted once each, by every cf32 path: the count is the number
// of positions (iq/doc.go: a sample is clipped when a component has
// |v| ≥ 1).
func TestDecodeCF32SparseClips(t *testing.T) {
	x := randomIQ(newRng(), 1000)
	for i := range x {
		x[i] *= 0.5
	}
	at := []int{0, 15, 16, 255, 256, 511, 700, 999}
	for k, i := range at {
		if k%2 == 0 {
			x[i] = complex(-1, imag(x[i]))
		} else {
			x[i] = complex(real(x[i]), 1.25)
		}
	}
	b := append([]byte(nil), cf32View(x)...)
	for name, dec := range map[string]func([]complex64, []byte) (int, int){
		"chosen":    func(d []complex64, b []byte) (int, int) { return decodeComplex(CF32, d, b) },
		"words":     decodeCF32Words,
		"reference": decodeCF32Go,
	} {
		dst := make([]complex64, len(x))
		if c, nf := dec(dst, b); c != len(at) || nf != 0 {
			t.Errorf("%s: clipped %d non-finite %d, want %d 0", name, c, nf, len(at))
		}
	}
}
