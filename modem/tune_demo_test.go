package modem_test

import (
	"math"
	"testing"

	"ssbkit/modem"
	scene "ssbkit/samples"
)

// The goal on the demo band: every SSB station's carrier within
// ±10 Hz of the scenario's truth, the drifting one tracked within ±10 Hz
// over its whole length. The channel is narrowed as rx does (centred on
// the middle of the 300–2700 Hz pass band of the assumed carrier) from a
// carrier 120 Hz low and 60 Hz high, the largest errors of the edge-based
// detection and beyond; every accepted window is compared with the true
// carrier at its middle (samples.Station: a linear drift).
func TestTuneDemoBand(t *testing.T) {
	const tolHz = 10  // the goal
	const minOK = 0.8 // of the windows accepted (common practice for a track)
	band, err := scene.NewBand(scene.DefaultBandConfig())
	if err != nil {
		t.Fatal(err)
	}
	truth := band.Truth()
	x := band.ReadAll()
	for _, st := range truth.Stations {
		if st.Mode != "usb" && st.Mode != "lsb" {
			continue
		}
		for _, mis := range []float64{-120, 60} {
			mode, shift := modem.USB, 1500.0
			if st.Mode == "lsb" {
				mode, shift = modem.LSB, -1500
			}
			assumed := st.OffsetHz + mis
			nw, err := modem.NewNarrower(truth.RateHz, assumed+shift, 6000, 1725, 80)
			if err != nil {
				t.Fatal(err)
			}
			y := nw.Process(nil, x)
			e, err := modem.NewTuneEstimator(modem.TuneConfig{Rate: nw.Rate(), Carrier: -shift, Mode: mode})
			if err != nil {
				t.Fatal(err)
			}
			ests := e.Flush(e.Process(nil, y))
			ok := 0
			var worst float64
			for _, es := range ests {
				if !es.OK {
					continue
				}
				ok++
				// the narrower's output m is the capture at (m − Delay)/rate
				tm := es.Time() - nw.Delay()/nw.Rate()
				want := st.OffsetHz + st.DriftHz*tm/truth.Seconds - assumed
				worst = math.Max(worst, math.Abs(es.OffsetHz-want))
				if d := es.OffsetHz - want; math.Abs(d) > tolHz {
					t.Errorf("%s (carrier %+g Hz off): at %.1f s %+.1f Hz, truth %+.1f Hz", st.Label, mis, tm, es.OffsetHz, want)
				}
			}
			t.Logf("%-32s tuned %+4.0f Hz off: %d of %d windows, largest error %.1f Hz", st.Label, mis, ok, len(ests), worst)
			if float64(ok) < minOK*float64(len(ests)) {
				t.Errorf("%s (carrier %+g Hz off): %d of %d windows accepted", st.Label, mis, ok, len(ests))
			}
		}
	}
}
