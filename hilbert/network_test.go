package hilbert

import (
	"math"
	"math/cmplx"
	"slices"
	"testing"
)

// gridMinByResponse is the minimum of 20·log10(|H(f)|/|H(−f)|) over f by
// Network.Response: complex division per section, independent of the
// Monte Carlo kernel's arithmetic.
func gridMinByResponse(n *Network, f []float64) float64 {
	m := math.Inf(1)
	for _, v := range f {
		m = math.Min(m, ratioDB(cmplx.Abs(n.Response(v)), cmplx.Abs(n.Response(-v))))
	}
	return m
}

func designNet(t testing.TB, sections int, series string) *Network {
	t.Helper()
	a, err := NewAnalog(sections, 300, 2700)
	if err != nil {
		t.Fatal(err)
	}
	p := Parts{Value: 10e-9}
	if series != "" {
		p.Series, _ = Series(series)
	}
	return a.Build(p)
}

func TestNetworkIdealMatchesAnalog(t *testing.T) {
	// Unsnapped parts reproduce the design's poles, so the network's
	// response is the design's, and on a grid that holds both band edges
	// (where the equiripple error peaks) its minimum is the closed form.
	const (
		tolResp = 1e-12
		tolDB   = 1e-6
	)
	for _, n := range []int{2, 5, 8} {
		a, _ := NewAnalog(n, 300, 2700)
		net := a.Build(Parts{Value: 10e-9})
		for _, f := range []float64{-2000, 300, 1000, 2700} {
			if d := cmplx.Abs(net.Response(f) - a.Response(f)); d > tolResp {
				t.Errorf("n=%d f=%g: network and design differ by %g", n, f, d)
			}
		}
		r := net.MonteCarlo(MonteCarlo{Low: 300, High: 2700, Trials: 3})
		want := AnalogSuppressionDB(n, 300, 2700)
		for _, v := range r.MinDB {
			if math.Abs(v-want) > tolDB {
				t.Errorf("n=%d: zero tolerance gives %.9f dB, ideal %.9f dB", n, v, want)
			}
		}
		// --fix r: the same poles from a fixed resistor.
		nr := a.Build(Parts{FixR: true, Value: 22e3})
		if got := nr.GridMinDB(LogGrid(300, 2700, 512)); math.Abs(got-want) > tolDB {
			t.Errorf("n=%d fixed R: %.9f dB, ideal %.9f", n, got, want)
		}
	}
}

func TestMonteCarloSnappedOnly(t *testing.T) {
	// Snapping alone, zero tolerance: every trial is the snapped network,
	// whose grid minimum Response gives independently; Analyze's refined
	// minimum can only be lower, and by little on a 512-point grid.
	const (
		tolDB  = 1e-9
		gridDB = 0.1
	)
	for _, series := range []string{"E12", "E24", "E96"} {
		net := designNet(t, 6, series)
		r := net.MonteCarlo(MonteCarlo{Low: 300, High: 2700, Trials: 5, Seed: 9})
		want := gridMinByResponse(net, r.Freq)
		ana := net.Analyze(300, 2700).SuppressionMinDB
		for _, v := range r.MinDB {
			if math.Abs(v-want) > tolDB {
				t.Errorf("%s: trial %.9f dB, snapped network %.9f dB", series, v, want)
			}
		}
		if !(r.MinDB[0] >= ana-tolDB && r.MinDB[0]-ana < gridDB) {
			t.Errorf("%s: grid minimum %.4f dB, refined %.4f dB", series, r.MinDB[0], ana)
		}
		if ideal := AnalogSuppressionDB(6, 300, 2700); !(want < ideal) {
			t.Errorf("%s: snapped %.2f dB not below ideal %.2f dB", series, want, ideal)
		}
	}
}

func TestMonteCarloImageRejection(t *testing.T) {
	// Each trial's suppression at each frequency equals the image-
	// rejection formula for the gain ratio g = |Q/I| and the departure ε
	// of Q from −90° after I (SuppressionDB, checked against its closed
	// forms in TestSuppressionDB), evaluated on the same parts. The
	// drawn parts are rebuilt here from the documented draw order.
	const tolDB = 1e-7
	net := designNet(t, 4, "E24")
	for _, gauss := range []bool{false, true} {
		mc := MonteCarlo{Low: 300, High: 2700, Points: 64, Trials: 4, Seed: 5, Tol: Tolerance{R: 0.01, C: 0.05, Gaussian: gauss}, Curves: true}
		r := net.MonteCarlo(mc)
		for tr := range mc.Trials {
			drawn := trialNetwork(net, mc, tr)
			for k, f := range r.Freq {
				i, q := drawn.Paths(f)
				z := q / i
				want := SuppressionDB(cmplx.Abs(z), cmplx.Phase(z)+math.Pi/2)
				if got := r.Curves[tr][k]; math.Abs(got-want) > tolDB {
					t.Errorf("gauss %v trial %d f=%.1f: %.9f dB, image rejection %.9f dB", gauss, tr, f, got, want)
				}
			}
		}
	}
}

// trialNetwork rebuilds trial tr of a MonteCarlo run: the same generator,
// four draws per section in the order R, C, Rin, Rf.
func trialNetwork(n *Network, mc MonteCarlo, tr int) *Network {
	src := newDraw(mc.Seed, mc.Tol.Gaussian)
	var out *Network
	for range tr + 1 {
		out = &Network{}
		for _, s := range n.Sections {
			dr, dc, din, df := src(), src(), src(), src()
			out.Sections = append(out.Sections, RCSection{Q: s.Q,
				R: s.R * (1 + mc.Tol.R*dr), C: s.C * (1 + mc.Tol.C*dc),
				Rin: s.Rin * (1 + mc.Tol.R*din), Rf: s.Rf * (1 + mc.Tol.R*df)})
		}
	}
	return out
}

func TestMonteCarloSpread(t *testing.T) {
	// Seeded: the same seed repeats; the spread grows with the tolerance
	// (the deviations scale with it, so every percentile falls).
	base := designNet(t, 8, "")
	for _, gauss := range []bool{false, true} {
		prev := [3]float64{math.Inf(1), math.Inf(1), math.Inf(1)}
		for _, tol := range []float64{0.0005, 0.002, 0.005, 0.01, 0.02, 0.05} {
			mc := MonteCarlo{Low: 300, High: 2700, Trials: 400, Seed: 11, Tol: Tolerance{R: tol, C: tol, Gaussian: gauss}}
			r := base.MonteCarlo(mc)
			q := [3]float64{r.Quantile(0.5), r.Quantile(0.05), r.Quantile(0.01)}
			for i := range q {
				if !(q[i] < prev[i]) {
					t.Errorf("gauss %v tol %g: quantile %d is %.2f dB, not below %.2f dB at the smaller tolerance", gauss, tol, i, q[i], prev[i])
				}
			}
			if !(q[2] <= q[1] && q[1] <= q[0]) {
				t.Errorf("gauss %v tol %g: percentiles out of order %v", gauss, tol, q)
			}
			prev = q
			again := base.MonteCarlo(mc)
			if !slices.Equal(r.MinDB, again.MinDB) {
				t.Errorf("gauss %v tol %g: the same seed gave different trials", gauss, tol)
			}
			mc.Seed++
			if other := base.MonteCarlo(mc); slices.Equal(r.MinDB, other.MinDB) {
				t.Errorf("gauss %v tol %g: another seed gave the same trials", gauss, tol)
			}
		}
	}
}

func TestMonteCarloQuantileAndYield(t *testing.T) {
	// stat.Empirical (gonum): the p-quantile of N sorted values is the
	// value at 1-based rank ⌈p·N⌉. Yield counts trials at or above the
	// target.
	r := MCResult{MinDB: make([]float64, 2000)}
	for i := range r.MinDB {
		r.MinDB[i] = float64((i * 7919) % 2000) // a permutation of 0…1999
	}
	for _, c := range []struct{ p, want float64 }{{0.5, 999}, {0.05, 99}, {0.01, 19}, {0.0104, 20}} {
		if got := r.Quantile(c.p); got != c.want {
			t.Errorf("Quantile(%g) = %g, want %g", c.p, got, c.want)
		}
	}
	if got := r.Yield(1500); got != 0.25 {
		t.Errorf("Yield(1500) = %g, want 0.25", got)
	}
}

func TestSensitivity(t *testing.T) {
	// Each drop equals a direct recomputation with that part alone
	// moved; R and C of one section share their slope (only RC counts).
	const tolDB = 1e-9
	net := designNet(t, 6, "E96")
	tol := Tolerance{R: 0.01, C: 0.05}
	f := LogGrid(300, 2700, 256)
	base := net.GridMinDB(f)
	sens := net.Sensitivity(300, 2700, 256, tol)
	if len(sens) != 4*len(net.Sections) {
		t.Fatalf("%d entries", len(sens))
	}
	for _, s := range sens {
		worst := math.Inf(1)
		for _, sign := range []float64{-1, 1} {
			m := &Network{Sections: slices.Clone(net.Sections)}
			p := &m.Sections[s.Section]
			x := 1 + sign*s.Tolerance
			switch s.Part {
			case "R":
				p.R *= x
			case "C":
				p.C *= x
			case "Rin":
				p.Rin *= x
			case "Rf":
				p.Rf *= x
			}
			worst = math.Min(worst, m.GridMinDB(f))
		}
		if want := base - worst; math.Abs(s.DropDB-want) > tolDB {
			t.Errorf("section %d %s: drop %.6f dB, direct %.6f dB", s.Section, s.Part, s.DropDB, want)
		}
		if s.DropDB < 0 || s.SlopeDBPerPct < 0 {
			t.Errorf("section %d %s: negative drop %g or slope %g", s.Section, s.Part, s.DropDB, s.SlopeDBPerPct)
		}
	}
	for i := 0; i < len(sens); i += 4 {
		if r, c := sens[i].SlopeDBPerPct, sens[i+1].SlopeDBPerPct; math.Abs(r-c) > 1e-9 {
			t.Errorf("section %d: R slope %g, C slope %g", i/4, r, c)
		}
	}
}

func TestMonteCarloNoAllocs(t *testing.T) {
	net := designNet(t, 8, "E96")
	k := newKernel(net, LogGrid(300, 2700, 512))
	if a := testing.AllocsPerRun(20, func() { k.minDB(nil) }); a != 0 {
		t.Errorf("kernel allocates %v times per trial", a)
	}
}

// BenchmarkMonteCarlo is the speed goal: 2000 trials of an
// 8-section network over a 512-point grid in under one second on one core.
func BenchmarkMonteCarlo(b *testing.B) {
	net := designNet(b, 8, "E96")
	mc := MonteCarlo{Low: 300, High: 2700, Points: 512, Trials: 2000, Seed: 1, Tol: Tolerance{R: 0.01, C: 0.05}}
	for b.Loop() {
		net.MonteCarlo(mc)
	}
}
