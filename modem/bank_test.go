package modem

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/dsp/fourier"
)

func TestBankFFT(t *testing.T) {
	// The four interleaved transforms against gonum's complex128 FFT of
	// each lane (a general-purpose reference library). Tolerance: float32
	// rounding over log₂M passes, 1e-6 of the largest bin per pass
	// (common practice), relative to √M (the bins' typical size).
	for _, m := range []int{4, 8, 16, 32, 64, 128, 256, 512, 1024} {
		f := newBankFFT(m)
		r := rand.New(rand.NewPCG(uint64(m), 9))
		x := make([]complex64, 4*m)
		for i := range x {
			x[i] = complex(float32(r.NormFloat64()), float32(r.NormFloat64()))
		}
		ref := fourier.NewCmplxFFT(m)
		want := make([][]complex128, 4)
		for j := range 4 {
			seq := make([]complex128, m)
			for q := range m {
				seq[q] = complex128(x[4*q+j])
			}
			want[j] = ref.Coefficients(nil, seq)
		}
		f.transform(x)
		tol := 1e-6 * math.Log2(float64(m)) * math.Sqrt(float64(m)) * 4
		var worst float64
		for j := range 4 {
			for k := range m {
				e := cmplx.Abs(complex128(x[4*int(f.pos[k])+j]) - want[j][k])
				worst = max(worst, e)
			}
		}
		if worst > tol {
			t.Errorf("M=%d: largest bin error %.3g, want ≤ %.3g", m, worst, tol)
		}
	}
}

// bankDirect computes the Channeliser's defining sum in float64:
// y_k[j] = Σ_l h[l]·x[n−l]·e^{−j2πk(n−l)/M}, n = (j+1)·D − 1, x zero
// before index 0.
func bankDirect(h []float64, m, d int, x []complex64, k, j int) complex128 {
	n := (j+1)*d - 1
	var s complex128
	for l, v := range h {
		i := n - l
		if i < 0 || i >= len(x) {
			continue
		}
		s += complex(v, 0) * complex128(x[i]) * cmplx.Exp(complex(0, -2*math.Pi*float64(k)*float64(i%m)/float64(m)))
	}
	return s
}

func TestChanneliserDefinition(t *testing.T) {
	// Every sub-band's outputs against the defining sum (the channel
	// filter H_k(z) = H_0(z·W_M^k) of Smith, Spectral Audio Signal
	// Processing, 2011, "Polyphase Analysis of Portnoff STFT"), computed
	// directly in float64. Tolerance: float32 rounding of K·M products
	// and the FFT, 2e-6 of the input's RMS per √(K·M) (common practice).
	for _, tc := range []struct{ m, d int }{{8, 4}, {16, 8}, {64, 32}, {16, 5}, {64, 25}, {32, 2}} {
		m := tc.m
		c, err := NewChanneliser(ChanneliserSpec{Rate: 48000, Bands: m, Decim: tc.d})
		if err != nil {
			t.Fatal(err)
		}
		x := gaussNoise(37*m+5, 1, uint64(m))
		bands := make([]int, m)
		for k := range bands {
			bands[k] = k
		}
		got := c.Process(nil, bands, x)
		tol := 2e-6 * math.Sqrt(float64(c.n))
		for k := range m {
			if len(got[k]) != len(x)/c.d {
				t.Fatalf("M=%d band %d: %d outputs, want %d", m, k, len(got[k]), len(x)/c.d)
			}
			for j, v := range got[k] {
				want := bankDirect(c.proto, m, c.d, x, k, j)
				if e := cmplx.Abs(complex128(v) - want); e > tol {
					t.Fatalf("M=%d band %d output %d: %v, want %v (error %.3g > %.3g)", m, k, j, v, want, e, tol)
				}
			}
		}
	}
}

func TestChanneliserBlockSizes(t *testing.T) {
	// Block-size independence (DEVELOPERS.md): any split of the input
	// gives the same outputs (each output is computed from its own window
	// whatever the split; only a last batch of fewer than four outputs
	// runs the Go loops instead of the kernels). Tolerance: 1e-5 of the
	// input's RMS, float32 rounding as in TestChannelBlockSizes.
	const tol = 1e-5
	c, _ := NewChanneliser(ChanneliserSpec{Rate: 2.4e6, Bands: 64, Pass: 20e3})
	x := gaussNoise(50000, 1, 4)
	bands := []int{0, 1, 5, 32, 63, 17}
	ref := c.Process(nil, bands, x)
	for _, bs := range []int{1, 7, 31, 32, 33, 1000, 4096, 65537} {
		c.Reset()
		got := make([][]complex64, len(bands))
		var buf [][]complex64
		for i := 0; i < len(x); i += bs {
			buf = c.Process(buf, bands, x[i:min(len(x), i+bs)])
			for b := range got {
				got[b] = append(got[b], buf[b]...)
			}
		}
		for b := range bands {
			if len(got[b]) != len(ref[b]) {
				t.Fatalf("block %d band %d: %d outputs, want %d", bs, bands[b], len(got[b]), len(ref[b]))
			}
			for i := range got[b] {
				if cmplx.Abs(complex128(got[b][i]-ref[b][i])) > tol {
					t.Fatalf("block %d band %d output %d: %v, want %v", bs, bands[b], i, got[b][i], ref[b][i])
				}
			}
		}
	}
}

func TestChanneliserAliasing(t *testing.T) {
	// The bank's aliasing and pass-band figures against its design: a
	// tone at f from a sub-band's centre comes out of that sub-band with
	// the magnitude |H(f)| of the prototype (the DTFT of its taps,
	// FreqResponse), aliased to f mod 2fs/M. In the pass band |f| ≤ Pass
	// the gain is 1 ± δ and every tone that aliases onto ±Pass comes from
	// |f| ≥ 2fs/M − Pass, where it is at most δ = 10^(−80/20) (the Kaiser
	// design's specification, Oppenheim & Schafer, 3rd ed., sec. 7.5.3).
	// Tolerance of the measured levels against |H(f)|: 1e-6 absolute
	// (float32 rounding, common practice).
	const rate = 2.4e6
	const m = 256
	const pass = rate/(2*m) + 1425 // half the spacing plus a USB channel's half-width
	c, err := NewChanneliser(ChanneliserSpec{Rate: rate, Bands: m, Pass: pass})
	if err != nil {
		t.Fatal(err)
	}
	delta := math.Pow(10, -80.0/20)
	const tol = 1e-6
	out := c.OutRate()
	stop := out - pass
	t.Logf("M=%d, D=%d, %d taps, sub-band rate %g Hz, pass ±%.0f Hz, stop from %.0f Hz", m, c.d, len(c.proto), out, pass, stop)
	const n = 1 << 17
	worstPass, worstAlias := 0.0, 0.0
	for _, tc := range []struct {
		band int
		f    float64 // from the band's centre
		pass bool
	}{
		{0, 0, true}, {3, pass, true}, {3, -pass, true}, {200, 0.7 * pass, true}, {128, -pass, true},
		{5, stop, false}, {5, -stop, false}, {7, stop + 300, false}, {250, -stop - 1000, false},
		{9, out + pass, false}, {9, -out - 0.3*pass, false}, {64, 2*out - pass, false},
	} {
		fc := c.Centre(tc.band)
		x := complexTone(n, 1, fc+tc.f, rate)
		y := c.Process(nil, []int{tc.band}, x)[0]
		y = y[len(c.proto)/c.d+1:] // past the start-up
		alias := tc.f - out*math.Round(tc.f/out)
		got := toneLevel(y, alias, out)
		want := cmplx.Abs(FreqResponse(c.proto, tc.f, rate))
		if math.Abs(got-want) > tol {
			t.Errorf("band %d, tone %+.0f Hz: level %.7f, want |H| = %.7f", tc.band, tc.f, got, want)
		}
		if tc.pass {
			worstPass = max(worstPass, math.Abs(got-1))
			if math.Abs(got-1) > delta {
				t.Errorf("band %d, tone %+.0f Hz in the pass band: gain %.6f, want 1 ± %.1e", tc.band, tc.f, got, delta)
			}
		} else {
			worstAlias = max(worstAlias, got)
			if got > delta {
				t.Errorf("band %d, tone %+.0f Hz (alias at %+.0f Hz): %.1f dB, want ≤ −80", tc.band, tc.f, alias, 20*math.Log10(got))
			}
		}
	}
	t.Logf("pass-band ripple %.2e (δ = %.0e), worst alias %.1f dB", worstPass, delta, 20*math.Log10(worstAlias))
}

func TestChanneliserCoverage(t *testing.T) {
	// No gaps: every frequency of the capture lies within ±fs/(2M) of a
	// sub-band centre (Nearest), so with Pass = fs/(2M) + a channel's
	// half-width a whole channel is in one sub-band's flat band.
	c, _ := NewChanneliser(ChanneliserSpec{Rate: 2.4e6, Bands: 128})
	s := 2.4e6 / 128
	for f := -1.2e6; f < 1.2e6; f += 977 {
		k, off := c.Nearest(f)
		if math.Abs(off) > s/2+1e-6 {
			t.Fatalf("%g Hz: offset %g from band %d exceeds half the spacing", f, off, k)
		}
		if d := c.Centre(k) + off - f; math.Abs(d) > 1e-6 && math.Abs(math.Abs(d)-2.4e6) > 1e-6 {
			t.Fatalf("%g Hz: band %d centre %g + %g", f, k, c.Centre(k), off)
		}
	}
}

func TestChanneliserAllocs(t *testing.T) {
	// No allocation per call in the steady state (DEVELOPERS.md).
	c, _ := NewChanneliser(ChanneliserSpec{Rate: 2.4e6, Bands: 128})
	x := gaussNoise(8192, 1, 2)
	bands := []int{1, 2, 3}
	buf := c.Process(nil, bands, x)
	if n := testing.AllocsPerRun(20, func() { buf = c.Process(buf, bands, x) }); n != 0 {
		t.Errorf("%v allocations per call, want 0", n)
	}
}

func TestBankKernelsMatchGo(t *testing.T) {
	// The AVX2 kernels against their Go twins (the reference loops) on
	// random data. Tolerance: float32 rounding, the kernels fusing
	// multiply-adds, 1e-5 relative to the data's scale (common practice).
	if !haveKernels {
		t.Skip("no AVX2/FMA kernels in this build")
	}
	const tol = 1e-5
	r := rand.New(rand.NewPCG(5, 5))
	rnd := func(n int) []complex64 {
		x := make([]complex64, n)
		for i := range x {
			x[i] = complex(float32(r.NormFloat64()), float32(r.NormFloat64()))
		}
		return x
	}
	for _, m := range []int{8, 16, 64, 256, 512} {
		for _, d := range []int{m / 2, m/2 - 3, m / 4, 2} {
			if d < 2 {
				continue
			}
			c, err := NewChanneliser(ChanneliserSpec{Rate: 1e6, Bands: m, Decim: d})
			if err != nil {
				t.Fatal(err)
			}
			win := rnd(c.rows * m)
			for _, e := range []int{0, 1, 5, m - 1} {
				want := make([]complex64, 4*m)
				got := make([]complex64, 4*m)
				bankFoldGo(want, win, c.g, m, d, e, 4)
				bankFoldAVX2(&got[0], &win[0], &c.gp[2*3*d], m, d, c.rows, e)
				for i := range got {
					if e := cmplx.Abs(complex128(got[i] - want[i])); e > tol*math.Sqrt(float64(c.n)) {
						t.Fatalf("fold M=%d D=%d: element %d = %v, want %v", m, d, i, got[i], want[i])
					}
				}
			}
		}
		f := newBankFFT(m)
		x := rnd(4 * m)
		y := append([]complex64(nil), x...)
		l, st := m, 0
		for ; l >= 8; l /= 4 {
			bankPassGo(x, l, f.tw[st])
			bankPassAVX2(&y[0], m, l, &f.tw[st][0])
			st++
		}
		if l == 4 {
			bankLast4Go(x)
			bankLast4AVX2(&y[0], m)
		} else {
			bankLast2Go(x)
			bankLast2AVX2(&y[0], m)
		}
		for i := range x {
			if e := cmplx.Abs(complex128(x[i] - y[i])); e > tol*float64(m) {
				t.Fatalf("FFT passes M=%d: element %d = %v, want %v", m, i, y[i], x[i])
			}
		}
		rows := []int32{2, 0, 1}
		offs := []int32{4 * 3, 0, 4 * int32(m-1)}
		a := make([]complex64, 3*10)
		b := make([]complex64, 3*10)
		bankGather(a, 10, x, rows, offs, 3) // three lanes: the Go loop
		bankGather(b, 10, x, rows, offs, 4) // four lanes: the kernel
		for i := range 3 {
			for j := range 3 {
				if a[10*i+j] != b[10*i+j] {
					t.Fatalf("gather: row %d lane %d = %v, want %v", i, j, b[10*i+j], a[10*i+j])
				}
			}
		}
	}
}
