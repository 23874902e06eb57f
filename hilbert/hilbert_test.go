package hilbert

import (
	"encoding/json"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"strconv"
	"strings"
	"testing"
)

// band is the common test case: 300–2700 Hz at 8 kHz.
func spec(design string, taps int) Spec {
	return Spec{Design: design, Taps: taps, Sections: 4, Rate: 8000, Low: 300, High: 2700}
}

func mustNew(t testing.TB, s Spec) Splitter {
	t.Helper()
	sp, err := New(s)
	if err != nil {
		t.Fatalf("New(%+v): %v", s, err)
	}
	return sp
}

// allSpecs returns one splitter of each design at moderate length.
func allSpecs() []Spec {
	var out []Spec
	for _, d := range Designs {
		s := spec(d, 31)
		if d == "fft" {
			s.Taps = 64
		}
		out = append(out, s)
	}
	return out
}

// streamSpecs adds fixed-point designs (Spec.Bits; the all-pass pair then
// runs in integers) to allSpecs, for the streaming properties.
func streamSpecs() []Spec {
	q := spec("allpass", 31)
	q.Sections, q.Bits = 7, 16
	e := spec("equiripple", 31)
	e.Bits = 12
	return append(allSpecs(), q, e)
}

func TestWindowedCoefficients(t *testing.T) {
	// The windowed design's taps are w[M+m]·2/(πm) for odd m and 0 for
	// even m, antisymmetric (Oppenheim & Schafer, Discrete-Time Signal
	// Processing, 3rd ed., sec. 12.4.1: h[n] = 2/(πn) for odd n).
	const tol = 1e-15
	for _, d := range []string{"rect", "hamming", "blackman", "kaiser"} {
		for _, n := range []int{3, 5, 21, 63} {
			sp := mustNew(t, spec(d, n))
			i, q, ok := Coefficients(sp)
			if !ok || len(i) != n || len(q) != n {
				t.Fatalf("%s %d: Coefficients = %d, %d, %v", d, n, len(i), len(q), ok)
			}
			m := (n - 1) / 2
			w := make([]float64, n)
			for k := range w {
				x := float64(k) / float64(n-1)
				switch d {
				case "rect":
					w[k] = 1
				case "hamming": // common practice: 0.54 − 0.46·cos(2πk/(N−1))
					w[k] = 0.54 - 0.46*math.Cos(2*math.Pi*x)
				case "blackman": // common practice: 0.42 − 0.5cos + 0.08cos(2·)
					w[k] = 0.42 - 0.5*math.Cos(2*math.Pi*x) + 0.08*math.Cos(4*math.Pi*x)
				case "kaiser":
					beta := KaiserBeta(kaiserAttenuation(n, 4*math.Pi*300/8000))
					r := 2*x - 1
					w[k] = BesselI0(beta*math.Sqrt(1-r*r)) / BesselI0(beta)
				}
			}
			for k := range q {
				if want := 0.0; k == m {
					if i[k] != 1 {
						t.Errorf("%s %d: i[%d] = %g, want 1", d, n, k, i[k])
					}
				} else if i[k] != want {
					t.Errorf("%s %d: i[%d] = %g, want 0", d, n, k, i[k])
				}
				mm := k - m
				want := 0.0
				if mm%2 != 0 {
					want = 2 / (math.Pi * float64(mm)) * w[k]
				}
				if math.Abs(q[k]-want) > tol {
					t.Errorf("%s %d: q[%d] = %.17g, want %.17g", d, n, k, q[k], want)
				}
				if q[k] != -q[n-1-k] {
					t.Errorf("%s %d: q not antisymmetric at %d", d, n, k)
				}
			}
		}
	}
}

func TestBesselI0(t *testing.T) {
	// Abramowitz & Stegun, Handbook of Mathematical Functions, Table 9.8
	// (e^{−x}·I0(x)): x=1 → 0.4657596077, x=5 → 0.1835408126,
	// x=10 → 0.1278333372.
	const tol = 1e-9
	for _, c := range []struct{ x, want float64 }{{1, 0.4657596077}, {5, 0.1835408126}, {10, 0.1278333372}} {
		if got := math.Exp(-c.x) * BesselI0(c.x); math.Abs(got-c.want) > tol {
			t.Errorf("e^-x I0(%g) = %.10f, want %.10f", c.x, got, c.want)
		}
	}
	// scipy.special.i0, scipy 1.10.1 (printed with repr), to the last few
	// bits: the series serves modem's Kaiser designs too.
	const tolRel = 1e-14
	for _, c := range []struct{ x, want float64 }{
		{0, 1},
		{0.5, 1.0634833707413234},
		{1, 1.2660658777520082},
		{5, 27.239871823604442},
		{10, 2815.716628466254},
		{20, 43558282.559553534},
	} {
		if got := BesselI0(c.x); math.Abs(got-c.want) > tolRel*c.want {
			t.Errorf("I0(%g) = %v, scipy %v", c.x, got, c.want)
		}
	}
}

func TestKaiserBeta(t *testing.T) {
	// Kaiser's formulas (Oppenheim & Schafer, 3rd ed., sec. 7.5.3, eq.
	// 7.75, equation number from memory), evaluated by hand:
	// 60 dB → 0.1102·51.3 = 5.65326; 40 dB → 0.5842·19^0.4 + 0.07886·19 =
	// 3.39532; 20 dB → 0.
	const tol = 1e-4
	for _, c := range []struct{ a, want float64 }{{60, 5.65326}, {40, 3.39532}, {20, 0}} {
		if got := KaiserBeta(c.a); math.Abs(got-c.want) > tol {
			t.Errorf("KaiserBeta(%g) = %.5f, want %.5f", c.a, got, c.want)
		}
	}
}

func TestKaiserGolden(t *testing.T) {
	// Kaiser's β and window against scipy.signal.kaiser_beta and
	// scipy.signal.windows.kaiser (testdata/golden.py, scipy 1.10.1).
	const (
		betaTol = 1e-12 // the same closed form in float64
		winTol  = 1e-12 // I0 by its power series against scipy's cephes i0
	)
	b, err := os.ReadFile("testdata/kaiser_golden.json")
	if err != nil {
		t.Fatal(err)
	}
	var g struct {
		ScipyVersion string `json:"scipy_version"`
		Betas        []struct {
			AttenDB float64 `json:"atten_db"`
			Beta    float64
		}
		Windows []struct {
			N    int
			Beta float64
			W    []float64
		}
	}
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	if g.ScipyVersion != "1.10.1" || len(g.Betas) == 0 || len(g.Windows) == 0 {
		t.Fatalf("golden file: scipy %q, %d betas, %d windows", g.ScipyVersion, len(g.Betas), len(g.Windows))
	}
	for _, c := range g.Betas {
		if got := KaiserBeta(c.AttenDB); math.Abs(got-c.Beta) > betaTol {
			t.Errorf("KaiserBeta(%g) = %.15g, scipy %.15g", c.AttenDB, got, c.Beta)
		}
	}
	for _, c := range g.Windows {
		w := make([]float64, c.N)
		for i := range w {
			w[i] = 1
		}
		Kaiser(w, c.Beta)
		for i := range w {
			if math.Abs(w[i]-c.W[i]) > winTol {
				t.Errorf("Kaiser(%d, β=%g)[%d] = %.15g, scipy %.15g", c.N, c.Beta, i, w[i], c.W[i])
			}
		}
	}
}

func TestRect21(t *testing.T) {
	// The 21-tap rectangular design, delay + j·(ideal taps n = −10…10):
	// about +6 dB at +rate/4, about −24 dB at −rate/4, so about 30 dB of
	// opposite-sideband attenuation there; its Hilbert magnitude is within
	// 1 dB of 0 dB only from about 0.05π to 0.95π (common practice figures
	// for this textbook design). By hand: A(π/2) = (4/π)(1 − 1/3 + 1/5 −
	// 1/7 + 1/9) = 1.06305, so |1 + A| → +6.29 dB and |1 − A| → −24.0 dB.
	const (
		tolDB       = 0.01 // against the by-hand series
		aboutTolDB  = 0.1  // the "about" figures, to their last digit
		wantPosDB   = 6.3  // "about +6 dB", by hand 6.29
		wantNegDB   = -24  // "about −24 dB"
		wantAttenDB = 30.3 // "about 30 dB", by hand 6.29 + 24.0
	)
	sp := mustNew(t, Spec{Design: "rect", Taps: 21, Rate: 8000, Low: 100, High: 3900})
	a := 4 / math.Pi * (1 - 1.0/3 + 1.0/5 - 1.0/7 + 1.0/9)
	pos := 20 * math.Log10(cmplx.Abs(sp.Response(2000)))
	neg := 20 * math.Log10(cmplx.Abs(sp.Response(-2000)))
	if want := 20 * math.Log10(1+a); math.Abs(pos-want) > tolDB || math.Abs(pos-wantPosDB) > aboutTolDB {
		t.Errorf("gain at +rate/4 = %.3f dB, want %.3f (about +6)", pos, want)
	}
	if want := 20 * math.Log10(a-1); math.Abs(neg-want) > tolDB || math.Abs(neg-wantNegDB) > aboutTolDB {
		t.Errorf("gain at −rate/4 = %.3f dB, want %.3f (about −24)", neg, want)
	}
	if d := pos - neg; math.Abs(d-wantAttenDB) > aboutTolDB {
		t.Errorf("attenuation at rate/4 = %.2f dB, want about 30.3", d)
	}
	// Hilbert magnitude |A(ω)| within 1 dB of 0 dB from 0.05π to 0.95π,
	// and not much beyond (it falls to 0 at 0 and π).
	f := sp.(*firSplitter)
	for _, c := range []struct {
		w      float64
		inside bool
	}{{0.055 * math.Pi, true}, {0.5 * math.Pi, true}, {0.945 * math.Pi, true}, {0.035 * math.Pi, false}, {0.965 * math.Pi, false}} {
		db := 20 * math.Log10(math.Abs(f.amplitude(c.w)))
		if (math.Abs(db) <= 1) != c.inside {
			t.Errorf("|A(%.3fπ)| = %.2f dB, within 1 dB: %v, want %v", c.w/math.Pi, db, !c.inside, c.inside)
		}
	}
}

func TestResponseSign(t *testing.T) {
	// The Q path is −90° after I at positive frequencies, like the ideal
	// Hilbert transformer −j·sgn(ω) (Oppenheim & Schafer, 3rd ed., sec.
	// 12.4); H ≈ 2 at +f and ≈ 0 at −f for every design (31 rectangular
	// taps ripple by about ±0.06 at 700 Hz).
	const tol = 0.06
	for _, s := range allSpecs() {
		sp := mustNew(t, s)
		for _, f := range []float64{700, 1500, 2300} {
			if g := cmplx.Abs(sp.Response(f)); math.Abs(g-2) > tol {
				t.Errorf("%s: |H(%g)| = %.4f, want 2", s.Design, f, g)
			}
			if g := cmplx.Abs(sp.Response(-f)); g > tol {
				t.Errorf("%s: |H(−%g)| = %.4f, want 0", s.Design, f, g)
			}
		}
	}
}

func TestSuppressionDB(t *testing.T) {
	// Equal gains and phase error ε: 20·log10(cot(ε/2)); 1° → 41.2 dB
	// (common practice figure). With a gain ratio g as well,
	// 10·log10((1 + 2g·cos ε + g²)/(1 − 2g·cos ε + g²)), the image rejection
	// ratio of a quadrature pair with gain and phase imbalance (from memory:
	// the same form as the image-rejection formula in Razavi, RF
	// Microelectronics, 2nd ed., sec. 4.2).
	const (
		tolDB      = 0.005 // against the closed forms, evaluated here
		quotedTol  = 0.05  // the quoted figure has one decimal
		quoted1Deg = 41.2  // dB at ε = 1°, g = 1 (issue 3)
	)
	if got := SuppressionDB(1, math.Pi/180); math.Abs(got-quoted1Deg) > quotedTol {
		t.Errorf("SuppressionDB(1, 1°) = %.3f, want 41.2", got)
	}
	for _, eps := range []float64{0.1, 1, 3} {
		e := eps * math.Pi / 180
		want := 20 * math.Log10(1/math.Tan(e/2))
		if got := SuppressionDB(1, e); math.Abs(got-want) > tolDB {
			t.Errorf("SuppressionDB(1, %g°) = %.4f, want %.4f", eps, got, want)
		}
	}
	// Analyze on synthetic responses H(±f) = 1 ± g·e^{jε} must agree.
	for _, c := range []struct{ g, eps float64 }{{1, 0.5}, {1.01, 0}, {0.98, 2}, {1.05, 5}} {
		syn := synthetic{g: c.g, eps: c.eps * math.Pi / 180}
		a := Analyze(syn, 300, 2700)
		want := SuppressionDB(c.g, c.eps*math.Pi/180)
		if math.Abs(a.SuppressionMinDB-want) > tolDB || math.Abs(a.SuppressionMeanDB-want) > tolDB {
			t.Errorf("g=%g ε=%g°: Analyze min %.4f mean %.4f, want %.4f", c.g, c.eps, a.SuppressionMinDB, a.SuppressionMeanDB, want)
		}
	}
}

// synthetic is a splitter with constant gain and phase imbalance.
type synthetic struct{ g, eps float64 }

func (s synthetic) Spec() Spec { return Spec{Rate: 8000} }
func (s synthetic) Response(f float64) complex128 {
	q := cmplx.Rect(s.g, s.eps)
	if f < 0 {
		return 1 - q
	}
	return 1 + q
}
func (s synthetic) Delay() float64    { return 0 }
func (s synthetic) MACs() float64     { return 0 }
func (s synthetic) NewFilter() Filter { return nil }

func TestAnalyzeMinimumRefined(t *testing.T) {
	// The minimum must be right to 0.05 dB (DESIGN.md): compare with a
	// brute-force grid 100 times finer.
	const tolDB = 0.05
	for _, s := range []Spec{spec("equiripple", 101), spec("rect", 63), spec("allpass", 0), spec("weaver", 41), spec("fft", 63), spec("fft", 64)} {
		if s.Design == "allpass" {
			s.Sections = 6
		}
		sp := mustNew(t, s)
		a := Analyze(sp, 300, 2700)
		fine := math.Inf(1)
		for i := 0; i <= 100000; i++ {
			fine = math.Min(fine, SuppressionAt(sp, 300+2400*float64(i)/100000))
		}
		if a.SuppressionMinDB > fine+tolDB || a.SuppressionMinDB < fine-tolDB {
			t.Errorf("%s: min %.4f dB, fine grid %.4f", s.Design, a.SuppressionMinDB, fine)
		}
	}
}

type remezGolden struct {
	ScipyVersion string `json:"scipy_version"`
	Cases        []struct {
		Taps             int
		Rate, Low, High  float64
		H                []float64
		SuppressionMinDB float64 `json:"suppression_min_db"`
	}
	// Remez63DefaultGrid is the minimum suppression over 300–2700 Hz of
	// scipy's 63-tap design with its default grid density.
	Remez63DefaultGrid float64 `json:"remez63_default_grid_suppression_min_db"`
}

func readRemezGolden(t *testing.T) remezGolden {
	t.Helper()
	b, err := os.ReadFile("testdata/remez_golden.json")
	if err != nil {
		t.Fatal(err)
	}
	var g remezGolden
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	if g.ScipyVersion != "1.10.1" || len(g.Cases) < 3 {
		t.Fatalf("golden file: scipy %q, %d cases", g.ScipyVersion, len(g.Cases))
	}
	return g
}

func TestEquirippleGolden(t *testing.T) {
	// Golden taps from scipy.signal.remez(type='hilbert') on a dense grid
	// (testdata/golden.py, scipy 1.10.1). scipy's Hilbert taps have the
	// opposite sign to ours: it returns +90° at positive frequencies, so
	// our q[k] = −scipy[k].
	const tol = 1e-6
	g := readRemezGolden(t)
	for _, c := range g.Cases {
		sp := mustNew(t, Spec{Design: "equiripple", Taps: c.Taps, Rate: c.Rate, Low: c.Low, High: c.High})
		_, q, _ := Coefficients(sp)
		for k := range q {
			if d := math.Abs(q[k] + c.H[k]); d > tol {
				t.Errorf("%d taps, %g–%g Hz: q[%d] = %.9f, scipy −(%.9f), diff %.2g", c.Taps, c.Low, c.High, k, q[k], c.H[k], d)
			}
		}
	}
}

func TestEquirippleGoldenSuppression(t *testing.T) {
	// Analyze's minimum suppression of each equiripple design against the
	// minimum that testdata/golden.py computes with numpy for scipy's taps
	// on a 200001-point grid (scipy 1.10.1). Our taps equal scipy's within
	// 1e-6 (TestEquirippleGolden), so the figures must agree within the
	// 0.05 dB DESIGN.md asks of the band minimum.
	const tolDB = 0.05
	g := readRemezGolden(t)
	for _, c := range g.Cases {
		sp := mustNew(t, Spec{Design: "equiripple", Taps: c.Taps, Rate: c.Rate, Low: c.Low, High: c.High})
		got := Analyze(sp, c.Low, c.High).SuppressionMinDB
		if math.Abs(got-c.SuppressionMinDB) > tolDB {
			t.Errorf("%d taps, %g–%g Hz at %g Hz: min suppression %.3f dB, scipy/numpy %.3f dB", c.Taps, c.Low, c.High, c.Rate, got, c.SuppressionMinDB)
		}
	}
}

func TestEquiripple63(t *testing.T) {
	// 63 taps, 8 kHz, 300–2700 Hz: at least 80 dB (issue 3), and no worse
	// than scipy.signal.remez's design for 300–3700 Hz with its default
	// grid, which reaches 81.03 dB there (testdata/golden.py, scipy
	// 1.10.1; the issue quotes 81.0 dB). The error must also be
	// equiripple: all in-band extrema of |1 − A| equal within 1 % (Parks
	// & McClellan alternation theorem).
	const (
		floorDB = 80   // issue 3
		tolDB   = 0.05 // DESIGN.md: band minimum right to 0.05 dB
	)
	sp := mustNew(t, spec("equiripple", 63))
	a := Analyze(sp, 300, 2700)
	g := readRemezGolden(t)
	if math.Abs(g.Remez63DefaultGrid-81.0) > tolDB {
		t.Fatalf("golden: scipy's default-grid design reaches %.3f dB, the issue says 81.0", g.Remez63DefaultGrid)
	}
	if a.SuppressionMinDB < floorDB || a.SuppressionMinDB < g.Remez63DefaultGrid-tolDB {
		t.Errorf("min suppression %.2f dB, want ≥ %v and ≥ scipy's %.2f dB", a.SuppressionMinDB, floorDB, g.Remez63DefaultGrid)
	}
	t.Logf("63 taps, 300–2700 Hz at 8 kHz: %.2f dB (scipy default grid %.2f dB)", a.SuppressionMinDB, g.Remez63DefaultGrid)
	f := sp.(*firSplitter)
	peaks := extremaOf(func(x float64) float64 { return math.Abs(1 - f.amplitude(2*math.Pi*x/8000)) }, 300, 3700, 20000)
	checkEqual(t, "equiripple |1−A|", peaks, 0.01)
	if len(peaks) < 17 { // K+1 = 17 alternations for 63 taps
		t.Errorf("%d extrema, want ≥ 17", len(peaks))
	}
}

// extremaOf returns the local maxima of g on a uniform grid over [a, b],
// ends included.
func extremaOf(g func(float64) float64, a, b float64, n int) []float64 {
	v := make([]float64, n+1)
	for i := range v {
		v[i] = g(a + (b-a)*float64(i)/float64(n))
	}
	var out []float64
	for i := range v {
		if (i == 0 || v[i] >= v[i-1]) && (i == n || v[i] >= v[i+1]) {
			out = append(out, v[i])
		}
	}
	return out
}

func checkEqual(t *testing.T, what string, v []float64, rel float64) {
	t.Helper()
	lo, hi := math.Inf(1), 0.0
	for _, x := range v {
		lo, hi = math.Min(lo, x), math.Max(hi, x)
	}
	if (hi-lo)/hi > rel {
		t.Errorf("%s extrema from %.6g to %.6g, not within %g%%", what, lo, hi, 100*rel)
	}
}

func TestAllpassCheckValues(t *testing.T) {
	// Optimum (elliptic-function) 90° pair over 300–3700 Hz at 8 kHz, by
	// total order N = 2·sections+1: peak phase error and suppression
	// (issue 3 check values from the closed-form Jacobi-nome formula;
	// testdata/ellip_golden.json cross-checks the coefficients with
	// scipy.signal.ellip, scipy 1.10.1).
	const tolDeg, tolDB = 0.0001, 0.05
	for _, c := range []struct {
		sections  int
		deg, supp float64
	}{{3, 0.5093, 47.0}, {4, 0.0889, 62.2}, {5, 0.0155, 77.4}} {
		sp := mustNew(t, Spec{Design: "allpass", Sections: c.sections, Rate: 8000, Low: 300, High: 3700})
		ap := sp.(*allpassSplitter)
		errDeg := func(f float64) float64 {
			w := 2 * math.Pi * f / 8000
			i, q := ap.paths(w)
			return math.Abs(math.Abs(cmplx.Phase(q/i))*180/math.Pi - 90)
		}
		peaks := extremaOf(errDeg, 300, 3700, 40000)
		peak := 0.0
		for _, p := range peaks {
			peak = math.Max(peak, p)
		}
		if math.Abs(peak-c.deg) > tolDeg {
			t.Errorf("N=%d: peak phase error %.5f°, want %.4f°", 2*c.sections+1, peak, c.deg)
		}
		// Equiripple: all extrema equal within 1 % (issue 3).
		checkEqual(t, "allpass phase error", peaks, 0.01)
		a := Analyze(sp, 300, 3700)
		if math.Abs(a.SuppressionMinDB-c.supp) > tolDB {
			t.Errorf("N=%d: suppression %.3f dB, want %.1f", 2*c.sections+1, a.SuppressionMinDB, c.supp)
		}
	}
}

func TestAllpassGolden(t *testing.T) {
	// Coefficients against the poles of scipy.signal.ellip half-band
	// designs (testdata/golden.py, scipy 1.10.1): a = |pole|².
	const tol = 1e-8
	b, err := os.ReadFile("testdata/ellip_golden.json")
	if err != nil {
		t.Fatal(err)
	}
	var g struct {
		ScipyVersion string `json:"scipy_version"`
		Cases        []struct {
			Order int
			A     []float64
		}
	}
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	if g.ScipyVersion != "1.10.1" {
		t.Fatalf("golden scipy version %q", g.ScipyVersion)
	}
	for _, c := range g.Cases {
		a := allpassCoefficients((c.Order-1)/2, 300, 8000)
		for i := range c.A {
			if math.Abs(a[i]-c.A[i]) > tol {
				t.Errorf("order %d: a[%d] = %.12f, scipy %.12f", c.Order, i, a[i], c.A[i])
			}
		}
	}
}

func TestAllpassRises(t *testing.T) {
	// Suppression rises with the number of sections (issue 3).
	prev := 0.0
	for n := 1; n <= 10; n++ {
		s := spec("allpass", 0)
		s.Sections = n
		a := Analyze(mustNew(t, s), 300, 2700)
		if a.SuppressionMinDB <= prev {
			t.Errorf("%d sections: %.2f dB, not above %.2f", n, a.SuppressionMinDB, prev)
		}
		prev = a.SuppressionMinDB
	}
}

func TestFilterMatchesResponse(t *testing.T) {
	// The streaming filter's measured suppression equals the response's
	// within 1 dB while below 100 dB (issue 3, --verify).
	const tolDB = 1
	for _, s := range allSpecs() {
		for _, taps := range []int{7, 15, 31, 63} {
			if s.Design == "fft" {
				s.Taps = 4 * taps
			} else {
				s.Taps = taps
			}
			s.Sections = taps / 8
			if s.Sections == 0 {
				s.Sections = 1
			}
			sp := mustNew(t, s)
			for _, f := range []float64{300, 1500, 2700} {
				want := SuppressionAt(sp, f)
				got := MeasureDB(sp, f)
				if want < 100 && math.Abs(got-want) > tolDB {
					t.Errorf("%s %d/%d at %g Hz: measured %.2f dB, response %.2f dB", s.Design, s.Taps, s.Sections, f, got, want)
				}
			}
		}
	}
}

func TestFilterGainAndDelay(t *testing.T) {
	// a·cos(ωn) becomes a·e^{jω(n−D)} (the unity convention of
	// DESIGN.md), within the splitter's deviation from the ideal response
	// (a·(|H(f)/2 − e^{−jωD}| + |H(−f)|/2)) plus float32 rounding.
	const (
		tol    = 1e-5 // float32 rounding over a few hundred taps
		maxDev = 0.01 // these designs at 3× the test length are within 1 % of ideal at 1500 Hz (common practice)
	)
	for _, s := range allSpecs() {
		s.Taps *= 3
		sp := mustNew(t, s)
		if s.Design == "allpass" {
			continue // its delay varies over the band (IIR)
		}
		const f, a = 1500.0, 0.7
		w := 2 * math.Pi * f / 8000
		n := 4096
		src := make([]float32, n)
		for i := range src {
			src[i] = float32(a * math.Cos(w*float64(i)))
		}
		dst := sp.NewFilter().Process(nil, src)
		d := sp.Delay()
		dev := a * (cmplx.Abs(sp.Response(f)/2-cmplx.Rect(1, -w*d)) + cmplx.Abs(sp.Response(-f))/2)
		if dev > maxDev {
			t.Errorf("%s: deviation %g from the unity convention", s.Design, dev)
		}
		for i := n - 100; i < n; i++ {
			want := cmplx.Rect(a, w*(float64(i)-d))
			got := complex128(dst[i])
			if cmplx.Abs(got-want) > dev+tol {
				t.Fatalf("%s: out[%d] = %v, want %v", s.Design, i, got, want)
			}
		}
	}
}

func TestBlockwise(t *testing.T) {
	// Block-wise output equals whole-signal output for many block sizes.
	rng := rand.New(rand.NewPCG(1, 2))
	src := make([]float32, 5000)
	for i := range src {
		src[i] = float32(rng.NormFloat64())
	}
	for _, s := range streamSpecs() {
		sp := mustNew(t, s)
		want := sp.NewFilter().Process(nil, src)
		for _, bs := range []int{1, 2, 3, 7, 64, 100, 1023, 1024, 1025, 4999} {
			f := sp.NewFilter()
			got := make([]complex64, len(src))
			for off := 0; off < len(src); off += bs {
				end := min(off+bs, len(src))
				f.Process(got[off:end], src[off:end])
			}
			for i := range got {
				if got[i] != want[i] {
					t.Fatalf("%s (%d bits) block %d: out[%d] = %v, whole %v", s.Design, s.Bits, bs, i, got[i], want[i])
				}
			}
		}
		// Reset returns to the initial state.
		f := sp.NewFilter()
		f.Process(nil, src[:777])
		f.Reset()
		got := f.Process(nil, src)
		for i := range got {
			if got[i] != want[i] {
				t.Fatalf("%s after Reset: out[%d] = %v, want %v", s.Design, i, got[i], want[i])
			}
		}
	}
}

func TestNoAllocs(t *testing.T) {
	src := make([]float32, 4096)
	dst := make([]complex64, 4096)
	for _, s := range streamSpecs() {
		f := mustNew(t, s).NewFilter()
		if n := testing.AllocsPerRun(20, func() { f.Process(dst, src) }); n != 0 {
			t.Errorf("%s (%d bits): %v allocations per block", s.Design, s.Bits, n)
		}
	}
}

func TestEnvelopeRipple(t *testing.T) {
	// A residual opposite sideband of relative amplitude r makes the
	// envelope |x| of a tone ripple by ±r, since |1 + r·e^{jθ}| runs from
	// 1 − r to 1 + r; −20 dB suppression means about 10 % amplitude error
	// when measuring an instantaneous amplitude as |x| (common practice).
	// Measured through the streaming filter of a short rectangular design,
	// whose suppression is poor near the band's low edge.
	const (
		tolRel   = 0.05 // relative to r: the band edge of the design adds a little in-band ripple
		target   = 20.0 // dB of suppression for the 10 % case
		wantR20  = 0.10 // the common-practice figure at −20 dB
		tolR20   = 0.005
		settle   = 100 // samples: several filter lengths
		nSamples = 4000
	)
	sp := mustNew(t, Spec{Design: "rect", Taps: 7, Rate: 8000, Low: 300, High: 3700})
	ripple := func(f float64) float64 {
		w := 2 * math.Pi * f / 8000
		src := make([]float32, nSamples)
		for i := range src {
			src[i] = float32(math.Cos(w * float64(i)))
		}
		dst := sp.NewFilter().Process(nil, src)
		lo, hi := math.Inf(1), 0.0
		for _, v := range dst[settle:] {
			e := cmplx.Abs(complex128(v))
			lo, hi = math.Min(lo, e), math.Max(hi, e)
		}
		return (hi - lo) / (hi + lo)
	}
	for _, f := range []float64{450, 600, 900} {
		r := cmplx.Abs(sp.Response(-f)) / cmplx.Abs(sp.Response(f))
		got := ripple(f)
		if math.Abs(got-r) > tolRel*r {
			t.Errorf("%g Hz: envelope ripple ±%.4f, opposite sideband r = %.4f", f, got, r)
		}
		t.Logf("%g Hz: suppression %.1f dB, envelope ripple ±%.1f %%", f, -20*math.Log10(r), 100*got)
	}
	// A frequency where this design suppresses by exactly 20 dB, found by
	// bisection between one below and one above 20 dB: the envelope there
	// ripples by about ±10 %.
	lo, hi := 300.0, 2000.0
	if SuppressionAt(sp, lo) > target || SuppressionAt(sp, hi) < target {
		t.Fatalf("20 dB not bracketed: %.1f dB at %g Hz, %.1f dB at %g Hz", SuppressionAt(sp, lo), lo, SuppressionAt(sp, hi), hi)
	}
	for range 60 {
		mid := (lo + hi) / 2
		if SuppressionAt(sp, mid) < target {
			lo = mid
		} else {
			hi = mid
		}
	}
	if got := ripple(lo); math.Abs(got-wantR20) > tolR20 {
		t.Errorf("at %.1f Hz (20 dB suppression): envelope ripple ±%.2f %%, want about ±10 %%", lo, 100*got)
	} else {
		t.Logf("at %.1f Hz (20 dB suppression): envelope ripple ±%.2f %%", lo, 100*got)
	}
}

func TestBadSpecs(t *testing.T) {
	for _, c := range []struct {
		s    Spec
		want string
	}{
		{Spec{Design: "bogus", Taps: 31, Rate: 8000, Low: 300, High: 2700}, "allowed: rect, hamming"},
		{Spec{Design: "kaiser", Taps: 30, Rate: 8000, Low: 300, High: 2700}, "odd"},
		{Spec{Design: "kaiser", Taps: 1, Rate: 8000, Low: 300, High: 2700}, "odd, 3 to"},
		{Spec{Design: "weaver", Taps: 2, Rate: 8000, Low: 300, High: 2700}, "odd, 3 to"},
		{Spec{Design: "kaiser", Taps: 31, Rate: 8000, Low: 0, High: 2700}, "0 < low < high < rate/2"},
		{Spec{Design: "kaiser", Taps: 31, Rate: 8000, Low: 300, High: 4000}, "0 < low < high < rate/2"},
		{Spec{Design: "kaiser", Taps: 31, Rate: 8000, Low: 2700, High: 300}, "0 < low < high"},
		{Spec{Design: "kaiser", Taps: 31, Rate: 0, Low: 300, High: 2700}, "rate"},
		{Spec{Design: "allpass", Sections: 0, Rate: 8000, Low: 300, High: 2700}, "sections must be 1 to"},
		{Spec{Design: "fft", Taps: 4, Rate: 8000, Low: 300, High: 2700}, "block size"},
		{Spec{Design: "kaiser", Taps: 31, Rate: 8000, Low: math.NaN(), High: 2700}, "band"},
	} {
		_, err := New(c.s)
		if err == nil || !strings.Contains(err.Error(), c.want) || strings.Contains(err.Error(), "\n") {
			t.Errorf("New(%+v) = %v, want one-line error with %q", c.s, err, c.want)
		}
	}
}

func TestProcessPanics(t *testing.T) {
	for _, s := range allSpecs() {
		f := mustNew(t, s).NewFilter()
		func() {
			defer func() {
				if r := recover(); r != "hilbert: dst length differs from src" {
					t.Errorf("%s: panic %v", s.Design, r)
				}
			}()
			f.Process(make([]complex64, 3), make([]float32, 4))
		}()
	}
}

func BenchmarkFIR(b *testing.B) {
	for _, taps := range []int{63, 255} {
		for _, d := range []string{"equiripple", "weaver"} {
			b.Run(d+"/"+strconv.Itoa(taps), func(b *testing.B) {
				benchFilter(b, mustNew(b, spec(d, taps)))
			})
		}
	}
	for _, n := range []int{3, 6} {
		s := spec("allpass", 0)
		s.Sections = n
		b.Run("allpass/"+strconv.Itoa(n), func(b *testing.B) { benchFilter(b, mustNew(b, s)) })
	}
	for _, n := range []int{512, 4096} {
		b.Run("fft/"+strconv.Itoa(n), func(b *testing.B) { benchFilter(b, mustNew(b, spec("fft", n))) })
	}
}

func benchFilter(b *testing.B, sp Splitter) {
	src := make([]float32, 4096)
	for i := range src {
		src[i] = float32(math.Sin(float64(i)))
	}
	dst := make([]complex64, len(src))
	f := sp.NewFilter()
	b.SetBytes(int64(4 * len(src)))
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		f.Process(dst, src)
	}
	b.ReportMetric(float64(b.N)*float64(len(src))/b.Elapsed().Seconds()/1e6, "MS/s")
}

func BenchmarkSweep(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		for _, d := range Designs {
			for n := 7; n <= 255; n += 8 {
				s := spec(d, n)
				if d == "fft" {
					s.Taps = n + 1
				}
				s.Sections = 1 + n/32
				Analyze(mustNew(b, s), 300, 2700)
			}
		}
	}
}

// BenchmarkSweepAllOdd is the analysis behind
// `ssbkit sweep --designs all --taps 7:255:2 --sections 1:16:1`: every
// design at every odd length (fft at the same lengths, as the command
// does), all-pass with 1 to 16 sections.
func BenchmarkSweepAllOdd(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		for _, d := range Designs {
			if d == "allpass" {
				for n := 1; n <= 16; n++ {
					s := spec(d, 0)
					s.Sections = n
					Analyze(mustNew(b, s), 300, 2700)
				}
				continue
			}
			for n := 7; n <= 255; n += 2 {
				if d == "fft" && n < MinFFT {
					continue
				}
				Analyze(mustNew(b, spec(d, n)), 300, 2700)
			}
		}
	}
}
