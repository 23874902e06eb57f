package iq

import "math"

// Stats accumulates the level, DC offset and second-order statistics of a
// stream of samples, in bounded memory. The zero value is ready to use.
//
// With N samples y[n]:
//
//	DC       m = (1/N) Σ y[n]
//	RMS      10·log10((1/N) Σ |y[n]|²)  dBFS (0 dBFS is |y| = 1)
//	peak     10·log10(max |y[n]|²)       dBFS
//
// and the DC-free moments E|y−m|² and E[(y−m)²] feed the blind imbalance
// estimate (see EstimateImbalance).
type Stats struct {
	n      int64
	sumRe  float64
	sumIm  float64
	sumPow float64 // Σ|y|²
	sumSqR float64 // Re Σy² = Σ(re² − im²)
	sumSqI float64 // Im Σy² = Σ2·re·im
	peak   float64 // max |y|²
}

// Add accumulates the samples of x. It does not allocate.
func (s *Stats) Add(x []complex64) {
	// Block sums in float64 keep the rounding error of long captures far
	// below the 1e-6 relative level the imbalance estimate needs.
	var sr, si, p, qr, qi, pk float64
	pk = s.peak
	for _, v := range x {
		re, im := float64(real(v)), float64(imag(v))
		sr += re
		si += im
		a := re*re + im*im
		p += a
		qr += re*re - im*im
		qi += 2 * re * im
		if a > pk {
			pk = a
		}
	}
	s.n += int64(len(x))
	s.sumRe += sr
	s.sumIm += si
	s.sumPow += p
	s.sumSqR += qr
	s.sumSqI += qi
	s.peak = pk
}

// Count returns the number of samples accumulated.
func (s *Stats) Count() int64 { return s.n }

// Mean returns the DC offset m = E[y] (0 with no samples).
func (s *Stats) Mean() complex128 {
	if s.n == 0 {
		return 0
	}
	return complex(s.sumRe/float64(s.n), s.sumIm/float64(s.n))
}

// Power returns the mean power E|y|² (DC included).
func (s *Stats) Power() float64 {
	if s.n == 0 {
		return 0
	}
	return s.sumPow / float64(s.n)
}

// RMSDBFS returns the RMS level in dBFS, −Inf for silence or no samples.
func (s *Stats) RMSDBFS() float64 { return 10 * math.Log10(s.Power()) }

// PeakDBFS returns the peak level in dBFS, −Inf for silence or no samples.
func (s *Stats) PeakDBFS() float64 { return 10 * math.Log10(s.peak) }

// Imbalance returns the blind I/Q imbalance estimate from the DC-free
// moments: E|y−m|² = E|y|² − |m|² and E[(y−m)²] = E[y²] − m².
func (s *Stats) Imbalance() Imbalance {
	if s.n == 0 {
		return EstimateImbalance(0, 0)
	}
	n := float64(s.n)
	m := s.Mean()
	pow := s.sumPow/n - real(m)*real(m) - imag(m)*imag(m)
	sq := complex(s.sumSqR/n, s.sumSqI/n) - m*m
	return EstimateImbalance(pow, sq)
}
