package iq

import (
	"bytes"
	"encoding/binary"
	"math"
	"testing"
)

// TestFiniteCF32Classes checks the word-parallel NaN/Inf test against the
// IEEE 754 classes of float32 bit patterns at every boundary (IEEE Std
// 754-2019, clause 3.4: exponent field all ones is Inf when the fraction
// is 0, NaN otherwise; everything else is finite), in either half of a
// sample and at every position of a block (the four-word body and the
// tail).
func TestFiniteCF32Classes(t *testing.T) {
	cases := []struct {
		bits   uint32
		finite bool
	}{
		{0x00000000, true},  // +0
		{0x80000000, true},  // −0
		{0x00000001, true},  // smallest subnormal
		{0x007fffff, true},  // largest subnormal
		{0x00800000, true},  // smallest normal
		{0x3f800000, true},  // 1
		{0x7f000000, true},  // exponent field 254, 2^127
		{0x7f7fffff, true},  // largest finite
		{0xff7fffff, true},  // most negative finite
		{0x7f800000, false}, // +Inf
		{0xff800000, false}, // −Inf
		{0x7fc00000, false}, // quiet NaN
		{0x7f800001, false}, // signalling NaN, smallest fraction
		{0xffffffff, false}, // NaN, all bits
	}
	for _, c := range cases {
		if f := math.Float32frombits(c.bits); (f-f == 0) != c.finite {
			t.Fatalf("case %#08x: the reference test disagrees with the table", c.bits)
		}
		for _, n := range []int{1, 3, 4, 5, 9} {
			for pos := range 2 * n {
				x := make([]complex64, n)
				for i := range x {
					x[i] = complex(0.5, -0.25)
				}
				b := append([]byte(nil), cf32View(x)...)
				binary.LittleEndian.PutUint32(b[4*pos:], c.bits)
				if got := finiteCF32(b); got != c.finite {
					t.Errorf("%#08x at component %d of %d samples: finite %v, want %v", c.bits, pos, n, got, c.finite)
				}
			}
		}
	}
}

// TestEncodeCF32MatchesReference: encodeCF32 writes exactly the bytes
// and count of the reference loop encodeCF32Go (finite values as is, NaN
// and ±Inf as 0: iq/doc.go), for every length up to 70, at misaligned
// starts, with and without non-finite components.
func TestEncodeCF32MatchesReference(t *testing.T) {
	rng := newRng()
	bad := []float32{float32(math.NaN()), float32(math.Inf(1)), float32(math.Inf(-1)), math.Float32frombits(0x7f800001)}
	for n := 0; n <= 70; n++ {
		for trial := range 6 {
			x := randomIQ(rng, n+1)[1:] // start one sample into the allocation
			want := 0
			if trial%2 == 1 && n > 0 {
				for range 1 + rng.IntN(3) {
					i := rng.IntN(n)
					v := bad[rng.IntN(len(bad))]
					if rng.IntN(2) == 0 {
						x[i] = complex(v, imag(x[i]))
					} else {
						x[i] = complex(real(x[i]), v)
					}
				}
				for _, v := range x {
					if a := real(v); a-a != 0 {
						want++
					}
					if b := imag(v); b-b != 0 {
						want++
					}
				}
			}
			got := make([]byte, 8*n)
			ref := make([]byte, 8*n)
			nf := encodeCF32(got, x)
			nfRef := encodeCF32Go(ref, x)
			if !bytes.Equal(got, ref) || nf != nfRef || nf != want {
				t.Fatalf("n=%d trial %d: bytes equal %v, non-finite %d (reference %d, counted %d)", n, trial, bytes.Equal(got, ref), nf, nfRef, want)
			}
			for i, v := range x {
				a, b := real(v), imag(v)
				if a-a != 0 {
					a = 0
				}
				if b-b != 0 {
					b = 0
				}
				if !bytes.Equal(got[8*i:8*i+8], lef32(a, b)) {
					t.Fatalf("n=%d sample %d: % x, want %v", n, i, got[8*i:8*i+8], complex(a, b))
				}
			}
		}
	}
}

// TestRawWriterCF32NonFinite: a writer that sends clean pieces straight
// from the caller's memory still writes NaN/Inf as 0 in the piece that
// holds them, counts them, and writes the other pieces as is (iq/doc.go).
func TestRawWriterCF32NonFinite(t *testing.T) {
	x := randomIQ(newRng(), 3*writeChunk+17)
	x[writeChunk+5] = complex(float32(math.NaN()), 0.5)
	x[3*writeChunk+16] = complex(0.25, float32(math.Inf(-1)))
	var out bytes.Buffer
	w, err := NewRawWriter(&out, CF32)
	if err != nil {
		t.Fatal(err)
	}
	if n, err := w.Write(x); n != len(x) || err != nil {
		t.Fatalf("Write: %d, %v", n, err)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	want := make([]byte, 8*len(x))
	encodeCF32Go(want, x)
	if !bytes.Equal(out.Bytes(), want) || w.NonFinite() != 2 {
		t.Fatalf("equal %v, %d non-finite (want 2)", bytes.Equal(out.Bytes(), want), w.NonFinite())
	}
	if v := x[writeChunk+5]; !math.IsNaN(float64(real(v))) {
		t.Error("Write changed its source")
	}
}

// TestRawWriterAllocs: writing does not allocate after the first call.
func TestRawWriterAllocs(t *testing.T) {
	x := randomIQ(newRng(), 2*writeChunk+3)
	for _, dt := range []Datatype{CU8, CI8, CI16, CF32} {
		w, _ := NewRawWriter(discard{}, dt)
		w.Write(x)
		if a := testing.AllocsPerRun(20, func() { w.Write(x) }); a != 0 {
			t.Errorf("%s: %v allocations per Write", dt, a)
		}
	}
}

// discard is io.Discard without its ReadFrom fast path.
type discard struct{}

func (discard) Write(p []byte) (int, error) { return len(p), nil }
