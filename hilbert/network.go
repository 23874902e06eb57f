package hilbert

import (
	"math"
	"math/rand/v2"
	"slices"

	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"
)

// Network is an analog phasing network as built from parts. Each section
// is the usual op-amp first-order all-pass: the input drives the
// non-inverting input through a resistor R with a capacitor C to ground,
// and the inverting input through Rin with Rf in the feedback path, so
//
//	T(s) = (1 − g·sRC)/(1 + sRC),   g = Rf/Rin,
//
// an all-pass with its pole at 1/(2πRC) while Rf = Rin. The model is the
// ideal op-amp: its gain-bandwidth, input capacitance, the source and
// load impedances, layout and the matching of the two paths' op-amps all
// matter beyond it.
type Network struct {
	Sections []RCSection
}

// RCSection is one op-amp all-pass section of a Network.
type RCSection struct {
	// Q is true for a section of the Q path.
	Q bool
	// R and C (ohms, farads) set the pole 1/(2πRC).
	R, C float64
	// Rin and Rf (ohms) are the op-amp's input and feedback resistors,
	// nominally equal.
	Rin, Rf float64
}

// Pole returns the section's pole frequency 1/(2πRC) in Hz.
func (s RCSection) Pole() float64 { return 1 / (2 * math.Pi * s.R * s.C) }

// Parts says how Build chooses a network's parts.
type Parts struct {
	// FixR fixes every section's resistor at Value ohms and computes the
	// capacitor; otherwise (the default) every capacitor is Value farads
	// and the resistor is computed: C = 1/(2πpR), R = 1/(2πpC).
	FixR  bool
	Value float64
	// Series, when not nil, snaps the computed part to the nearest value
	// of a preferred series (Series, Snap).
	Series []float64
	// Gain is the value of Rin and Rf in ohms (0 means 10 kΩ).
	Gain float64
}

// Build returns the network of parts p for the design: I sections first,
// then Q, each path by ascending pole. It panics if p.Value is not
// positive and finite or a computed part is not (a pole near 0 Hz with a
// tiny fixed part).
func (a *Analog) Build(p Parts) *Network {
	g := p.Gain
	if g == 0 {
		g = 10e3
	}
	if !(p.Value > 0) || math.IsInf(p.Value, 0) {
		panic("hilbert: Build needs a positive finite part value")
	}
	n := &Network{}
	for _, path := range []struct {
		q     bool
		poles []float64
	}{{false, a.I}, {true, a.Q}} {
		for _, f := range path.poles {
			s := RCSection{Q: path.q, Rin: g, Rf: g}
			x := 1 / (2 * math.Pi * f * p.Value)
			if p.Series != nil {
				x = Snap(x, p.Series)
			}
			if p.FixR {
				s.R, s.C = p.Value, x
			} else {
				s.R, s.C = x, p.Value
			}
			n.Sections = append(n.Sections, s)
		}
	}
	return n
}

// Paths returns the I and Q path responses at f Hz.
func (n *Network) Paths(f float64) (i, q complex128) {
	i, q = 1, 1
	w := 2 * math.Pi * f
	for _, s := range n.Sections {
		x := w * s.R * s.C
		t := complex(1, -s.Rf/s.Rin*x) / complex(1, x)
		if s.Q {
			q *= t
		} else {
			i *= t
		}
	}
	return i, q
}

// Response returns the analytic response H(f) = I(f) + j·Q(f) at f Hz.
func (n *Network) Response(f float64) complex128 {
	i, q := n.Paths(f)
	return i + complex(0, 1)*q
}

// Analyze evaluates the network over [low, high] Hz like Analog.Analyze
// (DelayMS from the phase of H by a central difference at the centre).
// It panics if !(0 < low < high).
func (n *Network) Analyze(low, high float64) Analysis {
	if !(low > 0 && low < high) {
		panic("hilbert: Analyze band must satisfy 0 < low < high")
	}
	r := analyzeBand(n, low, high)
	f := (low + high) / 2
	d := 1e-3 * f
	p := n.Response(f+d) * conj(n.Response(f-d))
	r.DelayMS = 1000 * -math.Atan2(imag(p), real(p)) / (2 * math.Pi * 2 * d)
	return r
}

// Tolerance says how far real parts stray from their nominal values.
type Tolerance struct {
	// R and C are the relative tolerances of the resistors and the
	// capacitors (0.01 is ±1 %).
	R, C float64
	// Gaussian draws each part from a normal distribution whose 3σ is
	// the tolerance (0.27 % of parts then lie outside it); otherwise each
	// part is uniform within ±tolerance.
	Gaussian bool
}

// MonteCarlo describes a tolerance analysis of a Network.
type MonteCarlo struct {
	// Low and High bound the band in Hz; Points is the number of
	// frequencies of its grid, spaced evenly on a logarithmic scale with
	// both edges included (0 means 512).
	Low, High float64
	Points    int
	// Trials is the number of networks drawn; Seed seeds the generator
	// (PCG), so a run repeats exactly.
	Trials int
	Seed   uint64
	Tol    Tolerance
	// Curves keeps every trial's suppression at every grid frequency.
	Curves bool
	// Progress, if not nil, is called after each trial with the number
	// of trials done.
	Progress func(done int)
}

// MCResult is the outcome of a MonteCarlo run.
type MCResult struct {
	// Freq is the grid (Hz).
	Freq []float64
	// MinDB holds each trial's minimum suppression over the grid (dB),
	// in trial order.
	MinDB []float64
	// Curves[t][k] is trial t's suppression at Freq[k] (with Curves).
	Curves [][]float64
}

// Quantile returns the p-quantile (0 ≤ p ≤ 1) of the trials' minimum
// suppression by gonum's stat.Quantile with stat.Empirical: the smallest
// trial value v such that at least a fraction p of the trials are ≤ v
// (no interpolation).
func (r *MCResult) Quantile(p float64) float64 {
	s := slices.Clone(r.MinDB)
	slices.Sort(s)
	return stat.Quantile(p, stat.Empirical, s, nil)
}

// Yield returns the fraction of trials whose minimum suppression reaches
// target dB.
func (r *MCResult) Yield(target float64) float64 {
	var k int
	for _, v := range r.MinDB {
		if v >= target {
			k++
		}
	}
	return float64(k) / float64(len(r.MinDB))
}

// LogGrid returns points frequencies from low to high, evenly spaced on a
// logarithmic scale, both ends exact.
func LogGrid(low, high float64, points int) []float64 {
	f := make([]float64, points)
	for k := range f {
		f[k] = low * math.Pow(high/low, float64(k)/float64(points-1))
	}
	f[0], f[points-1] = low, high
	return f
}

// partsPerSection is the number of parts MonteCarlo draws for each
// section, in this order: R, C, Rin, Rf.
const partsPerSection = 4

// MonteCarlo draws mc.Trials networks whose parts stray from n's by the
// tolerances and returns each one's suppression over the band. Each trial
// draws, section by section, a deviation d for R, C, Rin and Rf in that
// order from one seeded generator and scales the part by (1 + tol·d), d
// uniform on [−1, 1] or normal with σ = 1/3: the same seed gives the same
// deviations for any tolerance, so the spread grows with the tolerance
// trial by trial. It panics if the band or the counts are invalid.
func (n *Network) MonteCarlo(mc MonteCarlo) MCResult {
	if mc.Points == 0 {
		mc.Points = 512
	}
	if !(mc.Low > 0 && mc.Low < mc.High) || mc.Points < 2 || mc.Trials < 1 {
		panic("hilbert: MonteCarlo needs 0 < Low < High, Points ≥ 2 and Trials ≥ 1")
	}
	res := MCResult{Freq: LogGrid(mc.Low, mc.High, mc.Points), MinDB: make([]float64, mc.Trials)}
	k := newKernel(n, res.Freq)
	draw := newDraw(mc.Seed, mc.Tol.Gaussian)
	for t := range res.MinDB {
		for i, s := range n.Sections {
			dr, dc, din, df := draw(), draw(), draw(), draw()
			k.tau[i] = s.R * (1 + mc.Tol.R*dr) * s.C * (1 + mc.Tol.C*dc)
			k.gain[i] = s.Rf * (1 + mc.Tol.R*df) / (s.Rin * (1 + mc.Tol.R*din))
		}
		var curve []float64
		if mc.Curves {
			curve = make([]float64, mc.Points)
			res.Curves = append(res.Curves, curve)
		}
		res.MinDB[t] = k.minDB(curve)
		if mc.Progress != nil {
			mc.Progress(t + 1)
		}
	}
	return res
}

// newDraw returns the generator of part deviations: PCG seeded with seed,
// uniform on [−1, 1] or normal with σ = 1/3 (gonum's distuv).
func newDraw(seed uint64, gaussian bool) func() float64 {
	src := rand.NewPCG(seed, 0x55bc1711)
	if gaussian {
		return distuv.Normal{Mu: 0, Sigma: 1.0 / 3, Src: src}.Rand
	}
	return distuv.Uniform{Min: -1, Max: 1, Src: src}.Rand
}

// SuppressionCurve returns the suppression of n in dB at each of the
// frequencies f, by the arithmetic MonteCarlo uses.
func (n *Network) SuppressionCurve(f []float64) []float64 {
	c := make([]float64, len(f))
	newKernel(n, f).minDB(c)
	return c
}

// GridMinDB returns the minimum suppression of n over the frequencies f,
// by the arithmetic MonteCarlo uses.
func (n *Network) GridMinDB(f []float64) float64 {
	return newKernel(n, f).minDB(nil)
}

// kernel evaluates the suppression of a network with given section time
// constants τ = RC and gains g on a fixed grid. Written out by hand for
// speed: per section and frequency, with x = ωτ,
//
//	T = (1 − jgx)/(1 + jx) = ((1 − gx²) − jx(1 + g)) / (1 + x²),
//
// the complex numerators of each path are multiplied up and their real
// denominators kept apart, so the whole grid costs no division and one
// logarithm per trial (for the minimum).
type kernel struct {
	q         []bool
	tau, gain []float64
	w         []float64 // 2πf
	ir, ii    []float64 // I path numerator
	qr, qi    []float64 // Q path numerator
	di, dq    []float64 // real denominators
}

func newKernel(n *Network, f []float64) *kernel {
	ns, np := len(n.Sections), len(f)
	k := &kernel{q: make([]bool, ns), tau: make([]float64, ns), gain: make([]float64, ns), w: make([]float64, np)}
	for i, s := range n.Sections {
		k.q[i], k.tau[i], k.gain[i] = s.Q, s.R*s.C, s.Rf/s.Rin
	}
	for i, v := range f {
		k.w[i] = 2 * math.Pi * v
	}
	buf := make([]float64, 6*np)
	k.ir, k.ii, k.qr, k.qi, k.di, k.dq = buf[:np], buf[np:2*np], buf[2*np:3*np], buf[3*np:4*np], buf[4*np:5*np], buf[5*np:]
	return k
}

// minDB evaluates the current τ and g on the grid and returns the
// minimum suppression in dB (capped at MaxSuppressionDB); with a non-nil
// curve it also stores the suppression at each frequency.
func (k *kernel) minDB(curve []float64) float64 {
	for i := range k.w {
		k.ir[i], k.ii[i], k.qr[i], k.qi[i], k.di[i], k.dq[i] = 1, 0, 1, 0, 1, 1
	}
	for s, tau := range k.tau {
		g := k.gain[s]
		g1 := 1 + g
		re, im, d := k.ir, k.ii, k.di
		if k.q[s] {
			re, im, d = k.qr, k.qi, k.dq
		}
		re, im, d = re[:len(k.w)], im[:len(k.w)], d[:len(k.w)]
		for i, w := range k.w {
			x := w * tau
			x2 := x * x
			nr, ni := 1-g*x2, -x*g1
			r, m := re[i], im[i]
			re[i] = r*nr - m*ni
			im[i] = r*ni + m*nr
			d[i] *= 1 + x2
		}
	}
	// H(±f) ∝ A ± jB with A = I·dQ, B = Q·dI (common real factor dropped).
	best := math.Inf(1)
	for i := range k.w {
		ar, ai := k.ir[i]*k.dq[i], k.ii[i]*k.dq[i]
		br, bi := k.qr[i]*k.di[i], k.qi[i]*k.di[i]
		pr, pi := ar-bi, ai+br
		nr, ni := ar+bi, ai-br
		num, den := pr*pr+pi*pi, nr*nr+ni*ni
		r := capRatio * capRatio
		if den > num/(capRatio*capRatio) {
			r = num / den
		}
		best = math.Min(best, r)
		if curve != nil {
			curve[i] = 10 * math.Log10(r)
		}
	}
	return 10 * math.Log10(best)
}

// PartSensitivity is how much one part of a Network matters.
type PartSensitivity struct {
	// Section indexes Network.Sections; Part is "R", "C", "Rin" or "Rf".
	Section int
	Part    string
	// Tolerance is the part's relative tolerance used for DropDB.
	Tolerance float64
	// DropDB is how far the minimum suppression over the band falls when
	// this part alone sits at the worse end of its tolerance, all others
	// nominal.
	DropDB float64
	// SlopeDBPerPct is the fall per percent for a small change (0.1 %, the
	// worse direction): the minimum is not differentiable at an
	// equiripple optimum, so this is a one-sided slope.
	SlopeDBPerPct float64
}

// Sensitivity returns, for every part of n, the fall of the minimum
// suppression over the log grid of points frequencies in [low, high] when
// that part alone moves to ±tol (Tol.R for resistors, Tol.C for
// capacitors), in section order R, C, Rin, Rf. R and C of a section enter
// only as the product RC, so their slopes are equal and their drops differ
// by their tolerances.
func (n *Network) Sensitivity(low, high float64, points int, tol Tolerance) []PartSensitivity {
	k := newKernel(n, LogGrid(low, high, points))
	base := k.minDB(nil)
	var out []PartSensitivity
	for i, s := range n.Sections {
		for _, p := range []string{"R", "C", "Rin", "Rf"} {
			t := tol.R
			if p == "C" {
				t = tol.C
			}
			fall := func(rel float64) float64 {
				worst := math.Inf(1)
				for _, sign := range []float64{-1, 1} {
					m := 1 + sign*rel
					switch p {
					case "R", "C":
						k.tau[i] = s.R * s.C * m
					case "Rin":
						k.gain[i] = s.Rf / (s.Rin * m)
					case "Rf":
						k.gain[i] = s.Rf * m / s.Rin
					}
					worst = math.Min(worst, k.minDB(nil))
					k.tau[i], k.gain[i] = s.R*s.C, s.Rf/s.Rin
				}
				return base - worst
			}
			const small = 0.001
			out = append(out, PartSensitivity{Section: i, Part: p, Tolerance: t, DropDB: fall(t), SlopeDBPerPct: fall(small) / (100 * small)})
		}
	}
	return out
}
