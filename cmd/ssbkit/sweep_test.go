package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"ssbkit/hilbert"
)

func TestSweepJSON(t *testing.T) {
	code, out, errs := runCmd(t, "sweep", "--designs", "equiripple,allpass", "--taps", "63", "--sections", "3:5:1", "--json", "--verify")
	if code != exitOK {
		t.Fatalf("exit %d, stderr %q", code, errs)
	}
	var j struct {
		RateHz float64          `json:"rate_hz"`
		BandHz [2]float64       `json:"band_hz"`
		Rows   []map[string]any `json:"rows"`
	}
	if err := json.Unmarshal([]byte(out), &j); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	if j.RateHz != 8000 || j.BandHz != [2]float64{300, 2700} || len(j.Rows) != 4 {
		t.Fatalf("rate %g band %v rows %d", j.RateHz, j.BandHz, len(j.Rows))
	}
	keys := []string{"design", "length", "suppression_min_db", "suppression_mean_db", "ripple_db", "delay_samples", "delay_ms", "macs_per_sample", "measured_min_db"}
	for _, r := range j.Rows {
		for _, k := range keys {
			if _, ok := r[k]; !ok {
				t.Errorf("row %v lacks %q", r, k)
			}
		}
		// The streaming filter measures no better than the band minimum
		// predicted (the tones sample the band) and, for these designs
		// whose minimum lies at a band edge, agrees within 1 dB below
		// 100 dB (issue 3).
		p, m := r["suppression_min_db"].(float64), r["measured_min_db"].(float64)
		if p < 100 && (m < p-1 || m > p+1) {
			t.Errorf("%v %v: predicted %.2f, measured %.2f", r["design"], r["length"], p, m)
		}
	}
	// 63-tap equiripple reaches 80 dB (issue 3).
	const floorDB = 80
	if s := j.Rows[0]["suppression_min_db"].(float64); s < floorDB {
		t.Errorf("equiripple 63: %.2f dB", s)
	}
	// allpass length is the number of sections.
	if l := j.Rows[1]["length"].(float64); l != 3 {
		t.Errorf("allpass length %v, want 3", l)
	}
}

func TestSweepOutputs(t *testing.T) {
	dir := t.TempDir()
	csvP, png, txt := filepath.Join(dir, "s.csv"), filepath.Join(dir, "s.png"), filepath.Join(dir, "s.txt")
	code, _, errs := runCmd(t, "sweep", "--designs", "all", "--taps", "15:63:16", "--csv", csvP, "--plot", png, "-o", txt, "-q")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	b, _ := os.ReadFile(csvP)
	lines := strings.Split(strings.TrimSpace(string(b)), "\n")
	if lines[0] != "design,length,suppression_min_db,suppression_mean_db,ripple_db,delay_samples,delay_ms,macs_per_sample" {
		t.Errorf("csv header %q", lines[0])
	}
	// 7 designs × 4 lengths + allpass and analog × 10 default sections.
	if len(lines) != 1+7*4+2*10 {
		t.Errorf("csv has %d lines", len(lines))
	}
	if p, _ := os.ReadFile(png); len(p) < 1000 || string(p[1:4]) != "PNG" {
		t.Errorf("plot is not a PNG")
	}
	if s, _ := os.ReadFile(txt); !strings.Contains(string(s), "equiripple") {
		t.Errorf("text output: %q", s)
	}
	// Existing outputs are kept without --force.
	code, _, errs = runCmd(t, "sweep", "--csv", csvP, "-q")
	if code != exitFailure || !strings.Contains(errs, "exists") {
		t.Errorf("second run: %d %q", code, errs)
	}
}

func TestSweepBadInput(t *testing.T) {
	checkUsageErrors(t, "sweep", nil, []usageCase{
		{[]string{"--designs", "magic"}, "allowed: rect, hamming"},
		{[]string{"--taps", "8"}, "odd"},
		{[]string{"--taps", "9:3"}, "START"},
		{[]string{"--taps", "a,b"}, "comma list"},
		{[]string{"--band", "2700:300"}, "band"},
		{[]string{"--band", "300:4000"}, "rate/2"},
		{[]string{"--rate", "-5"}, "--rate"},
		{[]string{"--sections", "0:3"}, "START"},
		{[]string{"extra"}, "no arguments"},
		{[]string{"--bits", "0"}, "--bits 0"},
		{[]string{"--bits", "64"}, "want 2 to 32"},
		{[]string{"--designs", "analog", "--sections", "17"}, "analog sections must be 1 to 16"},
	})
}

func TestParseLengths(t *testing.T) {
	for _, c := range []struct {
		in   string
		want []int
	}{{"7:15:4", []int{7, 11, 15}}, {"7:16:4", []int{7, 11, 15}}, {"3:5", []int{3, 4, 5}}, {"31, 63,127", []int{31, 63, 127}}, {"9", []int{9}}} {
		got, err := parseLengths("--taps", c.in)
		if err != nil || !reflect.DeepEqual(got, c.want) {
			t.Errorf("parseLengths(%q) = %v, %v; want %v", c.in, got, err, c.want)
		}
	}
}

func FuzzParseLengths(f *testing.F) {
	seeds, _ := os.ReadFile("testdata/lengths_seeds.txt")
	for _, s := range strings.Split(string(seeds), "\n") {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		if len(s) > 100 {
			return
		}
		v, err := parseLengths("--taps", s)
		if err != nil {
			return
		}
		if len(v) == 0 || len(v) > maxSweepRows {
			t.Fatalf("%q: %d lengths", s, len(v))
		}
		for _, n := range v {
			if n < 1 {
				t.Fatalf("%q: length %d", s, n)
			}
		}
	})
}

// TestSweepSkipWarning: an FFT block below hilbert.MinFFT is skipped with
// a one-line warning that -q does not silence (DEVELOPERS.md: warnings
// `ssbkit: cmd: warning: …`); the other lengths still run.
func TestSweepSkipWarning(t *testing.T) {
	code, out, errs := runCmd(t, "sweep", "--designs", "fft", "--taps", "3,15", "-q", "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if errs != "ssbkit: sweep: warning: fft block size 3 skipped (at least 8)\n" {
		t.Errorf("stderr %q", errs)
	}
	var j struct{ Rows []struct{ Length int } }
	if err := json.Unmarshal([]byte(out), &j); err != nil || len(j.Rows) != 1 || j.Rows[0].Length != 15 {
		t.Errorf("rows %+v (%v), want the 15 block only", j.Rows, err)
	}
}

func TestSweepBitsAndAnalog(t *testing.T) {
	code, out, errs := runCmd(t, "sweep", "--designs", "equiripple,allpass,analog", "--taps", "63", "--sections", "3,7", "--bits", "16", "--json", "--verify")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var j struct {
		Bits int              `json:"bits"`
		Rows []map[string]any `json:"rows"`
	}
	if err := json.Unmarshal([]byte(out), &j); err != nil || j.Bits != 16 || len(j.Rows) != 5 {
		t.Fatalf("%v bits %d rows %d\n%s", err, j.Bits, len(j.Rows), out)
	}
	for _, r := range j.Rows {
		q, hasQ := r["quantized_min_db"].(float64)
		_, hasM := r["measured_min_db"]
		if r["design"] == "analog" {
			// No coefficients and no streaming filter.
			if hasQ || hasM || r["macs_per_sample"].(float64) != 0 {
				t.Errorf("analog row %v", r)
			}
			continue
		}
		if !hasQ || !hasM || q > r["suppression_min_db"].(float64)+0.5 {
			t.Errorf("row %v", r)
		}
	}
	// 63 taps: 81.29 dB exact, 76.54 dB at 16 bits (hilbert's
	// TestEquiripple63 and TestQuantized63Taps); allpass 3 sections: the
	// 47.04 dB check value of issue 3 (its minimum over 300–3700 Hz lies
	// at 300 Hz, so 300–2700 Hz gives the same); analog rows: the closed
	// form (hilbert's TestAnalogEquiripple checks it against the
	// alternation and the image-rejection formula).
	want := []struct {
		design string
		length float64
		min    float64
	}{{"equiripple", 63, 81.29}, {"allpass", 3, 47.04}, {"allpass", 7, -1},
		{"analog", 3, hilbert.AnalogSuppressionDB(3, 300, 2700)}, {"analog", 7, hilbert.AnalogSuppressionDB(7, 300, 2700)}}
	for i, w := range want {
		r := j.Rows[i]
		if r["design"] != w.design || r["length"].(float64) != w.length || w.min > 0 && math.Abs(r["suppression_min_db"].(float64)-w.min) > 0.01 {
			t.Errorf("row %d: %v, want %+v", i, r, w)
		}
	}
	if q := j.Rows[0]["quantized_min_db"].(float64); math.Abs(q-79.42) > 0.01 {
		t.Errorf("equiripple 63 at 16 bits: %.2f dB", q)
	}
	// The text table marks what does not apply.
	code, out, _ = runCmd(t, "sweep", "--designs", "analog", "--sections", "4", "--bits", "12", "--verify")
	if code != exitOK || !strings.Contains(out, "12-bit min dB") || !strings.Contains(out, "–") {
		t.Errorf("text:\n%s", out)
	}
}
