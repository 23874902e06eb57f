package samples

import (
	"errors"
	"io"
	"math"
	"math/cmplx"
	"math/rand/v2"
)

// BenchConfig describes the bench test: a two-tone transmission of the
// user's own transmitter, upper sideband, as captured by a receiver with a
// small I/Q imbalance. Levels in dB are of amplitude-squared (power).
// DefaultBenchConfig gives the demo's values; every field is used as given.
type BenchConfig struct {
	Rate    float64 // capture rate, Hz
	Center  float64 // centre frequency of the capture, Hz (metadata only)
	Seconds float64 // duration
	Offset  float64 // (suppressed) carrier, Hz from the centre

	Tone1, Tone2 float64 // audio tones, Hz above the carrier
	PEPDBFS      float64 // two-tone peak envelope power without the imperfections, dBFS

	OppositeDB  float64 // each tone's image in the opposite sideband, dB below the tone
	CarrierDBc  float64 // carrier leak, dB relative to the two-tone PEP
	IMD3LowDBc  float64 // product at 2·Tone1 − Tone2, dB relative to one tone
	IMD3HighDBc float64 // product at 2·Tone2 − Tone1, dB relative to one tone

	GainDB    float64 // receiver Q path gain over I path gain, dB
	PhaseDeg  float64 // receiver Q path's departure from 90°, degrees
	NoiseDBFS float64 // total power of the receiver's white noise, dBFS
	Seed      uint64
}

// DefaultBenchConfig returns the demo's bench test: 5 s at 48 kHz, carrier
// 6 kHz above the centre of 7.090 MHz, tones at 1000 and 1600 Hz (both
// third-order products fall inside the 300–2700 Hz band: 400 and 2200 Hz),
// PEP −6 dBFS, opposite sideband −45 dB, carrier −40 dBc, IMD3 −35 and
// −38 dBc, receiver imbalance 0.2 dB and 1°, noise −80 dBFS.
func DefaultBenchConfig() BenchConfig {
	return BenchConfig{
		Rate: 48000, Center: 7.090e6, Seconds: 5, Offset: 6000,
		Tone1: 1000, Tone2: 1600, PEPDBFS: -6,
		OppositeDB: -45, CarrierDBc: -40, IMD3LowDBc: -35, IMD3HighDBc: -38,
		GainDB: 0.2, PhaseDeg: 1, NoiseDBFS: -80, Seed: 17,
	}
}

// benchTone is one complex exponential of the bench signal.
type benchTone struct {
	freq  float64 // Hz from the centre
	amp   float64
	phase float64 // radians at n = 0
}

// BenchSignal generates the bench test capture, block by block.
type BenchSignal struct {
	cfg    BenchConfig
	tones  []benchTone
	mu, nu complex128
	sigma  float64 // noise standard deviation per component
	total  int64
	n      int64
	pcg    *rand.PCG
	rng    *rand.Rand
}

// NewBench returns the bench test for cfg. The tones, carrier and products
// are complex exponentials with exactly the configured levels; the opposite
// sideband and products start at seeded random phases.
func NewBench(cfg BenchConfig) (*BenchSignal, error) {
	switch {
	case !(cfg.Rate > 0) || !(cfg.Seconds > 0):
		return nil, errors.New("samples: bench rate and duration must be positive")
	case !(cfg.Tone1 > 0 && cfg.Tone2 > cfg.Tone1):
		return nil, errors.New("samples: bench tones must satisfy 0 < Tone1 < Tone2")
	case math.Abs(cfg.Offset)+2*cfg.Tone2 >= cfg.Rate/2:
		return nil, errors.New("samples: bench signal does not fit in the capture bandwidth")
	case !(cfg.PEPDBFS <= 0):
		return nil, errors.New("samples: bench PEP must be at most 0 dBFS")
	}
	b := &BenchSignal{cfg: cfg}
	b.pcg, b.rng = newRand(cfg.Seed)
	a := math.Pow(10, cfg.PEPDBFS/20) / 2 // PEP (2a)²
	db := func(x float64) float64 { return math.Pow(10, x/20) }
	ph := func() float64 { return 2 * math.Pi * b.rng.Float64() }
	f1, f2 := cfg.Tone1, cfg.Tone2
	b.tones = []benchTone{
		{cfg.Offset + f1, a, 0},
		{cfg.Offset + f2, a, 0},
		{cfg.Offset - f1, a * db(cfg.OppositeDB), ph()},
		{cfg.Offset - f2, a * db(cfg.OppositeDB), ph()},
		{cfg.Offset, 2 * a * db(cfg.CarrierDBc), ph()},
		{cfg.Offset + 2*f1 - f2, a * db(cfg.IMD3LowDBc), ph()},
		{cfg.Offset + 2*f2 - f1, a * db(cfg.IMD3HighDBc), ph()},
	}
	b.mu, b.nu = imbalance(cfg.GainDB, cfg.PhaseDeg)
	b.sigma = math.Sqrt(math.Pow(10, cfg.NoiseDBFS/10) / 2)
	b.total = int64(math.Round(cfg.Seconds * cfg.Rate))
	b.Reset()
	return b, nil
}

// imbalance returns μ and ν of y = μx + νx* for a Q path of gain g (dB)
// and phase error φ (degrees): yI = xI, yQ = g·(xQ·cosφ − xI·sinφ), which
// gives μ = (1 + g·e^{−jφ})/2 and ν = (1 − g·e^{jφ})/2.
func imbalance(gainDB, phaseDeg float64) (mu, nu complex128) {
	g := math.Pow(10, gainDB/20)
	phi := phaseDeg * math.Pi / 180
	mu = (1 + complex(g, 0)*cmplx.Exp(complex(0, -phi))) / 2
	nu = (1 - complex(g, 0)*cmplx.Exp(complex(0, phi))) / 2
	return mu, nu
}

// Config returns the configuration.
func (b *BenchSignal) Config() BenchConfig { return b.cfg }

// Samples is the length of the capture.
func (b *BenchSignal) Samples() int64 { return b.total }

// Reset returns to the first sample.
func (b *BenchSignal) Reset() {
	b.n = 0
	b.pcg.Seed(b.cfg.Seed, seedStream+1)
}

// Read fills dst with the next samples of the capture and returns how many
// it wrote; at the end it returns 0, io.EOF.
func (b *BenchSignal) Read(dst []complex64) (int, error) {
	left := b.total - b.n
	if left <= 0 {
		return 0, io.EOF
	}
	if int64(len(dst)) > left {
		dst = dst[:left]
	}
	g := math.Pow(10, b.cfg.GainDB/20)
	phi := b.cfg.PhaseDeg * math.Pi / 180
	sinp, cosp := math.Sincos(phi)
	for i := range dst {
		var xr, xi float64
		for _, t := range b.tones {
			c := t.freq / b.cfg.Rate * float64(b.n)
			c -= math.Floor(c)
			s, co := math.Sincos(2*math.Pi*c + t.phase)
			xr += t.amp * co
			xi += t.amp * s
		}
		// receiver: imbalance of the Q path, then its white noise
		yr := xr
		yi := g * (xi*cosp - xr*sinp)
		yr += b.sigma * b.rng.NormFloat64()
		yi += b.sigma * b.rng.NormFloat64()
		dst[i] = complex(float32(yr), float32(yi))
		b.n++
	}
	return len(dst), nil
}

// BenchTone is one tone of the bench truth.
type BenchTone struct {
	OffsetHz float64 `json:"offset_hz"` // from the carrier
	DBFS     float64 `json:"dbfs"`
}

// BenchTruth is what the bench test capture contains, in the units and
// with the definitions of the measure command (see DESIGN.md, Definitions).
type BenchTruth struct {
	RateHz          float64     `json:"rate_hz"`
	CenterHz        float64     `json:"center_hz"`
	CarrierOffsetHz float64     `json:"carrier_offset_hz"`
	Sideband        string      `json:"sideband"`
	BandHz          [2]float64  `json:"band_hz"`
	Tones           []BenchTone `json:"tones"`
	PEPDBFS         float64     `json:"pep_dbfs"` // peak of |y|² over the generated capture
	WantedDBFS      float64     `json:"wanted_dbfs"`
	UnwantedDBFS    float64     `json:"unwanted_dbfs"`
	SuppressionDB   float64     `json:"suppression_db"`
	CarrierDBc      float64     `json:"carrier_dbc"`
	IMD3DBc         float64     `json:"imd3_dbc"`
	IMD3DBPEP       float64     `json:"imd3_db_pep"`
	GainImbalanceDB float64     `json:"iq_gain_imbalance_db"`
	PhaseImbalDeg   float64     `json:"iq_phase_imbalance_deg"`
	ImageRejDB      float64     `json:"image_rejection_db"`
}

// Truth returns the figures a perfect measurement of the capture would
// give over the audio band 300–2700 Hz. Levels are exact powers of the
// injected components (scaled by |μ|² of the receiver) plus the expected
// noise power in the band; PEP is found by generating the whole capture
// once.
func (b *BenchSignal) Truth() BenchTruth {
	const low, high = 300, 2700
	cfg := b.cfg
	m2 := real(b.mu * cmplx.Conj(b.mu))
	p := func(amp float64) float64 { return m2 * amp * amp }
	noise := math.Pow(10, cfg.NoiseDBFS/10) * (high - low) / cfg.Rate
	var wanted, unwanted float64
	for _, t := range b.tones {
		d := t.freq - cfg.Offset
		switch {
		case d >= low && d <= high:
			wanted += p(t.amp)
		case -d >= low && -d <= high:
			unwanted += p(t.amp)
		}
	}
	wanted += noise
	unwanted += noise

	// PEP of the actual capture: a fresh generator, same seed.
	c, _ := NewBench(cfg)
	buf := make([]complex64, 4096)
	var pep float64
	for {
		n, err := c.Read(buf)
		for _, v := range buf[:n] {
			pep = math.Max(pep, float64(real(v))*float64(real(v))+float64(imag(v))*float64(imag(v)))
		}
		if err != nil {
			break
		}
	}
	dB := func(x float64) float64 { return 10 * math.Log10(x) }
	tone := p(b.tones[0].amp)
	imd := math.Max(p(b.tones[5].amp), p(b.tones[6].amp))
	nu2 := real(b.nu * cmplx.Conj(b.nu))
	return BenchTruth{
		RateHz: cfg.Rate, CenterHz: cfg.Center, CarrierOffsetHz: cfg.Offset,
		Sideband: "upper", BandHz: [2]float64{low, high},
		Tones: []BenchTone{
			{cfg.Tone1, dB(p(b.tones[0].amp))},
			{cfg.Tone2, dB(p(b.tones[1].amp))},
		},
		PEPDBFS:         dB(pep),
		WantedDBFS:      dB(wanted),
		UnwantedDBFS:    dB(unwanted),
		SuppressionDB:   dB(wanted) - dB(unwanted),
		CarrierDBc:      dB(p(b.tones[4].amp)) - dB(pep),
		IMD3DBc:         dB(imd) - dB(tone),
		IMD3DBPEP:       dB(imd) - dB(pep),
		GainImbalanceDB: cfg.GainDB,
		PhaseImbalDeg:   cfg.PhaseDeg,
		ImageRejDB:      dB(m2) - dB(nu2),
	}
}
