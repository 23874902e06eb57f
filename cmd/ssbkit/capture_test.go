package main

import (
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
