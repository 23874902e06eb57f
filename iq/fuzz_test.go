package iq

import (
	"bytes"
	"cmp"
	"errors"
	"io"
	"math"
	"os"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"
)

// The fuzz targets check that no input makes a parser panic or read
// without bound; seeds are under testdata/ and testdata/fuzz/.

func FuzzReadSigMFMeta(f *testing.F) {
	if b, err := os.ReadFile("testdata/handwritten.sigmf-meta"); err == nil {
		f.Add(b)
	}
	f.Add([]byte(`{"global":{"core:datatype":"cu8","core:sample_rate":1e6,"core:version":"1.0.0"},"captures":[{"core:sample_start":0,"core:frequency":7.1e6}],"annotations":[]}`))
	f.Add([]byte(`{"global":{}}`))
	f.Add([]byte(`[1,2,3]`))
	f.Fuzz(func(t *testing.T, b []byte) {
		if len(b) > 1<<16 {
			return
		}
		m, err := ReadSigMFMeta(bytes.NewReader(b), "fuzz")
		if err != nil && strings.Contains(err.Error(), "\n") {
			t.Fatalf("error of more than one line: %q", err)
		}
		if err == nil {
			var out bytes.Buffer
			if err := WriteSigMFMeta(&out, m); err != nil {
				t.Fatalf("parsed metadata does not write: %v", err)
			}
			// What we write reads back to the same description (the
			// writer keeps core:datetime to the millisecond and sorts the
			// annotations by core:sample_start, as SigMF v1.0.0 asks).
			back, err := ReadSigMFMeta(&out, "fuzz-out")
			if err != nil {
				t.Fatalf("written metadata does not read: %v\n%s", err, out.String())
			}
			m.Datetime = m.Datetime.Truncate(time.Millisecond)
			slices.SortStableFunc(m.Annotations, func(a, b Annotation) int { return cmp.Compare(a.SampleStart, b.SampleStart) })
			if back.Datatype != m.Datatype || back.Rate != m.Rate || back.HasCenter != m.HasCenter || back.Center != m.Center ||
				back.Description != m.Description || !back.Datetime.Equal(m.Datetime) || !slices.Equal(back.Annotations, m.Annotations) {
				t.Fatalf("round trip changed the metadata:\n%+v\n%+v", m, back)
			}
		}
	})
}

func FuzzReadWAVHeader(f *testing.F) {
	f.Add(wavBytes(wavPCM, 2, 16, 48000, 0, make([]byte, 8)))
	f.Add(wavBytes(wavExtensible, 1, 24, 8000, wavPCM, make([]byte, 6)))
	f.Add(wavBytes(wavFloat, 2, 32, 8000, 0, make([]byte, 8)))
	f.Add([]byte("RIFF\x00\x00\x00\x00WAVEfmt \xff\xff\xff\xff"))
	f.Fuzz(func(t *testing.T, b []byte) {
		if len(b) > 1<<16 {
			return
		}
		h, err := readWAVHeader(bytes.NewReader(b), "fuzz.wav")
		if err != nil {
			if strings.Contains(err.Error(), "\n") {
				t.Fatalf("error of more than one line: %q", err)
			}
			return
		}
		if h.Channels < 1 || h.Channels > 2 || h.frameSize() == 0 || h.DataOffset > int64(len(b)) {
			t.Fatalf("accepted header %+v", h)
		}
	})
}

// FuzzRawStdin decodes arbitrary bytes as each datatype from a stream.
func FuzzRawStdin(f *testing.F) {
	f.Add([]byte{0, 255, 1, 2, 3}, uint8(0))
	f.Add(lef32(1, 2, 3), uint8(3))
	f.Fuzz(func(t *testing.T, b []byte, k uint8) {
		if len(b) > 1<<16 {
			return
		}
		dt := Datatypes[int(k)%len(Datatypes)]
		s, err := Open("-", Options{Format: dt, Rate: 1000, Stdin: bytes.NewReader(b)})
		if err != nil {
			t.Fatal(err)
		}
		buf := make([]complex64, 777)
		total := 0
		for err == nil {
			var n int
			n, err = s.Read(buf)
			total += n
		}
		clean := len(b)%dt.SampleSize() == 0
		if (err == io.EOF) != clean {
			t.Fatalf("%s: %d bytes ended with %v", dt, len(b), err)
		}
		if clean && total != len(b)/dt.SampleSize() {
			t.Fatalf("%s: %d samples from %d bytes", dt, total, len(b))
		}
	})
}

// FuzzParseFrequency: no input panics; an accepted value is finite and
// survives printing and parsing again exactly; the k suffix multiplies by
// 10³ (the decimal prefixes of the SI, common practice).
func FuzzParseFrequency(f *testing.F) {
	for _, s := range []string{"1500", "48k", "7.1M", "-300k", "2.4GHz", "1e3", " 10k ", "7.1m", "0x10", "NaN", "1e308k", ""} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		if len(s) > 256 {
			return
		}
		v, err := ParseFrequency(s)
		if err != nil {
			if strings.Contains(err.Error(), "\n") {
				t.Fatalf("%q: error of more than one line: %q", s, err)
			}
			return
		}
		if math.IsNaN(v) || math.IsInf(v, 0) {
			t.Fatalf("%q: accepted %v", s, v)
		}
		text := strconv.FormatFloat(v, 'g', -1, 64)
		back, err := ParseFrequency(text)
		if err != nil || back != v {
			t.Fatalf("%q = %v; printed %q reads back as %v, %v", s, v, text, back, err)
		}
		// The same number with a k suffix is a thousand times larger, to
		// float64 rounding of the multiplication.
		const relTol = 1e-15
		if k, err := ParseFrequency(text + "k"); err == nil && math.Abs(k-1e3*v) > relTol*math.Abs(1e3*v) {
			t.Fatalf("%q: %v·1e3 = %v, but %sk reads as %v", s, v, 1e3*v, text, k)
		}
	})
}

// FuzzParseBand: no input panics; an accepted band has LOW < HIGH, both
// finite, and prints and reads back exactly.
func FuzzParseBand(f *testing.F) {
	for _, s := range []string{"300:2700", "300:2.7k", "2700:300", "300", "a:b", ":", "1k:1k", "-5k:5k", "300:2700:1"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		if len(s) > 256 {
			return
		}
		lo, hi, err := ParseBand(s)
		if err != nil {
			if strings.Contains(err.Error(), "\n") {
				t.Fatalf("%q: error of more than one line: %q", s, err)
			}
			return
		}
		if !(lo < hi) || math.IsInf(lo, 0) || math.IsInf(hi, 0) {
			t.Fatalf("%q: accepted %v:%v", s, lo, hi)
		}
		text := strconv.FormatFloat(lo, 'g', -1, 64) + ":" + strconv.FormatFloat(hi, 'g', -1, 64)
		l2, h2, err := ParseBand(text)
		if err != nil || l2 != lo || h2 != hi {
			t.Fatalf("%q = %v:%v; %q reads back as %v:%v, %v", s, lo, hi, text, l2, h2, err)
		}
	})
}

// FuzzParseDatatype: no input panics; an accepted name is a supported
// datatype with a sample size of the design's table, and its SigMF name
// parses to itself.
func FuzzParseDatatype(f *testing.F) {
	for _, s := range []string{"cu8", "ci8", "cs8", "ci16_le", "ci16", "cs16", "cf32_le", "cf32", "rf32_le", "ri16", "CF32_LE", " cu8 ", "cf64_le", ""} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		d, err := ParseDatatype(s)
		if err != nil {
			var ue *UnsupportedError
			if !errors.As(err, &ue) || strings.Contains(err.Error(), "\n") {
				t.Fatalf("%q: error %T %q", s, err, err)
			}
			return
		}
		if !d.Valid() {
			t.Fatalf("%q: accepted invalid %q", s, d)
		}
		// Sample sizes of the design's format table (common practice).
		want := map[Datatype]int{CU8: 2, CI8: 2, CI16: 4, CF32: 8, RF32: 4, RI16: 2}[d]
		if d.SampleSize() != want {
			t.Fatalf("%q: %s sample size %d, want %d", s, d, d.SampleSize(), want)
		}
		if again, err := ParseDatatype(string(d)); err != nil || again != d {
			t.Fatalf("%q = %s, which parses as %q, %v", s, d, again, err)
		}
	})
}
