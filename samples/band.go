package samples

import (
	"errors"
	"fmt"
	"io"
	"math"
	"math/rand/v2"

	"ssbkit/modem"
)

// BandConfig describes the evening-band capture. DefaultBandConfig gives
// the demo's values.
type BandConfig struct {
	Rate    float64 // capture rate, Hz (48000 or more)
	Center  float64 // centre frequency, Hz
	Seconds float64 // duration
	// NoiseDensity is the band noise, dBFS per Hz (complex, white).
	NoiseDensity float64
	Seed         uint64
}

// DefaultBandConfig returns the demo's band: 24 s at 48 kHz centred on
// 7.150 MHz, noise −105 dBFS/Hz.
func DefaultBandConfig() BandConfig {
	return BandConfig{Rate: 48000, Center: 7.150e6, Seconds: 24, NoiseDensity: -105, Seed: 40}
}

// Station is one transmission of the band scene, as the scene's truth.
type Station struct {
	Label    string  `json:"label"`     // invented description
	Mode     string  `json:"mode"`      // usb, lsb, am or carrier
	OffsetHz float64 `json:"offset_hz"` // (suppressed) carrier at the start, Hz from the centre
	FreqHz   float64 `json:"freq_hz"`   // the same, absolute
	DriftHz  float64 `json:"drift_hz"`  // frequency change over the capture (linear)
	// LevelDBFS is the RMS of the signal while it is active (speech:
	// over its syllables), dBFS. For AM it is the carrier.
	LevelDBFS float64 `json:"level_dbfs"`
	LowHz     float64 `json:"low_hz"`  // lower edge of the occupied band at the start, Hz from the centre
	HighHz    float64 `json:"high_hz"` // upper edge of the same
	Voice     string  `json:"voice,omitempty"`

	voice VoiceConfig
	depth float64 // AM
	key   string  // keyed carrier text
}

// BandTruth is the scene's known content.
type BandTruth struct {
	RateHz       float64    `json:"rate_hz"`
	CenterHz     float64    `json:"center_hz"`
	Seconds      float64    `json:"duration_s"`
	Samples      int64      `json:"samples"`
	NoiseDensity float64    `json:"noise_dbfs_per_hz"`
	AudioBandHz  [2]float64 `json:"audio_band_hz"`
	Stations     []Station  `json:"stations"`
}

// Audio band of every voice station, Hz: common practice for SSB
// telephony.
const bandLow, bandHigh = 300.0, 2700.0

// audioRate is the rate the station audio is made and modulated at.
const audioRate = 8000.0

// stations are the transmissions of the band scene: invented descriptions,
// no call signs.
func stations() []Station {
	return []Station{
		{Label: "net control, strong, low voice", Mode: "lsb", OffsetHz: -17000, LevelDBFS: -24,
			voice: VoiceConfig{Pitch: 105, Seed: 101}},
		{Label: "portable station, drifting", Mode: "lsb", OffsetHz: -9500, DriftHz: 25, LevelDBFS: -32,
			voice: VoiceConfig{Pitch: 135, Formants: 1.05, Seed: 102}},
		{Label: "AM broadcast-style station", Mode: "am", OffsetHz: -3000, LevelDBFS: -30, depth: 0.8,
			voice: VoiceConfig{Pitch: 120, Level: 0.2, Seed: 103}},
		{Label: "high voice, upper sideband", Mode: "usb", OffsetHz: 5000, LevelDBFS: -28,
			voice: VoiceConfig{Pitch: 215, Formants: 1.17, Seed: 104}},
		{Label: "steady carrier", Mode: "carrier", OffsetHz: 9000, LevelDBFS: -45},
		{Label: "weak distant station", Mode: "usb", OffsetHz: 12500, LevelDBFS: -42,
			voice: VoiceConfig{Pitch: 160, Formants: 1.08, Pause: 0.4, Seed: 105}},
		{Label: "keyed carrier sending TEST", Mode: "carrier", OffsetHz: 20000, LevelDBFS: -38, key: "TEST"},
	}
}

// BandSignal generates the band capture block by block.
type BandSignal struct {
	cfg      BandConfig
	truth    BandTruth
	src      []*stationGen
	sigma    float64
	pcg      *rand.PCG
	rng      *rand.Rand
	total, n int64
}

// NewBand returns the band scene for cfg.
func NewBand(cfg BandConfig) (*BandSignal, error) {
	if !(cfg.Rate >= 48000) || !(cfg.Seconds > 0) || cfg.Seconds > 3600 {
		return nil, errors.New("samples: band rate must be at least 48 kHz and the duration 0–3600 s")
	}
	b := &BandSignal{cfg: cfg}
	b.pcg, b.rng = newRand(cfg.Seed)
	b.total = int64(math.Round(cfg.Seconds * cfg.Rate))
	b.sigma = math.Sqrt(math.Pow(10, cfg.NoiseDensity/10) * cfg.Rate / 2)
	b.truth = BandTruth{RateHz: cfg.Rate, CenterHz: cfg.Center, Seconds: cfg.Seconds, Samples: b.total,
		NoiseDensity: cfg.NoiseDensity, AudioBandHz: [2]float64{bandLow, bandHigh}}
	for _, st := range stations() {
		st.FreqHz = cfg.Center + st.OffsetHz
		switch st.Mode {
		case "usb":
			st.LowHz, st.HighHz = st.OffsetHz+bandLow, st.OffsetHz+bandHigh
		case "lsb":
			st.LowHz, st.HighHz = st.OffsetHz-bandHigh, st.OffsetHz-bandLow
		case "am":
			st.LowHz, st.HighHz = st.OffsetHz-bandHigh, st.OffsetHz+bandHigh
		default:
			st.LowHz, st.HighHz = st.OffsetHz, st.OffsetHz
		}
		g, err := newStationGen(st, cfg)
		if err != nil {
			return nil, fmt.Errorf("samples: station %q: %w", st.Label, err)
		}
		if st.voice.Rate != 0 || st.Mode != "carrier" {
			v := g.voice.Config()
			st.Voice = fmt.Sprintf("pitch %.0f Hz, formants ×%.2f", v.Pitch, v.Formants)
		}
		b.truth.Stations = append(b.truth.Stations, st)
		b.src = append(b.src, g)
	}
	return b, nil
}

// Truth returns what the capture contains.
func (b *BandSignal) Truth() BandTruth { return b.truth }

// Samples is the length of the capture.
func (b *BandSignal) Samples() int64 { return b.total }

// Read fills dst with the next samples of the capture and returns how many
// it wrote; at the end it returns 0, io.EOF.
func (b *BandSignal) Read(dst []complex64) (int, error) {
	left := b.total - b.n
	if left <= 0 {
		return 0, io.EOF
	}
	if int64(len(dst)) > left {
		dst = dst[:left]
	}
	for i := range dst {
		dst[i] = complex(float32(b.sigma*b.rng.NormFloat64()), float32(b.sigma*b.rng.NormFloat64()))
	}
	for _, s := range b.src {
		s.add(dst)
	}
	b.n += int64(len(dst))
	return len(dst), nil
}

// ReadAll returns the rest of the capture in one slice (24 s at 48 kHz
// is 9 MB; Read streams a longer scene).
func (b *BandSignal) ReadAll() []complex64 {
	x := make([]complex64, b.total-b.n)
	for k := 0; k < len(x); {
		n, _ := b.Read(x[k:])
		if n == 0 {
			break
		}
		k += n
	}
	return x
}

// stationGen makes one station's complex baseband at the capture rate.
type stationGen struct {
	st    Station
	total float64 // samples in the capture, for the drift

	voice *Voice
	mod   *modem.Modulator // audio → complex baseband at the capture rate
	osc   *modem.Oscillator
	keyer *Keyer
	amp   float64

	audio []float32
	base  []complex64
	up    []complex64
	fifo  []complex64 // capture-rate samples made; fifo[head:] not yet used
	head  int
	made  int64 // capture-rate samples made so far
}

const chunk = 256 // audio samples per modulation step

func newStationGen(st Station, cfg BandConfig) (*stationGen, error) {
	g := &stationGen{st: st, total: cfg.Seconds * cfg.Rate}
	g.osc = modem.NewOscillator(st.OffsetHz, cfg.Rate)
	level := math.Pow(10, st.LevelDBFS/20)
	if st.Mode == "carrier" {
		g.amp = level
		if st.key != "" {
			g.keyer = NewKeyer(st.key, 12, 0.01, cfg.Rate)
			// level is the RMS while keyed down
		}
		g.base = make([]complex64, chunk*8)
		return g, nil
	}
	vc := st.voice
	vc.Rate = audioRate
	v, err := NewVoice(vc)
	if err != nil {
		return nil, err
	}
	g.voice = v
	tc := modem.TxConfig{Mode: st.Mode, BandLow: bandLow, BandHigh: bandHigh, AudioRate: audioRate, OutRate: cfg.Rate}
	switch st.Mode {
	case "usb", "lsb":
		// Unity convention of the modulator: a real tone a·cos becomes
		// a·e^{jωn}, so the power doubles and the speech RMS v.Level
		// becomes v.Level·√2.
		tc.Gain = level / (v.Config().Level * math.Sqrt2)
	case "am":
		// The voice is limited to ±limit: that is the audio peak the
		// depth refers to, and the carrier, Gain·Peak/Depth, is level.
		tc.Depth = st.depth
		tc.Levels = modem.AudioLevels{Peak: limit, Max: limit, Min: -limit, EnvelopePeak: limit}
		tc.Gain = level * st.depth / limit
	default:
		return nil, fmt.Errorf("unknown mode %q", st.Mode)
	}
	g.mod, err = modem.NewModulator(tc)
	if err != nil {
		return nil, err
	}
	g.audio = make([]float32, chunk)
	g.up = make([]complex64, g.mod.MaxOut(chunk))
	return g, nil
}

// produce appends the next stretch of the station's signal to g.fifo.
func (g *stationGen) produce() {
	if g.st.DriftHz != 0 {
		g.osc.SetFrequency(g.st.OffsetHz + g.st.DriftHz*float64(g.made)/g.total)
	}
	var out []complex64
	if g.voice == nil {
		out = g.base
		for i := range out {
			a := g.amp
			if g.keyer != nil {
				a *= g.keyer.Next()
			}
			out[i] = complex(float32(a), 0)
		}
	} else {
		out = g.mod.Process(g.up, g.voice.Generate(g.audio))
	}
	out = g.osc.Mix(out, out)
	g.fifo = append(g.fifo, out...)
	g.made += int64(len(out))
}

// add adds the next len(dst) samples of the station to dst.
func (g *stationGen) add(dst []complex64) {
	for len(dst) > 0 {
		if g.head == len(g.fifo) {
			g.fifo, g.head = g.fifo[:0], 0
			g.produce()
			continue
		}
		k := min(len(dst), len(g.fifo)-g.head)
		for i, v := range g.fifo[g.head : g.head+k] {
			dst[i] += v
		}
		dst = dst[k:]
		g.head += k
	}
}
