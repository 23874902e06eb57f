package main

import (
	"bytes"
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"ssbkit/iq"
)

// writeCapture writes x to path through iq's writers (container from the
// extension, like createCapture).
func writeCapture(t *testing.T, path string, dt iq.Datatype, rate float64, x []complex64) {
	t.Helper()
	writeCaptureMeta(t, path, iq.Meta{Datatype: dt, Rate: rate}, x)
}

// writeCaptureMeta is writeCapture with the whole metadata given.
func writeCaptureMeta(t *testing.T, path string, meta iq.Meta, x []complex64) {
	t.Helper()
	c, err := createCapture(path, meta, true)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := c.Write(x); err != nil {
		t.Fatal(err)
	}
	if err := c.Commit(); err != nil {
		t.Fatal(err)
	}
}

// skewedNoise is circular Gaussian noise through a Q path of gain g and
// phase error phiDeg, plus a DC offset.
func skewedNoise(n int, g, phiDeg float64, dc complex64) []complex64 {
	rng := rand.New(rand.NewPCG(21, 22))
	phi := phiDeg * math.Pi / 180
	c, s := float32(g*math.Cos(phi)), float32(g*math.Sin(phi))
	y := make([]complex64, n)
	for i := range y {
		xi, xq := float32(rng.NormFloat64()*0.05), float32(rng.NormFloat64()*0.05)
		y[i] = complex(xi, c*xq-s*xi) + dc
	}
	return y
}

func infoJSON(t *testing.T, args ...string) map[string]any {
	t.Helper()
	code, out, errs := runCmd(t, append([]string{"info", "--json"}, args...)...)
	if code != exitOK {
		t.Fatalf("info %v: exit %d: %s", args, code, errs)
	}
	var m map[string]any
	if err := json.Unmarshal([]byte(out), &m); err != nil {
		t.Fatalf("info --json: %v\n%s", err, out)
	}
	return m
}

// TestInfoLevels checks info on a cu8 file whose values follow from the
// format table (common practice): codes 255/0 are ±1 (rail, clipped),
// 191/64 are ±63.5/127.5.
func TestInfoLevels(t *testing.T) {
	const (
		tol   = 1e-9 // s: duration is a float64 division
		dbTol = 1e-6 // dB: float32 samples, float64 sums
		dcTol = 1e-7 // symmetric codes cancel exactly but for float32 rounding
	)
	dir := t.TempDir()
	p := filepath.Join(dir, "levels.cu8")
	os.WriteFile(p, []byte{255, 255, 0, 0, 191, 64, 64, 191}, 0o644)
	m := infoJSON(t, "--rate", "2.4M", "--center", "7.1M", p)
	for _, key := range []string{"format", "rate_hz", "center_hz", "samples", "duration_s", "peak_dbfs", "rms_dbfs",
		"dc_offset", "clipped", "iq_gain_imbalance_db", "iq_phase_imbalance_deg", "image_rejection_db"} {
		if _, ok := m[key]; !ok {
			t.Errorf("JSON has no %q (DESIGN.md info keys)", key)
		}
	}
	a := 63.5 / 127.5
	wantPeak := 10 * math.Log10(2)                  // |1+j|² = 2
	wantRMS := 10 * math.Log10((2+2+2*a*a+2*a*a)/4) // mean |x|²
	if m["format"] != "cu8" || m["rate_hz"] != 2.4e6 || m["center_hz"] != 7.1e6 || m["samples"] != 4.0 || m["clipped"] != 2.0 {
		t.Errorf("report %v", m)
	}
	if d := m["duration_s"].(float64) - 4/2.4e6; math.Abs(d) > tol {
		t.Errorf("duration off by %g", d)
	}
	if math.Abs(m["peak_dbfs"].(float64)-wantPeak) > dbTol || math.Abs(m["rms_dbfs"].(float64)-wantRMS) > dbTol {
		t.Errorf("peak %v rms %v, want %v %v", m["peak_dbfs"], m["rms_dbfs"], wantPeak, wantRMS)
	}
	dc := m["dc_offset"].([]any)
	if math.Abs(dc[0].(float64)) > dcTol || math.Abs(dc[1].(float64)) > dcTol {
		t.Errorf("dc %v, want 0", dc)
	}
	code, out, _ := runCmd(t, "info", "--rate", "2.4M", p)
	if code != exitOK || !strings.Contains(out, "clipped           2 samples") || !strings.Contains(out, "2400000 Hz") {
		t.Errorf("text report:\n%s", out)
	}
}

// TestInfoImbalance: info's blind image rejection matches the textbook
// 10·log10((1+2g·cosφ+g²)/(1−2g·cosφ+g²)) within 0.5 dB for g = 1.02,
// φ = 2° (Razavi, RF Microelectronics, 2nd ed., Sec. 4.2.4).
func TestInfoImbalance(t *testing.T) {
	const (
		tolDB    = 0.5  // the tolerance on image rejection
		phaseTol = 0.1  // degrees; as iq's TestImbalanceEstimate
		gainTol  = 0.02 // dB; as iq's TestImbalanceEstimate
	)
	p := filepath.Join(t.TempDir(), "skew.wav")
	writeCapture(t, p, iq.CF32, 48000, skewedNoise(1<<20, 1.02, 2, complex(0.01, -0.02)))
	m := infoJSON(t, p)
	g, phi := 1.02, 2*math.Pi/180
	want := 10 * math.Log10((1+2*g*math.Cos(phi)+g*g)/(1-2*g*math.Cos(phi)+g*g))
	if got := m["image_rejection_db"].(float64); math.Abs(got-want) > tolDB {
		t.Errorf("image rejection %.2f dB, formula %.2f dB", got, want)
	}
	if got := m["iq_phase_imbalance_deg"].(float64); math.Abs(got-2) > phaseTol {
		t.Errorf("phase %.3f°, want 2", got)
	}
	if got := m["iq_gain_imbalance_db"].(float64); math.Abs(got-20*math.Log10(g)) > gainTol {
		t.Errorf("gain %.3f dB, want %.3f", got, 20*math.Log10(g))
	}
}

// TestInfoBad: bad inputs give one line on stderr and exit 1; command-line
// mistakes exit 2.
func TestInfoBad(t *testing.T) {
	dir := t.TempDir()
	write := func(name string, b []byte) string {
		p := filepath.Join(dir, name)
		os.WriteFile(p, b, 0o644)
		return p
	}
	inf := math.Float32bits(float32(math.Inf(1)))
	nan := []byte{byte(inf), byte(inf >> 8), byte(inf >> 16), byte(inf >> 24), 0, 0, 0, 0}
	cases := []struct {
		args []string
		code int
		want string
	}{
		{[]string{"info", filepath.Join(dir, "missing.wav")}, exitFailure, "no such file"},
		{[]string{"info", filepath.Join(dir, "missing")}, exitFailure, "missing: no such file"},
		{[]string{"info", write("empty.cf32", nil)}, exitFailure, "empty file"},
		{[]string{"info", "--rate", "1k", write("odd.cs16", make([]byte, 6))}, exitFailure, "not a whole number"},
		{[]string{"info", write("norate.cu8", make([]byte, 6))}, exitFailure, "--rate"},
		{[]string{"info", write("bad.sigmf-meta", []byte(`{"global": {"core:datatype": "cu8",}}`))}, exitFailure, "line 1, column 36"},
		{[]string{"info", write("nodt.sigmf-meta", []byte(`{"global": {"core:version": "1.0.0"}}`))}, exitFailure, "core:datatype"},
		{[]string{"info", write("cf64.sigmf-meta", []byte(`{"global": {"core:datatype": "cf64_le"}}`))}, exitFailure, `unsupported SigMF core:datatype "cf64_le"`},
		// Format tag 2 (Microsoft ADPCM) in an otherwise valid header.
		{[]string{"info", write("adpcm.wav", []byte("RIFF\x28\x00\x00\x00WAVEfmt \x10\x00\x00\x00\x02\x00\x02\x00\x40\x1f\x00\x00\x00\x7d\x00\x00\x04\x00\x10\x00data\x04\x00\x00\x00\x00\x00\x00\x00"))}, exitFailure, "unsupported WAV encoding (format tag 0x2"},
		{[]string{"info", write("three.wav", []byte("RIFF\x28\x00\x00\x00WAVEfmt \x10\x00\x00\x00\x01\x00\x03\x00\x40\x1f\x00\x00\xc0\x5d\x00\x00\x06\x00\x10\x00data\x06\x00\x00\x00\x00\x00\x00\x00\x00\x00"))}, exitFailure, "3 channels"},
		{[]string{"info"}, exitUsage, "want one CAPTURE"},
		{[]string{"info", "--rate", "fast", "x.cu8"}, exitUsage, "--rate"},
		{[]string{"info", "--format", "cf64", "-"}, exitUsage, "--format"},
	}
	for _, c := range cases {
		code, _, errs := runCmd(t, c.args...)
		if code != c.code || !strings.Contains(errs, c.want) || strings.Count(errs, "\n") != 1 || !strings.HasPrefix(errs, "ssbkit: info: ") {
			t.Errorf("%v: exit %d, stderr %q; want %d and one line with %q", c.args, code, errs, c.code, c.want)
		}
	}
	// NaN/Inf are reported, not fatal, in info: counted in the report and
	// warned about in one line on stderr.
	infPath := write("inf.cf32", nan)
	code, out, errs := runCmd(t, "info", "--json", "--rate", "1k", infPath)
	var m map[string]any
	if code != exitOK || json.Unmarshal([]byte(out), &m) != nil || m["nonfinite"] != 1.0 {
		t.Errorf("inf.cf32: exit %d, report %s", code, out)
	}
	if want := "ssbkit: info: warning: " + infPath + ": 1 NaN or Inf values"; !strings.HasPrefix(errs, want) || strings.Count(errs, "\n") != 1 {
		t.Errorf("inf.cf32: stderr %q, want one line starting %q", errs, want)
	}
}

// TestInfoStdin reads raw samples from standard input.
func TestInfoStdin(t *testing.T) {
	var o, e bytes.Buffer
	code := run([]string{"info", "--json", "--format", "cu8", "--rate", "8k", "-"}, &env{stdin: bytes.NewReader([]byte{255, 128, 0, 128}), stdout: &o, stderr: &e})
	if code != exitOK || !strings.Contains(o.String(), `"samples": 2`) {
		t.Errorf("exit %d\n%s%s", code, o.String(), e.String())
	}
}

// TestInfoOutput: -o writes the report to a file through the safe-output
// path: an existing file is kept without --force, the capture itself (or
// its SigMF partner) is refused as the output, and nothing is left behind.
func TestInfoOutput(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "c.cu8")
	os.WriteFile(p, []byte{255, 128, 0, 128}, 0o644)
	rep := filepath.Join(dir, "c.json")
	if code, out, errs := runCmd(t, "info", "--json", "--rate", "8k", "-o", rep, p); code != exitOK || out != "" {
		t.Fatalf("exit %d, stdout %q, stderr %q", code, out, errs)
	}
	var m map[string]any
	if b, err := os.ReadFile(rep); err != nil || json.Unmarshal(b, &m) != nil || m["samples"] != 2.0 {
		t.Errorf("report file: %v %v", err, m)
	}
	if code, _, errs := runCmd(t, "info", "--rate", "8k", "-o", rep, p); code != exitFailure || !strings.Contains(errs, "--force") {
		t.Errorf("existing output: exit %d %q", code, errs)
	}
	if code, _, errs := runCmd(t, "info", "--rate", "8k", "--force", "-o", rep, p); code != exitOK {
		t.Errorf("--force: exit %d %q", code, errs)
	}
	if b, _ := os.ReadFile(rep); !strings.HasPrefix(string(b), "file ") {
		t.Errorf("text report file: %q", b)
	}
	if code, _, errs := runCmd(t, "info", "--rate", "8k", "--force", "-o", p, p); code != exitUsage || !strings.Contains(errs, "also an input") {
		t.Errorf("output = input: exit %d %q", code, errs)
	}
	meta := filepath.Join(dir, "r.sigmf-meta")
	os.WriteFile(meta, []byte(`{"global":{"core:datatype":"cu8","core:sample_rate":8000}}`), 0o644)
	os.WriteFile(filepath.Join(dir, "r.sigmf-data"), []byte{1, 2}, 0o644)
	if code, _, errs := runCmd(t, "info", "--force", "-o", filepath.Join(dir, "r.sigmf-data"), meta); code != exitUsage || !strings.Contains(errs, "also an input") {
		t.Errorf("output = SigMF partner: exit %d %q", code, errs)
	}
	assertNoTemp(t, dir)
}
