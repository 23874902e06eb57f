package iq

import (
	"encoding/binary"
	"math"
	"testing"
)

// TestDecodeScaling checks every read scaling of the design's format table
// exactly (common practice: cu8 (v−127.5)/127.5, ci8 v/128, ci16 v/32768,
// cf32 as is), including the rail codes counted as clipped.
func TestDecodeScaling(t *testing.T) {
	const tol = 0 // exact: every value is a float32 computed the same way
	cases := []struct {
		dt      Datatype
		bytes   []byte
		want    complex64
		clipped int
	}{
		{CU8, []byte{0, 255}, complex(-1, 1), 1},
		{CU8, []byte{127, 128}, complex(float32(-0.5/127.5), float32(0.5/127.5)), 0},
		{CU8, []byte{1, 254}, complex(float32(-126.5/127.5), float32(126.5/127.5)), 0},
		{CI8, []byte{0x80, 0x7f}, complex(-1, 127.0/128), 1},
		{CI8, []byte{0xff, 0x01}, complex(-1.0/128, 1.0/128), 0},
		{CI8, []byte{0x81, 0x7e}, complex(-127.0/128, 126.0/128), 0},
		{CI16, le16(-32768, 32767), complex(-1, 32767.0/32768), 1},
		{CI16, le16(-1, 1), complex(-1.0/32768, 1.0/32768), 0},
		{CI16, le16(-32767, 32766), complex(-32767.0/32768, 32766.0/32768), 0},
		{CF32, lef32(0.25, -0.75), complex(0.25, -0.75), 0},
		{CF32, lef32(1, 0), complex(1, 0), 1},
		{CF32, lef32(0, -1.5), complex(0, -1.5), 1},
	}
	for _, c := range cases {
		dst := make([]complex64, 1)
		clipped, nf := decodeComplex(c.dt, dst, c.bytes)
		if d := dst[0] - c.want; real(d) != tol || imag(d) != tol || clipped != c.clipped || nf != 0 {
			t.Errorf("%s % x: got %v clipped %d nonfinite %d, want %v clipped %d", c.dt, c.bytes, dst[0], clipped, nf, c.want, c.clipped)
		}
	}
}

// TestEncodeScaling checks every write scaling of the design's table,
// clamp(round(x·s + o), lo, hi), exactly, with rounding half away from
// zero and clamping (common practice), and that NaN/Inf become 0.
func TestEncodeScaling(t *testing.T) {
	cases := []struct {
		dt   Datatype
		in   complex64
		want []byte
	}{
		{CU8, complex(-1, 1), []byte{0, 255}},
		{CU8, complex(0, 0), []byte{128, 128}}, // round(127.5) = 128
		{CU8, complex(-2, 3), []byte{0, 255}},  // clamped
		{CU8, complex(float32(0.5/127.5), float32(-0.5/127.5)), []byte{128, 127}},
		{CI8, complex(-1, 1), []byte{0x80, 0x7f}}, // 128 clamps to 127
		{CI8, complex(0.5/128, -0.5/128), []byte{0x01, 0xff}},
		{CI8, complex(-5, 5), []byte{0x80, 0x7f}},
		{CI16, complex(-1, 1), le16(-32768, 32767)},
		{CI16, complex(1.5/32768, -1.5/32768), le16(2, -2)},
		{CI16, complex(1.0/32768, -1.0/32768), le16(1, -1)},
		{CF32, complex(0.1, -2.5), lef32(0.1, -2.5)},
		{CF32, complex(float32(math.NaN()), float32(math.Inf(1))), lef32(0, 0)},
		{CI16, complex(float32(math.NaN()), float32(math.Inf(-1))), le16(0, 0)},
		{CU8, complex(float32(math.NaN()), 0), []byte{128, 128}},
	}
	for _, c := range cases {
		dst := make([]byte, c.dt.SampleSize())
		encodeComplex(c.dt, dst, []complex64{c.in})
		if string(dst) != string(c.want) {
			t.Errorf("%s %v: got % x, want % x", c.dt, c.in, dst, c.want)
		}
	}
}

// TestCodeRoundTrip checks that every integer code decodes and re-encodes
// to itself (the two scalings of the table are inverse, common practice).
func TestCodeRoundTrip(t *testing.T) {
	for _, dt := range []Datatype{CU8, CI8} {
		for v := 0; v < 256; v++ {
			b := []byte{byte(v), byte(255 - v)}
			x := make([]complex64, 1)
			decodeComplex(dt, x, b)
			out := make([]byte, 2)
			encodeComplex(dt, out, x)
			if out[0] != b[0] || out[1] != b[1] {
				t.Fatalf("%s code %d: round trip gave % x", dt, v, out)
			}
		}
	}
	for v := -32768; v < 32768; v++ {
		b := le16(int16(v), int16(-1-v))
		x := make([]complex64, 1)
		decodeComplex(CI16, x, b)
		out := make([]byte, 4)
		encodeComplex(CI16, out, x)
		if string(out) != string(b) {
			t.Fatalf("ci16 code %d: round trip gave % x", v, out)
		}
	}
}

func TestDecodeNonFinite(t *testing.T) {
	b := lef32(float32(math.NaN()), float32(math.Inf(-1)))
	b = append(b, lef32(0.5, float32(math.Inf(1)))...)
	dst := make([]complex64, 2)
	_, nf := decodeComplex(CF32, dst, b)
	if nf != 3 || dst[0] != 0 || dst[1] != complex(0.5, 0) {
		t.Fatalf("got %v, %d non-finite; want [0 (0.5+0i)], 3", dst, nf)
	}
}

func TestParseDatatypeAndExt(t *testing.T) {
	for _, c := range []struct {
		name string
		want Datatype
	}{{"x.cu8", CU8}, {"x.CS8", CI8}, {"x.ci8", CI8}, {"x.cs16", CI16}, {"x.ci16", CI16}, {"x.cf32", CF32}, {"x.raw", CF32}} {
		if got, ok := DatatypeFromExt(c.name); !ok || got != c.want {
			t.Errorf("DatatypeFromExt(%q) = %q, %v; want %q", c.name, got, ok, c.want)
		}
	}
	if _, ok := DatatypeFromExt("x.wav"); ok {
		t.Error("x.wav taken as raw")
	}
	if _, err := ParseDatatype("cf64_le"); err == nil {
		t.Error("cf64_le accepted")
	}
}

func TestParseFrequency(t *testing.T) {
	const tol = 1e-9 // relative; decimal suffixes are exact to float64 rounding
	good := []struct {
		in   string
		want float64
	}{
		{"1500", 1500}, {"48k", 48e3}, {"48K", 48e3}, {"7.1M", 7.1e6}, {"-300k", -300e3},
		{"2.4G", 2.4e9}, {"14.2MHz", 14.2e6}, {"0", 0}, {"1e3", 1000}, {" 10k ", 10e3},
	}
	for _, c := range good {
		got, err := ParseFrequency(c.in)
		if err != nil || math.Abs(got-c.want) > tol*math.Abs(c.want) {
			t.Errorf("ParseFrequency(%q) = %v, %v; want %v", c.in, got, err, c.want)
		}
	}
	for _, in := range []string{"", "k", "7.1m", "abc", "1..2", "NaN", "Inf", "0x10", "1_000", "12kk"} {
		if _, err := ParseFrequency(in); err == nil {
			t.Errorf("ParseFrequency(%q) accepted", in)
		}
	}
	lo, hi, err := ParseBand("300:2.7k")
	if err != nil || lo != 300 || hi != 2700 {
		t.Errorf("ParseBand = %v, %v, %v", lo, hi, err)
	}
	for _, in := range []string{"300", "2700:300", "a:b", "300:300"} {
		if _, _, err := ParseBand(in); err == nil {
			t.Errorf("ParseBand(%q) accepted", in)
		}
	}
}

func le16(v ...int16) []byte {
	b := make([]byte, 2*len(v))
	for i, x := range v {
		binary.LittleEndian.PutUint16(b[2*i:], uint16(x))
	}
	return b
}

func lef32(v ...float32) []byte {
	b := make([]byte, 4*len(v))
	for i, x := range v {
		binary.LittleEndian.PutUint32(b[4*i:], math.Float32bits(x))
	}
	return b
}
