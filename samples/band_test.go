package samples

import (
	"io"
	"math"
	"testing"

	"ssbkit/modem/spectral"
)

func TestBandDetect(t *testing.T) {
	// The scene's stations, as seen by the package's signal detector: a
	// smoke test of the scene rather than of the detector (whose own tests
	// carry the references). Carrier within 200 Hz: the detector's SSB
	// estimate assumes the 300 Hz audio low edge the stations use.
	const carrierTol = 200.0
	cfg := DefaultBandConfig()
	cfg.Seconds = 8
	b, err := NewBand(cfg)
	if err != nil {
		t.Fatal(err)
	}
	acc := spectral.NewAccumulator(4096, cfg.Rate)
	buf := make([]complex64, 10000)
	var peak float64
	for {
		n, err := b.Read(buf)
		acc.Add(buf[:n])
		for _, v := range buf[:n] {
			peak = math.Max(peak, math.Hypot(float64(real(v)), float64(imag(v))))
		}
		if err == io.EOF {
			break
		}
	}
	if peak >= 1 {
		t.Errorf("capture peak %v, want below full scale", peak)
	}
	got := spectral.Detect(acc.PSD(), cfg.Rate, spectral.DetectOptions{})
	for _, s := range got {
		t.Logf("detected %+v", s)
	}
	for _, st := range b.Truth().Stations {
		found := false
		for _, s := range got {
			if math.Abs(s.OffsetHz-st.OffsetHz) <= carrierTol+math.Abs(st.DriftHz) && s.Kind == st.Mode {
				found = true
			}
		}
		if !found {
			t.Errorf("station %q (%s at %+.0f Hz) not detected", st.Label, st.Mode, st.OffsetHz)
		}
	}
}

func TestBandBlockwise(t *testing.T) {
	cfg := DefaultBandConfig()
	cfg.Seconds = 0.5
	mk := func() *BandSignal { b, _ := NewBand(cfg); return b }
	read := func(b *BandSignal, bs int) []complex64 { return readAll(t, b, bs) }
	whole := read(mk(), 1<<20)
	if int64(len(whole)) != mk().Samples() {
		t.Fatalf("%d samples, want %d", len(whole), mk().Samples())
	}
	for _, bs := range []int{1, 333, 4096} {
		got := read(mk(), bs)
		for i := range whole {
			if got[i] != whole[i] {
				t.Fatalf("block %d: sample %d differs", bs, i)
			}
		}
	}
}

// TestScenarioAllocs: the band and bench-test generators read block after
// block without allocating, so a capture of any length needs bounded memory.
func TestScenarioAllocs(t *testing.T) {
	cfg := DefaultBandConfig()
	cfg.Seconds = 60
	band, err := NewBand(cfg)
	if err != nil {
		t.Fatal(err)
	}
	bcfg := DefaultBenchConfig()
	bcfg.Seconds = 60
	bench, err := NewBench(bcfg)
	if err != nil {
		t.Fatal(err)
	}
	buf := make([]complex64, 4096)
	for name, r := range map[string]interface {
		Read([]complex64) (int, error)
	}{"band": band, "bench": bench} {
		r.Read(buf) // the first block starts every station's pipeline
		r.Read(buf)
		if a := testing.AllocsPerRun(20, func() { r.Read(buf) }); a != 0 {
			t.Errorf("%s: %v allocations per block, want 0", name, a)
		}
	}
}

func BenchmarkBand(b *testing.B) {
	cfg := DefaultBandConfig()
	cfg.Seconds = 3600
	s, err := NewBand(cfg)
	if err != nil {
		b.Fatal(err)
	}
	buf := make([]complex64, 16384)
	b.SetBytes(8 * int64(len(buf)))
	b.ReportAllocs()
	for b.Loop() {
		s.Read(buf)
	}
}

func BenchmarkBench(b *testing.B) {
	cfg := DefaultBenchConfig()
	cfg.Seconds = 3600
	s, err := NewBench(cfg)
	if err != nil {
		b.Fatal(err)
	}
	buf := make([]complex64, 16384)
	b.SetBytes(8 * int64(len(buf)))
	b.ReportAllocs()
	for b.Loop() {
		s.Read(buf)
	}
}

// ReadAll returns what Read would, to the end (the scene is seeded).
func TestBandReadAll(t *testing.T) {
	cfg := DefaultBandConfig()
	cfg.Seconds = 1
	a, _ := NewBand(cfg)
	b, _ := NewBand(cfg)
	head := make([]complex64, 777)
	if n, _ := a.Read(head); n != len(head) {
		t.Fatalf("read %d", n)
	}
	got := append(head, a.ReadAll()...)
	var want []complex64
	buf := make([]complex64, 1000)
	for {
		n, err := b.Read(buf)
		want = append(want, buf[:n]...)
		if err == io.EOF {
			break
		}
	}
	if int64(len(got)) != a.Samples() || len(got) != len(want) {
		t.Fatalf("%d samples, want %d", len(got), len(want))
	}
	for i := range got {
		if got[i] != want[i] {
			t.Fatalf("sample %d: %v, want %v", i, got[i], want[i])
		}
	}
	if rest := a.ReadAll(); len(rest) != 0 {
		t.Errorf("%d samples after the end", len(rest))
	}
}
