package main

import (
	"encoding/json"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestSpectrumSignalsAndPicture(t *testing.T) {
	// a carrier at −6 kHz and an AM tone (1 kHz, 50 %) on a carrier at
	// +9 kHz: kinds and frequencies are the ones placed; 50 Hz bins.
	const rate = 48000.0
	dir := t.TempDir()
	in := writeCF32(t, dir, "c.cf32", 1<<17, rate, 1e-5,
		tone{-6000, 0.05},
		tone{9000, 0.2}, tone{8000, 0.05}, tone{10000, 0.05})
	code, out, errs := runCmd(t, "spectrum", in, "--rate", "48k", "--center", "7.1M", "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		Signals []struct {
			OffsetHz float64  `json:"offset_hz"`
			FreqHz   *float64 `json:"freq_hz"`
			LowHz    float64  `json:"low_hz"`
			HighHz   float64  `json:"high_hz"`
			SNRdB    float64  `json:"snr_db"`
			Kind     string   `json:"kind"`
		} `json:"signals"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatalf("%v: %s", err, out)
	}
	want := []struct {
		kind string
		f    float64
	}{{"carrier", -6000}, {"am", 9000}}
	if len(doc.Signals) != len(want) {
		t.Fatalf("signals %+v, want %v", doc.Signals, want)
	}
	for i, w := range want {
		s := doc.Signals[i]
		if s.Kind != w.kind || math.Abs(s.OffsetHz-w.f) > 50 || s.FreqHz == nil || math.Abs(*s.FreqHz-7.1e6-w.f) > 50 {
			t.Errorf("signal %d: %+v, want %s at %g Hz (7.1 MHz + offset)", i, s, w.kind, w.f)
		}
		if !(s.LowHz <= s.OffsetHz && s.OffsetHz <= s.HighHz) {
			t.Errorf("signal %d: carrier %g outside its edges %g…%g", i, s.OffsetHz, s.LowHz, s.HighHz)
		}
	}

	pic := filepath.Join(dir, "s.png")
	code, out, errs = runCmd(t, "spectrum", in, "--rate", "48k", "-o", pic, "--list", "--width", "600", "--height", "450")
	if code != exitOK || !strings.Contains(out, "offset_hz") || !strings.Contains(out, "carrier") {
		t.Fatalf("exit %d, %s, list %q", code, errs, out)
	}
	f, err := os.Open(pic)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	cfg, err := png.DecodeConfig(f)
	if err != nil || cfg.Width < 600 || cfg.Height < 450 {
		t.Errorf("picture: %v, %dx%d", err, cfg.Width, cfg.Height)
	}
}

func TestSpectrumUsage(t *testing.T) {
	dir := t.TempDir()
	in := writeCF32(t, dir, "c.cf32", 4096, 48000, 1e-5, tone{1000, 0.1})
	for _, tc := range []struct {
		args []string
		code int
		msg  string
	}{
		{[]string{in, "--rate", "48k"}, exitUsage, "nothing to do"},
		{[]string{in, "--rate", "48k", "--list", "--json"}, exitUsage, "exclude"},
		{[]string{in, "--rate", "48k", "--list", "--resolution", "1"}, exitFailure, "too few"},
		{[]string{in, "--rate", "48k", "-o", in, "--force"}, exitUsage, "also an input"},
		{[]string{in, "--rate", "48k", "--list", "--threshold", "0"}, exitUsage, "--threshold 0"},
		{[]string{in, "--rate", "48k", "--list", "--threshold", "-3"}, exitUsage, "--threshold -3"},
	} {
		code, _, errs := runCmd(t, append([]string{"spectrum"}, tc.args...)...)
		if code != tc.code || !strings.Contains(errs, tc.msg) {
			t.Errorf("spectrum %v: exit %d, %q; want %d and %q", tc.args, code, errs, tc.code, tc.msg)
		}
	}
}
