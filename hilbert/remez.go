package hilbert

import (
	"errors"
	"fmt"
	"math"
)

// Equiripple design by the Remez exchange. gonum has no Parks–McClellan
// routine, so this file carries a small one specialised to the odd-length
// Hilbert transformer whose band is symmetric about a quarter of the rate.
//
// With N = 2M+1 taps and h[m] = 0 for even m (the symmetric band forces
// it), the amplitude A(ω) = 2·Σ_{m odd} h[m]·sin(mω) becomes, with
// θ = π/2 − ω,
//
//	A = Σ_{j=0}^{K−1} c_j·cos((2j+1)θ) = cos θ · P(cos 2θ),   c_j = 2(−1)^j·h[2j+1],
//
// P a polynomial of degree K−1, K = ⌊(M+1)/2⌋. Minimising max |1 − A| over
// θ ∈ [0, π/2 − ωe] is then the weighted polynomial problem
// min max cos θ·|1/cos θ − P(x)|, x = cos 2θ, solved by the Remez exchange
// with barycentric Lagrange interpolation (Parks & McClellan, IEEE Trans.
// Circuit Theory CT-19(2), 1972; Oppenheim & Schafer, 3rd ed., sec. 7.7).
// The taps come back by the discrete sine transform of A.

// remezDensity is the grid points per unknown. scipy.signal.remez's
// default of 16 leaves its taps about 1e-5 from the continuous optimum
// for short designs; 64 brings them within about 4e-7.
const remezDensity = 64

// remezCoarse is the density of the first, coarse exchange.
const remezCoarse = 8

// errRemez reports a failed exchange (not expected for valid specs).
var errRemez = errors.New("equiripple design did not converge")

// remezHilbert returns h[0..M] (h[0] = 0, zero at even m) of the equiripple
// Hilbert transformer of n = 2M+1 taps over [fe, rate/2 − fe], and the
// peak error δ = max |1 − A| over the band.
//
// If an iterate's peak error on the fine grid falls below stop, the
// exchange ends there and returns a nil h with that peak error: it bounds
// the optimum from above (each iterate's peak error does), so the optimum
// is below stop too. Callers that discard designs below a floor pass the
// floor and save the iterations, which near float64 rounding may run to
// the limit without settling. On the coarse grid the same event only
// moves the exchange on to the fine grid: a coarse peak error bounds
// nothing on the fine grid.
func remezHilbert(n int, fe, rate, stop float64) (h []float64, delta float64, err error) {
	m := (n - 1) / 2
	k := (m + 1) / 2
	h = make([]float64, m+1)
	if k == 0 {
		return h, 1, nil
	}
	tmax := math.Pi/2 - 2*math.Pi*fe/rate
	// The grid is uniform in the angle φ of x = c + r·cos φ over the x
	// interval [cos 2θmax, 1], so it is dense where a polynomial's
	// extrema cluster, and the initial extremal set is the Chebyshev
	// extrema φ = πi/K, a good guess (an even spread in θ stalls beyond
	// about 100 taps). The exchange first converges on a coarse grid, then
	// on the fine one, whose points include the coarse ones.
	xlo := math.Cos(2 * tmax)
	c, r := (1+xlo)/2, (1-xlo)/2
	ng := remezDensity*k + 1
	var (
		gx  = make([]float64, ng) // x = cos 2θ
		gd  = make([]float64, ng) // desired 1/cos θ
		gw  = make([]float64, ng) // weight cos θ
		ext = make([]int, k+1)
		xs  = make([]float64, k+1)
		ys  = make([]float64, k+1)
		bw  = make([]float64, k+1)
		e   = make([]float64, ng)
		cur = make([]int, 0, ng)
	)
	for i := range ext {
		ext[i] = i * remezCoarse
	}
	interp := func(x float64) float64 {
		var num, den float64
		for i := 0; i < k; i++ {
			d := x - xs[i]
			if d == 0 {
				return ys[i]
			}
			t := bw[i] / d
			num += t * ys[i]
			den += t
		}
		return num / den
	}
	var (
		converged bool
		emax      float64
		best      = math.Inf(1)
		bxs       = make([]float64, k+1)
		bys       = make([]float64, k+1)
		bbw       = make([]float64, k+1)
	)
	for stage, dens := range []int{remezCoarse, remezDensity} {
		ng := dens*k + 1
		gx, gd, gw, e := gx[:ng], gd[:ng], gw[:ng], e[:ng]
		for i := range gx {
			x := c + r*math.Cos(math.Pi*float64(i)/float64(ng-1))
			gx[i] = x
			gw[i] = math.Sqrt((1 + x) / 2) // cos θ
			gd[i] = 1 / gw[i]
		}
		if stage > 0 {
			for i := range ext {
				ext[i] *= remezDensity / remezCoarse
			}
		}
		converged = false
		best = math.Inf(1)
		for iter := 0; iter < 100; iter++ {
			for i, g := range ext {
				xs[i] = gx[g]
			}
			gam := baryWeights(xs)
			var num, den float64
			for i, g := range ext {
				num += gam[i] * gd[g]
				s := 1.0
				if i%2 == 1 {
					s = -1
				}
				den += s * gam[i] / gw[g]
			}
			delta = num / den
			for i, g := range ext {
				s := 1.0
				if i%2 == 1 {
					s = -1
				}
				ys[i] = gd[g] - s*delta/gw[g]
			}
			// Weights of the K-point interpolant: drop the last point.
			for i := 0; i < k; i++ {
				bw[i] = gam[i] * (xs[i] - xs[k])
			}
			emax = 0
			for i := range gx {
				e[i] = gw[i] * (gd[i] - interp(gx[i]))
				emax = math.Max(emax, math.Abs(e[i]))
			}
			if emax < best {
				best = emax
				copy(bxs, xs)
				copy(bys, ys)
				copy(bbw, bw)
			}
			if emax-math.Abs(delta) <= 1e-12*math.Abs(delta)+1e-300 {
				converged = true
				break
			}
			if emax < stop {
				if stage > 0 {
					return nil, emax, nil
				}
				break
			}
			cur = extrema(cur[:0], e)
			if len(cur) < k+1 {
				break
			}
			for len(cur) > k+1 {
				if math.Abs(e[cur[0]]) < math.Abs(e[cur[len(cur)-1]]) {
					cur = cur[1:]
				} else {
					cur = cur[:len(cur)-1]
				}
			}
			same := true
			for i := range ext {
				if ext[i] != cur[i] {
					same = false
				}
				ext[i] = cur[i]
			}
			if same {
				converged = true
				break
			}
		}
	}
	// Past about 10⁻¹⁰ the error is float64 rounding and the exchange
	// cannot settle; the best iteration is then as good as converged.
	if !converged {
		if best > 1e-10 {
			return nil, 0, fmt.Errorf("%w (%d taps)", errRemez, n)
		}
		copy(xs, bxs)
		copy(ys, bys)
		copy(bw, bbw)
		emax = best
	}
	// Taps by the discrete sine transform of A at ω_j = πj/L, L = M+1:
	// h[m] = (1/L)·Σ_{j=1}^{L−1} A(ω_j)·sin(mω_j).
	l := m + 1
	a := make([]float64, l)
	for j := 1; j < l; j++ {
		w := math.Pi * float64(j) / float64(l)
		a[j] = math.Sin(w) * interp(-math.Cos(2*w))
	}
	for mm := 1; mm <= m; mm += 2 {
		var s float64
		for j := 1; j < l; j++ {
			s += a[j] * math.Sin(float64(mm)*math.Pi*float64(j)/float64(l))
		}
		h[mm] = s / float64(l)
	}
	return h, emax, nil
}

// baryWeights returns barycentric weights 1/Π_{j≠i}(x_i − x_j), scaled by a
// common factor (the formulas using them are scale-free); the products are
// formed in logarithms so that hundreds of points neither overflow nor
// underflow.
func baryWeights(x []float64) []float64 {
	n := len(x)
	lg := make([]float64, n)
	sg := make([]float64, n)
	lmax := math.Inf(-1)
	for i := range x {
		s, l := 1.0, 0.0
		for j := range x {
			if j == i {
				continue
			}
			d := x[i] - x[j]
			if d < 0 {
				s = -s
			}
			l -= math.Log(math.Abs(d))
		}
		lg[i], sg[i] = l, s
		lmax = math.Max(lmax, l)
	}
	w := make([]float64, n)
	for i := range w {
		w[i] = sg[i] * math.Exp(lg[i]-lmax)
	}
	return w
}

// extrema appends the grid indices of the alternating local extrema of e
// (ends included) to dst: of neighbouring extrema with the same sign only
// the larger is kept.
func extrema(dst []int, e []float64) []int {
	n := len(e)
	for i := range e {
		v := e[i]
		up := (i == 0 || v >= e[i-1]) && (i == n-1 || v >= e[i+1])
		down := (i == 0 || v <= e[i-1]) && (i == n-1 || v <= e[i+1])
		if !(up && v > 0 || down && v < 0) {
			continue
		}
		if len(dst) > 0 {
			last := dst[len(dst)-1]
			if (e[last] > 0) == (v > 0) {
				if math.Abs(v) > math.Abs(e[last]) {
					dst[len(dst)-1] = i
				}
				continue
			}
		}
		dst = append(dst, i)
	}
	return dst
}

// remezFloor is the smallest peak error δ a design is allowed to reach
// (about 166 dB of suppression). Smaller errors cannot be turned into taps
// in float64: recovering the taps extrapolates the polynomial P over the
// transition band, which magnifies rounding by a factor growing
// exponentially with the length.
const remezFloor = 1e-8

// newEquiripple designs over [fe, rate/2 − fe]. When that band is so easy
// for the length that δ would fall below remezFloor, the edge is lowered
// (by bisection) until δ ≈ remezFloor: the design is then equiripple over
// a wider band and still exceeds about 166 dB over the requested one.
func newEquiripple(s Spec) (*firSplitter, error) {
	fe := edge(s)
	h, d, err := remezHilbert(s.Taps, fe, s.Rate, remezFloor)
	if err != nil {
		d = 0 // the exchange met float64 rounding: far below the floor
	}
	if d < remezFloor {
		// ln δ falls about linearly as the edge rises: secant steps from
		// the requested edge towards δ = 2·remezFloor, keeping the best
		// design at or above the floor.
		const target = 2 * remezFloor
		f0, g0 := fe, math.Log(math.Max(d, 1e-13)/target)
		// First guess from Kaiser's length formula (O&S 3rd ed., eq. 7.63):
		// transition 2ωe = (A − 8)/(2.285(N−1)) for A = 20·log10(2/target).
		f1 := (20*math.Log10(2/target) - 8) / (2.285 * float64(s.Taps-1)) / 2 / (2 * math.Pi) * s.Rate
		f1 = math.Min(f1, fe/2)
		var found bool
		for range 12 {
			h1, d1, err := remezHilbert(s.Taps, f1, s.Rate, remezFloor)
			if err != nil {
				f1 /= 2
				continue
			}
			if d1 >= remezFloor && (!found || d1 < 4*remezFloor) {
				h, found = h1, true
				if d1 < 4*remezFloor {
					break
				}
			}
			g1 := math.Log(d1 / target)
			next := f1 - g1*(f1-f0)/(g1-g0)
			f0, g0 = f1, g1
			f1 = math.Min(math.Max(next, f1/4), fe)
		}
		if !found {
			return nil, fmt.Errorf("%w (%d taps)", errRemez, s.Taps)
		}
	}
	return &firSplitter{spec: s, m: (s.Taps - 1) / 2, h: h, odd: true}, nil
}
