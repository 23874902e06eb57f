package iq

import (
	"bytes"
	"fmt"
	"io"
	"testing"
)

// BenchmarkDecode measures decoding each datatype into complex64 from
// memory (b.SetBytes counts the file bytes; samples/s = MB/s ÷ sample size).
func BenchmarkDecode(b *testing.B) {
	const n = 16384
	for _, dt := range []Datatype{CU8, CI8, CI16, CF32} {
		src := make([]byte, n*dt.SampleSize())
		for i := range src {
			src[i] = byte(i * 7)
		}
		dst := make([]complex64, n)
		b.Run(string(dt), func(b *testing.B) {
			b.SetBytes(int64(len(src)))
			b.ReportAllocs()
			for b.Loop() {
				decodeComplex(dt, dst, src)
			}
			b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds()/1e6, "MS/s")
		})
	}
	// The reference loops that the kernels of decode_amd64.s replace on
	// amd64 with AVX2 (the figures before them), and the portable cf32
	// word scan of other machines.
	ref := []struct {
		dt  Datatype
		dec func([]complex64, []byte)
	}{
		{CU8, func(d []complex64, s []byte) { decodeCU8Go(d, s) }},
		{CI8, func(d []complex64, s []byte) { decodeCI8Go(d, s) }},
		{CI16, func(d []complex64, s []byte) { decodeCI16Go(d, s) }},
		{CF32, func(d []complex64, s []byte) { decodeCF32Go(d, s) }},
		{"cf32_le_words", func(d []complex64, s []byte) { decodeCF32Words(d, s) }},
	}
	for _, r := range ref {
		size := r.dt.SampleSize()
		if r.dt == "cf32_le_words" {
			size = 8
		}
		src := make([]byte, n*size)
		for i := range src {
			src[i] = byte(i * 7)
		}
		dst := make([]complex64, n)
		name := string(r.dt)
		if r.dt != "cf32_le_words" {
			name += "_reference"
		}
		b.Run(name, func(b *testing.B) {
			b.SetBytes(int64(len(src)))
			b.ReportAllocs()
			for b.Loop() {
				r.dec(dst, src)
			}
			b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds()/1e6, "MS/s")
		})
	}
}

// BenchmarkDecodeCF32Unclipped measures cf32_le decoding of a capture
// that never reaches full scale (uniform in ±0.99), the usual case, where
// the portable word scan needs no second pass for the clip count; the
// bytes of BenchmarkDecode are arbitrary floats, three quarters beyond
// full scale.
func BenchmarkDecodeCF32Unclipped(b *testing.B) {
	const n = 16384
	src := append([]byte(nil), cf32View(randomIQ(newRng(), n))...)
	dst := make([]complex64, n)
	for _, c := range []struct {
		name string
		dec  func([]complex64, []byte)
	}{
		{"chosen", func(d []complex64, s []byte) { decodeComplex(CF32, d, s) }},
		{"reference", func(d []complex64, s []byte) { decodeCF32Go(d, s) }},
		{"words", func(d []complex64, s []byte) { decodeCF32Words(d, s) }},
	} {
		b.Run(c.name, func(b *testing.B) {
			b.SetBytes(int64(len(src)))
			b.ReportAllocs()
			for b.Loop() {
				c.dec(dst, src)
			}
			b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds()/1e6, "MS/s")
		})
	}
}

// BenchmarkSource measures the whole read path (Source.Read from an
// in-memory stream), including the analytic conversion of real formats.
func BenchmarkSource(b *testing.B) {
	const n = 1 << 18
	for _, dt := range Datatypes {
		data := make([]byte, n*dt.SampleSize())
		for i := range data {
			data[i] = byte(i*13) & 0x3f
		}
		b.Run(string(dt), func(b *testing.B) {
			b.SetBytes(int64(len(data)))
			b.ReportAllocs()
			buf := make([]complex64, 8192)
			r := bytes.NewReader(data)
			for b.Loop() {
				r.Reset(data)
				s, _ := Open("-", Options{Format: dt, Rate: 1e6, Stdin: r})
				for {
					if _, err := s.Read(buf); err == io.EOF {
						break
					}
				}
			}
			b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds()/1e6, "MS/s")
		})
	}
}

func BenchmarkEncode(b *testing.B) {
	const n = 16384
	src := randomIQ(newRng(), n)
	for _, dt := range []Datatype{CU8, CI8, CI16, CF32} {
		dst := make([]byte, n*dt.SampleSize())
		b.Run(string(dt), func(b *testing.B) {
			b.SetBytes(int64(len(dst)))
			b.ReportAllocs()
			for b.Loop() {
				encodeComplex(dt, dst, src)
			}
			b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds()/1e6, "MS/s")
		})
	}
	// The reference loop that encodeCF32 replaces on little-endian
	// machines (the figure before the change).
	dst := make([]byte, 8*n)
	b.Run("cf32_le_reference", func(b *testing.B) {
		b.SetBytes(int64(len(dst)))
		b.ReportAllocs()
		for b.Loop() {
			encodeCF32Go(dst, src)
		}
		b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds()/1e6, "MS/s")
	})
}

// BenchmarkRawWriterCF32 measures RawWriter.Write of cf32_le into a
// writer that discards: clean pieces are passed on without a copy.
func BenchmarkRawWriterCF32(b *testing.B) {
	src := randomIQ(newRng(), 1<<16)
	w, _ := NewRawWriter(discard{}, CF32)
	b.SetBytes(int64(8 * len(src)))
	b.ReportAllocs()
	for b.Loop() {
		w.Write(src)
	}
}

func BenchmarkStatsAndCorrector(b *testing.B) {
	x := randomIQ(newRng(), 16384)
	y := make([]complex64, len(x))
	b.Run("stats", func(b *testing.B) {
		b.SetBytes(int64(8 * len(x)))
		b.ReportAllocs()
		var st Stats
		for b.Loop() {
			st.Add(x)
		}
	})
	b.Run("corrector", func(b *testing.B) {
		c := NewCorrector(0.01, ImbalanceOf(1.02, 2))
		b.SetBytes(int64(8 * len(x)))
		b.ReportAllocs()
		for b.Loop() {
			c.Process(y, x)
		}
	})
	for _, taps := range []int{255, DefaultAnalyticTaps} {
		b.Run(fmt.Sprintf("analytic-%d", taps), func(b *testing.B) {
			a := NewAnalytic(taps)
			in := make([]float32, len(x))
			b.SetBytes(int64(4 * len(in)))
			b.ReportAllocs()
			for b.Loop() {
				a.Process(y, in)
			}
			b.ReportMetric(float64(len(in))*float64(b.N)/b.Elapsed().Seconds()/1e6, "MS/s")
		})
	}
}
