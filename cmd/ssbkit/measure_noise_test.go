package main

import (
	"encoding/binary"
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestMeasureNoiseOnly: a capture with no transmission (a receiver with
// its input terminated: circular Gaussian noise through a Q path of gain
// g and phase error φ) still gives its I/Q balance, with the sideband
// figures absent (JSON null, sideband "none", a note) and a warning on
// stderr; exit 0. The expected image rejection is
// (1 + 2g·cos φ + g²)/(1 − 2g·cos φ + g²) (Razavi, RF Microelectronics,
// 2nd ed., sec. 4.2.4), the gain 20·log10 g, the phase φ. A --plot has
// nothing to draw and is refused, leaving no file.
func TestMeasureNoiseOnly(t *testing.T) {
	const (
		g      = 0.97
		phiDeg = -1.5
		n      = 1 << 18
		// the blind estimate's spread over n noise samples: |ν/μ| is
		// known to about 1/√n (from memory), 0.002 against the 0.026
		// here, about 0.7 dB of image rejection
		tolIRR   = 1.0  // dB
		tolGain  = 0.03 // dB
		tolPhase = 0.2  // degrees
	)
	phi := phiDeg * math.Pi / 180
	wantIRR := 10 * math.Log10((1+2*g*math.Cos(phi)+g*g)/(1-2*g*math.Cos(phi)+g*g))
	dir := t.TempDir()
	r := rand.New(rand.NewPCG(13, 1))
	b := make([]byte, 0, 8*n)
	for range n {
		re, im := 0.01*r.NormFloat64(), 0.01*r.NormFloat64()
		q := g * (im*math.Cos(phi) - re*math.Sin(phi))
		b = binary.LittleEndian.AppendUint32(b, math.Float32bits(float32(re)))
		b = binary.LittleEndian.AppendUint32(b, math.Float32bits(float32(q)))
	}
	in := filepath.Join(dir, "terminated.cf32")
	if err := os.WriteFile(in, b, 0o644); err != nil {
		t.Fatal(err)
	}

	code, out, errs := runCmd(t, "measure", in, "--rate", "48k", "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.HasPrefix(errs, "ssbkit: measure: warning: "+in+": no signal") || strings.Count(errs, "\n") != 1 {
		t.Errorf("stderr %q, want one warning naming the file and the missing signal", errs)
	}
	var j map[string]any
	if err := json.Unmarshal([]byte(out), &j); err != nil {
		t.Fatalf("%v in %s", err, out)
	}
	for _, k := range []string{"wanted_dbfs", "unwanted_dbfs", "suppression_db", "pep_dbfs", "carrier_dbc", "occupied_bandwidth_hz"} {
		if v, ok := j[k]; !ok || v != nil {
			t.Errorf("%s = %v (present %v), want null", k, v, ok)
		}
	}
	if j["sideband"] != "none" || j["note"] == nil || j["rate_hz"] != 48000.0 {
		t.Errorf("sideband %v, note %v, rate_hz %v; want none, a note, 48000", j["sideband"], j["note"], j["rate_hz"])
	}
	irr, _ := j["image_rejection_db"].(float64)
	gain, _ := j["iq_gain_imbalance_db"].(float64)
	ph, _ := j["iq_phase_imbalance_deg"].(float64)
	if math.Abs(irr-wantIRR) > tolIRR || math.Abs(gain-20*math.Log10(g)) > tolGain || math.Abs(ph-phiDeg) > tolPhase {
		t.Errorf("image rejection %.2f dB, gain %.3f dB, phase %.3f°; want %.2f, %.3f, %.1f",
			irr, gain, ph, wantIRR, 20*math.Log10(g), phiDeg)
	}
	t.Logf("noise only: IRR %.2f dB (want %.2f), gain %.3f dB, phase %.3f°", irr, wantIRR, gain, ph)

	code, out, _ = runCmd(t, "measure", in, "--rate", "48k")
	if code != exitOK || !strings.Contains(out, "no transmission above the noise") || !strings.Contains(out, "image rejection") {
		t.Errorf("text report: exit %d\n%s", code, out)
	}

	png := filepath.Join(dir, "m.png")
	code, _, errs = runCmd(t, "measure", in, "--rate", "48k", "--plot", png)
	if code != exitFailure || !strings.Contains(errs, "nothing to plot") || strings.Count(errs, "\n") != 1 {
		t.Errorf("--plot: exit %d, %q; want 1 and one line saying there is nothing to plot", code, errs)
	}
	if _, err := os.Stat(png); err == nil {
		t.Error("--plot of nothing wrote a file")
	}
	assertNoTemp(t, dir)
}
