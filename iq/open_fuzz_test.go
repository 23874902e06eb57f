package iq

import (
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// FuzzOpenSigMF opens a recording of fuzzed metadata and data files and
// reads it to the end: no panic, a one-line error naming one of the two
// files, or exactly the samples the data file holds (analytic signals of
// real datatypes have as many as the file).
func FuzzOpenSigMF(f *testing.F) {
	f.Add([]byte(`{"global":{"core:datatype":"ci8","core:sample_rate":8000},"captures":[{"core:sample_start":0,"core:frequency":7e6}],"annotations":[{"core:sample_start":1,"core:sample_count":2}]}`), []byte{1, 2, 3, 4, 5, 6})
	f.Add([]byte(`{"global":{"core:datatype":"rf32_le","core:sample_rate":1000,"core:dataset":"r.sigmf-data"}}`), lef32(0.5, -0.5, 0.25))
	f.Add([]byte(`{"global":{"core:datatype":"cu8","core:sample_rate":1e3},"captures":[{"core:sample_start":0},{"core:sample_start":3}]}`), []byte{0, 255, 1, 2})
	dir := f.TempDir()
	meta, data := filepath.Join(dir, "r.sigmf-meta"), filepath.Join(dir, "r.sigmf-data")
	f.Fuzz(func(t *testing.T, m, d []byte) {
		if len(m) > 1<<14 || len(d) > 1<<14 {
			return
		}
		if err := os.WriteFile(meta, m, 0o644); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(data, d, 0o644); err != nil {
			t.Fatal(err)
		}
		s, err := Open(meta, Options{Rate: 1000})
		if err != nil {
			msg := err.Error()
			if strings.Contains(msg, "\n") || !strings.Contains(msg, meta) && !strings.Contains(msg, data) {
				t.Fatalf("error %q: want one line naming %s or %s", msg, meta, data)
			}
			return
		}
		defer s.Close()
		checkReadsAll(t, s, int64(len(d)/s.Meta().Datatype.SampleSize()))
	})
}

// FuzzOpenWAV opens a fuzzed WAV file and reads it to the end: no panic,
// a one-line error naming the file, or exactly the frames of its data
// chunk.
func FuzzOpenWAV(f *testing.F) {
	f.Add(wavBytes(wavPCM, 2, 16, 48000, 0, make([]byte, 8)))
	f.Add(wavBytes(wavPCM, 1, 16, 8000, 0, make([]byte, 6)))
	f.Add(wavBytes(wavExtensible, 2, 24, 8000, wavPCM, make([]byte, 12)))
	f.Add(wavBytes(wavFloat, 1, 32, 8000, 0, lef32(0.5, 2)))
	dir := f.TempDir()
	p := filepath.Join(dir, "f.wav")
	f.Fuzz(func(t *testing.T, b []byte) {
		if len(b) > 1<<14 {
			return
		}
		if err := os.WriteFile(p, b, 0o644); err != nil {
			t.Fatal(err)
		}
		s, err := Open(p, Options{})
		if err != nil {
			if msg := err.Error(); strings.Contains(msg, "\n") || !strings.Contains(msg, p) {
				t.Fatalf("error %q: want one line naming %s", msg, p)
			}
			return
		}
		defer s.Close()
		checkReadsAll(t, s, s.Meta().Samples)
	})
}

// checkReadsAll reads s to the end and checks it delivers want samples
// and ends with io.EOF.
func checkReadsAll(t *testing.T, s *Source, want int64) {
	t.Helper()
	if s.Meta().Samples != want {
		t.Fatalf("Meta().Samples %d, want %d", s.Meta().Samples, want)
	}
	buf := make([]complex64, 1000)
	var got int64
	for {
		n, err := s.Read(buf)
		got += int64(n)
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("after %d samples: %v", got, err)
		}
		if n == 0 {
			t.Fatal("Read returned 0 samples and no error")
		}
	}
	if got != want {
		t.Fatalf("read %d samples, want %d", got, want)
	}
}
