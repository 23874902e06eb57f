package modem

import "math"

// FrontEnd chooses how a Receiver runs the first stage of its channels.
type FrontEnd int

// Front ends.
const (
	// FrontAuto lets the receiver choose by the planner rule (see
	// NewReceiverFront).
	FrontAuto FrontEnd = iota
	// FrontPerChannel gives every channel its own first stage: a
	// frequency-translating comb decimator at the capture rate,
	// grouped by four or two channels a kernel pass (Receiver).
	FrontPerChannel
	// FrontChanneliser splits the capture once with a Channeliser and
	// gives each channel its nearest sub-band, where the channel's own
	// chain, planned at the sub-band rate, fine-tunes and decimates it.
	FrontChanneliser
)

// String returns auto, per-channel or channeliser.
func (f FrontEnd) String() string {
	switch f {
	case FrontPerChannel:
		return "per-channel"
	case FrontChanneliser:
		return "channeliser"
	}
	return "auto"
}

// ChanneliserMinChannels is the planner rule of NewReceiver: from this
// many channels on the receiver splits the capture with a Channeliser.
// Measured (BenchmarkReceiverFront, 2.4 MS/s, USB channels; the table in
// DEVELOPERS.md): with 14 channels a receiver of per-channel first
// stages still costs 10 % less CPU time than the channeliser, with 16
// the channeliser 15–30 % less.
const ChanneliserMinChannels = 16

// bankMinBands is the fewest sub-bands worth a Channeliser: with fewer
// the sub-band rate is near the capture rate and the channels' own
// chains do all the decimation again.
const bankMinBands = 16

// maxRxBankBands bounds the receiver's Channeliser.
const maxRxBankBands = 2048

// testBankPlan, when set (by benchmarks), replaces planBank's choice.
var testBankPlan *bankPlan

// bankPlan is a Channeliser design for a receiver.
type bankPlan struct {
	m, d int
	pass float64
	cost float64 // estimated operations per input sample, bank and chains
}

// planBank chooses the Channeliser for cfgs (defaults filled): among
// sub-band counts M (powers of two from bankMinBands) and decimations D
// from M/4 to M/2 (two- to fourfold oversampling) whose sub-band rate fs/D
// every channel's own chain reaches the audio rate from by integer
// steps (a work rate that divides the sub-band rate and the audio rate),
// or, when no design has such a rate, among all of them with chains that
// end in a rational resampler (as every per-channel chain at such a
// capture rate does), it takes the one with the fewest estimated
// operations per input sample:
// the bank's (Channeliser.Cost) plus, per channel, its chain's
// multiplications (ChannelPlan.Cost) at the sub-band rate. The pass band
// is fs/(2M) plus the widest channel's half-width, so that every channel
// lies wholly in the flat band of its nearest sub-band. ok is false when
// the channels differ in capture rate, audio rate or rejection, or no
// design fits.
func planBank(cfgs []RxConfig) (p bankPlan, ok bool) {
	c0 := cfgs[0]
	fs, fa := c0.Rate, c0.AudioRate
	var protect float64
	shapes := map[chainShape]bool{}
	for _, c := range cfgs {
		if c.Rate != fs || c.AudioRate != fa || c.AttenDB != c0.AttenDB {
			return p, false
		}
		_, half, trans := c.channelShape()
		shapes[chainShape{half + trans/2, trans}] = true
		protect = max(protect, half+trans/2)
	}
	// Decimations D with fs/D = fw·d2 for a work rate fw = fa/u: D
	// divides fs·u/fa.
	var qs []int
	for u := 1; u <= 64 && fa/float64(u) >= 4*protect; u++ {
		q := fs * float64(u) / fa
		if q == math.Trunc(q) && q < 1<<20 {
			qs = append(qs, int(q))
		}
	}
	best := math.Inf(1)
	// First the designs whose chains reach the audio rate by integer
	// steps; when there are none (2.5 MS/s with 48 kHz audio: 625/12),
	// any decimation, the chains ending in a rational resampler as the
	// per-channel ones then do: first those whose resampler has at most
	// cheapPhases phases, then any.
	for _, phases := range []int{0, cheapPhases, maxRatioTerm} {
		if phases > 0 && !math.IsInf(best, 1) {
			break
		}
		for m := bankMinBands; m <= maxRxBankBands; m *= 2 {
			if p2, c, ok := planBankBands(cfgs, m, qs, shapes, protect, phases); ok && c < best {
				best, p = c, p2
			}
		}
	}
	return p, !math.IsInf(best, 1)
}

type chainShape struct{ protect, trans float64 }

// planBankBands is planBank's choice of decimation D for M sub-bands:
// among D from M/2 down to M/4 whose sub-band rate divides fs·u/fa for a
// q = fs·u/fa of qs (or any D when phases > 0: chains ending in a
// rational resampler of at most that many phases), the one of the fewest
// estimated operations per input sample, and that count.
func planBankBands(cfgs []RxConfig, m int, qs []int, shapes map[chainShape]bool, protect float64, phases int) (p bankPlan, cost float64, ok bool) {
	c0 := cfgs[0]
	fs, fa := c0.Rate, c0.AudioRate
	best := math.Inf(1)
	pass := fs/float64(2*m) + protect
	for d := m / 2; d >= m/4; d-- {
		divides := phases > 0
		for _, q := range qs {
			divides = divides || q%d == 0
		}
		r := fs / float64(d)
		if !divides || !(r > 2*pass) {
			continue
		}
		chains, fits := 0.0, true
		for sh := range shapes {
			ops, ok := chainOps(r, fa, sh.protect, sh.trans, c0.AttenDB, phases)
			if !ok {
				fits = false
				break
			}
			chains = max(chains, ops)
		}
		if !fits {
			continue
		}
		b, err := NewChanneliserPlan(ChanneliserSpec{Rate: fs, Bands: m, Decim: d, Pass: pass, AttenDB: c0.AttenDB})
		if err != nil {
			continue
		}
		cost := b + float64(len(cfgs))*chains/fs
		if cost < best {
			best = cost
			p = bankPlan{m: m, d: d, pass: pass, cost: cost}
		}
	}
	return p, best, !math.IsInf(best, 1)
}

// chainOps estimates the floating-point operations per second of a
// channel's chain of half-width protect and filter transition trans (Hz)
// reading a sub-band at rate r:
// the decimators (ChannelPlan.Cost), the channel filter at the work rate
// and the interpolator to the audio rate with the detector (complex taps,
// real output) or the rational resampler, two operations a multiply-add.
// ok is false when the work rate does not reach the audio rate by an
// integer step nor, with phases > 0, by a resampler of at most phases
// phases.
func chainOps(r, fa, protect, trans, attenDB float64, phases int) (ops float64, ok bool) {
	cp, err := planChannel(r, fa, 4*protect, protect, trans, attenDB)
	if err != nil {
		return 0, false
	}
	fw := cp.WorkRate
	filt := float64(KaiserOrder(trans, fw, attenDB) + 1)
	up := fa / fw
	if math.Abs(up-math.Round(up)) > 1e-9 {
		if l, _, err := rateRatio(fw, fa); err != nil || l > phases {
			return 0, false
		}
		return 2*cp.Cost*r + 2*filt*fw + 2*resamplerTaps(fw, protect, attenDB)*fa, true
	}
	interp := float64(KaiserOrder(fw-2*protect, fa, attenDB)+1) / math.Round(up)
	return 2*cp.Cost*r + 2*filt*fw + 4*interp*fa, true
}

// bankChains builds the Channeliser for cfgs (defaults filled) and each
// channel's chain on its nearest sub-band.
func bankChains(cfgs []RxConfig, p bankPlan) (*Channeliser, []int, []*Channel, error) {
	bank, err := NewChanneliser(ChanneliserSpec{Rate: cfgs[0].Rate, Bands: p.m, Decim: p.d, Pass: p.pass, AttenDB: cfgs[0].AttenDB})
	if err != nil {
		return nil, nil, nil, err
	}
	fs := bank.Rate()
	d := float64(bank.Decim())
	// Sub-band output j is taken at input index (j+1)·D − 1 and stands
	// for time (j+1)·D − 1 − Delay(); the chain reads it as time j·D.
	lag := (bank.Delay() - d + 1) / fs
	bands := make([]int, len(cfgs))
	chans := make([]*Channel, len(cfgs))
	for i, cfg := range cfgs {
		shift, _, _ := cfg.channelShape()
		k, off := bank.Nearest(cfg.Offset + shift)
		bands[i] = k
		c, err := buildChannel(cfg, chainInput{rate: bank.OutRate(), offset: off - shift, lag: lag, fine: true})
		if err != nil {
			return nil, nil, nil, err
		}
		chans[i] = c
	}
	return bank, bands, chans, nil
}

// Channeliser returns the receiver's filter bank, or nil when every
// channel has its own first stage.
func (r *Receiver) Channeliser() *Channeliser { return r.bank }

// flushSamples is the number of capture samples of zeros that push the
// delayed tail of channel c out, through the Channeliser when there is
// one (a fine tuner's delay line is emptied by Channel.Flush instead).
func (r *Receiver) flushSamples(c *Channel) int64 {
	in := int64(1)
	if r.bank != nil {
		in = int64(r.bank.Decim())
	}
	return int64(math.Ceil(float64(c.delay-c.tuneDelay+1)*c.cfg.Rate/c.cfg.AudioRate)) + int64(c.plan.Decim)*in*2
}
