package modem

import (
	"math"
	"math/rand/v2"
)

// voiceSpec describes a synthetic voiced SSB signal for the tuning tests:
// a harmonic series k·f0(t) of a pitch contour, band-limited to the
// 300–2700 Hz SSB audio band, as complex baseband with its carrier at
// Carrier + Drift·t/Seconds Hz.
type voiceSpec struct {
	Rate    float64
	Seconds float64
	Pitch   float64 // mean pitch, Hz
	Mode    Mode
	Carrier float64 // Hz in the baseband at t = 0
	Drift   float64 // Hz over the whole signal (linear)
	SNR     float64 // dB in 2700 Hz over the voiced parts; +Inf: no noise
	Steady  bool    // one pitch throughout: no intonation, no vibrato
	Seed    uint64
}

// Pitch contour and rhythm of the synthetic talker. Adult pitch ranges
// are roughly 85–180 Hz male and 165–255 Hz female (from memory); the
// contour is the usual intonation of read speech (common practice): each
// phrase starts within ±10 % of the mean and falls by 15 % over its
// length (declination), with a ±2 % vibrato at 5 Hz (from memory, a mild
// vibrato), syllables of 120–300 ms, gaps of 40–120 ms between them and
// pauses of 0.3–0.6 s between phrases of 1.5–3 s.
const (
	voicePhraseSpread = 0.10
	voiceDeclination  = 0.15
	voiceVibrato      = 0.02
	voiceVibratoHz    = 5
)

// formantSets are F1, F2, F3 of a few vowels, Hz (Peterson and Barney
// 1952, adult men, from memory; as in package samples).
var formantSets = [][3]float64{
	{270, 2290, 3010}, {530, 1840, 2480}, {730, 1090, 2440},
	{570, 840, 2410}, {300, 870, 2240}, {640, 1190, 2390},
}

// synthVoice returns the signal of s and the carrier offset (Hz in the
// baseband) at every sample.
func synthVoice(s voiceSpec) (x []complex64, carrier []float64) {
	r := rand.New(rand.NewPCG(s.Seed, 77))
	n := int(s.Seconds * s.Rate)
	x = make([]complex64, n)
	carrier = make([]float64, n)
	sign := 1.0
	if s.Mode == LSB {
		sign = -1
	}
	type seg struct {
		a, b     int     // samples
		voiced   bool    //
		p0, p1   float64 // phrase pitch at its start and end (for the contour)
		pa, pb   int     // phrase span
		formants [3]float64
		vibPhase float64
		loud     float64
	}
	var segs []seg
	for t := 0; t < n; {
		// a phrase
		plen := int((1.5 + 1.5*r.Float64()) * s.Rate)
		p0 := s.Pitch * (1 + voicePhraseSpread*(2*r.Float64()-1))
		p1 := p0 * (1 - voiceDeclination)
		if s.Steady {
			p0, p1 = s.Pitch, s.Pitch
		}
		pa, pb := t, min(n, t+plen)
		for t < pb {
			syl := int((0.12 + 0.18*r.Float64()) * s.Rate)
			b := min(pb, t+syl)
			segs = append(segs, seg{a: t, b: b, voiced: true, p0: p0, p1: p1, pa: pa, pb: pb,
				formants: formantSets[r.IntN(len(formantSets))], vibPhase: 2 * math.Pi * r.Float64(),
				loud: 0.6 + 0.4*r.Float64()})
			t = b
			gap := int((0.04 + 0.08*r.Float64()) * s.Rate)
			if s.Steady {
				gap = 0
			}
			t = min(pb, t+gap)
		}
		pause := int((0.3 + 0.3*r.Float64()) * s.Rate)
		if s.Steady {
			pause = 0
		}
		t = min(n, t+pause)
	}
	var phase float64
	var amps []float64
	var sigPow float64
	var sigN int
	for _, sg := range segs {
		for i := sg.a; i < sg.b; i++ {
			pt := float64(i-sg.pa) / float64(max(1, sg.pb-sg.pa))
			f0 := sg.p0 + (sg.p1-sg.p0)*pt
			if !s.Steady {
				f0 *= 1 + voiceVibrato*math.Sin(2*math.Pi*voiceVibratoHz*float64(i)/s.Rate+sg.vibPhase)
			}
			phase += 2 * math.Pi * f0 / s.Rate
			if phase > 2*math.Pi {
				phase -= 2 * math.Pi
			}
			// syllable envelope: raised-cosine rise and fall of 30 ms
			ts := float64(i-sg.a) / s.Rate
			te := float64(sg.b-1-i) / s.Rate
			env := sg.loud
			if s.Steady {
				env = 1
			} else {
				if ts < 0.03 {
					env *= 0.5 - 0.5*math.Cos(math.Pi*ts/0.03)
				}
				if te < 0.03 {
					env *= 0.5 - 0.5*math.Cos(math.Pi*te/0.03)
				}
			}
			// harmonic amplitudes: formant resonances over a falling tilt,
			// tapered outside 300–2700 Hz (refreshed every 32 samples)
			if (i-sg.a)%32 == 0 {
				amps = amps[:0]
				for k := 1; float64(k)*f0 < 2800; k++ {
					a := float64(k) * f0
					amp := 1 / math.Sqrt(a/300)
					for _, f := range sg.formants {
						d := (a - f) / 120
						amp *= 1 + 3/(1+d*d)
					}
					amps = append(amps, amp*bandTaper(a))
				}
			}
			zr, zi := math.Cos(phase), sign*math.Sin(phase)
			pr, pi := zr, zi
			var yr, yi float64
			for _, amp := range amps {
				yr += amp * pr
				yi += amp * pi
				pr, pi = pr*zr-pi*zi, pr*zi+pi*zr
			}
			yr *= env
			yi *= env
			x[i] = complex(float32(yr), float32(yi))
			sigPow += yr*yr + yi*yi
			sigN++
		}
	}
	// scale to unit power over the voiced parts, then the carrier and noise
	g := 1 / math.Sqrt(sigPow/float64(max(1, sigN)))
	var cph float64
	for i := range x {
		c := s.Carrier + s.Drift*float64(i)/float64(n)
		carrier[i] = c
		sn, cs := math.Sincos(cph)
		v := complex128(x[i]) * complex(g*cs, g*sn)
		x[i] = complex64(v)
		cph += 2 * math.Pi * c / s.Rate
		if cph > math.Pi {
			cph -= 2 * math.Pi
		}
	}
	if !math.IsInf(s.SNR, 1) {
		// complex white noise: density σ²/rate, so 2700 Hz hold σ²·2700/rate
		sigma2 := math.Pow(10, -s.SNR/10) * s.Rate / 2700
		sd := math.Sqrt(sigma2 / 2)
		for i := range x {
			x[i] += complex(float32(sd*r.NormFloat64()), float32(sd*r.NormFloat64()))
		}
	}
	return x, carrier
}

// bandTaper is 1 over 350–2650 Hz, 0 outside 250–2750 Hz, raised-cosine
// in between (a transmitter's audio band, common practice).
func bandTaper(a float64) float64 {
	switch {
	case a <= 250 || a >= 2750:
		return 0
	case a < 350:
		return 0.5 - 0.5*math.Cos(math.Pi*(a-250)/100)
	case a > 2650:
		return 0.5 - 0.5*math.Cos(math.Pi*(2750-a)/100)
	}
	return 1
}
