package main

import (
	"encoding/json"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"ssbkit/hilbert"
	"ssbkit/iq"
)

func TestTxBits(t *testing.T) {
	// With --bits the file is made by the quantised splitter: the
	// opposite sideband of a tone measured in the file matches the
	// quantised design's predicted suppression at the tone (hilbert's
	// response of the rounded coefficients; for allpass the integer
	// arithmetic too), not the exact design's. The splitter runs at the
	// 8 kHz internal rate over the 300–2700 Hz band.
	const tolDB = 1 // issue 3's --verify bound below 100 dB
	dir := t.TempDir()
	for _, c := range []struct {
		args []string
		spec hilbert.Spec
		tone float64
	}{
		{[]string{"--bits", "10"}, hilbert.Spec{Design: "equiripple", Taps: 63}, 1000},
		{[]string{"--bits", "9", "--sections", "5"}, hilbert.Spec{Design: "allpass", Sections: 5}, 700},
	} {
		out := filepath.Join(dir, "b.cf32")
		os.Remove(out)
		args := append([]string{"tx", "--tone", strconv.FormatFloat(c.tone, 'f', -1, 64), "--seconds", "1", "--gain", "0", "-o", out, "--json"}, c.args...)
		code, stdout, stderr := runCmd(t, args...)
		if code != exitOK {
			t.Fatalf("%q: exit %d %s", args, code, stderr)
		}
		var rep map[string]any
		if err := json.Unmarshal([]byte(stdout), &rep); err != nil {
			t.Fatal(err)
		}
		s := c.spec
		s.Rate, s.Low, s.High = 8000, 300, 2700
		exact, _ := hilbert.New(s)
		s.Bits = int(rep["bits"].(float64))
		q, _ := hilbert.New(s)
		wantQ := hilbert.Analyze(q, 300, 2700).SuppressionMinDB
		if got := rep["quantized_suppression_db"].(float64); math.Abs(got-wantQ) > 0.05 {
			t.Errorf("%q: quantized_suppression_db %g, hilbert %.2f", args, got, wantQ)
		}
		if got := rep["predicted_suppression_db"].(float64); math.Abs(got-hilbert.Analyze(exact, 300, 2700).SuppressionMinDB) > 0.05 {
			t.Errorf("%q: predicted_suppression_db %g", args, got)
		}
		if !strings.Contains(stderr, "-bit coefficients: predicted suppression") {
			t.Errorf("stderr %q", stderr)
		}
		x, _ := readCapture(t, out, iq.Options{Format: "cf32_le", Rate: 48000})
		seg := x[4800:43200]
		meas := 20 * math.Log10(cmplx.Abs(toneAt(seg, c.tone, 48000))/cmplx.Abs(toneAt(seg, -c.tone, 48000)))
		wantAt := hilbert.SuppressionAt(q, c.tone)
		exactAt := hilbert.SuppressionAt(exact, c.tone)
		t.Logf("%q: measured %.2f, quantised %.2f, exact %.2f", c.args, meas, wantAt, exactAt)
		if math.Abs(meas-wantAt) > tolDB || math.Abs(meas-exactAt) < 3 {
			t.Errorf("%q: measured %.2f dB at %g Hz, quantised design %.2f dB, exact %.2f dB", args, meas, c.tone, wantAt, exactAt)
		}
	}
}

func TestTxBitsBadInput(t *testing.T) {
	out := filepath.Join(t.TempDir(), "o.cf32")
	checkUsageErrors(t, "tx", []string{"--tone", "1k", "-o", out}, []usageCase{
		{[]string{"--bits", "1"}, "--bits 1: want 2 to 32"},
		{[]string{"--bits", "40"}, "--bits 40"},
		{[]string{"--bits", "16", "--mode", "am"}, "--bits applies to usb and lsb"},
	})
}
