package spectral

import (
	"cmp"
	"math"
	"slices"

	"ssbkit/modem"
)

// Kinds of detected signal.
const (
	KindUSB     = "usb"
	KindLSB     = "lsb"
	KindAM      = "am"
	KindCarrier = "carrier"
	KindUnknown = "unknown"
)

// Signal is one signal found by Detect. Frequencies are offsets from the
// capture centre in Hz.
type Signal struct {
	// OffsetHz is the estimated carrier: the peak for am and carrier; for
	// usb (lsb) the suppressed carrier AudioLowHz below (above) the steep
	// low (high) edge; the middle of the occupied band for unknown.
	OffsetHz float64
	// LowHz and HighHz are the occupied edges.
	LowHz, HighHz float64
	// SNRdB is the signal power over the occupied band, noise removed,
	// relative to the noise power in the same band.
	SNRdB float64
	// Kind is usb, lsb, am, carrier or unknown.
	Kind string
	// EdgeOffsetHz is, for usb and lsb, the carrier placed from the
	// spectrum's edge (OffsetHz as Detect returns it); CarrierRefiner may
	// then move OffsetHz to the carrier found from the voice.
	EdgeOffsetHz float64
	// TuningConfidence is CarrierRefiner's confidence in OffsetHz (usb
	// and lsb; 0: not refined, OffsetHz is the edge estimate).
	TuningConfidence float64
	// Track is the refined carrier against time (usb and lsb, after
	// CarrierRefiner; nil otherwise).
	Track []TunePoint
}

// DetectOptions tunes Detect. The zero value gives the documented
// defaults.
type DetectOptions struct {
	// ThresholdDB is the level above the noise floor, in the smoothed
	// spectrum, at which a bin counts as occupied (default 8 dB).
	ThresholdDB float64
	// SmoothHz is the width of the moving average applied before
	// thresholding (default 60 Hz, at least one bin).
	SmoothHz float64
	// MergeHz joins occupied runs separated by a gap narrower than this
	// (default 500 Hz): it keeps an AM carrier with its sidebands and a
	// voice spectrum whole.
	MergeHz float64
	// NarrowHz is the widest group still called a carrier (default 150 Hz).
	NarrowHz float64
	// AudioLowHz is the audio low edge assumed for SSB: the suppressed
	// carrier is placed this far outside the steep edge (default 300 Hz,
	// the usual low edge of a voice transmitter's passband, common
	// practice).
	AudioLowHz float64
	// DynamicRangeDB bounds the noise floor from below at this many dB
	// under the strongest bin of the smoothed spectrum (default 100 dB).
	// A synthetic or float capture has no analogue noise: its floor is
	// rounding noise some 200 dB down, and without the bound every
	// rounding spur and the far skirts of the window would count as
	// signals. 100 dB is beyond the spurious-free range of receivers and
	// 16-bit converters (common practice), so real captures are not
	// affected.
	DynamicRangeDB float64
}

func (o DetectOptions) withDefaults() DetectOptions {
	if o.ThresholdDB == 0 {
		o.ThresholdDB = 8
	}
	if o.SmoothHz == 0 {
		o.SmoothHz = 60
	}
	if o.MergeHz == 0 {
		o.MergeHz = 500
	}
	if o.NarrowHz == 0 {
		o.NarrowHz = 150
	}
	if o.AudioLowHz == 0 {
		o.AudioLowHz = 300
	}
	if o.DynamicRangeDB == 0 {
		o.DynamicRangeDB = 100
	}
	return o
}

// smooth returns the moving average of x over w bins (w odd), the ends
// averaging over the bins present (modem.MovingAverage).
func smooth(x []float64, w int) []float64 { return modem.MovingAverage(nil, x, w) }

// smoothBins converts a smoothing width in Hz to an odd bin count.
func smoothBins(hz, binHz float64) int {
	w := int(math.Round(hz / binHz))
	if w < 1 {
		w = 1
	}
	return w | 1
}

// noiseQuantile is the quantile of the smoothed spectrum taken as the
// noise floor: a low quantile stays on the noise even when signals cover
// more than half of the capture.
const noiseQuantile = 0.3

// NoiseFloor returns the noise density (power per Hz) of a centred PSD:
// the 30 % quantile of the spectrum smoothed over smoothHz. Averaged
// spectra are nearly constant on noise, so a low quantile is close to the
// mean noise density while signals fill the upper quantiles (a robust
// order statistic, common practice).
func NoiseFloor(psd []float64, rate, smoothHz float64) float64 {
	if len(psd) == 0 {
		return 0
	}
	s := smooth(psd, smoothBins(smoothHz, rate/float64(len(psd))))
	slices.Sort(s)
	return s[int(noiseQuantile*float64(len(s)-1))]
}

// DetectionFloor returns the noise density Detect works from: NoiseFloor
// of psd over opt.SmoothHz, but no lower than opt.DynamicRangeDB under the
// strongest bin of the smoothed spectrum.
func DetectionFloor(psd []float64, rate float64, opt DetectOptions) float64 {
	if len(psd) == 0 || !(rate > 0) {
		return 0
	}
	opt = opt.withDefaults()
	return detectionFloor(psd, smooth(psd, smoothBins(opt.SmoothHz, rate/float64(len(psd)))), rate, opt)
}

// detectionFloor is DetectionFloor with the smoothed spectrum sm given.
func detectionFloor(psd, sm []float64, rate float64, opt DetectOptions) float64 {
	floor := NoiseFloor(psd, rate, opt.SmoothHz)
	if top := slices.Max(sm); top > 0 {
		floor = math.Max(floor, top*math.Pow(10, -opt.DynamicRangeDB/10))
	}
	return floor
}

// Detect finds the signals in a centred power spectral density (as
// returned by Accumulator.PSD with its default Hann window) of a capture
// at rate Hz. The steps:
//
//  1. the noise floor N₀ is NoiseFloor's low quantile of the smoothed PSD,
//     but at least the strongest smoothed bin less DynamicRangeDB
//     (DetectionFloor);
//  2. bins of the smoothed PSD above N₀·10^(ThresholdDB/10) are occupied;
//     runs closer than MergeHz are joined, and each group's edges are
//     pulled in to the outermost raw bins above the threshold and above
//     the Hann window's skirts of the group's stronger bins by the same
//     threshold (inSkirt), so a clean line is listed with the width of
//     its main lobe, not of its leakage;
//  3. each group gets a kind from its shape: narrower than NarrowHz is a
//     carrier; a strong narrow peak (10 dB over the group's median) near
//     the middle with sidebands on both sides, each beyond ±NarrowHz/2 of
//     the peak and at least −30 dB of the peak's power, is AM; a peak
//     holding 90 % of the power is a carrier (wider only by the window's
//     skirts); otherwise the power centroid tells the sideband — voice
//     energy crowds towards the carrier, so a centroid in the lower part
//     of the band is USB, in the upper part LSB, else unknown.
//
// Three carriers with a stronger one in the middle and two equal ones
// symmetric about it (a carrier amplitude-modulated by one tone) become
// one AM signal. Signals come back sorted by frequency.
func Detect(psd []float64, rate float64, opt DetectOptions) []Signal {
	n := len(psd)
	if n < 8 || !(rate > 0) {
		return nil
	}
	opt = opt.withDefaults()
	bin := rate / float64(n)
	sw := smoothBins(opt.SmoothHz, bin)
	sm := smooth(psd, sw)
	floor := detectionFloor(psd, sm, rate, opt)
	if !(floor > 0) {
		// an all-zero capture has nothing in it
		return nil
	}
	thrRatio := math.Pow(10, opt.ThresholdDB/10)
	thr := floor * thrRatio
	// runs of occupied bins
	type run struct{ a, b int }
	var runs []run
	for j := 0; j < n; {
		if sm[j] <= thr {
			j++
			continue
		}
		k := j
		for k+1 < n && sm[k+1] > thr {
			k++
		}
		runs = append(runs, run{j, k})
		j = k + 1
	}
	gap := int(math.Ceil(opt.MergeHz / bin))
	var groups []run
	for _, r := range runs {
		if len(groups) > 0 && r.a-groups[len(groups)-1].b-1 < gap {
			groups[len(groups)-1].b = r.b
			continue
		}
		groups = append(groups, r)
	}
	freq := func(j float64) float64 { return (j - float64(n/2)) * bin }
	var out []Signal
	var peaks []float64 // peak density of each signal
	for _, g := range groups {
		// pull the edges in to raw bins above the threshold
		a, b := g.a, g.b
		for a < b && psd[a] <= thr {
			a++
		}
		for b > a && psd[b] <= thr {
			b--
		}
		// and past the Hann skirts of the group's stronger bins
		for a < b && inSkirt(psd, a, a, b, thrRatio) {
			a++
		}
		for b > a && inSkirt(psd, b, a, b, thrRatio) {
			b--
		}
		s := Signal{LowHz: freq(float64(a) - 0.5), HighHz: freq(float64(b) + 0.5)}
		width := s.HighHz - s.LowHz
		var sig, moment float64
		peak := a
		for j := a; j <= b; j++ {
			e := math.Max(psd[j]-floor, 0) * bin
			sig += e
			moment += e * freq(float64(j))
			if psd[j] > psd[peak] {
				peak = j
			}
		}
		s.SNRdB = dB(sig) - dB(floor*math.Max(width, bin))
		peakHz := refinePeak(psd, peak, bin, freq)
		mid := (s.LowHz + s.HighHz) / 2
		// power near the peak (the window's main lobe and skirts) and
		// on each side beyond it
		zone := max(4, int(math.Ceil(opt.NarrowHz/2/bin)))
		var core, left, right float64
		for j := a; j <= b; j++ {
			e := math.Max(psd[j]-floor, 0)
			switch {
			case j < peak-zone:
				left += e
			case j > peak+zone:
				right += e
			default:
				core += e
			}
		}
		switch {
		case width <= opt.NarrowHz:
			s.Kind, s.OffsetHz = KindCarrier, peakHz
		case isAM(psd, a, b, peak, peakHz, s, opt) && math.Min(left, right) >= sidebandMin*core:
			s.Kind, s.OffsetHz = KindAM, peakHz
		case core >= carrierShare*(core+left+right):
			s.Kind, s.OffsetHz = KindCarrier, peakHz
		case tonal(psd, a, b, floor, zone):
			// a few lines (a two-tone test, say): without a carrier
			// or a speech-like spectrum the sideband is undecidable
			s.Kind, s.OffsetHz = KindUnknown, mid
		default:
			c := moment / sig
			rel := (c - mid) / (width / 2)
			switch {
			case rel < -centroidSkew:
				s.Kind, s.OffsetHz = KindUSB, s.LowHz-opt.AudioLowHz
				s.EdgeOffsetHz = s.OffsetHz
			case rel > centroidSkew:
				s.Kind, s.OffsetHz = KindLSB, s.HighHz+opt.AudioLowHz
				s.EdgeOffsetHz = s.OffsetHz
			default:
				s.Kind, s.OffsetHz = KindUnknown, mid
			}
		}
		out = append(out, s)
		peaks = append(peaks, psd[peak])
	}
	return mergeToneAM(out, peaks, bin)
}

// mergeToneAM joins three carriers that look like a carrier amplitude
// modulated by one tone — a stronger middle line with two lines of equal
// level (within 3 dB) symmetric about it (within two bins) and at most
// 5 kHz away — into one AM signal.
func mergeToneAM(sig []Signal, peaks []float64, bin float64) []Signal {
	for i := 1; i+1 < len(sig); i++ {
		l, c, r := sig[i-1], sig[i], sig[i+1]
		if l.Kind != KindCarrier || c.Kind != KindCarrier || r.Kind != KindCarrier {
			continue
		}
		d1, d2 := c.OffsetHz-l.OffsetHz, r.OffsetHz-c.OffsetHz
		if math.Abs(d1-d2) > 2*bin || d1 > 5000 ||
			peaks[i-1] >= peaks[i] || peaks[i+1] >= peaks[i] ||
			math.Abs(dB(peaks[i-1])-dB(peaks[i+1])) > 3 {
			continue
		}
		m := Signal{OffsetHz: c.OffsetHz, LowHz: l.LowHz, HighHz: r.HighHz, Kind: KindAM}
		// noise-free powers add: SNR over the joined width
		pow := func(s Signal) float64 { return math.Pow(10, s.SNRdB/10) * (s.HighHz - s.LowHz) }
		m.SNRdB = dB((pow(l) + pow(c) + pow(r)) / (m.HighHz - m.LowHz))
		sig = append(sig[:i-1], append([]Signal{m}, sig[i+2:]...)...)
		peaks = append(peaks[:i-1], append([]float64{peaks[i]}, peaks[i+2:]...)...)
	}
	return sig
}

// An AM signal has at least sidebandMin of its carrier's power on each
// side (−30 dB: far above a Hann window's leakage beyond four bins, well
// below the sidebands of speech modulation, common practice); a group
// whose peak zone holds carrierShare of the power is a carrier with the
// window's skirts.
const (
	sidebandMin  = 1e-3
	carrierShare = 0.9
)

// A group is tonal when its tonalLines strongest local peaks, with zone
// bins either side of each, hold tonalShare of its power above the floor
// while covering at most half of its bins: discrete lines, not the
// continuous spectrum of speech, whose power centroid shows the sideband
// (common practice; two or three test tones are tonal, voice with its
// harmonics spread over the band is not).
const (
	tonalLines = 4
	tonalShare = 0.9
)

// tonal reports whether the group [a, b] of psd is tonal (see tonalLines).
func tonal(psd []float64, a, b int, floor float64, zone int) bool {
	var peaks []int
	for j := a; j <= b; j++ {
		if (j == a || psd[j] >= psd[j-1]) && (j == b || psd[j] > psd[j+1]) {
			peaks = append(peaks, j)
		}
	}
	slices.SortFunc(peaks, func(x, y int) int { return cmp.Compare(psd[y], psd[x]) })
	covered := make([]bool, b-a+1)
	for _, p := range peaks[:min(tonalLines, len(peaks))] {
		for j := max(a, p-zone); j <= min(b, p+zone); j++ {
			covered[j-a] = true
		}
	}
	var in, all float64
	n := 0
	for j := a; j <= b; j++ {
		e := math.Max(psd[j]-floor, 0)
		all += e
		if covered[j-a] {
			in += e
			n++
		}
	}
	return 2*n <= len(covered) && in >= tonalShare*all
}

// centroidSkew is the fraction of the half width by which the power
// centroid must sit off the middle to call a sideband.
const centroidSkew = 0.1

// isAM reports whether the group [a, b] has a carrier-like peak: 10 dB
// above the group's median, within the middle third, with at least
// NarrowHz of occupied spectrum on each side.
func isAM(psd []float64, a, b, peak int, peakHz float64, s Signal, opt DetectOptions) bool {
	vals := slices.Clone(psd[a : b+1])
	slices.Sort(vals)
	med := vals[len(vals)/2]
	if dB(psd[peak])-dB(med) < 10 {
		return false
	}
	third := (s.HighHz - s.LowHz) / 3
	if peakHz < s.LowHz+third || peakHz > s.HighHz-third {
		return false
	}
	return peakHz-s.LowHz >= opt.NarrowHz && s.HighHz-peakHz >= opt.NarrowHz
}

// refinePeak returns the frequency of bin j refined by a parabola through
// the dB values of j and its neighbours.
func refinePeak(psd []float64, j int, bin float64, freq func(float64) float64) float64 {
	f := freq(float64(j))
	if j > 0 && j < len(psd)-1 {
		x, y, z := dB(psd[j-1]), dB(psd[j]), dB(psd[j+1])
		if d := x - 2*y + z; d < 0 {
			f += 0.5 * (x - z) / d * bin
		}
	}
	return f
}

// skirtReach is how far, in bins, inSkirt looks for a stronger bin: the
// Hann envelope there is 1/(π·63.5·(63.5²−1)) ≈ −118 dB, beyond the
// default 100 dB dynamic range plus threshold.
const skirtReach = 64

// hannSkirt returns a bound on the power leaked by a Hann window, relative
// to its peak, at x ≥ 1.5 bins from a line: the window's transform
// sin(πx)/(πx(1−x²)) (Harris, Proc. IEEE 66(1), 1978, the cos² window as
// three shifted Dirichlet kernels, large-N form) is bounded by
// 1/(πx(x²−1)) since |sin| ≤ 1.
func hannSkirt(x float64) float64 {
	e := 1 / (math.Pi * x * (x*x - 1))
	return e * e
}

// inSkirt reports whether bin j of psd lies within ratio (the detection
// threshold) of the Hann leakage of some bin k of [a, b] at least two bins
// away: psd[j] ≤ ratio·psd[k]·hannSkirt(|j−k|−½). A line falls between
// bins, so its strongest bin is within half a bin of it and the distance
// to the line is at least |j−k|−½. Such a bin is explained by the window,
// not by signal of its own. Welch averages of a Hann window (Accumulator's
// default) are assumed.
func inSkirt(psd []float64, j, a, b int, ratio float64) bool {
	for k := max(a, j-skirtReach); k <= min(b, j+skirtReach); k++ {
		d := j - k
		if d < 0 {
			d = -d
		}
		if d >= 2 && psd[j] <= ratio*psd[k]*hannSkirt(float64(d)-0.5) {
			return true
		}
	}
	return false
}
