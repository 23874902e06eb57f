package spectral

import (
	"gonum.org/v1/gonum/dsp/fourier"

	"ssbkit/internal/fft"
)

// transformer computes an in-place forward DFT of the segments
//
//	X[k] = Σ_i x[i]·e^{−j2πik/n},
//
// leaving bin perm[p] at position p (perm is the transformer's; nil means
// natural order).
type transformer interface {
	Transform(x []complex128)
}

// The power-of-two transforms are fft.Radix4 (package ssbkit/internal/fft,
// shared with modem's tuning estimator); what follows fuses its first and
// last passes with the Welch segment's windowing and squaring.

// fused reports whether segmentPower can run fused passes: log₂n even
// and n ≥ 16 (all radix-4, the usual spectrum lengths).
func fused(f *fft.Radix4) bool {
	return f.Len() >= 16 && f.Last() == 4
}

// segmentPower is the Welch segment's whole work for a fused length: the
// last radix-4 pass writes |X|² by position into out (added when add is
// set) and, with cols, sums it per column (cols[colOf[p]]) instead of
// storing X; without the AVX2 kernel the first pass also reads the
// samples seg[i]·win[i] itself (the float32 → float64 conversion and the
// window folded in). Against convert, transform and square apart this
// saves one pass over the segment, or two (measured: +27 % for the Go
// passes, +15 % with AVX2, where the vector first pass after a separate
// conversion beats the fused Go one).
func segmentPower(f *fft.Radix4, work []complex128, seg []complex64, win []float64, out []float64, add bool, cols []float64, colOf []int32) {
	n := f.Len()
	work = work[:n]
	seg = seg[:n]
	win = win[:n]
	m := n / 4
	if fft.HaveAVX2 {
		// converting apart and running the vector pass is faster than
		// the fused Go pass
		for i, v := range seg {
			work[i] = complex(float64(real(v))*win[i], float64(imag(v))*win[i])
		}
		f.Pass(work, n, 0)
	} else {
		firstPass(f, work, seg, win)
	}
	l := m
	for st := 1; l >= 16; st, l = st+1, l/4 {
		f.Pass(work, l, st)
	}
	lastPassPower(f, work, out, add, cols, colOf)
}

// firstPass is the first radix-4 pass of segmentPower reading seg·win.
func firstPass(f *fft.Radix4, work []complex128, seg []complex64, win []float64) {
	n := f.Len()
	m := n / 4
	tw1, tw2, tw3 := f.Twiddles(0)
	tw1, tw2, tw3 = tw1[:m], tw2[:m], tw3[:m]
	s0, s1, s2, s3 := seg[:m], seg[m : 2*m][:m], seg[2*m : 3*m][:m], seg[3*m:][:m]
	v0, v1, v2, v3 := win[:m], win[m : 2*m][:m], win[2*m : 3*m][:m], win[3*m:][:m]
	x0, x1, x2, x3 := work[:m], work[m : 2*m][:m], work[2*m : 3*m][:m], work[3*m:][:m]
	for i := range x0 {
		y0, y1, y2, y3 := fft.Butterfly4(
			complex(float64(real(s0[i]))*v0[i], float64(imag(s0[i]))*v0[i]),
			complex(float64(real(s1[i]))*v1[i], float64(imag(s1[i]))*v1[i]),
			complex(float64(real(s2[i]))*v2[i], float64(imag(s2[i]))*v2[i]),
			complex(float64(real(s3[i]))*v3[i], float64(imag(s3[i]))*v3[i]))
		x0[i], x1[i], x2[i], x3[i] = y0, fft.Mul(y1, tw1[i]), fft.Mul(y2, tw2[i]), fft.Mul(y3, tw3[i])
	}
}

// lastPassPower is the last radix-4 pass (blocks of 4, no twiddles) of
// segmentPower, writing |X|² instead of X.
func lastPassPower(f *fft.Radix4, work []complex128, out []float64, add bool, cols []float64, colOf []int32) {
	n := f.Len()
	out = out[:n]
	if cols != nil {
		colOf = colOf[:n]
	}
	for s := 0; s < n; s += 4 {
		b := work[s : s+4]
		y0, y1, y2, y3 := fft.Butterfly4(b[0], b[1], b[2], b[3])
		p0, p1, p2, p3 := power(y0), power(y1), power(y2), power(y3)
		o := out[s : s+4]
		if add {
			o[0] += p0
			o[1] += p1
			o[2] += p2
			o[3] += p3
		} else {
			o[0], o[1], o[2], o[3] = p0, p1, p2, p3
		}
		if cols != nil {
			k := colOf[s : s+4]
			cols[k[0]] += p0
			cols[k[1]] += p1
			cols[k[2]] += p2
			cols[k[3]] += p3
		}
	}
}

// power returns |y|².
func power(y complex128) float64 { return real(y)*real(y) + imag(y)*imag(y) }

// gonumFFT transforms lengths that are not powers of two with gonum's
// mixed-radix FFT (natural order). A CmplxFFT keeps work space, so each
// goroutine has its own.
type gonumFFT struct{ f *fourier.CmplxFFT }

func (g gonumFFT) Transform(x []complex128) { g.f.Coefficients(x, x) }
