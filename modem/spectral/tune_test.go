package spectral

import (
	"math"
	"testing"

	"ssbkit/samples"
)

// demoBand returns the demo scene's capture and truth.
func demoBand(t testing.TB) ([]complex64, samples.BandTruth) {
	t.Helper()
	band, err := samples.NewBand(samples.DefaultBandConfig())
	if err != nil {
		t.Fatal(err)
	}
	return band.ReadAll(), band.Truth()
}

// The check on the demo truth: detection then refinement puts
// every SSB station's carrier within ±10 Hz of the scenario's (the
// drifting station's at mid-capture, where the median of its track
// lies), with the edge-based estimate kept beside it, and every point of
// the tracks within ±10 Hz of the true carrier at its time
// (samples.Station: linear drift). The edge-based estimates are 27–120 Hz
// off on this band.
func TestRefineDemoBand(t *testing.T) {
	const tolHz = 10 // the goal
	x, truth := demoBand(t)
	n := FFTSizeFor(truth.RateHz, 50) // spectrum's default resolution
	acc := NewAccumulatorOptions(n, truth.RateHz, Options{Hop: n / 2})
	acc.Add(x)
	signals := Detect(acc.PSD(), truth.RateHz, DetectOptions{})
	acc.Close()
	r := NewCarrierRefiner(truth.RateHz, signals, 0)
	if !r.Needed() {
		t.Fatal("nothing to refine")
	}
	for k := 0; k < len(x); k += 10000 {
		if r.Write(x[k:min(len(x), k+10000)]) {
			break
		}
	}
	r.Refine(signals)
	ssb := 0
	for _, s := range signals {
		if s.Kind != KindUSB && s.Kind != KindLSB {
			if s.TuningConfidence != 0 || s.Track != nil {
				t.Errorf("%s at %.0f Hz refined", s.Kind, s.OffsetHz)
			}
			continue
		}
		ssb++
		var st samples.Station
		for _, c := range truth.Stations {
			if c.Mode == s.Kind && math.Abs(c.OffsetHz-s.EdgeOffsetHz) < 300 {
				st = c
			}
		}
		if st.Mode == "" {
			t.Fatalf("%s at %.0f Hz: no such station in the truth", s.Kind, s.EdgeOffsetHz)
		}
		mid := st.OffsetHz + st.DriftHz/2
		t.Logf("%-32s edge %+7.1f Hz, refined %+7.1f Hz (confidence %.2f, %d windows)", st.Label, s.EdgeOffsetHz-mid, s.OffsetHz-mid, s.TuningConfidence, len(s.Track))
		if d := s.OffsetHz - mid; math.Abs(d) > tolHz || s.TuningConfidence <= 0 {
			t.Errorf("%s: carrier %+.1f Hz from the truth (confidence %.2f)", st.Label, d, s.TuningConfidence)
		}
		for _, p := range s.Track {
			want := st.OffsetHz + st.DriftHz*p.Time/truth.Seconds
			if d := p.OffsetHz - want; math.Abs(d) > tolHz {
				t.Errorf("%s: track at %.1f s %+.1f Hz from the truth", st.Label, p.Time, d)
			}
		}
	}
	if ssb != 4 {
		t.Errorf("%d SSB signals, the scene has 4", ssb)
	}
}

// Voice-like noise (no pitch harmonics, TestDetectVoiceSignals's
// capture) gives no voice to tune by: the edge estimates stay, with no
// confidence.
func TestRefineKeepsEdgeWithoutVoice(t *testing.T) {
	const rate = 48000
	x := voiceCapture(8*rate, rate, 6000, -9000, 15000)
	n := FFTSizeFor(rate, 50)
	acc := NewAccumulatorOptions(n, rate, Options{Hop: n / 2})
	acc.Add(x)
	signals := Detect(acc.PSD(), rate, DetectOptions{})
	acc.Close()
	r := NewCarrierRefiner(rate, signals, 0)
	r.Write(x)
	r.Refine(signals)
	found := 0
	for _, s := range signals {
		if s.Kind != KindUSB && s.Kind != KindLSB {
			continue
		}
		found++
		if s.OffsetHz != s.EdgeOffsetHz || s.TuningConfidence != 0 || len(s.Track) != 0 {
			t.Errorf("%s: offset %.1f Hz, edge %.1f Hz, confidence %.2f, %d track points", s.Kind, s.OffsetHz, s.EdgeOffsetHz, s.TuningConfidence, len(s.Track))
		}
	}
	if found != 2 {
		t.Errorf("%d SSB signals found, want 2", found)
	}
}
