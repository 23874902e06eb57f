package modem

import (
	"math"
	"math/cmplx"
	"testing"
)

var resampleCases = []struct {
	in, out, pass, atten float64
	tone                 float64 // Hz, within pass
}{
	{44100, 48000, 0, 100, 3000},
	{48000, 44100, 0, 100, -5000},
	{8000, 2.4e6, 2700, 90, 2500},
	{48000, 8000, 2700, 90, -1234.5},
	{8000, 12000, 0, 80, 1000},
	{2.4e6, 48000, 15000, 90, 10000},
	{16000, 2.4e6, 3000, 100, -700},
	{12000, 12000, 0, 100, 1000},
}

// TestResamplerTone checks a complex tone against its ideal resampled
// form e^{j2πf(m − D)/fout}: frequency exact, amplitude within the pass-band
// ripple, delay as reported. The error allowed is the ripple of each stage
// plus the residual images, each δ = 10^(−A/20) (Kaiser window method,
// Oppenheim & Schafer, 3rd ed., eq. 7.74), plus float32 rounding.
func TestResamplerTone(t *testing.T) {
	for _, c := range resampleCases {
		r, err := NewResamplerSpec(ResamplerSpec{InRate: c.in, OutRate: c.out, Pass: c.pass, AttenDB: c.atten})
		if err != nil {
			t.Fatal(err)
		}
		n := int(0.05 * c.in)
		x := NewOscillator(c.tone, c.in).Generate(make([]complex64, n))
		y := r.Process(nil, x)
		stages := len(r.Stages())
		tol := float64(2*stages+1)*math.Pow(10, -c.atten/20) + 2e-6
		d := r.Delay()
		start := int(2*d) + 10
		var worst float64
		for m := start; m < len(y)-10; m++ {
			want := cmplx.Exp(complex(0, 2*math.Pi*c.tone*(float64(m)-d)/c.out))
			worst = math.Max(worst, cmplx.Abs(complex128(y[m])-want))
		}
		t.Logf("%g→%g: stages %v, delay %.2f, %d outputs, max error %.3g (tol %.3g)", c.in, c.out, r.Stages(), d, len(y), worst, tol)
		if worst > tol || len(y) < n*int(c.out)/int(c.in)-2 {
			t.Errorf("%g→%g tone %g: max error %.3g > %.3g (outputs %d)", c.in, c.out, c.tone, worst, tol, len(y))
		}
	}
}

// toneLevel returns |mean(y[m]·e^{−j2πfm/fs})| over y, windowed with a
// Hann window (normalised to unit gain) so that leakage from other tones is
// small: the amplitude of a tone at f.
func toneLevel(y []complex64, f, fs float64) float64 {
	var acc complex128
	var wsum float64
	for m, v := range y {
		w := 0.5 - 0.5*math.Cos(2*math.Pi*float64(m)/float64(len(y)))
		acc += complex(w, 0) * complex128(v) * cmplx.Exp(complex(0, -2*math.Pi*f*float64(m)/fs))
		wsum += w
	}
	return cmplx.Abs(acc) / wsum
}

// TestResamplerRejection checks that images (interpolation) and aliases
// (decimation) that would land within the pass band are attenuated by the
// design figure A (δ per the Kaiser design equations, O&S 3rd ed., eq.
// 7.74).
func TestResamplerRejection(t *testing.T) {
	cases := []struct {
		in, out, pass, atten, tone, probe float64
	}{
		// 1 kHz at 8 kHz up to 48 kHz: first images at 9 kHz and −7 kHz.
		{8000, 48000, 2700, 80, 1000, 9000},
		{8000, 48000, 2700, 80, 1000, -7000},
		// 44.1 kHz → 48 kHz: image of 3 kHz at 41.1 kHz ≡ −6.9 kHz.
		{44100, 48000, 0, 90, 3000, -6900},
		// 48 kHz → 8 kHz: a 7 kHz tone would alias to −1 kHz.
		{48000, 8000, 2700, 80, 7000, -1000},
		// 2.4 MHz → 48 kHz: 100 kHz would alias to 4 kHz.
		{2.4e6, 48000, 15000, 90, 100000, 4000},
	}
	for _, c := range cases {
		r, err := NewResamplerSpec(ResamplerSpec{InRate: c.in, OutRate: c.out, Pass: c.pass, AttenDB: c.atten})
		if err != nil {
			t.Fatal(err)
		}
		x := NewOscillator(c.tone, c.in).Generate(make([]complex64, int(0.1*c.in)))
		y := r.Process(nil, x)
		y = y[int(2*r.Delay())+10:]
		lvl := 20 * math.Log10(toneLevel(y, c.probe, c.out)+1e-30)
		t.Logf("%g→%g: tone %g, level at %g: %.1f dB", c.in, c.out, c.tone, c.probe, lvl)
		if lvl > -c.atten {
			t.Errorf("%g→%g: tone %g leaves %.1f dB at %g Hz, want ≤ −%g dB", c.in, c.out, c.tone, lvl, c.probe, c.atten)
		}
	}
}

// TestResamplerBlocks checks block-wise = whole-signal, bit for bit, and
// that MaxOut bounds every block.
func TestResamplerBlocks(t *testing.T) {
	for _, c := range resampleCases[:6] {
		x := testSignal(int(0.03*c.in), 9)
		r, _ := NewResamplerSpec(ResamplerSpec{InRate: c.in, OutRate: c.out, Pass: c.pass, AttenDB: c.atten})
		whole := r.Process(nil, x)
		for _, bs := range []int{1, 5, 333, 1023, 1024, 1025, 4000} {
			r.Reset()
			var got []complex64
			for off := 0; off < len(x); off += bs {
				blk := x[off:min(off+bs, len(x))]
				y := r.Process(nil, blk)
				if len(y) > r.MaxOut(len(blk)) {
					t.Fatalf("%g→%g block %d: %d outputs > MaxOut %d", c.in, c.out, bs, len(y), r.MaxOut(len(blk)))
				}
				got = append(got, y...)
			}
			if len(got) != len(whole) {
				t.Fatalf("%g→%g block %d: %d outputs, whole %d", c.in, c.out, bs, len(got), len(whole))
			}
			for i := range got {
				if got[i] != whole[i] {
					t.Fatalf("%g→%g block %d: y[%d] differs", c.in, c.out, bs, i)
				}
			}
		}
	}
}

// TestRealResampler checks the real version: a cosine keeps its
// frequency, amplitude and the reported delay; block-wise = whole.
func TestRealResampler(t *testing.T) {
	for _, c := range []struct{ in, out, f float64 }{{44100, 8000, 1000}, {8000, 48000, 2500}, {22050, 12000, 3000}, {48000, 8000, 2000}} {
		r, err := NewRealResampler(c.in, c.out, 90)
		if err != nil {
			t.Fatal(err)
		}
		n := int(0.05 * c.in)
		x := make([]float32, n)
		for i := range x {
			x[i] = float32(math.Cos(2 * math.Pi * c.f * float64(i) / c.in))
		}
		y := r.Process(nil, x)
		d := r.Delay()
		tol := float64(2*len(r.stages)+1)*math.Pow(10, -90.0/20) + 2e-6
		for m := int(2*d) + 10; m < len(y)-10; m++ {
			want := math.Cos(2 * math.Pi * c.f * (float64(m) - d) / c.out)
			if math.Abs(float64(y[m])-want) > tol {
				t.Fatalf("%g→%g: y[%d] = %v, want %v", c.in, c.out, m, y[m], want)
			}
		}
		r.Reset()
		var got []float32
		for off := 0; off < n; off += 77 {
			got = append(got, r.Process(nil, x[off:min(off+77, n)])...)
		}
		for i := range y {
			if got[i] != y[i] {
				t.Fatalf("%g→%g: block-wise y[%d] differs", c.in, c.out, i)
			}
		}
	}
}

func TestResamplerErrors(t *testing.T) {
	for _, c := range []ResamplerSpec{
		{InRate: 0, OutRate: 48000},
		{InRate: 48000, OutRate: math.NaN()},
		{InRate: 48000, OutRate: 48001},               // 48001/48000: filter too long
		{InRate: 8000, OutRate: 48000, Pass: 5000},    // pass beyond Nyquist of 8 kHz
		{InRate: 8000, OutRate: 48000, AttenDB: 1000}, // absurd attenuation
	} {
		if _, err := NewResamplerSpec(c); err == nil {
			t.Errorf("%+v: no error", c)
		}
	}
}

func TestResamplerAllocs(t *testing.T) {
	r, _ := NewResamplerSpec(ResamplerSpec{InRate: 8000, OutRate: 2.4e6, Pass: 2700, AttenDB: 90})
	x := testSignal(2000, 1)
	dst := make([]complex64, 0, r.MaxOut(len(x)))
	if a := testing.AllocsPerRun(5, func() { r.Process(dst, x) }); a != 0 {
		t.Errorf("%v allocations per block", a)
	}
	rr, _ := NewRealResampler(48000, 8000, 90)
	xr := testReal(6000, 1)
	dr := make([]float32, 0, rr.MaxOut(len(xr)))
	if a := testing.AllocsPerRun(5, func() { rr.Process(dr, xr) }); a != 0 {
		t.Errorf("real: %v allocations per block", a)
	}
}

func BenchmarkResampler(b *testing.B) {
	for _, c := range []struct {
		name          string
		in, out, pass float64
	}{
		{"8k-2.4M", 8000, 2.4e6, 2700},
		{"44.1k-48k", 44100, 48000, 0},
		{"2.4M-48k", 2.4e6, 48000, 15000},
	} {
		b.Run(c.name, func(b *testing.B) {
			r, _ := NewResamplerSpec(ResamplerSpec{InRate: c.in, OutRate: c.out, Pass: c.pass, AttenDB: 90})
			x := testSignal(4096, 1)
			dst := make([]complex64, 0, r.MaxOut(len(x)))
			b.SetBytes(int64(8 * len(x)))
			b.ReportAllocs()
			var outs int
			for b.Loop() {
				outs += len(r.Process(dst, x))
			}
			b.ReportMetric(float64(outs)/b.Elapsed().Seconds()/1e6, "MS/s_out")
		})
	}
}

// TestDecimKernel checks the decimating dot products of a real stage (the
// vector kernel where the CPU has one) against float64 sums, within
// Higham's float32 inner-product bound γ_k·Σ|h||w| (see txGammaK) plus
// the float32 rounding of the result.
func TestDecimKernel(t *testing.T) {
	if !useMixInterpAVX2 {
		t.Skip("no vector kernel on this machine or build")
	}
	for _, k := range []int{4, 8, 12, 32, 40} {
		for _, step := range []int{1, 2, 3, 7} {
			h := testReal(k, uint64(k))
			const n = 50
			w := testReal((n-1)*step+k, uint64(step))
			out := make([]float32, n)
			decimRealVec(out, w, h, step)
			for i, got := range out {
				var want, mag float64
				for t, c := range h {
					want += float64(c) * float64(w[i*step+t])
					mag += math.Abs(float64(c) * float64(w[i*step+t]))
				}
				if d := math.Abs(float64(got) - want); d > txGammaK(k)*mag+math.Ldexp(math.Abs(want), -24) {
					t.Fatalf("k %d step %d: out[%d] = %v, want %v", k, step, i, got, want)
				}
			}
		}
	}
}

func BenchmarkRealResampler(b *testing.B) {
	r, _ := NewRealResamplerSpec(ResamplerSpec{InRate: 48000, OutRate: 8000, Pass: 2700, AttenDB: 90})
	x := testReal(8192, 1)
	dst := make([]float32, 0, r.MaxOut(len(x)))
	b.SetBytes(int64(4 * len(x)))
	b.ReportAllocs()
	for b.Loop() {
		r.Process(dst, x)
	}
	b.ReportMetric(float64(b.N*len(x))/b.Elapsed().Seconds()/1e6, "MS/s_in")
}

func TestResamplerPlanShared(t *testing.T) {
	// Resamplers of one spec share their polyphase tables (plan's
	// cache) and keep their own state: two of them fed different signals
	// each give what a lone resampler gives for its signal.
	spec := ResamplerSpec{InRate: 2.5e6 / 25, OutRate: 48000, Pass: 3000}
	a, err := NewResamplerSpec(spec)
	if err != nil {
		t.Fatal(err)
	}
	b, _ := NewResamplerSpec(spec)
	for i := range a.stages {
		sa, sb := a.stages[i], b.stages[i]
		if &sa.ph[0] != &sb.ph[0] {
			t.Errorf("stage %d: tables not shared", i)
		}
		if &sa.buf[:1][0] == &sb.buf[:1][0] {
			t.Errorf("stage %d: history shared", i)
		}
	}
	x := complexTone(20000, 0.5, 1234, spec.InRate)
	y := complexTone(20000, 0.25, -777, spec.InRate)
	var ga, gb []complex64
	for i := 0; i < len(x); i += 1000 { // interleaved calls
		ga = append(ga, a.Process(nil, x[i:i+1000])...)
		gb = append(gb, b.Process(nil, y[i:i+1000])...)
	}
	planCache.Delete(spec) // a fresh plan for the reference
	for _, c := range []struct {
		name   string
		got, x []complex64
	}{{"first", ga, x}, {"second", gb, y}} {
		ref, _ := NewResamplerSpec(spec)
		want := ref.Process(nil, c.x)
		if len(c.got) != len(want) {
			t.Fatalf("%s resampler: %d outputs, want %d", c.name, len(c.got), len(want))
		}
		for i := range want {
			if c.got[i] != want[i] {
				t.Fatalf("%s resampler, output %d: %v, want %v (the same arithmetic)", c.name, i, c.got[i], want[i])
			}
		}
	}
}
