package modem

import (
	"errors"
	"math"
)

// Narrower moves the band around one frequency of a wide capture to zero
// and lowers the rate: the receive chain's decimation (PlanChannel's
// comb-shaped ShiftDecimator then Kaiser Decimators) without the channel
// filter and demodulator, for tools that analyse one transmission at a
// narrow rate. Inside ±Protect Hz of the chosen frequency the output is
// the input shifted by −freq, with aliases AttenDB down and a pass-band
// ripple below 0.01 dB (the comb's droop limit); beyond ±Protect lie the
// decimators' transition bands.
//
// Output m represents the capture at input index m·Decim(); the chain's
// group delay is Delay() output samples, and the first Settle() outputs
// depend on samples before the stream's start (taken as zeros).
type Narrower struct {
	plan   ChannelPlan
	first  *ShiftDecimator
	stages []*Decimator
	a      []complex64
	bufs   [][]complex64
	delay  float64
	settle int
}

// NewNarrower plans and builds the chain from inRate to the lowest
// integer fraction of inRate that is at least minRate Hz, mixing down by
// freq Hz and keeping ±protect Hz free of aliases to attenDB dB. It
// returns an error when no such chain exists (minRate below 2·protect,
// or inRate below minRate).
func NewNarrower(inRate, freq, minRate, protect, attenDB float64) (*Narrower, error) {
	if !(minRate >= 2*protect) || !(inRate >= minRate) || math.Abs(freq) >= inRate/2 {
		return nil, errors.New("modem: invalid narrowing request")
	}
	// an "audio rate" equal to the capture rate makes every decimation
	// acceptable to the planner, which then takes the largest
	plan, err := PlanChannel(inRate, inRate, minRate, protect, attenDB)
	if err != nil {
		return nil, err
	}
	n := &Narrower{plan: plan}
	first := combTaps(plan.First.Decim, plan.First.Order)
	n.first = NewShiftDecimator(first, plan.First.Decim, 0, freq, inRate)
	// delay and settling, in samples of each stage's output
	d := float64(plan.First.Decim)
	delay := float64(len(first)-1) / 2 / d
	settle := narrowCeilDiv(len(first)-1, plan.First.Decim)
	rate := inRate / d
	for _, dk := range plan.Stages {
		h := kaiserStageTaps(dk, rate, protect, attenDB)
		n.stages = append(n.stages, NewDecimator(h, dk, 0))
		delay = (delay + float64(len(h)-1)/2) / float64(dk)
		settle = narrowCeilDiv(settle+len(h)-1, dk)
		rate /= float64(dk)
	}
	n.bufs = make([][]complex64, len(n.stages))
	n.delay, n.settle = delay, settle
	return n, nil
}

func narrowCeilDiv(a, b int) int { return (a + b - 1) / b }

// Plan returns the decimation plan.
func (n *Narrower) Plan() ChannelPlan { return n.plan }

// Rate returns the output rate in Hz.
func (n *Narrower) Rate() float64 { return n.plan.WorkRate }

// Decim returns the total decimation factor.
func (n *Narrower) Decim() int { return n.plan.Decim }

// Delay returns the group delay in output samples: output m represents
// the capture at time (m − Delay())/Rate().
func (n *Narrower) Delay() float64 { return n.delay }

// Settle returns the number of first outputs whose filters reach before
// the start of the stream.
func (n *Narrower) Settle() int { return n.settle }

// MaxOut returns the most outputs k inputs can give.
func (n *Narrower) MaxOut(k int) int { return k/n.plan.Decim + 1 + len(n.stages) }

// Reset returns the chain to its initial state.
func (n *Narrower) Reset() {
	n.first.Reset()
	for _, s := range n.stages {
		s.Reset()
	}
}

// narrowChunk is the number of inputs run through the chain at a time;
// it bounds the intermediate buffers whatever block the caller passes.
const narrowChunk = 1 << 15

// Process narrows src and appends the outputs to dst[:0], returning it.
// dst is reallocated when its capacity is below MaxOut(len(src)); it must
// not overlap src. It does not allocate in the steady state.
func (n *Narrower) Process(dst, src []complex64) []complex64 {
	if cap(dst) < n.MaxOut(len(src)) {
		dst = make([]complex64, 0, n.MaxOut(len(src)))
	}
	dst = dst[:0]
	for len(src) > 0 {
		c := min(len(src), narrowChunk)
		n.a = n.first.Process(n.a, src[:c])
		x := n.a
		for i, s := range n.stages {
			n.bufs[i] = s.Process(n.bufs[i], x)
			x = n.bufs[i]
		}
		dst = append(dst, x...)
		src = src[c:]
	}
	return dst
}
