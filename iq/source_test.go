package iq

import (
	"bytes"
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestOpenBad checks the bad inputs of the issue: each is a one-line
// error naming the file and what is wrong.
func TestOpenBad(t *testing.T) {
	dir := t.TempDir()
	write := func(name string, b []byte) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, b, 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	cases := []struct {
		path string
		opt  Options
		want string
	}{
		{filepath.Join(dir, "missing.cf32"), Options{Rate: 1}, "no such file"},
		// A missing file with no known extension is reported as missing,
		// not as an extension problem.
		{filepath.Join(dir, "missing"), Options{}, "missing: no such file"},
		{write("one-over.cu8", make([]byte, 7)), Options{Rate: 1}, "(1 byte left over)"},
		{write("empty.cu8", nil), Options{Rate: 1}, "empty file"},
		{write("odd.cs16", make([]byte, 10)), Options{Rate: 1}, "size 10 bytes is not a whole number of 4-byte ci16_le samples (2 bytes left over)"},
		{write("norate.cu8", make([]byte, 10)), Options{}, "give --rate"},
		{write("what.bin", make([]byte, 10)), Options{Rate: 1}, "unknown extension"},
		{write("meta-only.sigmf-meta", []byte(`{"global":{"core:datatype":"cu8","core:sample_rate":1}}`)), Options{}, "meta-only.sigmf-data: no such file"},
		{write("cut.sigmf-meta", []byte(`{"global":{"core:datatype":"cf32_le","core:sample_rate":1}}`)), Options{}, "not a whole number of 8-byte"},
		{"-", Options{Rate: 1}, "--format"},
		// The SigMF archive format (SigMF Specification v1.0.0: a tar
		// file with extension .sigmf) is not read.
		{write("rec.sigmf", make([]byte, 1024)), Options{}, "rec.sigmf: unsupported SigMF archive"},
		// A key given twice (encoding/json would keep the last, matching
		// case-insensitively) is refused.
		{write("dup.sigmf-meta", []byte(`{"global":{"core:datatype":"cu8","Core:Datatype":"ci16_le"}}`)), Options{}, `key "Core:Datatype" appears twice`},
		// SigMF Specification v1.0.0: captures sorted by core:sample_start;
		// core:dataset names a non-conforming dataset (refused, and never
		// followed out of the metadata's folder).
		{write("order.sigmf-meta", []byte(`{"global":{"core:datatype":"cu8"},"captures":[{"core:sample_start":5},{"core:sample_start":5}]}`)), Options{}, "captures[1] core:sample_start 5 does not come after"},
		{write("away.sigmf-meta", []byte(`{"global":{"core:datatype":"cu8","core:dataset":"/etc/passwd"}}`)), Options{}, "points outside the metadata's folder"},
		{write("beyond.sigmf-meta", []byte(`{"global":{"core:datatype":"cu8","core:sample_rate":1},"annotations":[{"core:sample_start":2,"core:sample_count":9223372036854775807}]}`)), Options{}, "annotations[0] runs to sample 9223372036854775807 but beyond.sigmf-data holds 6 samples"},
		{write("ext.wav", wavBytesGUID(wavBytes(wavExtensible, 2, 16, 8000, wavPCM, make([]byte, 8)), 0x72)), Options{}, "unsupported WAV sub-format {00000001-0000-0010-8000-00AA00389B72}"},
		{"/dev/zero", Options{Format: CU8, Rate: 1}, "/dev/zero: is a device"},
	}
	write("cut.sigmf-data", make([]byte, 12))
	write("beyond.sigmf-data", make([]byte, 12))
	for _, c := range cases {
		_, err := Open(c.path, c.opt)
		if err == nil {
			t.Errorf("%s: accepted", c.path)
			continue
		}
		if msg := err.Error(); !strings.Contains(msg, c.want) || strings.Contains(msg, "\n") {
			t.Errorf("%s: error %q, want one line containing %q", c.path, msg, c.want)
		}
	}
}

// TestStdinPartialSample: whole samples are delivered, then a FormatError
// for the partial one.
func TestStdinPartialSample(t *testing.T) {
	s, err := Open("-", Options{Format: CI16, Rate: 1, Stdin: bytesReader(make([]byte, 4*3+3))})
	if err != nil {
		t.Fatal(err)
	}
	buf := make([]complex64, 10)
	n, err := s.Read(buf)
	if n != 3 || err != nil {
		t.Fatalf("first read %d, %v; want 3, nil", n, err)
	}
	_, err = s.Read(buf)
	var fe *FormatError
	if !errors.As(err, &fe) || !strings.Contains(err.Error(), "inside a sample") {
		t.Fatalf("second read error %v, want a FormatError about a partial sample", err)
	}
}

// TestNonFiniteCounted: NaN and Inf in a float capture are delivered as 0
// and counted.
func TestNonFiniteCounted(t *testing.T) {
	p := filepath.Join(t.TempDir(), "nan.cf32")
	inf := float32(math.Inf(1))
	os.WriteFile(p, lef32(float32(math.NaN()), 0.5, inf, -inf, 0.25, 0.25), 0o644)
	s, err := Open(p, Options{Rate: 1000})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	y := readAll(t, s)
	if len(y) != 3 || y[0] != complex(0, 0.5) || y[1] != 0 || y[2] != complex(0.25, 0.25) || s.NonFinite() != 3 {
		t.Errorf("got %v, %d non-finite; want [(0+0.5i) 0 (0.25+0.25i)], 3", y, s.NonFinite())
	}
}

// TestSourceReadAllocs: Read does not allocate in the steady state.
func TestSourceReadAllocs(t *testing.T) {
	p := filepath.Join(t.TempDir(), "big.cu8")
	os.WriteFile(p, make([]byte, 1<<22), 0o644)
	s, err := Open(p, Options{Rate: 1})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	buf := make([]complex64, 4096)
	if a := testing.AllocsPerRun(100, func() { s.Read(buf) }); a != 0 {
		t.Errorf("Read allocates %v times per call", a)
	}
}

// TestSourceBlockSizes: reading a capture in blocks of any size gives the
// same samples as reading it whole (streaming, common practice), for raw,
// WAV and SigMF files and for a real recording's analytic signal.
func TestSourceBlockSizes(t *testing.T) {
	dir := t.TempDir()
	rng := newRng()
	x := randomIQ(rng, 40000) // more than two read chunks
	files := map[string]Options{}
	for _, c := range []struct {
		name, container string
		dt              Datatype
	}{{"a.cu8", ContainerRaw, CU8}, {"a.cs16", ContainerRaw, CI16}, {"a.wav", ContainerWAV, CI16}, {"f.wav", ContainerWAV, CF32}} {
		p := filepath.Join(dir, c.name)
		f, err := os.Create(p)
		if err != nil {
			t.Fatal(err)
		}
		w, err := NewWriter(f, c.container, c.dt, 48000)
		if err != nil {
			t.Fatal(err)
		}
		w.Write(x)
		if err := w.Close(); err != nil {
			t.Fatal(err)
		}
		f.Close()
		files[p] = Options{Rate: 48000}
	}
	// A real recording: 24-bit mono WAV (read as its analytic signal).
	d24 := make([]byte, 3*30000)
	for i := range d24 {
		d24[i] = byte(rng.Uint32())
	}
	p := filepath.Join(dir, "mono24.wav")
	os.WriteFile(p, wavBytes(wavExtensible, 1, 24, 8000, wavPCM, d24), 0o644)
	files[p] = Options{}
	// A real SigMF recording (ri16_le), also read as its analytic signal.
	base := filepath.Join(dir, "real")
	var mb bytes.Buffer
	if err := WriteSigMFMeta(&mb, Meta{Datatype: RI16, Rate: 8000}); err != nil {
		t.Fatal(err)
	}
	os.WriteFile(base+".sigmf-meta", mb.Bytes(), 0o644)
	os.WriteFile(base+".sigmf-data", d24[:2*25000], 0o644)
	files[base+".sigmf-data"] = Options{}
	for path, opt := range files {
		read := func(bs int) []complex64 {
			s, err := Open(path, opt)
			if err != nil {
				t.Fatal(err)
			}
			defer s.Close()
			var out []complex64
			buf := make([]complex64, bs)
			for {
				n, err := s.Read(buf)
				out = append(out, buf[:n]...)
				if err == io.EOF {
					return out
				}
				if err != nil {
					t.Fatalf("%s block %d: %v", path, bs, err)
				}
			}
		}
		whole := read(1 << 20)
		for _, bs := range []int{1, 7, 1000, readChunk - 1, readChunk, readChunk + 1, 40000} {
			got := read(bs)
			if len(got) != len(whole) {
				t.Fatalf("%s block %d: %d samples, whole read %d", filepath.Base(path), bs, len(got), len(whole))
			}
			for i := range got {
				if got[i] != whole[i] {
					t.Fatalf("%s block %d: sample %d = %v, whole read %v", filepath.Base(path), bs, i, got[i], whole[i])
				}
			}
		}
	}
}

// TestReadWriteAllocs: no allocation per block in the steady state, for
// the real-recording path and the WAV reader as for raw (see
// TestSourceReadAllocs), and for both writers after their first block.
func TestReadWriteAllocs(t *testing.T) {
	if raceEnabled {
		t.Skip("the race detector allocates")
	}
	dir := t.TempDir()
	mono := filepath.Join(dir, "mono.wav")
	os.WriteFile(mono, wavBytes(wavFloat, 1, 32, 48000, 0, make([]byte, 4<<20)), 0o644)
	iqw := filepath.Join(dir, "iq.wav")
	os.WriteFile(iqw, wavBytes(wavPCM, 2, 16, 48000, 0, make([]byte, 4<<20)), 0o644)
	buf := make([]complex64, 4096)
	for _, p := range []string{mono, iqw} {
		s, err := Open(p, Options{})
		if err != nil {
			t.Fatal(err)
		}
		s.Read(buf) // the first block fills the analytic filter's delay
		if a := testing.AllocsPerRun(50, func() { s.Read(buf) }); a != 0 {
			t.Errorf("%s: Read allocates %v times per block", filepath.Base(p), a)
		}
		s.Close()
	}
	src := randomIQ(newRng(), 4096)
	rw, _ := NewRawWriter(io.Discard, CI16)
	rw.Write(src)
	if a := testing.AllocsPerRun(50, func() { rw.Write(src) }); a != 0 {
		t.Errorf("RawWriter.Write allocates %v times per block", a)
	}
	var f memFile
	ww, err := NewWriter(&f, ContainerWAV, CF32, 48000)
	if err != nil {
		t.Fatal(err)
	}
	ww.Write(src)
	f.b = make([]byte, 0, 1<<24) // room for the blocks below: memFile's own growth is not the writer's
	f.pos = 0
	if a := testing.AllocsPerRun(50, func() { ww.Write(src) }); a != 0 {
		t.Errorf("WAV Write allocates %v times per block", a)
	}
}

// wavBytesGUID returns the WAVE_FORMAT_EXTENSIBLE file b with the last
// byte of its sub-format GUID set to last.
func wavBytesGUID(b []byte, last byte) []byte {
	i := bytes.Index(b, []byte{0x00, 0x38, 0x9B, 0x71})
	b[i+3] = last
	return b
}
