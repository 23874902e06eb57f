package hilbert

import (
	"math"
	"testing"
)

func TestMagnitudesMatchResponse(t *testing.T) {
	// The batched magnitudes Analyze uses must equal |H(±f)| from
	// Response, the definition of the analytic filter (doc.go); they
	// differ only by the rounding of Response's phase factor e^{−jωD}.
	// Odd and even block sizes cover both FIR recurrences; 1023 points
	// leave a remainder after the batches of four.
	const relTol = 1e-12 // a few thousand float64 roundings
	specs := allSpecs()
	specs = append(specs, spec("fft", 63), spec("equiripple", 255), spec("weaver", 101))
	for _, s := range specs {
		sp := mustNew(t, s)
		const n = 1023
		f := make([]float64, n)
		for i := range f {
			f[i] = 100 + 3800*float64(i)/n
		}
		pos := make([]float64, n)
		neg := make([]float64, n)
		magnitudes(sp, f, pos, neg)
		for i, v := range f {
			wp, wn := cmplxAbs(sp.Response(v)), cmplxAbs(sp.Response(-v))
			if math.Abs(pos[i]-wp) > relTol*wp || math.Abs(neg[i]-wn) > relTol*math.Max(wn, 1e-300) {
				t.Fatalf("%s %d at %g Hz: |H(±f)| = %g, %g; Response gives %g, %g", s.Design, s.Taps, v, pos[i], neg[i], wp, wn)
			}
		}
	}
}

func TestAmplitude4Exact(t *testing.T) {
	// amplitude4 runs amplitude's recurrence in four lanes: the same
	// operations in the same order, so the same bits (IEEE 754 rounding
	// is deterministic).
	for _, s := range []Spec{spec("rect", 63), spec("fft", 63), spec("equiripple", 127)} {
		sp := mustNew(t, s)
		fir, ok := sp.(*firSplitter)
		if !ok {
			fir = sp.(*fftSplitter).fir
		}
		w := [4]float64{0.1, 0.7, 1.9, 3.0}
		got := fir.amplitude4(w)
		for j := range w {
			if want := fir.amplitude(w[j]); got[j] != want {
				t.Errorf("%s: lane %d: %g, amplitude gives %g", s.Design, j, got[j], want)
			}
		}
	}
}
