package modem

import (
	"fmt"
	"math"
	"math/cmplx"
	"testing"
)

// narrowTone returns n samples of a·e^{j2πft/rate}.
func narrowTone(n int, a, f, rate float64) []complex64 {
	x := make([]complex64, n)
	for i := range x {
		x[i] = complex64(cmplx.Rect(a, 2*math.Pi*f*float64(i)/rate))
	}
	return x
}

func TestNarrowerToneAndAliases(t *testing.T) {
	// A tone 2 kHz above the chosen frequency comes out at +2 kHz with its
	// amplitude (pass-band ripple at most combDroopDB plus the Kaiser
	// ripple 10^(−80/20), by design of PlanChannel; 0.02 dB allowed) and
	// the phase of the capture at (m − Delay)/Rate (a linear-phase FIR
	// delays by (L−1)/2 samples, Oppenheim & Schafer, Discrete-Time Signal
	// Processing, 3rd ed., sec. 5.7.3). A tone outside the protected band
	// that would alias into it is at least 80 dB down (the plan's AttenDB;
	// 2 dB allowed for the window's rounding).
	const (
		rate    = 2.4e6
		freq    = 300e3
		protect = 8000.0
		atten   = 80.0
		tolDB   = 0.02
		tolRad  = 1e-3
		// aliasMarginDB is what the alias may exceed −atten by
		aliasMarginDB = 2
	)
	nr, err := NewNarrower(rate, freq, 48000, protect, atten)
	if err != nil {
		t.Fatal(err)
	}
	if nr.Rate() != 48000 || nr.Decim() != 50 {
		t.Fatalf("rate %g decim %d, want 48000 and 50", nr.Rate(), nr.Decim())
	}
	x := narrowTone(1<<18, 0.5, freq+2000, rate)
	y := nr.Process(nil, x)
	var worst, worstPh float64
	for m := nr.Settle(); m < len(y); m++ {
		got := complex128(y[m])
		want := cmplx.Rect(0.5, 2*math.Pi*2000*(float64(m)-nr.Delay())/nr.Rate())
		worst = math.Max(worst, math.Abs(20*math.Log10(cmplx.Abs(got)/0.5)))
		worstPh = math.Max(worstPh, math.Abs(cmplx.Phase(got/want)))
	}
	if worst > tolDB || worstPh > tolRad {
		t.Errorf("tone: amplitude off by %.4f dB, phase by %.2g rad; want ≤ %g dB, %g rad", worst, worstPh, tolDB, tolRad)
	}
	// 48 kHz − 3 kHz above the frequency aliases to −3 kHz at 48 kHz
	nr.Reset()
	y = nr.Process(nil, narrowTone(1<<18, 0.5, freq+45000, rate))
	var peak float64
	for _, v := range y[nr.Settle():] {
		peak = math.Max(peak, cmplx.Abs(complex128(v)))
	}
	if db := 20 * math.Log10(peak/0.5); db > -atten+aliasMarginDB {
		t.Errorf("alias into the protected band at %.1f dB, want ≤ %g", db, -atten+aliasMarginDB)
	}
}

func TestNarrowerBlockwise(t *testing.T) {
	// Block-wise output equals whole-signal output (common practice for
	// streaming blocks; float32 sums in the same order: exact).
	x := testSignal(200000, 5)
	nr, err := NewNarrower(960e3, -100e3, 24000, 8000, 80)
	if err != nil {
		t.Fatal(err)
	}
	want := nr.Process(nil, x)
	for _, bs := range []int{1, 7, 999, 4096, 50000, 1 << 17} {
		t.Run(fmt.Sprint(bs), func(t *testing.T) {
			nr.Reset()
			var got []complex64
			var buf []complex64
			for i := 0; i < len(x); i += bs {
				buf = nr.Process(buf, x[i:min(i+bs, len(x))])
				got = append(got, buf...)
			}
			if len(got) != len(want) {
				t.Fatalf("%d outputs, want %d", len(got), len(want))
			}
			for i := range got {
				if got[i] != want[i] {
					t.Fatalf("output %d: %v, whole %v", i, got[i], want[i])
				}
			}
		})
	}
}

func TestNarrowerNoAlloc(t *testing.T) {
	x := testSignal(10000, 6)
	nr, err := NewNarrower(2.4e6, 120e3, 48000, 8000, 80)
	if err != nil {
		t.Fatal(err)
	}
	dst := nr.Process(nil, x)
	if got := testing.AllocsPerRun(20, func() { dst = nr.Process(dst, x) }); got != 0 {
		t.Errorf("%v allocations per call, want 0", got)
	}
}

func TestNarrowerBadRequest(t *testing.T) {
	for _, c := range [][4]float64{
		{48000, 0, 96000, 8000},     // narrower rate above the capture's
		{2.4e6, 0, 10000, 8000},     // rate below 2·protect
		{2.4e6, 1.3e6, 48000, 8000}, // frequency outside the capture
	} {
		if _, err := NewNarrower(c[0], c[1], c[2], c[3], 80); err == nil {
			t.Errorf("NewNarrower%v: no error", c)
		}
	}
}

func BenchmarkNarrower(b *testing.B) {
	// 2.4 MS/s to 48 kHz around +120 kHz (measure's chain)
	x := testSignal(1<<16, 7)
	nr, err := NewNarrower(2.4e6, 120e3, 48000, 8000, 80)
	if err != nil {
		b.Fatal(err)
	}
	dst := nr.Process(nil, x)
	b.SetBytes(8 << 16)
	b.ReportAllocs()
	for b.Loop() {
		dst = nr.Process(dst, x)
	}
}
