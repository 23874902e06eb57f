package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"ssbkit/samples"
)

// writeBand writes the demo scene, cut to seconds, as a raw cf32 file at
// 48 kHz and returns its path and truth.
func writeBand(t *testing.T, dir string, seconds float64) (string, samples.BandTruth) {
	t.Helper()
	cfg := samples.DefaultBandConfig()
	cfg.Seconds = seconds
	band, err := samples.NewBand(cfg)
	if err != nil {
		t.Fatal(err)
	}
	return writeRawCF32(t, filepath.Join(dir, "band.cf32"), band.ReadAll()), band.Truth()
}

type tunedSignal struct {
	OffsetHz   float64  `json:"offset_hz"`
	Kind       string   `json:"kind"`
	EdgeHz     *float64 `json:"edge_offset_hz"`
	Confidence *float64 `json:"tuning_confidence"`
}

func spectrumSignals(t *testing.T, out string) []tunedSignal {
	t.Helper()
	var doc struct {
		Signals []tunedSignal `json:"signals"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatalf("%v: %s", err, out)
	}
	return doc.Signals
}

// spectrum --json: offset_hz of an SSB signal is the carrier found from
// the voice, within ±10 Hz of the scene's (issue 12's goal), with
// tuning_confidence and the edge-based estimate beside it; other kinds
// have neither key. From standard input (one pass only) the edge
// estimate stays, with a warning and no confidence.
func TestSpectrumTunesSSB(t *testing.T) {
	const tolHz = 10
	dir := t.TempDir()
	in, truth := writeBand(t, dir, 8)
	code, out, errs := runCmd(t, "spectrum", in, "--rate", "48k", "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	ssb := 0
	for _, s := range spectrumSignals(t, out) {
		if s.Kind != "usb" && s.Kind != "lsb" {
			if s.EdgeHz != nil || s.Confidence != nil {
				t.Errorf("%s at %.0f Hz has tuning keys", s.Kind, s.OffsetHz)
			}
			continue
		}
		if s.EdgeHz == nil || s.Confidence == nil {
			t.Fatalf("%s at %.0f Hz: no edge_offset_hz or tuning_confidence", s.Kind, s.OffsetHz)
		}
		for _, st := range truth.Stations {
			// the carrier at the middle of the 8 s (samples.Station: linear
			// drift over the scene's 8 s)
			mid := st.OffsetHz + st.DriftHz/2
			if st.Mode != s.Kind || math.Abs(mid-*s.EdgeHz) > 300 {
				continue
			}
			ssb++
			if d := s.OffsetHz - mid; math.Abs(d) > tolHz || *s.Confidence <= 0 {
				t.Errorf("%s: carrier %+.1f Hz from the truth (edge %+.1f Hz), confidence %.2f", st.Label, d, *s.EdgeHz-mid, *s.Confidence)
			}
		}
	}
	if ssb != 4 {
		t.Errorf("%d SSB stations matched, want 4", ssb)
	}

	data, err := os.ReadFile(in)
	if err != nil {
		t.Fatal(err)
	}
	var o, e bytes.Buffer
	code = run([]string{"spectrum", "-", "--format", "cf32", "--rate", "48k", "--json"}, &env{stdin: bytes.NewReader(data), stdout: &o, stderr: &e})
	if code != exitOK || !strings.Contains(e.String(), "warning: standard input cannot be read twice") {
		t.Fatalf("stdin: exit %d, %q", code, e.String())
	}
	for _, s := range spectrumSignals(t, o.String()) {
		if (s.Kind == "usb" || s.Kind == "lsb") && (s.EdgeHz == nil || *s.EdgeHz != s.OffsetHz || *s.Confidence != 0) {
			t.Errorf("stdin: %s at %.1f Hz tuned (edge %v, confidence %v)", s.Kind, s.OffsetHz, s.EdgeHz, s.Confidence)
		}
	}
}

type rxDoc struct {
	Channels []struct {
		Output   string  `json:"output"`
		Mode     string  `json:"mode"`
		OffsetHz float64 `json:"offset_hz"`
		Samples  int64   `json:"audio_samples"`
		FineTune *struct {
			StartHz   float64 `json:"start_hz"`
			EndHz     float64 `json:"end_hz"`
			LargestHz float64 `json:"largest_hz"`
			Windows   int     `json:"windows"`
			Accepted  int     `json:"accepted"`
		} `json:"fine_tune"`
	} `json:"channels"`
}

func rxJSON(t *testing.T, out string) rxDoc {
	t.Helper()
	var doc rxDoc
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatalf("%v: %s", err, out)
	}
	return doc
}

// rx --fine-tune on the demo scene: the drifting LSB station and the
// high USB voice, tuned where the spectrum's edges put them (61 and
// 120 Hz off), get corrections that bring them within ±10 Hz of the
// true carrier at the start and at the end (issue 12's goal; the
// drifting one moves 25 Hz over the capture, samples.Station), reported
// in the summary and in --json; the audio is as long as without fine
// tuning. The AM station with --fine-tune keeps its carrier with a
// warning; the steady carrier tuned as usb has no voice: a warning, its
// carrier kept, and audio that is not silence.
func TestRxFineTune(t *testing.T) {
	const tolHz = 10
	dir := t.TempDir()
	const seconds = 8
	in, truth := writeBand(t, dir, seconds)
	station := func(label string) (start, end float64) {
		for _, st := range truth.Stations {
			if strings.HasPrefix(st.Label, label) {
				return st.OffsetHz, st.OffsetHz + st.DriftHz
			}
		}
		t.Fatalf("no station %q", label)
		return 0, 0
	}
	out := filepath.Join(dir, "ch_{freq}.wav")
	args := []string{"rx", in, "--rate", "48k", "--offset=-9427:lsb", "--offset", "4880:usb", "--offset=-3000:am", "--offset", "9000:usb", "-o", out}
	code, stdout, stderr := runCmd(t, append(args, "--fine-tune", "--json")...)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, want := range []string{
		"warning: --fine-tune: the am channel at -3000 Hz keeps its carrier",
		"ch_+9000.wav: --fine-tune found no voice to tune by",
		"carrier corrected by",
	} {
		if !strings.Contains(stderr, want) {
			t.Errorf("stderr lacks %q:\n%s", want, stderr)
		}
	}
	doc := rxJSON(t, stdout)
	if len(doc.Channels) != 4 {
		t.Fatalf("%d channels in the JSON", len(doc.Channels))
	}
	for i, label := range []string{"portable", "high voice"} {
		c := doc.Channels[i]
		s, e := station(label)
		if c.FineTune == nil {
			t.Fatalf("%s: no fine_tune", label)
		}
		// corrections at the first and last windows' middles: the truth
		// there (1.5 s in, 1.5 s from the end) within the tolerance
		s0 := s + (e-s)*1.5/seconds - c.OffsetHz
		e0 := s + (e-s)*(seconds-1.5)/seconds - c.OffsetHz
		if math.Abs(c.FineTune.StartHz-s0) > tolHz || math.Abs(c.FineTune.EndHz-e0) > tolHz || c.FineTune.Accepted == 0 {
			t.Errorf("%s: %+v, want start %+.1f Hz, end %+.1f Hz", label, *c.FineTune, s0, e0)
		}
		if c.Samples != seconds*48000 {
			t.Errorf("%s: %d audio samples, want %d", label, c.Samples, seconds*48000)
		}
	}
	if doc.Channels[2].FineTune != nil {
		t.Error("am channel fine tuned")
	}
	if ft := doc.Channels[3].FineTune; ft == nil || ft.Accepted != 0 || ft.LargestHz != 0 {
		t.Errorf("steady carrier: %+v", ft)
	}
	// the steady carrier's audio is not silence: a 0 Hz line as usb
	// gives nothing but the noise around it; it must still carry the band
	// noise (about −105 dBFS/Hz over 2.4 kHz: above −80 dBFS)
	a := readWAVMono(t, filepath.Join(dir, "ch_+9000.wav"), 48000)
	var p float64
	for _, v := range a {
		p += v * v
	}
	if rms := math.Sqrt(p / float64(len(a))); !(rms > 1e-4) {
		t.Errorf("steady carrier: audio RMS %.3g", rms)
	}
	// the same channels without fine tuning: the same lengths, no keys
	code, stdout, stderr = runCmd(t, append(args, "--json", "--force")...)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, c := range rxJSON(t, stdout).Channels {
		if c.FineTune != nil || c.Samples != seconds*48000 {
			t.Errorf("%s without --fine-tune: %d samples, fine_tune %v", c.Output, c.Samples, c.FineTune)
		}
	}
}

// --auto fine tunes by default; --fine-tune=false turns it off. Either
// way it tunes each SSB channel at the carrier found from the voice (as
// spectrum --list does, from the first autoRefineSeconds): within ±10 Hz
// of the scene's carrier at the middle of that look (issue 12's goal),
// not up to 120 Hz off as the spectrum's edges place it.
func TestRxAutoFineTune(t *testing.T) {
	const (
		seconds = 6
		tolHz   = 10
	)
	dir := t.TempDir()
	in, truth := writeBand(t, dir, seconds)
	out := filepath.Join(dir, "a_{freq}.wav")
	for _, tc := range []struct {
		extra []string
		tuned bool
	}{{nil, true}, {[]string{"--fine-tune=false"}, false}} {
		code, stdout, stderr := runCmd(t, append([]string{"rx", in, "--rate", "48k", "--auto", "--json", "-q", "--force", "-o", out}, tc.extra...)...)
		if code != exitOK {
			t.Fatalf("%v: exit %d: %s", tc.extra, code, stderr)
		}
		ssb := 0
		for _, c := range rxJSON(t, stdout).Channels {
			if c.Mode != "usb" && c.Mode != "lsb" {
				continue
			}
			ssb++
			if (c.FineTune != nil) != tc.tuned || (tc.tuned && c.FineTune.Accepted == 0) {
				t.Errorf("%v: %s at %.0f Hz: fine_tune %+v", tc.extra, c.Mode, c.OffsetHz, c.FineTune)
			}
			best := math.Inf(1)
			for _, st := range truth.Stations {
				if st.Mode == c.Mode {
					// samples.Station: linear drift over the scene's length
					mid := st.OffsetHz + st.DriftHz*min(seconds, autoRefineSeconds)/2/seconds
					best = math.Min(best, math.Abs(c.OffsetHz-mid))
				}
			}
			if best > tolHz {
				t.Errorf("%v: %s tuned at %.0f Hz, %.1f Hz from the nearest true carrier", tc.extra, c.Mode, c.OffsetHz, best)
			}
		}
		if ssb != 4 {
			t.Errorf("%v: %d SSB channels, want 4", tc.extra, ssb)
		}
	}
}
