package iq

import (
	"bytes"
	"encoding/binary"
	"io"
	"math"
	"math/rand/v2"
	"testing"
)

// TestDecodeComplexTable checks DecodeComplex against the design's
// format table (common practice: cu8 (v − 127.5)/127.5, ci8 v/128,
// ci16_le v/32768, cf32_le as is, NaN and ±Inf read as 0). The expected
// values are the table's formulas evaluated in float64 and rounded once
// to float32, so the tolerance is exact equality.
func TestDecodeComplexTable(t *testing.T) {
	f32 := func(v float64) float32 { return float32(v) }
	cases := []struct {
		dt   Datatype
		src  []byte
		want []complex64
	}{
		{CU8, []byte{0, 255, 127, 128}, []complex64{complex(-1, 1), complex(f32(-0.5/127.5), f32(0.5/127.5))}},
		{CI8, []byte{0x80, 0x7f, 0, 0xff}, []complex64{complex(-1, f32(127.0/128)), complex(0, f32(-1.0/128))}},
		{CI16, []byte{0x00, 0x80, 0xff, 0x7f, 0x01, 0x00, 0xff, 0xff}, []complex64{complex(-1, f32(32767.0/32768)), complex(f32(1.0/32768), f32(-1.0/32768))}},
		{CF32, lef32(0.25, -1.5, float32(math.NaN()), float32(math.Inf(-1))), []complex64{complex(0.25, -1.5), 0}},
		{CU8, nil, []complex64{}},
	}
	for _, c := range cases {
		got := DecodeComplex(nil, c.src, c.dt)
		if len(got) != len(c.want) {
			t.Fatalf("%s: %d samples, want %d", c.dt, len(got), len(c.want))
		}
		for i := range got {
			if got[i] != c.want[i] {
				t.Errorf("%s sample %d: got %v, want %v", c.dt, i, got[i], c.want[i])
			}
		}
	}
}

// TestDecodeComplexMatchesSource: on seeded random bytes, DecodeComplex
// gives exactly what a Source reading the same bytes gives, and reuses a
// large enough dst.
func TestDecodeComplexMatchesSource(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	for _, dt := range []Datatype{CU8, CI8, CI16, CF32} {
		b := make([]byte, 1001*dt.SampleSize())
		for i := range b {
			b[i] = byte(r.Uint32())
		}
		s, err := Open("-", Options{Format: dt, Rate: 1000, Stdin: bytes.NewReader(b)})
		if err != nil {
			t.Fatal(err)
		}
		want := make([]complex64, 0, 1001)
		buf := make([]complex64, 100)
		for {
			n, err := s.Read(buf)
			want = append(want, buf[:n]...)
			if err == io.EOF {
				break
			}
			if err != nil {
				t.Fatal(err)
			}
		}
		dst := make([]complex64, 2000)
		got := DecodeComplex(dst, b, dt)
		if &got[0] != &dst[0] {
			t.Errorf("%s: dst with room was not reused", dt)
		}
		if len(got) != len(want) {
			t.Fatalf("%s: %d samples, Source read %d", dt, len(got), len(want))
		}
		for i := range got {
			// NaN never reaches here: both turn it into 0.
			if got[i] != want[i] {
				t.Fatalf("%s sample %d: %v, Source read %v", dt, i, got[i], want[i])
			}
		}
	}
}

func TestDecodeComplexPanics(t *testing.T) {
	for _, c := range []struct {
		dt  Datatype
		src []byte
		msg string
	}{
		{RF32, make([]byte, 8), "iq: DecodeComplex of a real or unknown datatype"},
		{"cx99", make([]byte, 8), "iq: DecodeComplex of a real or unknown datatype"},
		{CI16, make([]byte, 6), "iq: DecodeComplex of a partial sample"},
	} {
		func() {
			defer func() {
				if got := recover(); got != c.msg {
					t.Errorf("%s with %d bytes: panic %v, want %q", c.dt, len(c.src), got, c.msg)
				}
			}()
			DecodeComplex(nil, c.src, c.dt)
		}()
	}
}

// FuzzDecodeComplex: no whole number of samples makes DecodeComplex
// panic; every output is finite, integer formats stay within full scale
// (|v| ≤ 1, the design's table) and cf32 keeps finite inputs as they are.
func FuzzDecodeComplex(f *testing.F) {
	f.Add([]byte{0, 255, 127, 128}, uint8(0))
	f.Add(lef32(1, 2, float32(math.NaN()), 3), uint8(3))
	f.Fuzz(func(t *testing.T, b []byte, k uint8) {
		if len(b) > 1<<16 {
			return
		}
		dts := []Datatype{CU8, CI8, CI16, CF32}
		dt := dts[int(k)%len(dts)]
		b = b[:len(b)/dt.SampleSize()*dt.SampleSize()]
		got := DecodeComplex(nil, b, dt)
		for i, v := range got {
			re, im := float64(real(v)), float64(imag(v))
			if math.IsNaN(re) || math.IsInf(re, 0) || math.IsNaN(im) || math.IsInf(im, 0) {
				t.Fatalf("%s sample %d: %v", dt, i, v)
			}
			if dt != CF32 && (math.Abs(re) > 1 || math.Abs(im) > 1) {
				t.Fatalf("%s sample %d beyond full scale: %v", dt, i, v)
			}
			if dt == CF32 {
				vi := math.Float32frombits(binary.LittleEndian.Uint32(b[8*i:]))
				if !math.IsNaN(float64(vi)) && !math.IsInf(float64(vi), 0) && vi != real(v) {
					t.Fatalf("cf32 sample %d: I %v read as %v", i, vi, real(v))
				}
			}
		}
	})
}
