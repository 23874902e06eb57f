package main

import (
	"fmt"
	"math"
	"math/rand/v2"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"ssbkit/iq"
	"ssbkit/modem"
)

func TestRxManyChannels(t *testing.T) {
	// ChanneliserMinChannels channels in one pass go through the
	// channeliser (the planner rule) and keep the unity convention of
	// DESIGN.md (rx): a usb tone of magnitude a at +f gives audio of
	// amplitude a at f, ±0.1 dB (issue 5), each WAV as long as the
	// capture.
	const tolDB = 0.1
	const rate = 240000.0
	const nch = modem.ChanneliserMinChannels
	const spacing = 220e3 / nch
	dir := t.TempDir()
	x := make([]complex64, int(rate))
	var args []string
	for i := range nch {
		off := math.Round(-110e3 + spacing*float64(i))
		y := rxTone(len(x), 0.05, off+600+100*float64(i), rate)
		for k := range x {
			x[k] += y[k]
		}
		args = append(args, "--offset", fmt.Sprintf("%.0f", off))
	}
	in := filepath.Join(dir, "band.cf32")
	writeCapture(t, in, iq.CF32, rate, x)
	code, _, errs := runCmd(t, append([]string{"rx", in, "--rate", "240k", "--agc", "off", "-o", filepath.Join(dir, "ch_{freq}.wav")}, args...)...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(errs, "channeliser") {
		t.Errorf("no channeliser reported for %d channels:\n%s", nch, errs)
	}
	for i := range nch {
		off := math.Round(-110e3 + spacing*float64(i))
		a := readWAVMono(t, filepath.Join(dir, fmt.Sprintf("ch_%+d.wav", int(off))), 48000)
		if len(a) != 48000 {
			t.Errorf("channel %+g: %d audio samples, want 48000", off, len(a))
		}
		got := amplitudeAt(a[4800:4800+38400], 600+100*float64(i), 48000)
		if d := 20 * math.Log10(got/0.05); math.Abs(d) > tolDB {
			t.Errorf("channel %+g: amplitude %.5f, want 0.05 (%.3f dB)", off, got, d)
		}
	}
}

func TestRxAutoBusyBand(t *testing.T) {
	// rx --auto on a busy band (as many voice signals as the planner rule
	// needs for the channeliser, usb and lsb, made by the modulator)
	// decodes every one through the channeliser, each
	// tuned within 200 Hz of its carrier (issue 6).
	const (
		rate   = 240000.0
		tolHz  = 200.0
		centre = 7.1e6
	)
	n := int(rate)
	x := make([]complex64, n)
	r := rand.New(rand.NewPCG(8, 8))
	sd := math.Sqrt(1e-10 * rate / 2)
	for i := range x {
		x[i] = complex(float32(sd*r.NormFloat64()), float32(sd*r.NormFloat64()))
	}
	var truth []float64
	const nsig = modem.ChanneliserMinChannels
	for i := range nsig {
		mode, off := "usb", math.Round(-110e3+220e3/nsig*float64(i))
		if i%2 == 1 {
			mode = "lsb"
		}
		m, err := modem.NewModulator(modem.TxConfig{Mode: mode, AudioRate: 48000, OutRate: rate, Offset: off, BandLow: 300, BandHigh: 2700})
		if err != nil {
			t.Fatal(err)
		}
		y := m.Process(nil, redAudio(n/5, 48000, uint64(10+i)))
		for k := range min(len(x), len(y)) {
			x[k] += 0.1 * y[k]
		}
		truth = append(truth, centre+off)
	}
	in := filepath.Join(t.TempDir(), "busy.cf32")
	writeCapture(t, in, iq.CF32, rate, x)
	code, _, errs := runCmd(t, "rx", in, "--rate", "240k", "--center", "7.1M", "--auto", "--agc", "off", "-o", filepath.Join(filepath.Dir(in), "auto_{freq}.wav"))
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(errs, fmt.Sprintf("%d channels through one channeliser", nsig)) {
		t.Errorf("the channeliser is not reported for %d channels:\n%s", nsig, errs)
	}
	files, _ := filepath.Glob(filepath.Join(filepath.Dir(in), "auto_*.wav"))
	if len(files) != len(truth) {
		t.Fatalf("wrote %d files, want %d:\n%s", len(files), len(truth), errs)
	}
	for _, f := range truth {
		found := false
		for _, p := range files {
			hz, err := strconv.ParseFloat(strings.TrimSuffix(strings.TrimPrefix(filepath.Base(p), "auto_"), ".wav"), 64)
			if err == nil && math.Abs(hz-f) <= tolHz {
				found = true
			}
		}
		if !found {
			t.Errorf("no file tuned within %g Hz of the carrier at %.0f Hz", tolHz, f)
		}
	}
}
