package modem

import (
	"math"
	"math/cmplx"
	"slices"
	"testing"
)

// runFine runs x through a fine tuner in blocks of size and returns the
// output with the delay line drained (len(x) + Delay samples) and the
// tuner.
func runFine(t testing.TB, cfg TuneConfig, x []complex64, size int, analysed []complex64) ([]complex64, *FineTuner) {
	t.Helper()
	ft, err := NewFineTuner(cfg, 0)
	if err != nil {
		t.Fatal(err)
	}
	if analysed != nil {
		// the estimator hears analysed while the line carries x
		k := 0
		ft.analyse = func(dst []TuneEstimate, src []complex64) []TuneEstimate {
			dst = ft.est.Process(dst, analysed[k:k+len(src)])
			k += len(src)
			return dst
		}
	}
	var out, buf []complex64
	for k := 0; k < len(x); k += size {
		buf = ft.Process(buf, x[k:min(len(x), k+size)])
		out = append(out, buf...)
	}
	return append(out, ft.Drain(buf)...), ft
}

// The drift check through the correction: a USB voice whose
// carrier drifts linearly by 25 Hz over 24 s, from 40 Hz above the tuned
// one, is followed within ±10 Hz at every sample from the first estimate
// on; and a tone carried through the same correction (the estimator
// hears the voice, the delay line carries the tone) keeps a continuous
// sample-to-sample phase: no step larger than a chunk's frequency move
// (50 Hz/s for 64 samples) allows, far below a click.
func TestFineTuneDrift(t *testing.T) {
	const (
		tolHz   = 10                                                              // the issue's
		stepTol = 2 * math.Pi * fineSlew * fineChunk / tuneRate / tuneRate * 1.01 // rad: the largest change of the phase step
		toneHz  = 700.0                                                           // the tone's baseband frequency
	)
	for _, mode := range []Mode{USB, LSB} {
		voice, carrier := synthVoice(voiceSpec{Rate: tuneRate, Seconds: 24, Pitch: 130, Mode: mode,
			Carrier: tuneCarrier(mode) + 40, Drift: 25, SNR: 20, Seed: 11})
		tone := complexTone(len(voice), 1, toneHz, tuneRate)
		cfg := TuneConfig{Rate: tuneRate, Carrier: tuneCarrier(mode), Mode: mode}
		y, ft := runFine(t, cfg, tone, 4000, voice)
		d := ft.Delay()
		if len(y) != len(tone)+d {
			t.Fatalf("%d outputs, want %d", len(y), len(tone)+d)
		}
		y = y[d:] // y[n] is the tone at n, corrected
		var prev float64
		worstStep, worstHz := 0.0, 0.0
		for n := 1; n < len(y); n++ {
			step := cmplx.Phase(complex128(y[n]) * cmplx.Conj(complex128(y[n-1])))
			// the correction applied at n: the tone's frequency less the
			// output's
			corr := toneHz - step*tuneRate/(2*math.Pi)
			truth := carrier[n] - tuneCarrier(mode)
			worstHz = math.Max(worstHz, math.Abs(corr-truth))
			if n > 1 {
				worstStep = math.Max(worstStep, math.Abs(step-prev))
			}
			prev = step
		}
		t.Logf("%s: worst %.2f Hz, worst step change %.3g rad (tol %.3g); report %+v", mode, worstHz, worstStep, stepTol, ft.Report())
		if worstHz > tolHz {
			t.Errorf("%s: correction up to %.1f Hz from the drifting carrier", mode, worstHz)
		}
		if worstStep > stepTol {
			t.Errorf("%s: phase step changes by up to %.2g rad between samples, want ≤ %.2g", mode, worstStep, stepTol)
		}
		r := ft.Report()
		if math.Abs(r.Start-40-25*1.5/24) > tolHz || math.Abs(r.End-65) > tolHz || r.Accepted < r.Windows*8/10 {
			t.Errorf("%s: report %+v, want start ≈ +40, end ≈ +65 Hz", mode, r)
		}
	}
}

// Without voice there is no correction: the output is the input, delayed
// (noise and a tone), and the report is empty of corrections.
func TestFineTuneNoVoice(t *testing.T) {
	x := testSignal(10*tuneRate, 8)
	for i := range x {
		s, c := math.Sincos(2 * math.Pi * 500 * float64(i) / tuneRate)
		x[i] = 0.01*x[i] + complex(float32(c), float32(s))
	}
	y, ft := runFine(t, TuneConfig{Rate: tuneRate, Carrier: -1500, Mode: USB}, x, 1000, nil)
	d := ft.Delay()
	if !slices.Equal(y[d:], x) || slices.ContainsFunc(y[:d], func(v complex64) bool { return v != 0 }) {
		t.Error("output is not the input delayed")
	}
	if r := ft.Report(); r.Start != 0 || r.End != 0 || r.Largest != 0 || r.Accepted != 0 || r.Windows == 0 {
		t.Errorf("report %+v", r)
	}
}

// The output does not depend on the block sizes (streaming convention).
func TestFineTuneBlocks(t *testing.T) {
	x, _ := synthVoice(voiceSpec{Rate: tuneRate, Seconds: 9, Pitch: 170, Mode: LSB, Carrier: 1500 - 70, SNR: 20, Seed: 12})
	cfg := TuneConfig{Rate: tuneRate, Carrier: 1500, Mode: LSB}
	want, ft := runFine(t, cfg, x, len(x), nil)
	if r := ft.Report(); math.Abs(r.Start+70) > 5 {
		t.Fatalf("report %+v, want about −70 Hz", r)
	}
	for _, size := range []int{1, 63, 64, 1000, 18432} {
		if got, _ := runFine(t, cfg, x, size, nil); !slices.Equal(got, want) {
			t.Errorf("blocks of %d: output differs", size)
		}
	}
}

func TestFineTuneAllocs(t *testing.T) {
	x, _ := synthVoice(voiceSpec{Rate: tuneRate, Seconds: 6, Pitch: 120, Mode: USB, Carrier: -1450, SNR: 20, Seed: 13})
	ft, err := NewFineTuner(TuneConfig{Rate: tuneRate, Carrier: -1500, Mode: USB}, 0)
	if err != nil {
		t.Fatal(err)
	}
	buf := make([]complex64, 600)
	k := 0
	allocs := testing.AllocsPerRun(50, func() {
		buf = ft.Process(buf, x[k:k+600])
		k = (k + 600) % (len(x) - 600)
	})
	if allocs != 0 {
		t.Errorf("%.1f allocations per call, want 0", allocs)
	}
}

func TestFineTunerErrors(t *testing.T) {
	if _, err := NewFineTuner(TuneConfig{Rate: tuneRate, Carrier: -1500, Mode: AM}, 0); err == nil {
		t.Error("am: no error")
	}
	if _, err := NewFineTuner(TuneConfig{Rate: tuneRate, Carrier: -1500, Mode: USB}, 100); err == nil {
		t.Error("a delay shorter than a window: no error")
	}
}

// runReceiver decodes x with the channels cfgs through Receiver.Run and
// returns each channel's audio and the receiver.
func runReceiver(t testing.TB, cfgs []RxConfig, x []complex64, block int) ([][]float32, *Receiver) {
	t.Helper()
	r, err := NewReceiver(cfgs)
	if err != nil {
		t.Fatal(err)
	}
	r.Block = block
	got := make([][]float32, len(cfgs))
	sinks := make([]func([]float32) error, len(cfgs))
	for i := range sinks {
		sinks[i] = func(a []float32) error { got[i] = append(got[i], a...); return nil }
	}
	if err := r.Run(&sliceReader{x, 1 << 16}, sinks); err != nil {
		t.Fatal(err)
	}
	return got, r
}

// A fine-tuned channel's audio is aligned with the capture and as long
// as it, like any channel's (Receiver.Run: audio sample k is the capture
// at k/AudioRate, round(N·AudioRate/Rate) samples): a USB tone, which
// gives no estimate and so no correction, decodes to the same audio with
// and without fine tuning, from the start to the last sample (the fine
// tuner's delay line emptied by Channel.Flush), and as the unity
// convention wants (a·cos 2πft with phase 0). Tolerance: both chains keep
// ripple and aliases 80 dB (1e-4) down; their plans differ.
func TestReceiverFineTuneAligned(t *testing.T) {
	const (
		rate = 48000
		a    = 0.3
		f    = 1000.0
		tol  = 1e-3 * a
	)
	x := complexTone(7*rate+123, a, 3000+f, rate)
	cfgs := []RxConfig{{Rate: rate, Offset: 3000}, {Rate: rate, Offset: 3000, FineTune: true}}
	for _, block := range []int{5000, 65536} {
		got, r := runReceiver(t, cfgs, x, block)
		ch := r.Channels()[1]
		if ch.FineTuner() == nil || ch.FineTuneDelay() == 0 || ch.Delay() <= r.Channels()[0].Delay() {
			t.Fatalf("no fine tuner in the chain (delay %d)", ch.Delay())
		}
		if len(got[0]) != len(x) || len(got[1]) != len(x) {
			t.Fatalf("block %d: %d and %d samples, want %d", block, len(got[0]), len(got[1]), len(x))
		}
		settle := rate / 50 // the filters' start
		for k := settle; k < len(x)-settle; k++ {
			want := a * math.Cos(2*math.Pi*f*float64(k)/rate)
			if d := math.Abs(float64(got[1][k]) - want); d > tol || math.Abs(float64(got[1][k]-got[0][k])) > tol {
				t.Fatalf("block %d: sample %d: %g with fine tuning, %g without, want %g", block, k, got[1][k], got[0][k], want)
			}
		}
		if rep := ch.FineTuner().Report(); rep.Accepted != 0 || rep.Largest != 0 {
			t.Errorf("a tone was tuned: %+v", rep)
		}
	}
}

// A voice 80 Hz above the tuned carrier (USB) or below it (LSB) is found
// and corrected in the receiver (the report's corrections within ±5 Hz,
// the goal for synthetic voices), also in a channel narrowed to
// 300–1200 Hz (whose work rate is raised for the estimator's band); AM
// ignores FineTune.
func TestReceiverFineTuneVoice(t *testing.T) {
	const rate = 48000
	const tolHz = 5
	for _, tc := range []struct {
		mode Mode
		off  float64 // true carrier minus tuned
	}{{USB, 80}, {LSB, -80}, {LSB, 150}} {
		voice, _ := synthVoice(voiceSpec{Rate: rate, Seconds: 8, Pitch: 150, Mode: tc.mode, Carrier: 5000 + tc.off, SNR: 25, Seed: 21})
		cfgs := []RxConfig{{Rate: rate, Offset: 5000, Mode: tc.mode, FineTune: true}, {Rate: rate, Offset: 5000, Mode: AM, FineTune: true},
			{Rate: rate, Offset: 5000, Mode: tc.mode, High: 1200, FineTune: true}}
		got, r := runReceiver(t, cfgs, voice, 65536)
		for _, i := range []int{0, 2} {
			if len(got[i]) != len(voice) {
				t.Errorf("%d samples, want %d", len(got[i]), len(voice))
			}
			rep := r.Channels()[i].FineTuner().Report()
			if math.Abs(rep.Start-tc.off) > tolHz || math.Abs(rep.End-tc.off) > tolHz || rep.Accepted < rep.Windows*8/10 {
				t.Errorf("%s %+g Hz, %g Hz wide: report %+v", tc.mode, tc.off, r.Channels()[i].Config().High, rep)
			}
		}
		if r.Channels()[1].FineTuner() != nil {
			t.Error("am channel has a fine tuner")
		}
	}
}

// The receive plan is not widened for fine tuning (rx.go): a correction
// beyond 225 Hz moves up to 75 Hz of the voice band (|f| up to 1500 Hz
// from the channel's centre) in from beyond the protected ±1425 Hz. The
// decimators of the default plan at 2.4 MS/s keep what aliases onto
// those frequencies at least 72 dB down (the chain's own responses,
// FreqResponse; the comb normalised to unity gain at 0 Hz), short of
// the 80 dB inside the protected band.
func TestFineTuneAliases(t *testing.T) {
	const minDB = 72
	c, err := NewChannel(RxConfig{Rate: 2.4e6, Offset: 100e3, FineTune: true})
	if err != nil {
		t.Fatal(err)
	}
	p := c.Plan()
	_, half, trans := c.Config().channelShape()
	protect := half + trans/2
	rate := p.InRate
	comb := combTaps(p.First.Decim, p.First.Order)
	stages := [][]float64{comb}
	rates := []float64{rate}
	decims := []int{p.First.Decim}
	r := rate / float64(p.First.Decim)
	for _, d := range p.Stages {
		stages = append(stages, kaiserStageTaps(d, r, protect, 80))
		rates = append(rates, r)
		decims = append(decims, d)
		r /= float64(d)
	}
	for f := protect; f <= protect+75; f += 5 {
		for i, h := range stages {
			out := rates[i] / float64(decims[i])
			g0 := cmplx.Abs(FreqResponse(h, 0, rates[i]))
			for k := 1; k <= decims[i]/2; k++ {
				for _, s := range []float64{-1, 1} {
					a := float64(k)*out + s*f
					if db := 20 * math.Log10(cmplx.Abs(FreqResponse(h, a, rates[i]))/g0); db > -minDB {
						t.Errorf("stage %d: alias from %.0f Hz onto %.0f Hz only %.1f dB down", i, a, f, -db)
					}
				}
			}
		}
	}
}
