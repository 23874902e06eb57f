package samples

import (
	"math"
	"math/rand/v2"
	"strings"

	"ssbkit/modem"
)

// Source is a real audio signal produced block by block.
type Source interface {
	// Generate fills dst with the next len(dst) samples and returns it.
	Generate(dst []float32) []float32
	// Reset returns the source to its first sample.
	Reset()
}

var (
	_ Source = (*Tone)(nil)
	_ Source = (*TwoTone)(nil)
	_ Source = (*KeyedTone)(nil)
	_ Source = (*Noise)(nil)
	_ Source = (*BandNoise)(nil)
	_ Source = (*Voice)(nil)
)

// Tone is the real tone Amp·cos(2π·Freq·n/Rate + Phase).
type Tone struct {
	Freq, Amp, Phase, Rate float64

	n int64
}

// NewTone returns a tone of frequency freq Hz and amplitude amp sampled at
// rate Hz, starting with phase 0. It panics if rate is not positive.
func NewTone(freq, amp, rate float64) *Tone {
	if !(rate > 0) {
		panic("samples: rate must be positive")
	}
	return &Tone{Freq: freq, Amp: amp, Rate: rate}
}

// Generate implements Source. The phase is computed from the sample index,
// so the tone does not drift however long it runs.
func (t *Tone) Generate(dst []float32) []float32 {
	step := t.Freq / t.Rate
	for i := range dst {
		// Whole cycles are removed before the multiplication by 2π so the
		// argument of Cos stays small.
		c := step * float64(t.n)
		c -= math.Floor(c)
		dst[i] = float32(t.Amp * math.Cos(2*math.Pi*c+t.Phase))
		t.n++
	}
	return dst
}

// Reset implements Source.
func (t *Tone) Reset() { t.n = 0 }

// TwoTone is the sum of two tones of equal amplitude, the classic test
// signal for intermodulation: its peak is 2·Amp.
type TwoTone struct {
	a, b Tone
	buf  []float32
}

// NewTwoTone returns tones at f1 and f2 Hz, each of amplitude amp, sampled
// at rate Hz. It panics if rate is not positive.
func NewTwoTone(f1, f2, amp, rate float64) *TwoTone {
	return &TwoTone{a: *NewTone(f1, amp, rate), b: *NewTone(f2, amp, rate)}
}

// Generate implements Source.
func (t *TwoTone) Generate(dst []float32) []float32 {
	t.a.Generate(dst)
	if cap(t.buf) < len(dst) {
		t.buf = make([]float32, len(dst))
	}
	b := t.b.Generate(t.buf[:len(dst)])
	for i := range dst {
		dst[i] += b[i]
	}
	return dst
}

// Reset implements Source.
func (t *TwoTone) Reset() { t.a.Reset(); t.b.Reset() }

// morse is the International Morse code of ITU-R M.1677-1, part I, for the
// letters and figures.
var morse = map[rune]string{
	'A': ".-", 'B': "-...", 'C': "-.-.", 'D': "-..", 'E': ".", 'F': "..-.",
	'G': "--.", 'H': "....", 'I': "..", 'J': ".---", 'K': "-.-", 'L': ".-..",
	'M': "--", 'N': "-.", 'O': "---", 'P': ".--.", 'Q': "--.-", 'R': ".-.",
	'S': "...", 'T': "-", 'U': "..-", 'V': "...-", 'W': ".--", 'X': "-..-",
	'Y': "-.--", 'Z': "--..",
	'1': ".----", '2': "..---", '3': "...--", '4': "....-", '5': ".....",
	'6': "-....", '7': "--...", '8': "---..", '9': "----.", '0': "-----",
}

// Keyer is the on/off envelope of a Morse message sent over and over: the
// unit is 1.2/WPM seconds (the common-practice "PARIS" speed), a dot is one
// unit on, a dash three, the gap inside a character one unit off, between
// characters three and between words (and after the message) seven
// (ITU-R M.1677-1, part I, section 2). Each edge is a raised-cosine ramp of
// Rise seconds.
type Keyer struct {
	units []bool  // the message, one entry per unit: key down or up
	unit  float64 // samples per unit
	rise  int     // samples per edge
	n     int64
	ramp  int // position on the edge ramp, 0 (off) … rise (on)
}

// NewKeyer returns the keying envelope of text (letters, figures and
// spaces) at wpm words per minute, with edges of rise seconds, sampled at
// rate Hz. It panics if text has no character it can send, or wpm, rise or
// rate is not positive.
func NewKeyer(text string, wpm, rise, rate float64) *Keyer {
	if !(wpm > 0) || !(rise > 0) || !(rate > 0) {
		panic("samples: keyer speed, rise time and rate must be positive")
	}
	var u []bool
	on := func(n int) {
		for range n {
			u = append(u, true)
		}
	}
	off := func(n int) {
		for range n {
			u = append(u, false)
		}
	}
	for wi, word := range strings.Fields(strings.ToUpper(text)) {
		if wi > 0 {
			off(7)
		}
		first := true
		for _, r := range word {
			code, ok := morse[r]
			if !ok {
				continue
			}
			if !first {
				off(3)
			}
			first = false
			for ei, e := range code {
				if ei > 0 {
					off(1)
				}
				if e == '.' {
					on(1)
				} else {
					on(3)
				}
			}
		}
	}
	if len(u) == 0 {
		panic("samples: keyer text has nothing to send")
	}
	off(7)
	k := &Keyer{units: u, unit: 1.2 / wpm * rate, rise: max(1, int(math.Round(rise*rate)))}
	return k
}

// Next returns the envelope of the next sample, in [0, 1].
func (k *Keyer) Next() float64 {
	i := int(float64(k.n)/k.unit) % len(k.units)
	k.n++
	if k.units[i] {
		k.ramp = min(k.ramp+1, k.rise)
	} else {
		k.ramp = max(k.ramp-1, 0)
	}
	return 0.5 * (1 - math.Cos(math.Pi*float64(k.ramp)/float64(k.rise)))
}

// Duty is the fraction of the message's units during which the key is down.
func (k *Keyer) Duty() float64 {
	d := 0
	for _, u := range k.units {
		if u {
			d++
		}
	}
	return float64(d) / float64(len(k.units))
}

// Period is the duration of one sending of the message, in samples.
func (k *Keyer) Period() float64 { return k.unit * float64(len(k.units)) }

// Reset returns the keyer to the start of its message, key up.
func (k *Keyer) Reset() { k.n, k.ramp = 0, 0 }

// KeyedTone is a tone keyed on and off by a Keyer.
type KeyedTone struct {
	Tone
	Key *Keyer
}

// NewKeyedTone returns a tone of frequency freq and amplitude amp keyed
// with text at wpm words per minute and 5 ms edges (common practice), at
// rate Hz.
func NewKeyedTone(freq, amp float64, text string, wpm, rate float64) *KeyedTone {
	return &KeyedTone{Tone: *NewTone(freq, amp, rate), Key: NewKeyer(text, wpm, 0.005, rate)}
}

// Generate implements Source.
func (t *KeyedTone) Generate(dst []float32) []float32 {
	t.Tone.Generate(dst)
	for i := range dst {
		dst[i] *= float32(t.Key.Next())
	}
	return dst
}

// Reset implements Source.
func (t *KeyedTone) Reset() { t.Tone.Reset(); t.Key.Reset() }

// Noise is white Gaussian noise of standard deviation RMS from a seeded
// generator (PCG, math/rand/v2).
type Noise struct {
	RMS  float64
	seed uint64
	pcg  *rand.PCG
	rng  *rand.Rand
}

// NewNoise returns white Gaussian noise of the given RMS level, seeded.
func NewNoise(rms float64, seed uint64) *Noise {
	g := &Noise{RMS: rms, seed: seed}
	g.pcg, g.rng = newRand(seed)
	return g
}

// Generate implements Source.
func (g *Noise) Generate(dst []float32) []float32 {
	for i := range dst {
		dst[i] = float32(g.RMS * g.rng.NormFloat64())
	}
	return dst
}

// Reset implements Source.
func (g *Noise) Reset() { g.pcg.Seed(g.seed, seedStream) }

// seedStream is the second PCG seed word, fixed for the package.
const seedStream = 0x5eed_55b0_c0de_0001

// newRand returns the seeded generator every part of the package uses; the
// PCG is returned too so that Reset can reseed it without allocating.
func newRand(seed uint64) (*rand.PCG, *rand.Rand) {
	p := rand.NewPCG(seed, seedStream)
	return p, rand.New(p)
}

// BandNoise is Gaussian noise limited to a band: white Noise through a
// Kaiser-window band-pass FIR (modem.KaiserBandpass, 60 dB stop band,
// transitions a tenth of the band wide).
type BandNoise struct {
	white Noise
	fir   *modem.RealFIR
}

// NewBandNoise returns noise of RMS level rms in the band low–high Hz at
// rate Hz, seeded. The level is that of the ideal band; the filter's
// transitions add a few per cent. It panics unless 0 < low < high < rate/2.
func NewBandNoise(low, high, rms, rate float64, seed uint64) *BandNoise {
	if !(low > 0 && high > low && high < rate/2) {
		panic("samples: band noise edges must satisfy 0 < low < high < rate/2")
	}
	taps := modem.KaiserBandpass(low, high, (high-low)/10, rate, 60)
	// White noise of variance σ² spreads evenly over 0…rate/2; the band
	// keeps the fraction (high−low)/(rate/2) of it.
	sigma := rms * math.Sqrt(rate/2/(high-low))
	return &BandNoise{white: *NewNoise(sigma, seed), fir: modem.NewRealFIR(taps)}
}

// Generate implements Source.
func (g *BandNoise) Generate(dst []float32) []float32 {
	g.white.Generate(dst)
	return g.fir.Process(dst, dst)
}

// Reset implements Source.
func (g *BandNoise) Reset() { g.white.Reset(); g.fir.Reset() }
