package samples

import (
	"errors"
	"math"
	"math/rand/v2"
)

// Resonator is Klatt's second-order digital resonator (Klatt 1980, eq. 1
// and its coefficient formulas; see the package documentation): a pair of
// complex poles at radius exp(−πBW/fs) and angle ±2πF/fs, with unity gain
// at 0 Hz. The zero value passes nothing; call Set.
type Resonator struct {
	a, b, c float64
	y1, y2  float64
}

// NewResonator returns a resonator at freq Hz with bandwidth bw Hz for the
// sample rate rate Hz.
func NewResonator(freq, bw, rate float64) *Resonator {
	r := new(Resonator)
	r.Set(freq, bw, rate)
	return r
}

// Set changes the resonance to freq Hz and bandwidth bw Hz at rate Hz,
// keeping the filter's memory so that a moving formant does not click.
func (r *Resonator) Set(freq, bw, rate float64) {
	e := math.Exp(-math.Pi * bw / rate)
	r.c = -e * e
	r.b = 2 * e * math.Cos(2*math.Pi*freq/rate)
	r.a = 1 - r.b - r.c
}

// Step filters one sample.
func (r *Resonator) Step(x float64) float64 {
	y := r.a*x + r.b*r.y1 + r.c*r.y2
	r.y2, r.y1 = r.y1, y
	return y
}

// Response is the frequency response A/(1 − B·z⁻¹ − C·z⁻²) at f Hz for the
// sample rate rate Hz.
func (r *Resonator) Response(f, rate float64) complex128 {
	w := 2 * math.Pi * f / rate
	z1 := complex(math.Cos(w), -math.Sin(w))
	return complex(r.a, 0) / (1 - complex(r.b, 0)*z1 - complex(r.c, 0)*z1*z1)
}

// Reset clears the filter's memory.
func (r *Resonator) Reset() { r.y1, r.y2 = 0, 0 }

// Rosenberg is the glottal flow of Rosenberg's trigonometric pulse (shape C
// of Rosenberg 1971, see the package documentation) at phase in [0, 1) of
// the pitch period, with opening and closing phases that are the fractions
// open and closing of the period. It rises from 0 to 1 and falls back to 0.
func Rosenberg(phase, open, closing float64) float64 {
	switch {
	case phase < 0:
		return 0
	case phase <= open:
		return 0.5 * (1 - math.Cos(math.Pi*phase/open))
	case phase <= open+closing:
		return math.Cos(math.Pi * (phase - open) / (2 * closing))
	}
	return 0
}

// vowels are the average formant frequencies F1, F2, F3 in Hz of ten
// American English vowels spoken by adult men, Peterson and Barney (1952),
// Table II (values from memory): i ɪ ɛ æ ɑ ɔ ʊ u ʌ ɝ.
var vowels = [][3]float64{
	{270, 2290, 3010}, {390, 1990, 2550}, {530, 1840, 2480}, {660, 1720, 2410},
	{730, 1090, 2440}, {570, 840, 2410}, {440, 1020, 2240}, {300, 870, 2240},
	{640, 1190, 2390}, {490, 1350, 1690},
}

// formantBW are the formant bandwidths in Hz (common practice for cascade
// synthesis) and f4 the fourth formant of the cascade, in Hz.
var formantBW = [4]float64{70, 100, 150, 250}

const f4 = 3500.0

// VoiceConfig describes a synthetic talker. The zero value of each field
// selects the default given beside it.
type VoiceConfig struct {
	Rate     float64 // sample rate in Hz, at least 8000 (default 8000)
	Pitch    float64 // mean fundamental in Hz, 50–400 (default 120)
	Formants float64 // formant scale against the adult male averages, 0.8–1.4 (default 1)
	Level    float64 // RMS over the syllables before the limiter, ≤ 0.25 (default 0.1); peaks are about 15 dB higher
	Pause    float64 // mean pause between phrases in s (default 0.6)
	Seed     uint64  // random seed: the same seed gives the same voice
}

// Voice is a speech-like signal from a glottal pulse train with a pitch
// contour, a cascade of four formant resonators, syllable envelopes and
// pauses between words and phrases (see the package documentation). A soft
// limiter, 0.9·tanh(y/0.9), keeps the output inside (−0.9, 0.9); it
// lowers a sample of 0.3 by 0.3 dB.
type Voice struct {
	cfg VoiceConfig
	pcg *rand.PCG
	rng *rand.Rand

	res  [4]Resonator
	fric Resonator

	// current segment
	silent     bool
	n, pos     int        // segment length and position, samples
	nc         int        // consonant (noise burst) part, samples
	from, to   [3]float64 // vowel formant targets
	loud       float64    // syllable loudness
	stressed   bool
	rising     bool // last syllable of a question: pitch rises
	wordLeft   int  // syllables left in the current word
	phraseLeft int  // words left in the phrase
	sylInPhr   int  // syllables so far in the phrase
	phrSyl     float64
	question   bool
	gap        bool // a gap must come before the next syllable

	// glottal source
	phase, jitter, gPrev float64
	gain                 float64

	sumSq  float64 // sum of squares over syllable samples, for calibration
	active int
}

// limit is the level the soft limiter (limit·tanh(y/limit)) approaches.
const limit = 0.9

// calibSeconds is how much of a voice NewVoice runs to set its level.
const calibSeconds = 10

// NewVoice returns a voice for cfg.
func NewVoice(cfg VoiceConfig) (*Voice, error) {
	if cfg.Rate == 0 {
		cfg.Rate = 8000
	}
	if cfg.Pitch == 0 {
		cfg.Pitch = 120
	}
	if cfg.Formants == 0 {
		cfg.Formants = 1
	}
	if cfg.Level == 0 {
		cfg.Level = 0.1
	}
	if cfg.Pause == 0 {
		cfg.Pause = 0.6
	}
	switch {
	case !(cfg.Rate >= 8000):
		return nil, errors.New("samples: voice rate must be at least 8000 Hz")
	case !(cfg.Pitch >= 50 && cfg.Pitch <= 400):
		return nil, errors.New("samples: voice pitch must be 50–400 Hz")
	case !(cfg.Formants >= 0.8 && cfg.Formants <= 1.4):
		return nil, errors.New("samples: voice formant scale must be 0.8–1.4")
	case !(cfg.Level > 0 && cfg.Level <= 0.25):
		return nil, errors.New("samples: voice level must be in (0, 0.25]")
	case !(cfg.Pause > 0 && cfg.Pause <= 10):
		return nil, errors.New("samples: voice pause must be in (0, 10] s")
	}
	v := &Voice{cfg: cfg}
	v.pcg, v.rng = newRand(cfg.Seed)
	// Calibrate: run the first seconds of this very voice at unity gain
	// and scale so that the RMS over its syllables is Level.
	v.gain = 1
	v.Reset()
	buf := make([]float32, 1024)
	var sum float64
	var cnt int
	for range int(calibSeconds * cfg.Rate / 1024) {
		v.Generate(buf)
		sum += v.sumSq
		cnt += v.active
		v.sumSq, v.active = 0, 0
	}
	if sum > 0 {
		v.gain = cfg.Level / math.Sqrt(sum/float64(cnt))
	}
	v.Reset()
	return v, nil
}

// Config returns the configuration with defaults filled in.
func (v *Voice) Config() VoiceConfig { return v.cfg }

// Reset implements Source.
func (v *Voice) Reset() {
	v.pcg.Seed(v.cfg.Seed, seedStream)
	for i := range v.res {
		v.res[i].Reset()
	}
	v.fric.Reset()
	v.silent, v.n, v.pos = true, int(0.1*v.cfg.Rate), 0
	v.wordLeft, v.phraseLeft, v.gap = 0, 0, false
	v.phase, v.jitter, v.gPrev = 0, 1, 0
	v.sumSq, v.active = 0, 0
}

// next plans the segment after the current one: a syllable, a gap between
// words or a pause between phrases.
func (v *Voice) next() {
	r, fs := v.rng, v.cfg.Rate
	v.pos = 0
	if v.gap {
		v.gap = false
		v.silent = true
		if v.phraseLeft == 0 {
			v.n = int(v.cfg.Pause * (0.5 + r.Float64()) * fs)
		} else {
			v.n = int((0.04 + 0.1*r.Float64()) * fs)
		}
		return
	}
	if v.wordLeft == 0 {
		if v.phraseLeft == 0 {
			v.phraseLeft = 3 + r.IntN(6)
			v.phrSyl = 1.7 * float64(v.phraseLeft)
			v.sylInPhr = 0
			v.question = r.Float64() < 0.2
		}
		v.phraseLeft--
		// one syllable in two words, two in three of ten, three in one of five
		switch p := r.Float64(); {
		case p < 0.5:
			v.wordLeft = 1
		case p < 0.8:
			v.wordLeft = 2
		default:
			v.wordLeft = 3
		}
	}
	v.wordLeft--
	v.silent = false
	v.n = int((0.14 + 0.16*r.Float64()) * fs)
	v.nc = 0
	if r.Float64() < 0.6 {
		v.nc = int((0.03 + 0.05*r.Float64()) * fs)
		fc := math.Min((2400+1200*r.Float64())*v.cfg.Formants, 0.42*fs)
		v.fric.Set(fc, 500+500*r.Float64(), fs)
	}
	v.from = vowels[r.IntN(len(vowels))]
	v.to = v.from
	if r.Float64() < 0.5 {
		v.to = vowels[r.IntN(len(vowels))]
	}
	v.stressed = r.Float64() < 0.35
	v.loud = 0.75 + 0.3*r.Float64()
	if v.stressed {
		v.loud *= 1.3
	}
	v.rising = v.question && v.wordLeft == 0 && v.phraseLeft == 0
	if v.wordLeft == 0 {
		v.gap = true
	}
}

// Generate implements Source.
func (v *Voice) Generate(dst []float32) []float32 {
	fs := v.cfg.Rate
	for i := range dst {
		for v.pos >= v.n {
			if !v.silent {
				v.sylInPhr++
			}
			v.next()
		}
		var y float64
		if v.silent {
			// Let the resonators ring out.
			y = v.cascade(0)
			v.gPrev = 0
		} else {
			y = v.syllableSample(fs)
		}
		v.pos++
		y *= v.gain
		if !v.silent {
			v.sumSq += y * y
			v.active++
		}
		// a soft limiter keeps the rare high peaks below full scale
		dst[i] = float32(limit * math.Tanh(y/limit))
	}
	return dst
}

// cascade runs x through the four formant resonators.
func (v *Voice) cascade(x float64) float64 {
	for k := range v.res {
		x = v.res[k].Step(x)
	}
	return x
}

// syllableSample computes one sample inside a syllable.
func (v *Voice) syllableSample(fs float64) float64 {
	var x float64
	if v.pos < v.nc {
		// consonant: a noise burst with a half-sine envelope
		e := math.Sin(math.Pi * float64(v.pos) / float64(v.nc))
		x += 0.6 * v.loud * e * v.fric.Step(v.rng.NormFloat64())
	}
	nv := v.n - v.nc
	t := float64(v.pos-v.nc) / float64(nv)
	if t < 0 {
		return v.cascade(0) + x
	}
	// Formant targets glide from one vowel to the other (smoothstep);
	// coefficients are refreshed every 8 samples of the segment.
	if (v.pos-v.nc)%8 == 0 {
		s := t * t * (3 - 2*t)
		for k := range 3 {
			f := (v.from[k] + (v.to[k]-v.from[k])*s) * v.cfg.Formants
			v.res[k].Set(math.Min(f, 0.45*fs), formantBW[k], fs)
		}
		v.res[3].Set(math.Min(f4*v.cfg.Formants, 0.46*fs), formantBW[3], fs)
	}
	// syllable envelope: rise over the first 15 %, fall over the last 35 %
	env := 1.0
	if t < 0.15 {
		env = 0.5 * (1 - math.Cos(math.Pi*t/0.15))
	} else if t > 0.65 {
		env = 0.5 * (1 + math.Cos(math.Pi*(t-0.65)/0.35))
	}
	env *= v.loud
	// pitch: declination through the phrase, a rise-fall on a stressed
	// syllable, a final rise for a question, jitter per period
	prog := math.Min(1, (float64(v.sylInPhr)+t)/v.phrSyl)
	f0 := v.cfg.Pitch * (1.12 - 0.24*prog) * v.jitter
	if v.stressed {
		f0 *= 1 + 0.12*math.Sin(math.Pi*t)
	}
	if v.rising {
		f0 *= 1 + 0.3*t
	}
	step := f0 / fs
	v.phase += step
	if v.phase >= 1 {
		v.phase -= 1
		v.jitter = 1 + 0.016*(v.rng.Float64()-0.5)
	}
	g := Rosenberg(v.phase, 0.4, 0.16)
	// The first difference per unit of phase: the radiated flow derivative
	// with an amplitude that does not depend on the pitch.
	dg := (g - v.gPrev) / step
	v.gPrev = g
	src := env * (dg + 0.3*v.rng.NormFloat64())
	return v.cascade(src) + x
}
