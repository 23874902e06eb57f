package iq

import (
	"bytes"
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// TestSigMFHandWritten parses a metadata file written by hand from the
// field list of the SigMF Specification v1.0.0 (global, captures and
// annotations objects; extra core fields such as core:author and
// core:hw must be accepted).
func TestSigMFHandWritten(t *testing.T) {
	f, err := os.Open("testdata/handwritten.sigmf-meta")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	m, err := ReadSigMFMeta(f, "handwritten.sigmf-meta")
	if err != nil {
		t.Fatal(err)
	}
	wantTime := time.Date(2024, 3, 10, 8, 15, 30, 250e6, time.UTC)
	if m.Datatype != CI16 || m.Rate != 96000 || !m.HasCenter || m.Center != 7074000.5 ||
		!m.Datetime.Equal(wantTime) || m.Real || !strings.HasPrefix(m.Description, "Invented") {
		t.Errorf("meta %+v", m)
	}
	want := []Annotation{
		{SampleStart: 100, SampleCount: 2000, FreqLowerEdge: 7075000, FreqUpperEdge: 7077700, Label: "USB", Comment: "invented test signal"},
		{SampleStart: 5000},
	}
	if len(m.Annotations) != 2 || m.Annotations[0] != want[0] || m.Annotations[1] != want[1] {
		t.Errorf("annotations %+v, want %+v", m.Annotations, want)
	}
	// its second capture segment retunes to 7.080 MHz at sample 48000
	if len(m.Retunes) != 1 || m.Retunes[0] != (Retune{SampleStart: 48000, Center: 7080000}) {
		t.Errorf("retunes %+v", m.Retunes)
	}
}

// TestSigMFSegmentsOneCentre: capture segments that repeat the first
// segment's core:frequency, or leave it out, are no retune.
func TestSigMFSegmentsOneCentre(t *testing.T) {
	for _, caps := range []string{
		`{"core:sample_start":0,"core:frequency":7.1e6},{"core:sample_start":10,"core:frequency":7.1e6}`,
		`{"core:sample_start":0,"core:frequency":7.1e6},{"core:sample_start":10}`,
	} {
		m, err := ReadSigMFMeta(strings.NewReader(`{"global":{"core:datatype":"cu8","core:sample_rate":48000},"captures":[`+caps+`]}`), "seg.sigmf-meta")
		if err != nil || !m.HasCenter || m.Center != 7.1e6 || len(m.Retunes) != 0 {
			t.Errorf("%s: %+v, %v; want centre 7.1 MHz and no retune", caps, m, err)
		}
	}
}

// TestSigMFWriteValid writes metadata and checks it against the required
// fields of SigMF Specification v1.0.0: a "global" object with
// core:datatype and core:version ("X.Y.Z"), "captures" and "annotations"
// arrays, core:sample_start in each of their objects, annotations sorted
// by core:sample_start; and that it reads back to the same Meta.
func TestSigMFWriteValid(t *testing.T) {
	m := Meta{
		Datatype: CF32, Rate: 48000, Center: 14.2e6, HasCenter: true,
		Description: "ssbkit test", Datetime: time.Date(2025, 1, 2, 3, 4, 5, 0, time.UTC),
		Annotations: []Annotation{
			{SampleStart: 500, SampleCount: 10, Label: "b"},
			{SampleStart: 0, SampleCount: 48000, FreqLowerEdge: 14.2003e6, FreqUpperEdge: 14.2027e6, Label: "USB", Comment: "carrier at 14.2 MHz"},
		},
	}
	var b bytes.Buffer
	if err := WriteSigMFMeta(&b, m); err != nil {
		t.Fatal(err)
	}
	var doc map[string]any
	if err := json.Unmarshal(b.Bytes(), &doc); err != nil {
		t.Fatalf("not JSON: %v\n%s", err, b.String())
	}
	g, ok := doc["global"].(map[string]any)
	if !ok {
		t.Fatal("no global object")
	}
	if g["core:datatype"] != "cf32_le" {
		t.Errorf("core:datatype %v", g["core:datatype"])
	}
	v, _ := g["core:version"].(string)
	if parts := strings.Split(v, "."); len(parts) != 3 || parts[0] != "1" {
		t.Errorf("core:version %q, want 1.Y.Z", v)
	}
	for _, key := range []string{"captures", "annotations"} {
		arr, ok := doc[key].([]any)
		if !ok {
			t.Fatalf("%s is not an array", key)
		}
		last := -1.0
		for i, o := range arr {
			s, ok := o.(map[string]any)["core:sample_start"].(float64)
			if !ok {
				t.Errorf("%s[%d] has no core:sample_start", key, i)
			}
			if key == "annotations" && s < last {
				t.Errorf("annotations not sorted by core:sample_start")
			}
			last = s
		}
	}
	back, err := ReadSigMFMeta(&b, "x")
	if err != nil {
		t.Fatal(err)
	}
	if back.Rate != m.Rate || back.Center != m.Center || !back.Datetime.Equal(m.Datetime) || back.Description != m.Description ||
		len(back.Annotations) != 2 || back.Annotations[0] != m.Annotations[1] || back.Annotations[1] != m.Annotations[0] {
		t.Errorf("read back %+v", back)
	}
}

// TestSigMFBad checks the errors for bad metadata: each names the file,
// and invalid JSON says where.
func TestSigMFBad(t *testing.T) {
	cases := []struct {
		name, json, want string
		unsupported      bool
	}{
		{"nodatatype", `{"global":{"core:version":"1.0.0"},"captures":[],"annotations":[]}`, `no global "core:datatype"`, false},
		{"unknown", `{"global":{"core:datatype":"cf64_be","core:version":"1.0.0"}}`, `"cf64_be"`, true},
		{"syntax", "{\n  \"global\": {\n    \"core:datatype\": \"cu8\",,\n  }\n}", "line 3, column 28", false},
		{"type", `{"global":{"core:datatype":5}}`, "line 1, column 28", false},
		{"noglobal", `{"captures":[]}`, `no "global"`, false},
		{"empty", ``, "empty metadata", false},
		{"nostart", `{"global":{"core:datatype":"cu8"},"annotations":[{"core:label":"x"}]}`, `annotations[0] has no "core:sample_start"`, false},
		{"badtime", `{"global":{"core:datatype":"cu8"},"captures":[{"core:sample_start":0,"core:datetime":"yesterday"}]}`, "ISO 8601", false},
		{"badrate", `{"global":{"core:datatype":"cu8","core:sample_rate":-5}}`, "not a positive rate", false},
	}
	for _, c := range cases {
		_, err := ReadSigMFMeta(strings.NewReader(c.json), c.name+".sigmf-meta")
		if err == nil {
			t.Errorf("%s: accepted", c.name)
			continue
		}
		if !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), c.name+".sigmf-meta") {
			t.Errorf("%s: error %q, want it to name the file and contain %q", c.name, err, c.want)
		}
		var ue *UnsupportedError
		var fe *FormatError
		if c.unsupported && !errors.As(err, &ue) || !c.unsupported && !errors.As(err, &fe) {
			t.Errorf("%s: error type %T", c.name, err)
		}
	}
}

// TestSigMFOpenEitherName opens a recording by its metadata and by its
// data name.
func TestSigMFOpenEitherName(t *testing.T) {
	dir := t.TempDir()
	base := filepath.Join(dir, "rec")
	m := Meta{Datatype: CU8, Rate: 2.4e6, Center: 7.1e6, HasCenter: true}
	var b bytes.Buffer
	if err := WriteSigMFMeta(&b, m); err != nil {
		t.Fatal(err)
	}
	os.WriteFile(base+".sigmf-meta", b.Bytes(), 0o644)
	os.WriteFile(base+".sigmf-data", []byte{0, 255, 128, 128, 255, 0}, 0o644)
	for _, name := range []string{base + ".sigmf-meta", base + ".sigmf-data"} {
		s, err := Open(name, Options{})
		if err != nil {
			t.Fatal(err)
		}
		y := readAll(t, s)
		s.Close()
		if got := s.Meta(); got.Samples != 3 || got.Rate != 2.4e6 || got.Center != 7.1e6 || len(y) != 3 || y[0] != complex(-1, 1) || s.Clipped() != 2 {
			t.Errorf("%s: meta %+v samples %v clipped %d", name, got, y, s.Clipped())
		}
	}
}
