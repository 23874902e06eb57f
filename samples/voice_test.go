package samples

import (
	"encoding/json"
	"math"
	"math/cmplx"
	"os"
	"slices"
	"testing"
)

func TestResonatorGolden(t *testing.T) {
	// Golden values: scipy.signal.lfilter and freqz (scipy 1.10.1) on
	// Klatt's coefficients; testdata/resonator_golden.py made the file.
	const tol = 1e-9
	var g struct {
		Cases []struct {
			Freq, BW, Rate float64
			Impulse        []float64
			ResponseFreqs  []float64 `json:"response_freqs"`
			ResponseRe     []float64 `json:"response_re"`
			ResponseIm     []float64 `json:"response_im"`
		}
	}
	b, err := os.ReadFile("testdata/resonator_golden.json")
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	for _, c := range g.Cases {
		r := NewResonator(c.Freq, c.BW, c.Rate)
		for n, want := range c.Impulse {
			x := 0.0
			if n == 0 {
				x = 1
			}
			if got := r.Step(x); math.Abs(got-want) > tol {
				t.Errorf("F=%v BW=%v fs=%v: h[%d] = %v, scipy %v", c.Freq, c.BW, c.Rate, n, got, want)
			}
		}
		for i, f := range c.ResponseFreqs {
			want := complex(c.ResponseRe[i], c.ResponseIm[i])
			if got := r.Response(f, c.Rate); cmplx.Abs(got-want) > tol*cmplx.Abs(want)+tol {
				t.Errorf("F=%v: H(%v Hz) = %v, scipy %v", c.Freq, f, got, want)
			}
		}
	}
}

func TestResonatorShape(t *testing.T) {
	// Klatt (1980): unity gain at 0 Hz; the resonance at F with bandwidth
	// BW. For a narrow two-pole resonance the −3 dB width is close to BW and
	// the peak close to F (common practice; the approximation improves as
	// BW/F shrinks).
	const (
		dcTol   = 1e-12
		peakTol = 0.02 // of F
		bwTol   = 0.05 // of BW
	)
	for _, c := range [][3]float64{{500, 60, 8000}, {1500, 100, 8000}, {2500, 150, 16000}} {
		F, BW, fs := c[0], c[1], c[2]
		r := NewResonator(F, BW, fs)
		if g := cmplx.Abs(r.Response(0, fs)); math.Abs(g-1) > dcTol {
			t.Errorf("F=%v: DC gain %v, want 1", F, g)
		}
		var fpk, gpk float64
		for f := 0.0; f < fs/2; f += 0.1 {
			if g := cmplx.Abs(r.Response(f, fs)); g > gpk {
				fpk, gpk = f, g
			}
		}
		if math.Abs(fpk/F-1) > peakTol {
			t.Errorf("F=%v: peak at %v Hz", F, fpk)
		}
		lo, hi := fpk, fpk
		for cmplx.Abs(r.Response(lo, fs)) > gpk/math.Sqrt2 {
			lo -= 0.05
		}
		for cmplx.Abs(r.Response(hi, fs)) > gpk/math.Sqrt2 {
			hi += 0.05
		}
		if math.Abs((hi-lo)/BW-1) > bwTol {
			t.Errorf("F=%v: −3 dB width %v Hz, want %v", F, hi-lo, BW)
		}
	}
}

func TestRosenberg(t *testing.T) {
	// Values straight from the formula of Rosenberg (1971), shape C.
	const tol = 1e-12
	tests := []struct{ phase, want float64 }{
		{0, 0}, {0.2, 0.5}, {0.4, 1}, {0.4 + 0.16*2.0/3, 0.5}, {0.56, 0}, {0.8, 0}, {-0.1, 0},
	}
	for _, tc := range tests {
		if got := Rosenberg(tc.phase, 0.4, 0.16); math.Abs(got-tc.want) > tol {
			t.Errorf("Rosenberg(%v) = %v, want %v", tc.phase, got, tc.want)
		}
	}
}

func TestVoiceConfigErrors(t *testing.T) {
	for _, c := range []VoiceConfig{{Rate: 4000}, {Pitch: 20}, {Formants: 2}, {Level: 0.9}, {Pause: -1}} {
		if _, err := NewVoice(c); err == nil {
			t.Errorf("%+v: no error", c)
		}
	}
}

// voiceStats runs a voice for sec seconds and returns the RMS over its
// active 20 ms frames (above −30 dB of the loudest), the active fraction,
// the peak, and the median fundamental from autocorrelation of the active
// frames.
func voiceStats(t *testing.T, cfg VoiceConfig, sec float64) (rmsAct, active, peak, f0 float64) {
	t.Helper()
	v, err := NewVoice(cfg)
	if err != nil {
		t.Fatal(err)
	}
	fs := v.Config().Rate
	x := v.Generate(make([]float32, int(sec*fs)))
	fr := int(0.02 * fs)
	var e []float64
	var mx float64
	for i := 0; i+fr <= len(x); i += fr {
		p := rms(x[i:i+fr]) * rms(x[i:i+fr])
		e = append(e, p)
		mx = math.Max(mx, p)
	}
	var sum float64
	var n int
	var f0s []float64
	for i, p := range e {
		if p < mx*1e-3 {
			continue
		}
		sum += p
		n++
		// pitch of a 40 ms window from here: strongest autocorrelation lag
		// between 2.5 and 20 ms
		w := x[i*fr : min(len(x), i*fr+2*fr)]
		if len(w) < 2*fr || p < mx*0.1 {
			continue
		}
		best, lag := 0.0, 0
		for l := int(fs / 400); l <= int(fs/50); l++ {
			var s float64
			for k := 0; k+l < len(w); k++ {
				s += float64(w[k]) * float64(w[k+l])
			}
			if s > best {
				best, lag = s, l
			}
		}
		if lag > 0 {
			f0s = append(f0s, fs/float64(lag))
		}
	}
	for _, v := range x {
		peak = math.Max(peak, math.Abs(float64(v)))
	}
	slices.Sort(f0s)
	return math.Sqrt(sum / float64(n)), float64(n) / float64(len(e)), peak, f0s[len(f0s)/2]
}

func TestVoiceCharacter(t *testing.T) {
	// The expectations follow the model's own definition (this package's
	// doc): Level is the RMS over syllables (frames here, so within 1.5 dB);
	// pitch moves between 0.88 and 1.12 of Pitch through a phrase, ±12 % on
	// stressed syllables, so the median is within 15 %; conversational
	// speech is active roughly half to four fifths of the time (common
	// practice).
	const (
		levelTolDB = 1.5
		pitchTol   = 0.15
		minActive  = 0.45 // "roughly half", with 5 % to spare
		maxActive  = 0.85 // "four fifths", with 5 % to spare
	)
	for _, cfg := range []VoiceConfig{
		{Seed: 1},
		{Seed: 2, Pitch: 210, Formants: 1.17, Level: 0.05},
		{Seed: 3, Pitch: 95, Level: 0.2, Rate: 16000},
	} {
		v, _ := NewVoice(cfg)
		c := v.Config()
		r, act, pk, f0 := voiceStats(t, cfg, 30)
		if d := 20 * math.Log10(r/c.Level); math.Abs(d) > levelTolDB {
			t.Errorf("%+v: active RMS %.4f is %.2f dB from Level", cfg, r, d)
		}
		if act < minActive || act > maxActive {
			t.Errorf("%+v: active %.2f of the time", cfg, act)
		}
		if pk >= limit {
			t.Errorf("%+v: peak %v not below the limiter's %v", cfg, pk, limit)
		}
		if math.Abs(f0/c.Pitch-1) > pitchTol {
			t.Errorf("%+v: median pitch %.1f Hz, want about %v", cfg, f0, c.Pitch)
		}
	}
}

func TestVoiceSeeds(t *testing.T) {
	a, _ := NewVoice(VoiceConfig{Seed: 1})
	b, _ := NewVoice(VoiceConfig{Seed: 2})
	x := a.Generate(make([]float32, 8000))
	y := b.Generate(make([]float32, 8000))
	// Two seeds must give different talkers; silent stretches (pauses)
	// may coincide, so up to half the samples may be equal (chosen).
	const maxSame = 4000
	same := 0
	for i := range x {
		if x[i] == y[i] {
			same++
		}
	}
	if same > maxSame {
		t.Errorf("seeds 1 and 2 give %d identical samples of 8000", same)
	}
}
