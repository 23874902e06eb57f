package main

import (
	"io"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"ssbkit/iq"
)

// TestCreateCaptureSigMF: both files appear only on Commit; Abort leaves
// nothing; the metadata carries rate, centre and annotations.
func TestCreateCaptureSigMF(t *testing.T) {
	dir := t.TempDir()
	target := filepath.Join(dir, "tx.sigmf-data")
	meta := iq.Meta{Datatype: iq.CI16, Rate: 48000, Center: 7.1e6, HasCenter: true,
		Annotations: []iq.Annotation{{SampleStart: 0, SampleCount: 3, FreqLowerEdge: 7.1003e6, FreqUpperEdge: 7.1027e6, Label: "USB"}}}
	c, err := createCapture(target, meta, false)
	if err != nil {
		t.Fatal(err)
	}
	c.Write([]complex64{0.5, -0.5i, 0.25})
	c.Abort()
	if ents, _ := os.ReadDir(dir); len(ents) != 0 {
		t.Fatalf("Abort left %d files", len(ents))
	}
	c, err = createCapture(target, meta, false)
	if err != nil {
		t.Fatal(err)
	}
	c.Write([]complex64{0.5, -0.5i, 0.25})
	if _, err := os.Stat(filepath.Join(dir, "tx.sigmf-meta")); !os.IsNotExist(err) {
		t.Fatal("metadata visible before Commit")
	}
	if err := c.Commit(); err != nil {
		t.Fatal(err)
	}
	x, m := readCapture(t, filepath.Join(dir, "tx.sigmf-meta"), iq.Options{})
	if len(x) != 3 || x[1] != -0.5i || m.Rate != 48000 || m.Center != 7.1e6 || len(m.Annotations) != 1 || m.Annotations[0].Label != "USB" {
		t.Errorf("read back %v %+v", x, m)
	}
	assertNoTemp(t, dir)
	// Writing the data half of a pair that is being read is refused.
	if _, err := createCapture(filepath.Join(dir, "tx.sigmf-data"), meta, true, filepath.Join(dir, "tx.sigmf-meta")); err == nil || !strings.Contains(err.Error(), "also an input") {
		t.Errorf("output pair equal to input pair: %v", err)
	}
	// An existing pair needs --force.
	if _, err := createCapture(filepath.Join(dir, "tx.sigmf-meta"), meta, false); err == nil || !strings.Contains(err.Error(), "--force") {
		t.Errorf("existing pair: %v", err)
	}
	assertNoTemp(t, dir)
}

func TestCreateCaptureKinds(t *testing.T) {
	dir := t.TempDir()
	for _, c := range []struct {
		name string
		dt   iq.Datatype
		size int64
	}{
		{"a.cu8", iq.CF32, 2}, // raw: the extension decides
		{"a.cs16", "", 4},
		{"a.wav", iq.CI16, 44 + 4},
		{"b.wav", "", 58 + 8}, // float WAV: fmt with cbSize and a fact chunk
	} {
		p := filepath.Join(dir, c.name)
		w, err := createCapture(p, iq.Meta{Datatype: c.dt, Rate: 8000}, false)
		if err != nil {
			t.Fatal(err)
		}
		w.Write([]complex64{0.5 + 0.5i})
		if err := w.Commit(); err != nil {
			t.Fatal(err)
		}
		if st, err := os.Stat(p); err != nil || st.Size() != c.size {
			t.Errorf("%s: size %v, want %d (%v)", c.name, st.Size(), c.size, err)
		}
	}
	if _, err := createCapture(filepath.Join(dir, "x.mp3"), iq.Meta{Rate: 1}, false); err == nil {
		t.Error("x.mp3 accepted")
	}
}

// failWriter fails every write after the first n bytes.
type failWriter struct{ n int }

func (f *failWriter) Write(p []byte) (int, error) {
	if len(p) > f.n {
		return 0, os.ErrClosed
	}
	f.n -= len(p)
	return len(p), nil
}

// TestFileSink checks that the asynchronous sink writes every byte in
// order whatever the sizes of the writes, that Flush leaves nothing
// queued, and that a write error reaches the caller (a later Write,
// Flush or Close).
func TestFileSink(t *testing.T) {
	var want, got strings.Builder
	s := newFileSink(&got)
	for i, size := 0, 1; i < 300; i, size = i+1, (size*7+3)%(3*fileSinkBuf) {
		p := make([]byte, size)
		for k := range p {
			p[k] = byte(i + k)
		}
		want.Write(p)
		if n, err := s.Write(p); n != size || err != nil {
			t.Fatalf("write %d: %d, %v", i, n, err)
		}
		if i%37 == 0 {
			if err := s.Flush(); err != nil || got.Len() != want.Len() {
				t.Fatalf("flush after write %d: %v; %d bytes written, want %d", i, err, got.Len(), want.Len())
			}
		}
	}
	if err := s.Close(); err != nil || got.String() != want.String() {
		t.Fatalf("close: %v; %d bytes written, want %d, equal %v", err, got.Len(), want.Len(), got.String() == want.String())
	}
	if err := s.Close(); err != nil {
		t.Errorf("second close: %v", err)
	}
	if _, err := s.Seek(0, io.SeekStart); err == nil {
		t.Errorf("seek of a writer that cannot seek succeeded")
	}

	s = newFileSink(&failWriter{n: fileSinkBuf})
	p := make([]byte, 5*fileSinkBuf)
	_, err := s.Write(p)
	ferr := s.Flush()
	if cerr := s.Close(); err == nil && ferr == nil || cerr == nil {
		t.Errorf("no error from a failing writer: write %v, flush %v, close %v", err, ferr, cerr)
	}
}

// TestCaptureWriteBehind: with writeBehind, every kind of output (raw
// formats, WAV with its header patched through Seek, a SigMF pair and
// standard output) holds exactly the bytes of the synchronous writer,
// whatever the sizes of the writes.
func TestCaptureWriteBehind(t *testing.T) {
	dir := t.TempDir()
	rng := rand.New(rand.NewPCG(3, 4))
	x := make([]complex64, 3*fileSinkBuf/8+1234)
	for i := range x {
		x[i] = complex(float32(rng.Float64()*2-1), float32(rng.Float64()*2-1))
	}
	write := func(c *captureOut) {
		t.Helper()
		for rest := x; len(rest) > 0; {
			k := min(len(rest), 1+rng.IntN(9000))
			if n, err := c.Write(rest[:k]); n != k || err != nil {
				t.Fatalf("write: %d, %v", n, err)
			}
			rest = rest[k:]
		}
		if err := c.Commit(); err != nil {
			t.Fatal(err)
		}
	}
	for _, c := range []struct {
		name  string
		dt    iq.Datatype
		files []string
	}{
		{"a.cf32", "", nil},
		{"a.cu8", "", nil},
		{"a.cs16", "", nil},
		{"a.wav", "", nil},
		{"b.wav", iq.CI16, nil},
		{"a.sigmf-meta", iq.CI8, []string{"a.sigmf-data", "a.sigmf-meta"}},
	} {
		files := c.files
		if files == nil {
			files = []string{c.name}
		}
		meta := iq.Meta{Datatype: c.dt, Rate: 48000}
		var want []string
		for i, opt := range []captureOpts{{}, {force: true, writeBehind: true}} {
			w, err := openCaptureOut(nil, filepath.Join(dir, c.name), meta, opt)
			if err != nil {
				t.Fatal(err)
			}
			write(w)
			for k, f := range files {
				b, err := os.ReadFile(filepath.Join(dir, f))
				if err != nil {
					t.Fatal(err)
				}
				if i == 0 {
					want = append(want, string(b))
				} else if string(b) != want[k] {
					t.Errorf("%s: %s differs with writeBehind (%d bytes, want %d)", c.name, f, len(b), len(want[k]))
				}
			}
		}
	}
	assertNoTemp(t, dir)
	var sync, behind strings.Builder
	for _, w := range []*strings.Builder{&sync, &behind} {
		c, err := openCaptureOut(w, "-", iq.Meta{Rate: 1}, captureOpts{writeBehind: w == &behind})
		if err != nil {
			t.Fatal(err)
		}
		write(c)
	}
	if sync.Len() != 8*len(x) || sync.String() != behind.String() {
		t.Errorf("standard output: %d bytes with writeBehind, %d without, want %d", behind.Len(), sync.Len(), 8*len(x))
	}
}

// TestCaptureWriteBehindError: a write error of the goroutine reaches
// Commit, and nothing is left behind.
func TestCaptureWriteBehindError(t *testing.T) {
	c, err := openCaptureOut(&failWriter{n: 100}, "-", iq.Meta{Rate: 1}, captureOpts{writeBehind: true})
	if err != nil {
		t.Fatal(err)
	}
	x := make([]complex64, fileSinkBuf)
	c.Write(x)
	c.Write(x)
	if err := c.Commit(); err == nil {
		t.Error("Commit after a failed write returned no error")
	}
	dir := t.TempDir()
	c, err = openCaptureOut(nil, filepath.Join(dir, "a.wav"), iq.Meta{Rate: 8000}, captureOpts{writeBehind: true})
	if err != nil {
		t.Fatal(err)
	}
	c.Write(x)
	c.Abort()
	if ents, _ := os.ReadDir(dir); len(ents) != 0 {
		t.Errorf("Abort left %d files", len(ents))
	}
}

// TestOpenCaptureIgnoredFlags: a WAV or SigMF file describes itself, so a
// --format or --rate that disagrees with it (or a --center that SigMF
// metadata overrides) draws one warning line each; agreeing flags, and a
// --center for a WAV (which has none), draw none. The figures come from
// the file.
func TestOpenCaptureIgnoredFlags(t *testing.T) {
	dir := t.TempDir()
	x := make([]complex64, 4096)
	for i := range x {
		x[i] = complex(float32(i%7)/8, -float32(i%5)/8)
	}
	wav := filepath.Join(dir, "c.wav")
	writeCapture(t, wav, iq.CF32, 48000, x)
	sig := filepath.Join(dir, "c.sigmf-meta")
	writeCaptureMeta(t, sig, iq.Meta{Datatype: iq.CF32, Rate: 48000, Center: 7.09e6, HasCenter: true}, x)
	for _, c := range []struct {
		args []string
		want []string
	}{
		{[]string{wav, "--format", "cu8", "--rate", "2.4M"}, []string{
			"ssbkit: info: warning: --format cu8 ignored: " + wav + " holds cf32_le",
			"ssbkit: info: warning: --rate 2.4M ignored: " + wav + " says 48000 Hz"}},
		{[]string{wav, "--format", "cf32", "--rate", "48k", "--center", "7.1M"}, nil},
		{[]string{sig, "--center", "7.1M"}, []string{"ssbkit: info: warning: --center 7.1M ignored: " + sig + " says 7090000 Hz"}},
		{[]string{sig, "--center", "7.09M"}, nil},
	} {
		code, out, errs := runCmd(t, append([]string{"info", "--json", "-q"}, c.args...)...)
		if code != exitOK {
			t.Fatalf("%q: exit %d: %s", c.args, code, errs)
		}
		if got := strings.Join(c.want, "\n"); strings.TrimSpace(errs) != got {
			t.Errorf("%q: stderr %q, want %q", c.args, errs, got)
		}
		if !strings.Contains(out, `"rate_hz": 48000`) {
			t.Errorf("%q: the rate is not the file's:\n%s", c.args, out)
		}
	}
}

// A SigMF recording retuned part-way (a second capture segment with
// another core:frequency; SigMF v1.0.0 allows it) is read with its first
// centre throughout, and every command that opens it says so once.
func TestOpenCaptureRetuned(t *testing.T) {
	dir := t.TempDir()
	x := make([]complex64, 4096)
	raw := filepath.Join(dir, "r.cf32")
	writeCapture(t, raw, iq.CF32, 48000, x)
	if err := os.Rename(raw, filepath.Join(dir, "r.sigmf-data")); err != nil {
		t.Fatal(err)
	}
	meta := filepath.Join(dir, "r.sigmf-meta")
	err := os.WriteFile(meta, []byte(`{"global":{"core:datatype":"cf32_le","core:sample_rate":48000,"core:version":"1.0.0"},
"captures":[{"core:sample_start":0,"core:frequency":7090000},{"core:sample_start":2048,"core:frequency":7095000},{"core:sample_start":3000,"core:frequency":7090000}],"annotations":[]}`), 0o644)
	if err != nil {
		t.Fatal(err)
	}
	code, out, errs := runCmd(t, "info", "--json", meta)
	want := "ssbkit: info: warning: " + meta + " is retuned part-way (to 7095000 Hz at sample 2048; 2 retunes in all): frequencies are taken from the first centre, 7090000 Hz, throughout"
	if code != exitOK || strings.TrimSpace(errs) != want || !strings.Contains(out, `"center_hz": 7090000`) {
		t.Errorf("exit %d, stderr %q, want %q\n%s", code, errs, want, out)
	}
}
