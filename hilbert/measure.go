package hilbert

import (
	"math"
	"math/cmplx"
)

// measureLen is the number of output samples MeasureDB projects, after the
// filter has settled.
const measureLen = 8192

// measureBeta is the Kaiser window β of the projection: side lobes near
// −120 dB keep the wanted tone at +f from leaking into the estimate at −f.
const measureBeta = 14

// MeasureDB runs a real tone cos(2πfn/rate) through a new streaming filter
// of s and returns the opposite-sideband suppression seen in its output,
// 20·log10(|Y(+f)|/|Y(−f)|), where Y(±f) projects the settled output on
// e^{±j2πfn/rate} under a Kaiser window. It checks the streaming filter
// against Response: the two agree within rounding while the suppression is
// well above the float32 floor (about 130 dB). The result is capped at
// MaxSuppressionDB.
func MeasureDB(s Splitter, f float64) float64 {
	settle := 4*int(math.Ceil(s.Delay())) + 2*s.Spec().Taps + 2048
	n := settle + measureLen
	src := make([]float32, n)
	w := 2 * math.Pi * f / s.Spec().Rate
	for i := range src {
		src[i] = float32(0.5 * math.Cos(w*float64(i)))
	}
	dst := s.NewFilter().Process(nil, src)
	win := make([]float64, measureLen)
	for i := range win {
		win[i] = 1
	}
	Kaiser(win, measureBeta)
	var pos, neg complex128
	for i, v := range dst[settle:] {
		y := complex(float64(real(v)), float64(imag(v))) * complex(win[i], 0)
		e := cmplx.Rect(1, w*float64(settle+i))
		pos += y * cmplx.Conj(e)
		neg += y * e
	}
	return ratioDB(cmplx.Abs(pos), cmplx.Abs(neg))
}
