package spectral

import "math"

// OccupiedBandwidth returns the edges lo < hi of the band, within the span
// [from, to] Hz, that holds the fraction of the span's power (0.99 for the
// usual 99 % bandwidth), with (1 − fraction)/2 of the power below lo and
// as much above hi: the β/2 definition of ITU-R Recommendation SM.328
// (occupied bandwidth, β = 1 %). The cumulative power is interpolated
// linearly inside each bin. ok is false when the span holds no power.
//
// It panics if fraction is not in (0, 1].
func (s *Spectrum) OccupiedBandwidth(from, to, fraction float64) (lo, hi float64, ok bool) {
	if !(fraction > 0 && fraction <= 1) {
		panic("spectral: occupied-bandwidth fraction not in (0, 1]")
	}
	if to < from {
		from, to = to, from
	}
	b := s.BinHz()
	j0 := max(0, int(math.Floor(s.Index(from)-0.5)))
	j1 := min(len(s.Density)-1, int(math.Ceil(s.Index(to)+0.5)))
	// each bin's [a, z] part inside the span and its power
	type piece struct{ a, z, p float64 }
	var total float64
	pieces := make([]piece, 0, j1-j0+1)
	for j := j0; j <= j1; j++ {
		f := s.Freq(j)
		a, z := math.Max(from, f-b/2), math.Min(to, f+b/2)
		if z <= a {
			continue
		}
		p := s.Density[j] * (z - a)
		pieces = append(pieces, piece{a, z, p})
		total += p
	}
	if !(total > 0) || len(pieces) == 0 {
		return 0, 0, false
	}
	edge := total * (1 - fraction) / 2
	var acc float64
	lo = pieces[0].a
	for _, pc := range pieces {
		if acc+pc.p >= edge {
			if pc.p > 0 {
				lo = pc.a + (edge-acc)/pc.p*(pc.z-pc.a)
			} else {
				lo = pc.a
			}
			break
		}
		acc += pc.p
	}
	acc = 0
	hi = pieces[len(pieces)-1].z
	for i := len(pieces) - 1; i >= 0; i-- {
		pc := pieces[i]
		if acc+pc.p >= edge {
			if pc.p > 0 {
				hi = pc.z - (edge-acc)/pc.p*(pc.z-pc.a)
			} else {
				hi = pc.z
			}
			break
		}
		acc += pc.p
	}
	return lo, hi, true
}
