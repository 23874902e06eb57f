package modem

import (
	"io"
	"math"
	"math/cmplx"
	"testing"

	"gonum.org/v1/gonum/dsp/fourier"
	"gonum.org/v1/gonum/dsp/window"

	"ssbkit/hilbert"
)

// modulateAll runs src through a new modulator for cfg in blocks of bs
// samples, with Flush, and returns the I/Q aligned to the audio (the
// first round(Delay) samples dropped) and the modulator.
func modulateAll(t testing.TB, cfg TxConfig, src []float32, bs int) ([]complex64, *Modulator) {
	t.Helper()
	m, err := NewModulator(cfg)
	if err != nil {
		t.Fatal(err)
	}
	d := int(math.Round(m.Delay()))
	m.SetCarrierPhase(-2 * math.Pi * math.Mod(cfg.Offset*float64(d)/cfg.OutRate, 1))
	var y []complex64
	for off := 0; off < len(src); off += bs {
		y = append(y, m.Process(nil, src[off:min(off+bs, len(src))])...)
	}
	y = append(y, m.Flush(nil)...)
	return y[d:], m
}

// tones returns n samples of Σ amp·cos(2πfᵢn/rate), computed in float64.
func tones(freqs []float64, amp, rate float64, n int) []float32 {
	x := make([]float32, n)
	for i := range x {
		var s float64
		for _, f := range freqs {
			s += amp * math.Cos(2*math.Pi*f*float64(i)/rate)
		}
		x[i] = float32(s)
	}
	return x
}

// spectrumDB returns the Blackman–Harris windowed power spectrum of the
// first 2^k samples of y in dB relative to its largest bin, and the bin
// width; bin i is at frequency (i − n/2)·width.
func spectrumDB(y []complex64, rate float64) ([]float64, float64) {
	n := 1
	for n*2 <= len(y) {
		n *= 2
	}
	seq := make([]complex128, n)
	for i := range seq {
		seq[i] = complex128(y[i])
	}
	window.BlackmanHarrisComplex(seq)
	c := fourier.NewCmplxFFT(n).Coefficients(nil, seq)
	p := make([]float64, n)
	var top float64
	for i := range c {
		v := real(c[i])*real(c[i]) + imag(c[i])*imag(c[i])
		p[(i+n/2)%n] = v
		top = math.Max(top, v)
	}
	for i := range p {
		p[i] = 10 * math.Log10(p[i]/top+1e-30)
	}
	return p, rate / float64(n)
}

// TestTxToneLands checks the first requirement: with the defaults
// a 1 kHz tone in USB lands at +1 kHz and in LSB at −1 kHz with magnitude
// equal to the audio amplitude (DESIGN.md unity convention), and the image
// and every other spur are at least 60 dB down (issue 4). The frequency is
// exact: the phase of y·e^{−j2πfn/fs} does not move over a second.
func TestTxToneLands(t *testing.T) {
	const (
		minSpurDB  = 60   // issue 4 requirement
		tolAmpDB   = 0.01 // band-filter ripple at 70 dB plus resampler ripple
		tolFreqHz  = 1e-5 // phase slope over 1 s, float32 phase noise
		guardBins  = 6    // Blackman–Harris main lobe half-width is 4 bins
		rate, fout = 48000., 48000.
	)
	for _, c := range []struct {
		mode string
		want float64
		out  float64
		off  float64
	}{
		{"usb", 1000, 48000, 0},
		{"lsb", -1000, 48000, 0},
		{"usb", 1000 + 12000, 96000, 12000},
		{"lsb", -1000 - 5000, 2.4e6 / 25, -5000},
	} {
		x := tones([]float64{1000}, 0.5, rate, int(1.5*rate))
		y, _ := modulateAll(t, TxConfig{Mode: c.mode, AudioRate: rate, OutRate: c.out, BandLow: 300, BandHigh: 2700, Offset: c.off}, x, 4096)
		seg := y[int(0.2*c.out):int(1.2*c.out)]
		// amplitude and frequency by correlation
		var a0, a1 complex128
		half := len(seg) / 2
		for i, v := range seg {
			e := complex128(v) * cmplx.Exp(complex(0, -2*math.Pi*c.want*float64(i)/c.out))
			if i < half {
				a0 += e
			} else {
				a1 += e
			}
		}
		amp := cmplx.Abs(a0+a1) / float64(len(seg))
		if d := 20 * math.Log10(amp/0.5); math.Abs(d) > tolAmpDB {
			t.Errorf("%s: tone at %g Hz has amplitude %.5f, want 0.5 (%.3f dB)", c.mode, c.want, amp, d)
		}
		df := (cmplx.Phase(a1) - cmplx.Phase(a0)) / (2 * math.Pi * float64(half) / c.out)
		if math.Abs(df) > tolFreqHz {
			t.Errorf("%s: frequency error %.3g Hz", c.mode, df)
		}
		p, w := spectrumDB(seg, c.out)
		n := len(p)
		peak := 0
		for i := range p {
			if p[i] > p[peak] {
				peak = i
			}
		}
		if f := float64(peak-n/2) * w; math.Abs(f-c.want) > w {
			t.Errorf("%s: strongest bin at %g Hz, want %g", c.mode, f, c.want)
		}
		worst, worstF := -400.0, 0.0
		for i := range p {
			if abs(i-peak) > guardBins && p[i] > worst {
				worst, worstF = p[i], float64(i-n/2)*w
			}
		}
		t.Logf("%s offset %g at %g S/s: strongest spur %.1f dB at %.0f Hz", c.mode, c.off, c.out, worst, worstF)
		if worst > -minSpurDB {
			t.Errorf("%s: spur %.1f dB at %g Hz, want ≤ −%d dB", c.mode, worst, worstF, minSpurDB)
		}
	}
}

func abs(i int) int {
	if i < 0 {
		return -i
	}
	return i
}

// TestTxTwoTone checks the two-tone figures: each tone's power is 6.02 dB
// below PEP and the average power 3.01 dB below PEP (common practice for
// the two-tone test: two equal tones of amplitude a give a PEP of (2a)²,
// tone powers a², mean power 2a²).
func TestTxTwoTone(t *testing.T) {
	const tolDB = 0.02 // band-filter ripple and the sampled PEP
	x := tones([]float64{700, 1900}, 0.25, 48000, 48000*2)
	for _, mode := range []string{"usb", "lsb"} {
		y, _ := modulateAll(t, TxConfig{Mode: mode, AudioRate: 48000, OutRate: 48000, BandLow: 300, BandHigh: 2700}, x, 1000)
		seg := y[9600:86400]
		var pep, mean float64
		for _, v := range seg {
			p := float64(real(v))*float64(real(v)) + float64(imag(v))*float64(imag(v))
			pep = math.Max(pep, p)
			mean += p
		}
		mean /= float64(len(seg))
		sign := 1.0
		if mode == "lsb" {
			sign = -1
		}
		for _, f := range []float64{700, 1900} {
			a := toneLevel(seg, sign*f, 48000)
			if d := 10*math.Log10(a*a/pep) + 6.02; math.Abs(d) > tolDB {
				t.Errorf("%s: tone %g Hz at %.3f dB re PEP, want −6.02", mode, f, 10*math.Log10(a*a/pep))
			}
		}
		if d := 10*math.Log10(mean/pep) + 3.01; math.Abs(d) > tolDB {
			t.Errorf("%s: average %.3f dB re PEP, want −3.01", mode, 10*math.Log10(mean/pep))
		}
	}
}

// TestTxAM checks the AM spectrum: with depth m each sideband is
// 20·log10(m/2) dB relative to the carrier (A_c(1 + m·cos ωt) =
// A_c·cos + (m·A_c/2) at ±ω; Haykin, Communication Systems, 4th ed.,
// sec. 2.2, from memory): −12.04 dB at m = 0.5. DSB has no carrier.
func TestTxAM(t *testing.T) {
	const tolDB = 0.02
	x := tones([]float64{1000}, 0.8, 48000, 48000)
	for _, m := range []float64{0.5, 0.8, 1} {
		y, mod := modulateAll(t, TxConfig{Mode: "am", Depth: m, AudioRate: 48000, OutRate: 48000, BandLow: 300, BandHigh: 2700, Levels: AudioLevels{Peak: 0.8, Max: 0.8, Min: -0.8, EnvelopePeak: 0.8}}, x, 777)
		seg := y[4800:43200]
		c := toneLevel(seg, 0, 48000)
		want := 20 * math.Log10(m/2)
		for _, f := range []float64{1000, -1000} {
			if d := 20*math.Log10(toneLevel(seg, f, 48000)/c) - want; math.Abs(d) > tolDB {
				t.Errorf("m=%g: sideband %g Hz at %.3f dBc, want %.2f", m, f, want+d, want)
			}
		}
		if math.Abs(c-mod.CarrierAmplitude()) > 1e-4 {
			t.Errorf("m=%g: carrier %g, CarrierAmplitude %g", m, c, mod.CarrierAmplitude())
		}
	}
	y, _ := modulateAll(t, TxConfig{Mode: "dsb", AudioRate: 48000, OutRate: 48000, BandLow: 300, BandHigh: 2700}, x, 777)
	seg := y[4800:43200]
	// x = g·a has no carrier term at all (package doc): what is measured
	// at 0 Hz is float32 rounding and the correlation's leakage, far
	// below this bound (chosen, no published figure).
	const maxDSBCarrierDB = -100
	if c := 20 * math.Log10(toneLevel(seg, 0, 48000)/toneLevel(seg, 1000, 48000)); c > maxDSBCarrierDB {
		t.Errorf("dsb: carrier at %.1f dB re sideband, want suppressed", c)
	}
}

// TestTxCarrier checks a reduced carrier (R3E) at −20 dB relative to PEP
// for a tone: carrier amplitude k·(a + c) with k = 10^(−20/20)
// (definition of dBc re PEP, DESIGN.md).
func TestTxCarrier(t *testing.T) {
	const tolDB = 0.05
	x := tones([]float64{1000}, 0.5, 48000, 48000)
	cfg := TxConfig{AudioRate: 48000, OutRate: 48000, BandLow: 300, BandHigh: 2700, Carrier: true, CarrierDB: -20, Levels: AudioLevels{Peak: 0.5, Max: 0.5, Min: -0.5, EnvelopePeak: 0.5}}
	y, _ := modulateAll(t, cfg, x, 1024)
	seg := y[4800:43200]
	var pep float64
	for _, v := range seg {
		pep = math.Max(pep, float64(real(v))*float64(real(v))+float64(imag(v))*float64(imag(v)))
	}
	c := toneLevel(seg, 0, 48000)
	if d := 10*math.Log10(c*c/pep) + 20; math.Abs(d) > tolDB {
		t.Errorf("carrier %.3f dB re PEP, want −20", 10*math.Log10(c*c/pep))
	}
}

// TestTxSuppressionMatchesSplitter checks, for every design, that the
// opposite sideband measured in the generated I/Q equals the hilbert
// prediction 20·log10(|H(f)|/|H(−f)|) within 1 dB where it is below
// 100 dB (issue 4; the definition in DESIGN.md).
func TestTxSuppressionMatchesSplitter(t *testing.T) {
	const tolDB = 1
	for _, c := range []struct {
		method string
		spec   hilbert.Spec
	}{
		{"phasing", hilbert.Spec{Design: "rect", Taps: 31}},
		{"phasing", hilbert.Spec{Design: "hamming", Taps: 31}},
		{"phasing", hilbert.Spec{Design: "blackman", Taps: 63}},
		{"phasing", hilbert.Spec{Design: "kaiser", Taps: 31}},
		{"phasing", hilbert.Spec{Design: "equiripple", Taps: 31}},
		{"phasing", hilbert.Spec{Design: "allpass", Sections: 3}},
		{"phasing", hilbert.Spec{Design: "fft", Taps: 64}},
		{"weaver", hilbert.Spec{Taps: 31}},
	} {
		for _, f := range []float64{400, 1500, 2600} {
			cfg := TxConfig{Method: c.method, Splitter: c.spec, AudioRate: 8000, OutRate: 48000, BandLow: 300, BandHigh: 2700}
			x := tones([]float64{f}, 0.5, 8000, 16000)
			y, m := modulateAll(t, cfg, x, 500)
			seg := y[24000:88000]
			got := 20 * math.Log10(toneLevel(seg, f, 48000)/toneLevel(seg, -f, 48000))
			sp := m.Splitter()
			want := 20 * math.Log10(cmplx.Abs(sp.Response(f))/cmplx.Abs(sp.Response(-f)))
			if want > 100 {
				continue
			}
			t.Logf("%s %s at %g Hz: measured %.2f dB, predicted %.2f dB", c.method, sp.Spec().Design, f, got, want)
			if math.Abs(got-want) > tolDB {
				t.Errorf("%s %s: at %g Hz measured %.2f dB, predicted %.2f dB", c.method, sp.Spec().Design, f, got, want)
			}
		}
	}
}

// TestTxDefaultSuppression checks the default design's predicted
// suppression over 300…2700 Hz (issue 4: ≥ 60 dB out of the box).
func TestTxDefaultSuppression(t *testing.T) {
	m, err := NewModulator(TxConfig{AudioRate: 48000, OutRate: 2.4e6, BandLow: 300, BandHigh: 2700})
	if err != nil {
		t.Fatal(err)
	}
	a := hilbert.Analyze(m.Splitter(), 300, 2700)
	if a.SuppressionMinDB < 60 {
		t.Errorf("default suppression %.1f dB", a.SuppressionMinDB)
	}
	// and measured in the generated I/Q at the band edges and centre
	// (tones 20 Hz inside the edges, where the band filter passes them
	// whole): the opposite-sideband line at −f at least 60 dB under the
	// tone at +f (issue 4: ≥ 60 dB over the pass band by default).
	const minDB = 60
	for _, f := range []float64{320, 1500, 2680} {
		x := tones([]float64{f}, 0.5, 48000, 48000)
		y, _ := modulateAll(t, TxConfig{AudioRate: 48000, OutRate: 48000, BandLow: 300, BandHigh: 2700}, x, 4096)
		seg := y[9600:38400]
		got := 20 * math.Log10(toneLevel(seg, f, 48000)/toneLevel(seg, -f, 48000))
		t.Logf("default usb, tone %g Hz: measured suppression %.1f dB", f, got)
		if got < minDB {
			t.Errorf("default usb, tone %g Hz: opposite sideband %.1f dB down, want ≥ %d", f, got, minDB)
		}
	}
}

// TestTxDefaultSuppressionOtherBands: with the length left to the default,
// a wider band still gets ≥ 60 dB (the design contract's default quality,
// ../shared/DESIGN.md tx), predicted and measured with a tone 20 Hz inside
// the low edge, where a short splitter is weakest.
func TestTxDefaultSuppressionOtherBands(t *testing.T) {
	const minDB = 60
	for _, tc := range []struct {
		method    string
		low, high float64
	}{
		{"phasing", 200, 3000},
		{"weaver", 200, 3000},
		{"phasing", 100, 3000},
	} {
		cfg := TxConfig{Method: tc.method, AudioRate: 48000, OutRate: 48000, BandLow: tc.low, BandHigh: tc.high}
		m, err := NewModulator(cfg)
		if err != nil {
			t.Fatal(err)
		}
		a := hilbert.Analyze(m.Splitter(), tc.low, tc.high)
		if a.SuppressionMinDB < DefaultSuppressionDB {
			t.Errorf("%s %g:%g: predicted %.1f dB, want ≥ %d", tc.method, tc.low, tc.high, a.SuppressionMinDB, DefaultSuppressionDB)
		}
		f := tc.low + 20
		x := tones([]float64{f}, 0.5, 48000, 48000)
		y, _ := modulateAll(t, cfg, x, 4096)
		seg := y[9600:38400]
		got := 20 * math.Log10(toneLevel(seg, f, 48000)/toneLevel(seg, -f, 48000))
		t.Logf("%s %g:%g, %d taps: tone %g Hz measured %.1f dB", tc.method, tc.low, tc.high, m.Splitter().Spec().Taps, f, got)
		if got < minDB {
			t.Errorf("%s %g:%g, tone %g Hz: opposite sideband %.1f dB down, want ≥ %d", tc.method, tc.low, tc.high, f, got, minDB)
		}
	}
}

// speech returns a speech-like signal: a gliding 110…180 Hz pitch with
// harmonics shaped by two moving formants and a 4 Hz syllable envelope
// (an invented test signal; the shape follows the source-filter picture
// of voiced speech, common practice).
func speech(rate float64, n int) []float32 {
	x := make([]float32, n)
	var ph float64
	for i := range x {
		t := float64(i) / rate
		f0 := 145 + 35*math.Sin(2*math.Pi*0.7*t)
		ph += 2 * math.Pi * f0 / rate
		f1 := 600 + 250*math.Sin(2*math.Pi*1.3*t)
		f2 := 1700 + 500*math.Sin(2*math.Pi*0.9*t+1)
		var s float64
		for h := 1; float64(h)*f0 < 3800; h++ {
			fh := float64(h) * f0
			g := math.Exp(-sq((fh-f1)/250)) + 0.5*math.Exp(-sq((fh-f2)/400)) + 0.02
			s += g * math.Cos(float64(h)*ph)
		}
		env := 0.55 + 0.45*math.Sin(2*math.Pi*4*t)
		x[i] = float32(0.1 * env * s)
	}
	return x
}

func sq(v float64) float64 { return v * v }

// bandLimit keeps the FFT bins of x in low…high Hz (both signs) — an ideal
// band-pass, the reference the modulator's band filter approximates.
func bandLimit(x []float32, low, high, rate float64) []float64 {
	n := len(x)
	seq := make([]float64, n)
	for i, v := range x {
		seq[i] = float64(v)
	}
	fft := fourier.NewFFT(n)
	c := fft.Coefficients(nil, seq)
	for i := range c {
		f := fft.Freq(i) * rate
		if f < low || f > high {
			c[i] = 0
		}
	}
	out := fft.Sequence(nil, c)
	for i := range out {
		out[i] /= float64(n)
	}
	return out
}

// TestTxRoundTrip modulates speech-like audio and demodulates it in the
// test (mix the carrier to 0 with an exp computed in float64, take the real
// part for usb/lsb — the real part of the analytic signal is the audio —
// or the envelope minus its mean for am), then correlates with the ideally
// band-limited audio: ≥ 0.99 (issue 4).
func TestTxRoundTrip(t *testing.T) {
	const minCorr = 0.99
	const rate = 16000.
	x := speech(rate, int(2*rate))
	ref := bandLimit(x, 300, 2700, rate)
	for _, c := range []struct {
		mode, method string
		out, off     float64
	}{
		{"usb", "phasing", 48000, 0},
		{"lsb", "phasing", 48000, 7000},
		{"usb", "weaver", 96000, -20000},
		{"am", "phasing", 48000, 3000},
		{"dsb", "phasing", 48000, 0},
	} {
		cfg := TxConfig{Mode: c.mode, Method: c.method, AudioRate: rate, OutRate: c.out, Offset: c.off, BandLow: 300, BandHigh: 2700, Levels: AudioLevels{Peak: 1, Max: 1, Min: -1, EnvelopePeak: 1}}
		y, _ := modulateAll(t, cfg, x, 999)
		// demodulate, back at the audio rate (every out/rate-th sample)
		step := int(c.out / rate)
		d := make([]float64, len(x))
		for i := range d {
			v := complex128(y[i*step]) * cmplx.Exp(complex(0, -2*math.Pi*c.off*float64(i*step)/c.out))
			switch c.mode {
			case "am":
				d[i] = cmplx.Abs(v)
			default:
				d[i] = real(v)
			}
		}
		if c.mode == "am" {
			var mean float64
			for _, v := range d {
				mean += v
			}
			mean /= float64(len(d))
			for i := range d {
				d[i] -= mean
			}
		}
		lo, hi := int(0.1*rate), int(1.9*rate)
		var sxy, sxx, syy float64
		for i := lo; i < hi; i++ {
			sxy += d[i] * ref[i]
			sxx += d[i] * d[i]
			syy += ref[i] * ref[i]
		}
		r := sxy / math.Sqrt(sxx*syy)
		t.Logf("%s/%s: correlation %.5f", c.mode, c.method, r)
		if r < minCorr {
			t.Errorf("%s/%s offset %g: correlation %.4f < %g", c.mode, c.method, c.off, r, minCorr)
		}
	}
}

// TestTxBlocks checks that the modulator's output does not depend on the
// block size, and that a block allocates nothing in the steady state.
func TestTxBlocks(t *testing.T) {
	x := speech(44100, 44100/2)
	for _, cfg := range []TxConfig{
		{AudioRate: 44100, OutRate: 96000, Offset: 5000, BandLow: 300, BandHigh: 2700},
		{Mode: "lsb", Splitter: hilbert.Spec{Design: "allpass", Sections: 5}, AudioRate: 44100, OutRate: 48000, BandLow: 300, BandHigh: 2700},
		{Mode: "usb", Splitter: hilbert.Spec{Design: "fft", Taps: 256}, AudioRate: 44100, OutRate: 48000, BandLow: 300, BandHigh: 2700},
		{Mode: "am", AudioRate: 44100, OutRate: 250000, Offset: -50000, BandLow: 300, BandHigh: 2700},
	} {
		whole, _ := modulateAll(t, cfg, x, len(x))
		for _, bs := range []int{1, 17, 1000, 4096} {
			got, _ := modulateAll(t, cfg, x, bs)
			if len(got) != len(whole) {
				t.Fatalf("%+v block %d: %d samples, whole %d", cfg.Mode, bs, len(got), len(whole))
			}
			for i := range got {
				if got[i] != whole[i] {
					t.Fatalf("%s block %d: sample %d differs", cfg.Mode, bs, i)
				}
			}
		}
		m, _ := NewModulator(cfg)
		blk := x[:4096]
		dst := make([]complex64, 0, m.MaxOut(len(blk)))
		m.Process(dst, blk)
		if a := testing.AllocsPerRun(10, func() { m.Process(dst, blk) }); a != 0 {
			t.Errorf("%s: %v allocations per block", cfg.Mode, a)
		}
	}
}

func TestTxConfigErrors(t *testing.T) {
	ok := TxConfig{AudioRate: 48000, OutRate: 48000, BandLow: 300, BandHigh: 2700}
	for _, c := range []struct {
		name string
		edit func(*TxConfig)
	}{
		{"mode", func(c *TxConfig) { c.Mode = "fm" }},
		{"method", func(c *TxConfig) { c.Method = "filter" }},
		{"depth", func(c *TxConfig) { c.Mode, c.Depth = "am", 1.5 }},
		{"negative depth", func(c *TxConfig) { c.Mode, c.Depth = "am", -0.1 }},
		{"offset", func(c *TxConfig) { c.Offset = 22000 }},
		{"band", func(c *TxConfig) { c.BandHigh = 30000 }},
		{"band order", func(c *TxConfig) { c.BandLow = 3000 }},
		{"carrier", func(c *TxConfig) { c.Carrier, c.CarrierDB = true, 3 }},
		{"rate", func(c *TxConfig) { c.OutRate = 0 }},
		{"narrow output", func(c *TxConfig) { c.OutRate = 4000 }},
		{"splitter", func(c *TxConfig) { c.Splitter = hilbert.Spec{Design: "nonesuch", Taps: 31} }},
	} {
		cfg := ok
		c.edit(&cfg)
		if _, err := NewModulator(cfg); err == nil {
			t.Errorf("%s: no error", c.name)
		}
	}
	if _, err := NewModulator(ok); err != nil {
		t.Errorf("valid config: %v", err)
	}
}

// TestSurvey checks the measured levels of a tone: peak and envelope peak
// equal its amplitude (a cosine's peak, a complex exponential's modulus).
func TestSurvey(t *testing.T) {
	const tol = 0.002 // 0.02 dB
	s, err := NewSurvey(TxConfig{AudioRate: 44100, OutRate: 48000, BandLow: 300, BandHigh: 2700})
	if err != nil {
		t.Fatal(err)
	}
	src := NewToneSource([]float64{1234}, 0.6, 44100, 44100)
	buf := make([]float32, 1000)
	for {
		n, err := src.Read(buf)
		s.Process(buf[:n])
		if err == io.EOF {
			break
		}
	}
	s.Flush()
	lv := s.Levels()
	if math.Abs(lv.Peak-0.6) > tol || math.Abs(lv.EnvelopePeak-0.6) > tol {
		t.Errorf("levels %+v, want peak and envelope 0.6", lv)
	}
}

func BenchmarkModulator(b *testing.B) {
	x := speech(48000, 48000)
	for _, c := range []struct {
		name string
		out  float64
		off  float64
	}{{"48k", 48000, 0}, {"2.4M", 2.4e6, 0}, {"2.4M-offset", 2.4e6, 100000}} {
		b.Run(c.name, func(b *testing.B) {
			m, err := NewModulator(TxConfig{AudioRate: 48000, OutRate: c.out, Offset: c.off, BandLow: 300, BandHigh: 2700})
			if err != nil {
				b.Fatal(err)
			}
			blk := x[:8192]
			dst := make([]complex64, 0, m.MaxOut(len(blk)))
			b.SetBytes(int64(4 * len(blk)))
			b.ReportAllocs()
			var outs int
			for b.Loop() {
				outs += len(m.Process(dst, blk))
			}
			b.ReportMetric(float64(outs)/b.Elapsed().Seconds()/1e6, "MS/s_out")
		})
	}
}

// TestLevelMeter checks the level statistics against a float64 sum and
// maximum of |y|² (PEP and average power as DESIGN.md defines them), over
// blocks of many lengths, for the kernel in use and the reference loop.
// Tolerance: float32 partial sums of at most 1024 terms, relative error
// ≤ 1024·2⁻²⁴ (Higham, Accuracy and Stability of Numerical Algorithms,
// 2nd ed., sec. 4.2; from memory); the peak is one float32 sum of two
// products, relative error ≤ 3·2⁻²⁴.
func TestLevelMeter(t *testing.T) {
	const sumTol, peakTol = 1024.0 / (1 << 24), 3.0 / (1 << 24)
	y := make([]complex64, 10007)
	for i := range y {
		// a slow chirp with one peak sample
		a := 0.3 + 0.2*math.Sin(float64(i)*0.001)
		if i == 5003 {
			a = 0.97
		}
		y[i] = complex64(cmplx.Rect(a, float64(i*i)*1e-4))
	}
	var lv LevelMeter
	var sum, peak float64
	for off, bs := 0, 1; off < len(y); off, bs = off+bs, bs*3+1 {
		blk := y[off:min(off+bs, len(y))]
		lv.Add(blk)
		for _, v := range blk {
			p := float64(real(v))*float64(real(v)) + float64(imag(v))*float64(imag(v))
			sum += p
			peak = math.Max(peak, p)
		}
	}
	if math.Abs(lv.Energy()-sum) > sumTol*sum || lv.Count() != int64(len(y)) {
		t.Errorf("energy %.9g over %d, want %.9g over %d", lv.Energy(), lv.Count(), sum, len(y))
	}
	if math.Abs(lv.Peak()-peak) > peakTol*peak {
		t.Errorf("PEP %.9g, want %.9g", lv.Peak(), peak)
	}
	// the reference loop, and a NaN sample that the peak ignores
	s, p := levelGo(y[:1024], 0)
	ks, kp := levelKernel(y[:1024], 0)
	if math.Abs(float64(s-ks)) > sumTol*float64(s) || p != kp {
		t.Errorf("kernel (%g, %g), reference loop (%g, %g)", ks, kp, s, p)
	}
	z := append([]complex64(nil), y[:64]...)
	z[17] = complex(float32(math.NaN()), 0)
	_, kp = levelKernel(z, 0)
	_, p = levelGo(z, 0)
	if math.IsNaN(float64(kp)) || math.IsNaN(float64(p)) {
		t.Errorf("NaN reached the peak: kernel %g, reference loop %g", kp, p)
	}
}

func BenchmarkLevelMeter(b *testing.B) {
	y := testSignal(51200, 5)
	var lv LevelMeter
	b.SetBytes(8 * int64(len(y)))
	b.ReportAllocs()
	for b.Loop() {
		lv.Add(y)
	}
}
