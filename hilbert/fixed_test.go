package hilbert

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/stat"
)

func TestFracBits(t *testing.T) {
	// The scale rule: the largest F with round(max|c|·2^F) ≤ 2^(B−1) − 1.
	// By hand: 2/π = 0.63662 at 16 bits → F = 15 (20861 ≤ 32767, while
	// 2^16 would give 41722); 0.9 at 8 bits → F = 7 (115 ≤ 127); 0.999 at
	// 8 bits → F = 6 (0.999·128 rounds to 128 > 127); 0.1 at 16 bits →
	// F = 18 (26214 ≤ 32767, 2^19 gives 52429).
	for _, c := range []struct {
		m          float64
		bits, want int
	}{{2 / math.Pi, 16, 15}, {0.9, 8, 7}, {0.999, 8, 6}, {0.1, 16, 18}, {1, 2, 0}, {3.5, 4, 1}} {
		if got := fracBits(c.m, c.bits, noFracLimit); got != c.want {
			t.Errorf("fracBits(%g, %d) = %d, want %d", c.m, c.bits, got, c.want)
		}
	}
	// Property over random coefficient sets.
	r := rand.New(rand.NewPCG(7, 8))
	for range 2000 {
		b := MinBits + r.IntN(MaxBits-MinBits+1)
		m := math.Exp(8 * (r.Float64() - 0.7))
		f := fracBits(m, b, noFracLimit)
		lim := math.Ldexp(1, b-1) - 1
		if math.Round(math.Ldexp(m, f)) > lim || math.Round(math.Ldexp(m, f+1)) <= lim {
			t.Fatalf("fracBits(%g, %d) = %d breaks the rule", m, b, f)
		}
	}
}

func TestQuantizedExact(t *testing.T) {
	// The integers times the scale are the quantised coefficients the
	// splitter uses, bit for bit, and every integer fits in B bits.
	for _, d := range []string{"kaiser", "equiripple", "allpass", "weaver", "fft"} {
		for _, b := range []int{2, 8, 12, 16, 24, 32} {
			s := spec(d, 31)
			if d == "fft" {
				s.Taps = 64
			}
			s.Sections, s.Bits = 6, b
			sp := mustNew(t, s)
			fx, ok := Quantized(sp)
			if !ok || fx.Bits != b {
				t.Fatalf("%s %d bits: Quantized %v %+v", d, b, ok, fx)
			}
			lim := int64(1)<<(b-1) - 1
			var ints []int64
			var vals []float64
			switch d {
			case "allpass":
				i, q, _ := Sections(sp)
				ints, vals = append(fx.I, fx.Q...), append(i, q...)
				if fx.DataBits != max(16, min(b, 24)) || fx.AccBits != b+fx.DataBits+2 {
					t.Errorf("allpass %d bits: data %d, accumulator %d", b, fx.DataBits, fx.AccBits)
				}
			case "weaver":
				ints, vals = fx.LowPass, sp.(*weaverSplitter).h
			default:
				_, q, _ := Coefficients(sp)
				ints, vals = fx.Q, q
				if fx.I != nil {
					t.Errorf("%s: I integers for a pure delay", d)
				}
			}
			if len(ints) != len(vals) || len(ints) == 0 {
				t.Fatalf("%s %d bits: %d integers, %d coefficients", d, b, len(ints), len(vals))
			}
			for k, v := range ints {
				if v > lim || v < -lim-1 {
					t.Errorf("%s %d bits: integer %d out of range", d, b, v)
				}
				if float64(v)*fx.Scale() != vals[k] {
					t.Errorf("%s %d bits: %d × 2^-%d = %.17g, coefficient %.17g", d, b, v, fx.Frac, float64(v)*fx.Scale(), vals[k])
				}
			}
		}
	}
	if _, ok := Quantized(mustNew(t, spec("kaiser", 31))); ok {
		t.Errorf("an exact design reports a fixed-point form")
	}
	s := spec("kaiser", 31)
	for _, b := range []int{1, 33, -4} {
		s.Bits = b
		if _, err := New(s); err == nil {
			t.Errorf("Bits %d accepted", b)
		}
	}
}

func TestQuantizationSixDBPerBit(t *testing.T) {
	// Rounding the coefficients to B bits adds an error whose size halves
	// with each bit, so the suppression floor rises about 6 dB per bit
	// (20·log10 2 = 6.02; common practice). Designs far above their
	// floor: the slope of a least-squares line (gonum stat) through the
	// quantised minima for B = 8…20 must be about 6 dB per bit. The
	// all-pass pair is checked more loosely: its few coefficients make
	// the floor a rougher function of B.
	for _, c := range []struct {
		s      Spec
		lo, hi float64 // accepted slope, dB per bit
	}{
		{Spec{Design: "equiripple", Taps: 127, Rate: 8000, Low: 300, High: 2700}, 5, 7},
		{Spec{Design: "kaiser", Taps: 127, Rate: 8000, Low: 300, High: 2700}, 5, 7},
		{Spec{Design: "allpass", Sections: 12, Rate: 8000, Low: 300, High: 2700}, 4, 8},
	} {
		exact := Analyze(mustNew(t, c.s), 300, 2700).SuppressionMinDB
		var bits, db []float64
		for b := 8; b <= 20; b += 2 {
			s := c.s
			s.Bits = b
			q := Analyze(mustNew(t, s), 300, 2700).SuppressionMinDB
			if q > exact+0.5 {
				t.Errorf("%s %d bits: %.2f dB, above the exact %.2f dB", s.Design, b, q, exact)
			}
			bits, db = append(bits, float64(b)), append(db, q)
		}
		_, slope := stat.LinearRegression(bits, db, nil, false)
		if slope < c.lo || slope > c.hi {
			t.Errorf("%s: %.2f dB per bit (%v dB at %v bits), want %g to %g", c.s.Design, slope, db, bits, c.lo, c.hi)
		}
		t.Logf("%s: %.2f dB per bit", c.s.Design, slope)
	}
}

func TestQuantized63Taps(t *testing.T) {
	// Issue 11 asks that a 63-tap equiripple design at 16 bits stay
	// within 1 dB of the exact design while that is below 80 dB. Over
	// a sweep of bands and rates this holds at 18 bits, but at 16 bits,
	// with the re-rounding search, only while the exact design is below
	// about 74 dB: the rounding error of 16 Q15 taps peaks near 80 dB and
	// adds to the design's own error (measured here; see DEVELOPERS.md).
	const tolDB = 1
	type tally struct{ in, over int }
	var n16, n18 tally
	worstNear80 := 0.0
	for lo := 100.0; lo <= 600; lo += 25 {
		for _, rate := range []float64{8000, 11025, 16000, 48000} {
			s := Spec{Design: "equiripple", Taps: 63, Rate: rate, Low: lo, High: 2700}
			exact := Analyze(mustNew(t, s), lo, 2700).SuppressionMinDB
			s.Bits = 16
			q16 := Analyze(mustNew(t, s), lo, 2700).SuppressionMinDB
			s.Bits = 18
			q18 := Analyze(mustNew(t, s), lo, 2700).SuppressionMinDB
			if exact < 74 {
				n16.in++
				if math.Abs(q16-exact) > tolDB {
					t.Errorf("16 bits, %g:2700 at %g: %.2f dB, exact %.2f dB", lo, rate, q16, exact)
				}
			} else if exact < 80 {
				n16.over++
				worstNear80 = math.Max(worstNear80, exact-q16)
			}
			if exact < 80 {
				n18.in++
				if math.Abs(q18-exact) > tolDB {
					t.Errorf("18 bits, %g:2700 at %g: %.2f dB, exact %.2f dB", lo, rate, q18, exact)
				}
			}
		}
	}
	if n16.in < 50 || n18.in < 50 || n16.over < 3 {
		t.Errorf("too few cases: %+v %+v", n16, n18)
	}
	// The gap is real: at 16 bits some design between 74 and 80 dB loses
	// more than 1 dB (the check fails if quantisation stops biting).
	if worstNear80 <= tolDB {
		t.Errorf("16 bits lose at most %.2f dB between 74 and 80 dB", worstNear80)
	}
	t.Logf("16 bits: %d designs below 74 dB within 1 dB; between 74 and 80 dB the worst loses %.2f dB; 18 bits: %d designs below 80 dB within 1 dB",
		n16.in, worstNear80, n18.in)
}

func TestRefineTaps(t *testing.T) {
	// The re-rounded taps against plain rounding (round half away from
	// zero, the quantize helper): the band's peak |1 − A| is never worse,
	// every tap stays within 1.5 steps of its exact value, zero taps stay
	// zero, and for the default design the gain is several dB (plain
	// Q15 rounding 76.5 dB, measured when the search was added).
	for _, c := range []struct {
		design string
		taps   int
		bits   int
	}{
		{"equiripple", 63, 16}, {"equiripple", 31, 12}, {"kaiser", 63, 14},
		{"equiripple", 127, 16}, {"hamming", 45, 10},
	} {
		s := Spec{Design: c.design, Taps: c.taps, Rate: 8000, Low: 300, High: 2700}
		exact := mustNew(t, s).(*firSplitter)
		plain := &firSplitter{spec: s, m: exact.m, h: append([]float64(nil), exact.h...), odd: exact.odd}
		_, frac := quantize(plain.h[1:], c.bits, noFracLimit)
		s.Bits = c.bits
		refined := mustNew(t, s).(*firSplitter)
		fx, _ := Quantized(refined)
		if fx.Frac != frac {
			t.Fatalf("%+v: scale 2^-%d, plain rounding's 2^-%d", c, fx.Frac, frac)
		}
		for m := 1; m <= exact.m; m++ {
			d := math.Abs(math.Ldexp(refined.h[m]-exact.h[m], frac))
			if d >= 1.5 || (exact.h[m] == 0 && refined.h[m] != 0) {
				t.Errorf("%+v: h[%d] %g steps from exact %g", c, m, d, exact.h[m])
			}
		}
		pq := Analyze(plain, 300, 2700).SuppressionMinDB
		rq := Analyze(refined, 300, 2700).SuppressionMinDB
		if rq < pq-0.01 {
			t.Errorf("%+v: refined %.2f dB below plain rounding %.2f dB", c, rq, pq)
		}
		t.Logf("%s %d taps, %d bits: plain %.2f dB, refined %.2f dB", c.design, c.taps, c.bits, pq, rq)
		if c.design == "equiripple" && c.taps == 63 && rq-pq < 2 {
			t.Errorf("default design: refined %.2f dB, plain %.2f dB: expected a gain of 2 dB or more", rq, pq)
		}
	}
}

func TestFixedAllpassFilter(t *testing.T) {
	// The integer all-pass filter against the float64 one with the same
	// quantised coefficients, on noise that peaks above full scale (the
	// 2 guard bits keep it from saturating): each section rounds to ½ LSB
	// of D-bit data and passes earlier rounding on at unity power gain,
	// so the outputs differ by a few LSB (bound 2 LSB per section).
	for _, b := range []int{8, 16, 24} {
		s := Spec{Design: "allpass", Sections: 6, Rate: 8000, Low: 300, High: 2700, Bits: b}
		sp := mustNew(t, s).(*allpassSplitter)
		fixed := sp.NewFilter()
		float := (&allpassSplitter{spec: sp.spec, ai: sp.ai, aq: sp.aq}).NewFilter()
		r := rand.New(rand.NewPCG(3, uint64(b)))
		src := make([]float32, 20000)
		for i := range src {
			src[i] = float32(0.3 * r.NormFloat64())
		}
		got, want := fixed.Process(nil, src), float.Process(nil, src)
		lsb := math.Ldexp(1, 1+allpassGuardBits-allpassDataBits(b))
		bound := 2 * float64(len(sp.ai)+len(sp.aq)) * lsb
		var worst float64
		for i := range got {
			worst = math.Max(worst, math.Abs(real(complex128(got[i])-complex128(want[i]))))
			worst = math.Max(worst, math.Abs(imag(complex128(got[i])-complex128(want[i]))))
		}
		if worst > bound {
			t.Errorf("%d bits: fixed and float differ by %g, bound %g", b, worst, bound)
		}
		// Measured through the integer arithmetic, the suppression is
		// the quantised response's within 1 dB where that is below the
		// data rounding floor (about 6 dB per data bit, minus a margin).
		for _, f := range []float64{300, 1500, 2700} {
			pred := SuppressionAt(sp, f)
			if pred < 6*float64(allpassDataBits(b)-allpassGuardBits)-20 {
				if m := MeasureDB(sp, f); math.Abs(m-pred) > 1 {
					t.Errorf("%d bits at %g Hz: measured %.2f dB, response %.2f dB", b, f, m, pred)
				}
			}
		}
	}
}

func TestFixedAllpassAccumulator(t *testing.T) {
	// 32-bit coefficients with 24-bit data and a full-scale input that
	// drives the sections hardest: the int64 accumulator must equal an
	// exact big-integer evaluation of the same recursion (no overflow).
	s := Spec{Design: "allpass", Sections: 10, Rate: 8000, Low: 100, High: 3900, Bits: 32}
	sp := mustNew(t, s).(*allpassSplitter)
	fx := sp.fixed
	src := make([]float32, 3000)
	for i := range src {
		src[i] = float32(4 * (1 - 2*float64((i/3)%2))) // ±4 square wave: saturates the input
	}
	got := sp.NewFilter().Process(nil, src)
	d := uint(fx.DataBits)
	hi := new(big.Int).Sub(new(big.Int).Lsh(big.NewInt(1), d-1), big.NewInt(1))
	lo := new(big.Int).Neg(new(big.Int).Lsh(big.NewInt(1), d-1))
	half := new(big.Int).Lsh(big.NewInt(1), uint(fx.Frac-1))
	chain := func(coefs []int64, st [][4]*big.Int, x *big.Int) *big.Int {
		for k, a := range coefs {
			acc := new(big.Int).Add(x, st[k][3])
			acc.Mul(acc, big.NewInt(a))
			acc.Sub(acc, new(big.Int).Lsh(st[k][1], uint(fx.Frac)))
			acc.Add(acc, half)
			y := acc.Rsh(acc, uint(fx.Frac)) // floor, like >> on int64
			if y.Cmp(hi) > 0 {
				y.Set(hi)
			}
			if y.Cmp(lo) < 0 {
				y.Set(lo)
			}
			st[k][1], st[k][0] = st[k][0], x
			st[k][3], st[k][2] = st[k][2], y
			x = y
		}
		return x
	}
	newState := func(n int) [][4]*big.Int {
		st := make([][4]*big.Int, n)
		for i := range st {
			for j := range st[i] {
				st[i][j] = new(big.Int)
			}
		}
		return st
	}
	si, sq := newState(len(fx.I)), newState(len(fx.Q))
	prev := new(big.Int)
	full := math.Ldexp(1, int(d)-1-allpassGuardBits)
	top := math.Ldexp(1, int(d)-1)
	for n, v := range src {
		xv := math.Round(float64(v) * full)
		xv = math.Min(math.Max(xv, -top), top-1)
		x := big.NewInt(int64(xv))
		u := chain(fx.I, si, x)
		w := chain(fx.Q, sq, prev)
		prev = x
		wantI, _ := new(big.Float).SetInt(u).Float64()
		wantQ, _ := new(big.Float).SetInt(w).Float64()
		if g := got[n]; float64(real(g)) != float64(float32(wantI/full)) || float64(imag(g)) != float64(float32(wantQ/full)) {
			t.Fatalf("sample %d: %v, exact %g %g", n, g, wantI/full, wantQ/full)
		}
	}
}
