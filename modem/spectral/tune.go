package spectral

import (
	"math"
	"slices"

	"ssbkit/modem"
)

// RefineSeconds is how much of a capture CarrierRefiner analyses by
// default: enough windows for a steady median and a drift, and a bounded
// cost on long recordings.
const RefineSeconds = 60

// Narrowing for the refinement: the channel of an SSB signal is centred
// on the middle of its 300–2700 Hz pass band (as rx does) and kept free
// of aliases over its half-width, the filter's transition and the
// estimator's search range, to 80 dB; the rate is the lowest integer
// fraction of the capture's at or above refineRate.
const (
	refineRate    = 6000
	refineProtect = (modem.DefaultSSBHigh-modem.DefaultSSBLow)/2 + 225 + modem.DefaultTuneRange
	refineAttenDB = 80
	refineShift   = (modem.DefaultSSBLow + modem.DefaultSSBHigh) / 2
)

// TunePoint is one window of a carrier track: the carrier's offset from
// the capture centre, Hz, at a time in seconds from the capture's start.
type TunePoint struct {
	Time, OffsetHz float64
}

// CarrierRefiner refines the carriers of the usb and lsb signals found by
// Detect from the voices themselves (modem.TuneEstimator) in a second
// pass over the capture: each signal's channel is narrowed around the
// detected carrier and analysed in 3 s windows, 1 s apart. Write feeds
// the capture; Refine writes the results into the signals.
type CarrierRefiner struct {
	limit int64 // capture samples to analyse
	seen  int64
	chans []*refineChan
}

type refineChan struct {
	idx   int // index in the signals
	edge  float64
	nw    *modem.Narrower
	est   *modem.TuneEstimator
	buf   []complex64
	ests  []modem.TuneEstimate
	delay float64 // the narrower's delay, s
}

// NewCarrierRefiner prepares the refinement of signals (as returned by
// Detect for a capture at rate Hz) over the first seconds of the capture
// (RefineSeconds when 0). A signal whose channel cannot be narrowed (a
// capture too slow, or the channel at its edge) is left as detected.
func NewCarrierRefiner(rate float64, signals []Signal, seconds float64) *CarrierRefiner {
	if seconds <= 0 {
		seconds = RefineSeconds
	}
	r := &CarrierRefiner{limit: int64(math.Ceil(seconds * rate))}
	for i, s := range signals {
		mode, shift := modem.USB, float64(refineShift)
		switch s.Kind {
		case KindUSB:
		case KindLSB:
			mode, shift = modem.LSB, -refineShift
		default:
			continue
		}
		nw, err := modem.NewNarrower(rate, s.OffsetHz+shift, refineRate, refineProtect, refineAttenDB)
		if err != nil {
			continue
		}
		est, err := modem.NewTuneEstimator(modem.TuneConfig{Rate: nw.Rate(), Carrier: -shift, Mode: mode})
		if err != nil {
			continue
		}
		r.chans = append(r.chans, &refineChan{idx: i, edge: s.OffsetHz, nw: nw, est: est, delay: nw.Delay() / nw.Rate()})
	}
	return r
}

// Needed reports whether any signal is to be refined.
func (r *CarrierRefiner) Needed() bool { return len(r.chans) > 0 }

// Write analyses the next capture samples and reports whether the
// refiner has seen all it wants (the caller may stop reading then).
func (r *CarrierRefiner) Write(x []complex64) (done bool) {
	if left := r.limit - r.seen; int64(len(x)) > left {
		x = x[:max(0, left)]
	}
	r.seen += int64(len(x))
	for _, c := range r.chans {
		c.buf = c.nw.Process(c.buf, x)
		c.ests = c.est.Process(c.ests, c.buf)
	}
	return r.seen >= r.limit
}

// Refine closes the analysis and writes its results into signals (the
// slice given to NewCarrierRefiner): for each usb and lsb signal analysed,
// EdgeOffsetHz keeps the detected carrier, Track the accepted windows,
// TuningConfidence the mean window confidence (refused windows count 0),
// and OffsetHz becomes the median of the track when the voice allowed at
// least minRefined of the windows (an estimate from a rare window would
// rest on little).
func (r *CarrierRefiner) Refine(signals []Signal) {
	for _, c := range r.chans {
		c.ests = c.est.Flush(c.ests)
		s := &signals[c.idx]
		s.EdgeOffsetHz = c.edge
		var conf float64
		var offs []float64
		s.Track = s.Track[:0]
		n := 0
		for _, e := range c.ests {
			if e.End-e.Start < 0.5*modem.DefaultTuneWindow {
				continue // a short flushed tail
			}
			n++
			if !e.OK {
				continue
			}
			conf += e.Confidence
			offs = append(offs, c.edge+e.OffsetHz)
			s.Track = append(s.Track, TunePoint{Time: e.Time() - c.delay, OffsetHz: c.edge + e.OffsetHz})
		}
		if n == 0 {
			continue
		}
		s.TuningConfidence = conf / float64(n)
		if float64(len(offs)) < minRefined*float64(n) {
			s.TuningConfidence = 0
			s.Track = nil
			continue
		}
		slices.Sort(offs)
		m := len(offs) / 2
		s.OffsetHz = offs[m]
		if len(offs)%2 == 0 {
			s.OffsetHz = (offs[m-1] + offs[m]) / 2
		}
	}
}

// minRefined is the share of a signal's windows that must give an
// estimate for its carrier to be refined.
const minRefined = 0.25
