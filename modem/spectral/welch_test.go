package spectral

import (
	"bufio"
	"encoding/binary"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"
)

func TestWindowENBW(t *testing.T) {
	// Harris 1978 (Proc. IEEE 66(1)), Table 1, equivalent noise bandwidth
	// in bins: Hann 1.50, 4-term Blackman–Harris 2.00. The flat-top
	// weights are MATLAB's "flattop" as in gonum; its ENBW 3.77 bins is
	// from memory (3.7702 computed from its weights in the large-n limit).
	const tol = 0.01
	for _, tc := range []struct {
		w    Window
		want float64
	}{
		{Hann, 1.50},
		{BlackmanHarris, 2.00},
		{FlatTop, 3.77},
	} {
		if got := tc.w.ENBW(4096); math.Abs(got-tc.want) > tol {
			t.Errorf("%v: ENBW %.4f bins, want %.2f", tc.w, got, tc.want)
		}
	}
}

func TestWhiteNoiseDensity(t *testing.T) {
	// White noise of variance σ² has a flat two-sided density σ²/fs
	// (Oppenheim & Schafer, Discrete-Time Signal Processing, 3rd ed.,
	// section 10.5.3: the averaged periodogram is asymptotically unbiased
	// when scaled by the window energy).
	const (
		rate     = 48000.0
		variance = 1e-3
		tolDB    = 0.2
	)
	want := 10 * math.Log10(variance/rate)
	x := addNoise(make([]complex64, 1<<18), variance, 1)
	for _, w := range []Window{Hann, FlatTop, BlackmanHarris} {
		for _, n := range []int{256, 4096} {
			a := NewAccumulatorOptions(n, rate, Options{Window: w})
			a.Add(x)
			var mean float64
			for _, v := range a.PSD() {
				mean += v
			}
			mean /= float64(n)
			if got := 10 * math.Log10(mean); dBdiff(got, want) > tolDB {
				t.Errorf("%v n=%d: density %.3f dBFS/Hz, want %.3f", w, n, got, want)
			}
			if got := 10 * math.Log10(NoiseFloor(a.PSD(), rate, 60)); dBdiff(got, want) > 0.5 {
				// the 30 % quantile sits a little below the mean
				t.Errorf("%v n=%d: noise floor %.3f dBFS/Hz, want %.3f ± 0.5", w, n, got, want)
			}
		}
	}
}

func readCF32(t testing.TB, name string) []complex64 {
	b, err := os.ReadFile(name)
	if err != nil {
		t.Fatal(err)
	}
	x := make([]complex64, len(b)/8)
	for i := range x {
		re := math.Float32frombits(binary.LittleEndian.Uint32(b[8*i:]))
		im := math.Float32frombits(binary.LittleEndian.Uint32(b[8*i+4:]))
		x[i] = complex(re, im)
	}
	return x
}

func readGolden(t testing.TB, name string) []float64 {
	f, err := os.Open(name)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var v []float64
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		s := strings.TrimSpace(sc.Text())
		if s == "" || s[0] == '#' {
			continue
		}
		x, err := strconv.ParseFloat(s, 64)
		if err != nil {
			t.Fatal(err)
		}
		v = append(v, x)
	}
	return v
}

func TestWelchScipyGolden(t *testing.T) {
	// Golden values: scipy.signal.welch (scipy 1.10.1), made by
	// testdata/welch_golden.py: periodic Hann, 256 points, hop 64,
	// no detrend, two-sided density.
	const relTol = 1e-9
	x := readCF32(t, "testdata/welch_input.cf32")
	want := readGolden(t, "testdata/welch_golden.txt")
	a := NewAccumulatorOptions(256, 48000, Options{Window: Hann, Hop: 64})
	a.Add(x)
	got := a.PSD()
	if len(got) != len(want) {
		t.Fatalf("%d bins, golden has %d", len(got), len(want))
	}
	if a.Segments() != 59 {
		// (4000 − 256)/64 + 1 segments, as scipy counts them
		t.Errorf("%d segments, want 59", a.Segments())
	}
	for k, w := range want { // golden in FFT order
		j := (k + 128) % 256
		if math.Abs(got[j]-w) > relTol*w {
			t.Errorf("bin %d: %.12g, scipy %.12g", k, got[j], w)
		}
	}
}

func TestToneLevelFlatTop(t *testing.T) {
	// A complex tone of amplitude A has power A² (definition of dBFS in
	// DESIGN.md); the flat-top peak reads it within 0.1 dB wherever the
	// tone falls between bins (the requirement; the MATLAB
	// flat-top scallop loss is below 0.01 dB, from memory).
	const (
		rate  = 48000.0
		n     = 4096
		tolDB = 0.1
	)
	bin := rate / n
	for _, frac := range []float64{0, 0.1, 0.25, 0.37, 0.5, 0.73} {
		for _, amp := range []float64{1, 0.01} {
			f := 1000*bin + frac*bin
			x := lines(n*8, rate, line{f: f, amp: amp, phase: 0.4})
			a := NewAccumulatorOptions(n, rate, Options{Window: FlatTop})
			a.Add(x)
			s := a.Spectrum()
			gotF, p, ok := s.Tone(f, 4*bin)
			want := 20 * math.Log10(amp)
			if !ok || dBdiff(DB(p), want) > tolDB {
				t.Errorf("tone at +%.2f bin, amp %g: %.3f dBFS, want %.3f", frac, amp, DB(p), want)
			}
			if math.Abs(gotF-f) > bin {
				t.Errorf("tone at %.2f Hz found at %.2f", f, gotF)
			}
		}
	}
}

func TestBlockwiseEqualsWhole(t *testing.T) {
	// Segmentation must not depend on how the stream is cut (common
	// practice for streaming blocks; exact equality expected).
	x := addNoise(lines(20000, 8000, line{f: 1234, amp: 0.5}), 1e-2, 3)
	for _, hop := range []int{0, 100, 512, 700} {
		whole := NewAccumulatorOptions(512, 8000, Options{Hop: hop})
		whole.Add(x)
		want := whole.PSD()
		for _, bs := range []int{1, 7, 64, 511, 512, 513, 4096, 20000} {
			a := NewAccumulatorOptions(512, 8000, Options{Hop: hop})
			for i := 0; i < len(x); i += bs {
				a.Add(x[i:min(i+bs, len(x))])
			}
			if a.Segments() != whole.Segments() {
				t.Fatalf("hop %d block %d: %d segments, want %d", hop, bs, a.Segments(), whole.Segments())
			}
			got := a.PSD()
			for j := range got {
				if got[j] != want[j] {
					t.Fatalf("hop %d block %d: bin %d differs: %g vs %g", hop, bs, j, got[j], want[j])
				}
			}
		}
	}
}

func TestWorkersEqualSerial(t *testing.T) {
	// Any number of workers and any block size give the serial result
	// bit for bit: each bin's sum takes the segments in stream order
	// (exact equality expected), also across a Spectrum read mid-stream.
	x := addNoise(lines(30011, 8000, line{f: 1234, amp: 0.5}, line{f: -2000, amp: 0.01}), 1e-2, 31)
	for _, n := range []int{1024, 512, 384} { // fused radix-4, radix-4 and gonum paths
		for _, hop := range []int{0, 100, 700} {
			ref := NewWaterfall(n, 8000, 4, 64, Options{Hop: hop})
			ref.Add(x)
			wantPSD, wantRows := ref.Accumulator().PSD(), ref.Rows()
			for _, workers := range []int{2, 3} {
				for _, bs := range []int{1, 333, 4096, len(x)} {
					w := NewWaterfall(n, 8000, 4, 64, Options{Hop: hop, Workers: workers})
					for i := 0; i < len(x); i += bs {
						w.Add(x[i:min(i+bs, len(x))])
						if i == 5*bs {
							_ = w.Accumulator().PSD() // flushes a partial batch
						}
					}
					got, rows := w.Accumulator().PSD(), w.Rows()
					w.Close()
					if w.Accumulator().Segments() != ref.Accumulator().Segments() {
						t.Fatalf("n %d hop %d workers %d block %d: %d segments, want %d", n, hop, workers, bs,
							w.Accumulator().Segments(), ref.Accumulator().Segments())
					}
					for j := range got {
						if got[j] != wantPSD[j] {
							t.Fatalf("n %d hop %d workers %d block %d: bin %d %g, serial %g", n, hop, workers, bs, j, got[j], wantPSD[j])
						}
					}
					if len(rows) != len(wantRows) {
						t.Fatalf("n %d hop %d workers %d block %d: %d rows, want %d", n, hop, workers, bs, len(rows), len(wantRows))
					}
					for r := range rows {
						for c := range rows[r] {
							if rows[r][c] != wantRows[r][c] {
								t.Fatalf("n %d hop %d workers %d block %d: row %d col %d differs", n, hop, workers, bs, r, c)
							}
						}
					}
				}
			}
		}
	}
}

func TestAddDoesNotAllocate(t *testing.T) {
	x := addNoise(make([]complex64, 3000), 1, 4)
	a := NewAccumulator(1024, 48000)
	a2 := NewAccumulatorOptions(1024, 48000, Options{Workers: 2})
	defer a2.Close()
	w := NewWaterfall(1024, 48000, 4, 256, Options{})
	m, err := NewMeasurer(48000, -1, MeasureOptions{Resolution: 50})
	if err != nil {
		t.Fatal(err)
	}
	mw, err := NewMeasurer(2.4e6, -1, MeasureOptions{CarrierHz: 100e3, Resolution: 50})
	if err != nil || mw.MeasureRate() == 2.4e6 {
		t.Fatalf("wide measurer: %v, measuring at %g Hz", err, mw.MeasureRate())
	}
	for i := 0; i < 40; i++ { // reach the steady state (waterfall rows)
		w.Add(x)
		m.Add(x)
		mw.Add(x)
	}
	for name, f := range map[string]func(){
		"Accumulator":           func() { a.Add(x) },
		"Accumulator/2 workers": func() { a2.Add(x) },
		"Waterfall":             func() { w.Add(x) },
		"Measurer":              func() { m.Add(x) },
		"Measurer/narrowed":     func() { mw.Add(x) },
	} {
		if got := testing.AllocsPerRun(20, f); got != 0 {
			t.Errorf("%s.Add: %v allocations per call, want 0", name, got)
		}
	}
}

func TestBandPowerParseval(t *testing.T) {
	// The density integrates to the signal power over the whole band
	// (Parseval; Oppenheim & Schafer, 3rd ed., eq. 8.68 for the DFT) for
	// any window once its energy is accounted for.
	const tolDB = 0.05
	x := lines(1<<16, 48000, line{f: 3000, amp: 0.5}, line{f: -7001.3, amp: 0.1})
	want := 10 * math.Log10(0.25+0.01)
	for _, w := range []Window{Hann, FlatTop, BlackmanHarris} {
		a := NewAccumulatorOptions(2048, 48000, Options{Window: w})
		a.Add(x)
		s := a.Spectrum()
		if got := DB(s.BandPower(-24000, 24000)); dBdiff(got, want) > tolDB {
			t.Errorf("%v: total %.3f dBFS, want %.3f", w, got, want)
		}
		if got := DB(s.BandPower(2500, 3500)); dBdiff(got, DB(0.25)) > tolDB {
			t.Errorf("%v: band power %.3f dBFS, want %.3f", w, got, DB(0.25))
		}
	}
}

func TestOccupiedBandwidthFlatNoise(t *testing.T) {
	// Noise flat over a band of width B has its 99 % bandwidth equal to
	// 0.99·B (ITU-R SM.328, β/2 = 0.5 % each side); within 1 %.
	const (
		rate = 48000.0
		tol  = 0.01
	)
	for _, tc := range []struct{ lo, hi float64 }{
		{-3000, 3000}, {1000, 4000}, {-15000, -5000},
	} {
		x := bandNoise(1<<18, rate, 0.1, 5, func(f float64) float64 {
			if f >= tc.lo && f <= tc.hi {
				return 1
			}
			return 0
		})
		y := make([]complex64, len(x))
		for i, v := range x {
			y[i] = complex64(v)
		}
		addNoise(y, 1e-9, 6)
		a := NewAccumulator(4096, rate)
		a.Add(y)
		lo, hi, ok := a.Spectrum().OccupiedBandwidth(-rate/2, rate/2, 0.99)
		want := 0.99 * (tc.hi - tc.lo)
		if got := hi - lo; !ok || math.Abs(got-want) > tol*want {
			t.Errorf("band %g:%g: OBW %.1f Hz (%.1f…%.1f), want %.1f ± 1 %%", tc.lo, tc.hi, got, lo, hi, want)
		}
	}
}

func TestWaterfallRows(t *testing.T) {
	// Rows stay within MaxRows…2·MaxRows, keep time order, and average
	// back to the Welch spectrum (both are means of the same periodograms).
	const rate = 8000.0
	n := 256
	quiet := addNoise(make([]complex64, 200*n), 1e-6, 8)
	loud := addNoise(lines(200*n, rate, line{f: 1000, amp: 0.5}), 1e-6, 9)
	w := NewWaterfall(n, rate, 16, 64, Options{Hop: n})
	w.Add(quiet)
	w.Add(loud)
	rows := w.Rows()
	if len(rows) < 16 || len(rows) > 32 {
		t.Fatalf("%d rows, want 16…32", len(rows))
	}
	col := int(float64(n/2)+1000/(rate/float64(n))) * 64 / n
	first, last := rows[0][col], rows[len(rows)-1][col]
	if DB(last)-DB(first) < 40 {
		t.Errorf("tone column: first row %.1f dB, last %.1f dB: the tone should appear only late", DB(first), DB(last))
	}
	// mean of the rows (weighted by segments) equals the column-averaged
	// spectrum
	s := w.Accumulator().Spectrum()
	per := int(math.Round(w.RowSeconds() * rate / float64(n)))
	var sum, segs float64
	for r, row := range rows {
		k := float64(per)
		if r == len(rows)-1 {
			k = float64(w.Accumulator().Segments() - per*(len(rows)-1))
		}
		sum += row[col] * k
		segs += k
	}
	var want float64
	for j := col * n / 64; j < (col+1)*n/64; j++ {
		want += s.Density[j]
	}
	want /= float64(n / 64)
	if got := sum / segs; math.Abs(got-want) > 1e-9*want {
		t.Errorf("rows average %g, spectrum %g", got, want)
	}
}
