package main

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"ssbkit/iq"
)

// toneAt returns the complex amplitude of the tone at f Hz in x (mean of
// x·e^{−j2πfn/rate}).
func toneAt(x []complex64, f, rate float64) complex128 {
	var acc complex128
	for n, v := range x {
		acc += complex128(v) * cmplx.Exp(complex(0, -2*math.Pi*f*float64(n)/rate))
	}
	return acc / complex(float64(len(x)), 0)
}

// TestTxTone checks the command end to end: a 1 kHz tone with --gain 0
// becomes a complex exponential of magnitude 1 at +1 kHz above the carrier
// at --offset (DESIGN.md unity convention), the file holds --seconds of
// samples at --rate, and the SigMF metadata records rate, centre and an
// annotation of the occupied band and the mode.
func TestTxTone(t *testing.T) {
	const tolDB = 0.01 // band filter and resampler ripple
	dir := t.TempDir()
	out := filepath.Join(dir, "t.sigmf-meta")
	code, stdout, stderr := runCmd(t, "tx", "--tone", "1k", "--seconds", "1", "--gain", "0", "--rate", "96k",
		"--offset", "-20k", "--center", "7.1M", "-o", out, "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if !strings.Contains(stderr, "PEP") || !strings.Contains(stderr, "PEP-to-average") {
		t.Errorf("no level report on stderr: %q", stderr)
	}
	var rep map[string]any
	if err := json.Unmarshal([]byte(stdout), &rep); err != nil {
		t.Fatalf("--json: %v: %q", err, stdout)
	}
	x, meta := readCapture(t, out, iq.Options{})
	if meta.Rate != 96000 || !meta.HasCenter || meta.Center != 7.1e6 || len(x) != 96000 {
		t.Fatalf("meta %+v, %d samples", meta, len(x))
	}
	if len(meta.Annotations) != 1 {
		t.Fatalf("annotations %+v", meta.Annotations)
	}
	a := meta.Annotations[0]
	if a.FreqLowerEdge != 7.1e6-20e3+300 || a.FreqUpperEdge != 7.1e6-20e3+2700 || !strings.Contains(a.Label, "USB") {
		t.Errorf("annotation %+v", a)
	}
	seg := x[9600:86400]
	if g := 20 * math.Log10(cmplx.Abs(toneAt(seg, -19000, 96000))); math.Abs(g) > tolDB {
		t.Errorf("tone at −19 kHz: %.3f dB, want 0 (unity)", g)
	}
	if img := 20 * math.Log10(cmplx.Abs(toneAt(seg, -21000, 96000))); img > -60 {
		t.Errorf("image at −21 kHz: %.1f dB, want ≤ −60", img)
	}
	if p := rep["pep_dbfs"].(float64); math.Abs(p) > 0.02 {
		t.Errorf("reported PEP %.3f dBFS, want 0", p)
	}
}

// TestTxPeakAndTwoTone checks peak normalisation (default −1 dBFS) and the
// two-tone PEP-to-average of 3.01 dB (common practice) reported in JSON.
func TestTxPeakAndTwoTone(t *testing.T) {
	const tolDB = 0.05
	dir := t.TempDir()
	out := filepath.Join(dir, "tt.cs16")
	code, stdout, stderr := runCmd(t, "tx", "--two-tone", "700,1900", "--seconds", "2", "-o", out, "--json", "-q")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var rep map[string]float64
	dec := json.NewDecoder(strings.NewReader(stdout))
	var raw map[string]any
	if err := dec.Decode(&raw); err != nil {
		t.Fatal(err)
	}
	rep = map[string]float64{}
	for k, v := range raw {
		if f, ok := v.(float64); ok {
			rep[k] = f
		}
	}
	if math.Abs(rep["pep_dbfs"]+1) > tolDB || math.Abs(rep["pep_to_average_db"]-3.01) > tolDB+0.03 {
		t.Errorf("PEP %.3f dBFS (want −1), PEP-to-average %.3f dB (want 3.01)", rep["pep_dbfs"], rep["pep_to_average_db"])
	}
	x, _ := readCapture(t, out, iq.Options{Rate: 48000})
	var pep float64
	for _, v := range x {
		pep = max(pep, real(complex128(v)*cmplx.Conj(complex128(v))))
	}
	if d := 10*math.Log10(pep) + 1; math.Abs(d) > tolDB {
		t.Errorf("file PEP %.3f dBFS, want −1", 10*math.Log10(pep))
	}
}

// TestTxAudioFile runs a WAV file through tx in every mode: the output
// length follows the audio's duration at the output rate.
func TestTxAudioFile(t *testing.T) {
	dir := t.TempDir()
	wav := filepath.Join(dir, "in.wav")
	if err := os.WriteFile(wav, monoWAV16(22050, 11025, 440), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, mode := range []string{"usb", "lsb", "am", "dsb"} {
		out := filepath.Join(dir, mode+".cf32")
		code, _, stderr := runCmd(t, "tx", wav, "--mode", mode, "--rate", "250k", "--offset", "50k", "-o", out, "-q")
		if code != 0 {
			t.Fatalf("%s: exit %d: %s", mode, code, stderr)
		}
		st, _ := os.Stat(out)
		if st.Size() != 8*125000 {
			t.Errorf("%s: %d bytes, want 0.5 s at 250 kS/s", mode, st.Size())
		}
	}
}

// monoWAV16 builds a 16-bit mono WAV of n samples of a tone (RIFF/WAVE
// canonical layout).
func monoWAV16(rate, n int, f float64) []byte {
	b := []byte("RIFF\x00\x00\x00\x00WAVEfmt \x10\x00\x00\x00\x01\x00\x01\x00")
	le32 := func(v int) []byte { return []byte{byte(v), byte(v >> 8), byte(v >> 16), byte(v >> 24)} }
	b = append(b, le32(rate)...)
	b = append(b, le32(2*rate)...)
	b = append(b, 2, 0, 16, 0)
	b = append(b, "data"...)
	b = append(b, le32(2*n)...)
	for i := range n {
		v := int16(math.Round(10000 * math.Sin(2*math.Pi*f*float64(i)/float64(rate))))
		b = append(b, byte(v), byte(uint16(v)>>8))
	}
	copy(b[4:8], le32(len(b)-8))
	return b
}

// TestTxBadInput checks the one-line errors and exit codes of the issue's
// bad-input list.
func TestTxBadInput(t *testing.T) {
	dir := t.TempDir()
	notWAV := filepath.Join(dir, "notes.wav")
	os.WriteFile(notWAV, []byte("plain text, not audio"), 0o644)
	empty := filepath.Join(dir, "empty.wav")
	os.WriteFile(empty, monoWAV16(8000, 0, 0), 0o644)
	silent := filepath.Join(dir, "silent.wav") // 1 s of zeros: a 0 Hz "tone"
	os.WriteFile(silent, monoWAV16(8000, 8000, 0), 0o644)
	out := filepath.Join(dir, "o.cf32")
	for _, c := range []struct {
		args []string
		code int
		want string
	}{
		{[]string{notWAV}, exitFailure, "not a WAV"},
		{[]string{empty}, exitFailure, "no samples"},
		{[]string{filepath.Join(dir, "missing.wav")}, exitFailure, "missing.wav"},
		{[]string{silent}, exitFailure, silent + ": the audio is silent within the pass band 300:2700 Hz"},
		{[]string{silent, "--band", "off"}, exitFailure, silent + ": the audio is silent"},
		{[]string{"--tone", "3500"}, exitUsage, "outside the pass band"},
		{[]string{"--tone", "30k", "--band", "off", "--rate", "48k"}, exitUsage, "above half"},
		{[]string{"--tone", "1k", "--offset", "23k"}, exitUsage, "Nyquist"},
		{[]string{"--tone", "1k", "--mode", "am", "--depth", "1.5"}, exitUsage, "--depth"},
		{[]string{"--tone", "1k", "--mode", "am", "--depth", "0"}, exitUsage, "--depth"},
		{[]string{"--tone", "1k", "--peak", "-3", "--gain", "0"}, exitUsage, "exclude"},
		{[]string{"--tone", "1k", "--mode", "fm"}, exitUsage, "--mode"},
		{[]string{"--tone", "1k", "--design", "nonesuch"}, exitUsage, "nonesuch"},
		{[]string{"--tone", "1k", "--carrier", "3"}, exitUsage, "--carrier"},
		{[]string{}, exitUsage, "no audio"},
		{[]string{"--tone", "1k", "--two-tone", "700,1900"}, exitUsage, "exclude"},
		{[]string{"--tone", "1k", "--design", "allpass", "--taps", "31"}, exitUsage, "--taps does not apply"},
		{[]string{"--tone", "1k", "--depth", "0.5"}, exitUsage, "--depth applies to --mode am"},
		{[]string{"--tone", "1k", "--taps", "0"}, exitUsage, "positive length"},
		{[]string{silent, "--seconds", "2"}, exitUsage, "--seconds applies to test tones"},
		{[]string{"--tone", "1k", "--taps", "31", "--sections", "3"}, exitUsage, "exclude"},
		{[]string{"--tone", "1k", "--design", "kaiser", "--sections", "3"}, exitUsage, "--sections applies"},
		{[]string{"--tone", "1k", "--method", "weaver", "--sections", "3"}, exitUsage, "--sections applies"},
	} {
		args := append([]string{"tx", "-o", out}, c.args...)
		code, _, stderr := runCmd(t, args...)
		if code != c.code || !strings.Contains(stderr, c.want) || strings.Count(strings.TrimSpace(stderr), "\n") != 0 {
			t.Errorf("%q: exit %d, stderr %q; want exit %d and one line with %q", c.args, code, stderr, c.code, c.want)
		}
		if _, err := os.Stat(out); err == nil {
			t.Errorf("%q: output left behind", c.args)
			os.Remove(out)
		}
	}
}

func TestTxHelp(t *testing.T) {
	code, stdout, _ := runCmd(t, "tx", "--help")
	for _, want := range []string{"licence", "spectral purity", "regulations", "Examples:", "--two-tone", "--carrier"} {
		if code != 0 || !strings.Contains(stdout, want) {
			t.Errorf("tx --help lacks %q (exit %d)", want, code)
		}
	}
}

// TestTxStdout: "-" writes cf32_le to the command's stdout (through the
// write-behind capture output): --seconds at 48 kHz of samples, and with
// --gain 0 the 1 kHz tone is a complex exponential of magnitude 1 at
// +1 kHz (DESIGN.md unity convention).
func TestTxStdout(t *testing.T) {
	const tolDB = 0.01 // band filter and resampler ripple, as in TestTxTone
	code, stdout, stderr := runCmd(t, "tx", "--tone", "1k", "--seconds", "0.5", "--gain", "0", "-q", "-o", "-")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if stderr != "" {
		t.Errorf("stderr with -q: %q", stderr)
	}
	if len(stdout) != 24000*8 {
		t.Fatalf("%d bytes on stdout, want %d (0.5 s at 48 kHz, 8 bytes a sample)", len(stdout), 24000*8)
	}
	s, err := iq.Open("-", iq.Options{Format: iq.CF32, Rate: 48000, Stdin: strings.NewReader(stdout)})
	if err != nil {
		t.Fatal(err)
	}
	x := make([]complex64, 24000)
	n := 0
	for n < len(x) {
		k, err := s.Read(x[n:])
		n += k
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatal(err)
		}
	}
	if n != len(x) {
		t.Fatalf("read %d samples, want %d", n, len(x))
	}
	seg := x[2400:21600]
	if g := 20 * math.Log10(cmplx.Abs(toneAt(seg, 1000, 48000))); math.Abs(g) > tolDB {
		t.Errorf("tone at +1 kHz: %.3f dB, want 0 (unity)", g)
	}
}

// TestTxSectionsPickAllpass: --sections alone selects the all-pass pair
// with that many sections (also without a band, where the default would be
// 12), as the SigMF description records.
func TestTxSectionsPickAllpass(t *testing.T) {
	dir := t.TempDir()
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--sections", "4"}, "splitter allpass 4,"},
		{[]string{"--sections", "8", "--band", "off"}, "splitter allpass 8,"},
	} {
		out := filepath.Join(dir, "s.sigmf-meta")
		args := append([]string{"tx", "--tone", "1k", "--seconds", "0.1", "-q", "--force", "-o", out}, c.args...)
		if code, _, errs := runCmd(t, args...); code != exitOK {
			t.Fatalf("%q: exit %d: %s", c.args, code, errs)
		}
		b, err := os.ReadFile(out)
		if err != nil || !strings.Contains(string(b), c.want) {
			t.Errorf("%q: metadata lacks %q (%v):\n%s", c.args, c.want, err, b)
		}
	}
}

// TestTxOutOfBandWarning: audio that lies outside --band (a 5 kHz tone
// against 300–2700 Hz) would be normalised from the filter's leftovers;
// tx warns on one line, even with -q, naming the file. A tone in the band
// draws no warning.
func TestTxOutOfBandWarning(t *testing.T) {
	dir := t.TempDir()
	for _, c := range []struct {
		f    float64
		warn bool
	}{{5000, true}, {1000, false}} {
		wav := filepath.Join(dir, fmt.Sprintf("t%g.wav", c.f))
		if err := os.WriteFile(wav, monoWAV16(22050, 11025, c.f), 0o644); err != nil {
			t.Fatal(err)
		}
		code, _, stderr := runCmd(t, "tx", wav, "-q", "-o", filepath.Join(dir, "o.cf32"), "--force")
		if code != exitOK {
			t.Fatalf("%g Hz: exit %d: %s", c.f, code, stderr)
		}
		want := "ssbkit: tx: warning: " + wav + ": the audio within the pass band 300:2700 Hz peaks "
		if got := strings.HasPrefix(stderr, want) && strings.Count(stderr, "\n") == 1; got != c.warn {
			t.Errorf("%g Hz: stderr %q, want warning %v", c.f, stderr, c.warn)
		}
	}
}
