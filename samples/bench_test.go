package samples

import (
	"io"
	"math"
	"math/cmplx"
	"testing"
)

// cproject returns the complex amplitude of e^{j2πfn/rate} in x:
// (1/N)·Σ x[n]·e^{−j2πfn/rate}, exact when x holds whole cycles.
func cproject(x []complex64, f, rate float64) complex128 {
	var s complex128
	for n, v := range x {
		s += complex128(v) * cmplx.Exp(complex(0, -2*math.Pi*f*float64(n)/rate))
	}
	return s / complex(float64(len(x)), 0)
}

// readAll reads a capture generator to its end in blocks of block samples.
func readAll(t *testing.T, b interface {
	Read([]complex64) (int, error)
}, block int) []complex64 {
	t.Helper()
	var out []complex64
	buf := make([]complex64, block)
	for {
		n, err := b.Read(buf)
		out = append(out, buf[:n]...)
		if err == io.EOF {
			return out
		}
		if err != nil {
			t.Fatal(err)
		}
	}
}

func TestBenchComponents(t *testing.T) {
	// Each component is measured by projection on its exponential over a
	// whole number of cycles (1 s, whole-Hz frequencies): the DFT at an
	// exact bin (Oppenheim & Schafer, Discrete-Time Signal Processing, 3rd
	// ed., eq. 8.67, the DFT definition). The image of e^{jωn} through
	// y = μx + νx* is ν·e^{−jωn}, so image rejection 10·log10(|μ|²/|ν|²)
	// must equal 10·log10((1+2g·cosφ+g²)/(1−2g·cosφ+g²)) (the usual
	// gain/phase image-rejection formula, from memory).
	const tolDB = 0.02 // noise at −80 dBFS against components ≥ −57 dBFS
	cfg := DefaultBenchConfig()
	cfg.Seconds = 1
	b, err := NewBench(cfg)
	if err != nil {
		t.Fatal(err)
	}
	x := readAll(t, b, 1000)
	if len(x) != 48000 {
		t.Fatalf("%d samples, want 48000", len(x))
	}
	tr := b.Truth()
	dB := func(c complex128) float64 { return 20 * math.Log10(cmplx.Abs(c)) }
	f := func(off float64) float64 { return dB(cproject(x, cfg.Offset+off, cfg.Rate)) }
	checks := []struct {
		name      string
		got, want float64
	}{
		{"tone 1 dBFS", f(cfg.Tone1), tr.Tones[0].DBFS},
		{"tone 2 dBFS", f(cfg.Tone2), tr.Tones[1].DBFS},
		{"opposite sideband", f(-cfg.Tone1) - f(cfg.Tone1), cfg.OppositeDB},
		{"carrier re PEP", f(0) - tr.PEPDBFS, tr.CarrierDBc},
		{"IMD3 low", f(2*cfg.Tone1-cfg.Tone2) - f(cfg.Tone1), cfg.IMD3LowDBc},
		{"IMD3 high", f(2*cfg.Tone2-cfg.Tone1) - f(cfg.Tone1), cfg.IMD3HighDBc},
		{"image rejection", f(cfg.Tone1) - dB(cproject(x, -cfg.Offset-cfg.Tone1, cfg.Rate)), tr.ImageRejDB},
	}
	g := math.Pow(10, cfg.GainDB/20)
	c := math.Cos(cfg.PhaseDeg * math.Pi / 180)
	irr := 10 * math.Log10((1+2*g*c+g*g)/(1-2*g*c+g*g))
	checks = append(checks, struct {
		name      string
		got, want float64
	}{"image rejection formula", tr.ImageRejDB, irr})
	for _, ch := range checks {
		if math.Abs(ch.got-ch.want) > tolDB {
			t.Errorf("%s: %.3f dB, want %.3f dB", ch.name, ch.got, ch.want)
		}
	}
	// Two tones at PEP −6 dBFS: each tone 6.02 dB below (common practice),
	// the imperfections move the actual peak by less than 0.3 dB.
	const pepTol = 0.3
	if math.Abs(tr.PEPDBFS-cfg.PEPDBFS) > pepTol {
		t.Errorf("PEP %.2f dBFS, want about %v", tr.PEPDBFS, cfg.PEPDBFS)
	}
	// Suppression: wanted over unwanted band power; the opposite images
	// are 45 dB below the tones, the in-band IMD3 adds 0.0013 dB.
	if math.Abs(tr.SuppressionDB+cfg.OppositeDB) > tolDB {
		t.Errorf("suppression %.3f dB, want about %v", tr.SuppressionDB, -cfg.OppositeDB)
	}
}

func TestBenchBlockwise(t *testing.T) {
	cfg := DefaultBenchConfig()
	cfg.Seconds = 0.1
	mk := func() *BenchSignal { b, _ := NewBench(cfg); return b }
	whole := readAll(t, mk(), 1<<20)
	for _, bs := range []int{1, 17, 1000, 4096} {
		got := readAll(t, mk(), bs)
		for i := range whole {
			if got[i] != whole[i] {
				t.Fatalf("block %d: sample %d differs", bs, i)
			}
		}
	}
}

func TestBenchConfigErrors(t *testing.T) {
	bad := []func(*BenchConfig){
		func(c *BenchConfig) { c.Rate = 0 },
		func(c *BenchConfig) { c.Tone2 = c.Tone1 },
		func(c *BenchConfig) { c.Offset = 23000 },
		func(c *BenchConfig) { c.PEPDBFS = 3 },
	}
	for i, f := range bad {
		c := DefaultBenchConfig()
		f(&c)
		if _, err := NewBench(c); err == nil {
			t.Errorf("case %d: no error", i)
		}
	}
}
