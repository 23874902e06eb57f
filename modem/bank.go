package modem

import (
	"errors"
	"fmt"
	"math"
	"slices"
)

// ChanneliserSpec describes a Channeliser; zero fields take defaults.
type ChanneliserSpec struct {
	Rate  float64 // input sample rate, Hz (required)
	Bands int     // number of sub-bands M, a power of two from 4 to 4096 (required)
	// Decim is the decimation D of every sub-band, from 2 to M/2 (at
	// least twofold oversampling); 0 means M/2.
	Decim int
	// Pass is the half-width (Hz) of the band around each sub-band's centre
	// that is kept flat (ripple ±δ) and free of aliases (at most δ, δ =
	// 10^(−AttenDB/20)); it must be below Rate/(2·Decim). 0 means
	// Rate/(2·Bands), half the spacing of the sub-bands.
	Pass    float64
	AttenDB float64 // default 80
}

// Channeliser is an oversampled polyphase DFT analysis filter bank: it
// splits a complex capture at rate fs into M sub-bands centred on
// k·fs/M (k = 0…M−1; k ≥ M/2 are the negative frequencies (k−M)·fs/M),
// each mixed to zero, low-pass filtered by the prototype h and decimated
// by D ≤ M/2 to the rate fs/D:
//
//	y_k[j] = Σ_l h[l]·x[n−l]·e^{−j2πk(n−l)/M},  n = (j+1)·D − 1,
//
// which is what a ShiftDecimator with taps h tuned to k·fs/M computes, for
// all k at the cost of one filter and one FFT. Writing t = n − l for the
// absolute index of a sample and grouping the samples by t mod M,
//
//	y_k[j] = Σ_{r<M} v[r]·e^{−j2πkr/M},  v[r] = Σ_{t ≡ r (mod M)} h[n−t]·x[t],
//
// the windowed frame time-aliased (folded) to M samples and transformed by
// an M-point FFT — the polyphase analysis of J. O. Smith III, Spectral
// Audio Signal Processing, W3K Publishing, 2011, sections "Polyphase
// Analysis of Portnoff STFT" (the polyphase filters compute the
// time-aliased windowed frame) and "Portnoff Windows"; the DFT filter
// bank of R. E. Crochiere & L. R. Rabiner, Multirate Digital Signal
// Processing, 1983, ch. 7. Folding by the absolute index (rather than by
// the position in the window) keeps the mixers' phases on the capture's
// clock, so no output needs a phase correction whatever D is; D need not
// divide M, which lets the sub-band rate be one the channels' own chains
// reach the audio rate from by integer steps.
//
// The prototype is a Kaiser-window low-pass (KaiserLowpass) with its
// pass band to Pass Hz and its stop band from fs/D − Pass: after the
// decimation by D every alias falling on |f| ≤ Pass comes from the stop
// band and is at most δ = 10^(−AttenDB/20). Sub-band centres are fs/M
// apart, so a Pass of at least fs/(2M) plus a channel's half-width puts
// every channel of the capture wholly inside the flat band of its
// nearest sub-band: no channel needs two sub-bands.
//
// Hand-written: no Go library offers a polyphase filter bank. On amd64
// with AVX2 and FMA the fold, the FFT passes and the copying out of the
// wanted sub-bands run in assembly (bank_amd64.s); the Go loops are their
// reference.
type Channeliser struct {
	rate  float64
	m, d  int
	n     int       // window length: rows·M − 3D ≥ len(proto)
	rows  int       // rows of M samples covering the four windows of a batch
	pass  float64   // Hz
	atten float64   // dB
	proto []float64 // the prototype h, odd length, symmetric
	g     []float32 // window-order taps g[i] = h[N−1−i], zero before the prototype
	gp    []float32 // g duplicated per complex lane and zero-padded by 3D before (bankFoldAVX2)
	fft   *bankFFT
	// Process's state
	buf  []complex64
	pos  int64
	work *bankWork
	out  []complex64
	sel  *bankSel // the last selection Process used
}

// Channeliser limits.
const (
	maxBankBands = 4096
	// bankBatch is the number of outputs (one per lane) computed together.
	bankBatch = 4
)

// NewChanneliserPlan returns the Cost of the bank NewChanneliser would
// design for spec, without designing its prototype (its length comes from
// Kaiser's formula, KaiserOrder, as a first estimate of the design's).
func NewChanneliserPlan(spec ChanneliserSpec) (float64, error) {
	c, err := newChanneliser(spec, false)
	if err != nil {
		return 0, err
	}
	return c.Cost(), nil
}

// NewChanneliser designs the bank for spec.
func NewChanneliser(spec ChanneliserSpec) (*Channeliser, error) {
	return newChanneliser(spec, true)
}

func newChanneliser(spec ChanneliserSpec, design bool) (*Channeliser, error) {
	m := spec.Bands
	if !(spec.Rate > 0) || math.IsInf(spec.Rate, 0) {
		return nil, errors.New("modem: channeliser rate must be positive")
	}
	if m < 4 || m > maxBankBands || m&(m-1) != 0 {
		return nil, fmt.Errorf("modem: %d sub-bands: want a power of two from 4 to %d", m, maxBankBands)
	}
	d := spec.Decim
	if d == 0 {
		d = m / 2
	}
	if d < 2 || d > m/2 {
		return nil, fmt.Errorf("modem: channeliser decimation %d: want 2 to %d", d, m/2)
	}
	atten := spec.AttenDB
	if atten == 0 {
		atten = DefaultRxAtten
	}
	spacing := spec.Rate / float64(m)
	out := spec.Rate / float64(d)
	pass := spec.Pass
	if pass == 0 {
		pass = spacing / 2
	}
	if !(pass > 0) || !(pass < out/2) {
		return nil, fmt.Errorf("modem: channeliser pass band ±%g Hz does not fit the sub-band rate %g Hz", pass, out)
	}
	c := &Channeliser{rate: spec.Rate, m: m, d: d, pass: pass, atten: atten}
	if !design {
		l := KaiserOrder(out-2*pass, spec.Rate, atten) + 1
		c.rows = (l + 3*d + m - 1) / m
		return c, nil
	}
	// cutoff at half the sub-band rate: pass band to pass, stop band from
	// out − pass
	c.proto = KaiserLowpass(out/2, out-2*pass, spec.Rate, atten)
	c.rows = (len(c.proto) + 3*d + m - 1) / m
	c.n = c.rows*m - 3*d
	c.g = make([]float32, c.n)
	off := c.n - len(c.proto)
	for i, h := range c.proto {
		// h symmetric: g[off + i] = h[N−1−off−i] = h[len−1−i] = h[i]
		c.g[off+i] = float32(h)
	}
	// gp[2(3D + i)] = gp[2(3D + i) + 1] = g[i]: a lane j of a batch reads
	// its tap of row p, position r at i = p·M + r − j·D, from −3D to N+3D−1
	c.gp = make([]float32, 2*(6*d+c.n))
	for i, v := range c.g {
		c.gp[2*(3*d+i)], c.gp[2*(3*d+i)+1] = v, v
	}
	c.fft = newBankFFT(m)
	c.Reset()
	return c, nil
}

// Bands returns the number of sub-bands M.
func (c *Channeliser) Bands() int { return c.m }

// Decim returns the decimation D.
func (c *Channeliser) Decim() int { return c.d }

// Rate returns the input rate in Hz.
func (c *Channeliser) Rate() float64 { return c.rate }

// OutRate returns the sub-band rate fs/D in Hz.
func (c *Channeliser) OutRate() float64 { return c.rate / float64(c.d) }

// Pass returns the half-width of the flat, alias-free band in Hz.
func (c *Channeliser) Pass() float64 { return c.pass }

// Taps returns the prototype low-pass (a copy).
func (c *Channeliser) Taps() []float64 { return append([]float64(nil), c.proto...) }

// Delay returns the prototype's group delay in input samples, (L−1)/2:
// output j, taken at input index (j+1)·D − 1, represents the input at
// time (j+1)·D − 1 − Delay().
func (c *Channeliser) Delay() float64 { return float64(len(c.proto)-1) / 2 }

// Centre returns the centre of sub-band k in Hz, in [−fs/2, fs/2).
func (c *Channeliser) Centre(k int) float64 {
	k = ((k % c.m) + c.m) % c.m
	if k >= c.m/2 {
		k -= c.m
	}
	return float64(k) * c.rate / float64(c.m)
}

// Nearest returns the sub-band whose centre is nearest to freq Hz and
// freq's offset from that centre (|offset| ≤ fs/(2M)).
func (c *Channeliser) Nearest(freq float64) (band int, offset float64) {
	s := c.rate / float64(c.m)
	k := int(math.Round(freq / s))
	offset = freq - float64(k)*s
	band = ((k % c.m) + c.m) % c.m
	return band, offset
}

// Cost returns the floating-point operations per input sample of the
// bank by the usual counts: per output (every D inputs) the fold's rows·M
// complex-by-real multiply-adds as the kernel runs them, zero taps
// included, at 4 each, and an M-point FFT at 5·M·log₂M.
func (c *Channeliser) Cost() float64 {
	return (4*float64(c.rows*c.m) + 5*float64(c.m)*math.Log2(float64(c.m))) / float64(c.d)
}

// Reset clears the history and returns to input index 0.
func (c *Channeliser) Reset() {
	c.buf = make([]complex64, c.n-1, c.n-1+stageChunk+3*c.d)
	c.pos = 0
	if c.work == nil {
		c.work = c.newWork()
	}
}

// MaxOut returns the most outputs per sub-band n inputs can give.
func (c *Channeliser) MaxOut(n int) int { return n/c.d + 1 }

// Process runs src through the bank and appends the outputs of sub-band
// bands[i] to dst[i][:0], returning dst (allocated when nil or short; a
// short dst[i] grows). It panics if a band is outside [0, M).
func (c *Channeliser) Process(dst [][]complex64, bands []int, src []complex64) [][]complex64 {
	if len(dst) < len(bands) {
		dst = append(dst, make([][]complex64, len(bands)-len(dst))...)
	}
	dst = dst[:len(bands)]
	for i := range dst {
		dst[i] = dst[i][:0]
	}
	if c.sel == nil || !slices.Equal(c.sel.bins, bands) {
		c.sel = c.selection(bands)
	}
	sel := c.sel
	for len(src) > 0 {
		n := min(stageChunk, len(src))
		c.buf = append(c.buf[:c.n-1], src[:n]...)
		stride := c.MaxOut(n)
		if cap(c.out) < stride*len(bands) {
			c.out = make([]complex64, stride*len(bands))
		}
		cnt := c.block(c.out, stride, sel, c.buf, c.pos, c.work)
		for i := range dst {
			dst[i] = append(dst[i], c.out[i*stride:i*stride+cnt]...)
		}
		c.pos += int64(n)
		copy(c.buf, c.buf[n:])
		src = src[n:]
	}
	return dst
}

// bankSel is a choice of sub-bands in the layout block copies them out
// by: row i of the output matrix holds sub-band bins[i], found at offs[i]
// (the bin's position in the transform's output times the four lanes).
type bankSel struct {
	bins []int
	rows []int32
	offs []int32
}

// selection returns the layout of the sub-bands bands. It panics if one
// lies outside [0, M).
func (c *Channeliser) selection(bands []int) *bankSel {
	s := &bankSel{bins: append([]int(nil), bands...)}
	for i, k := range bands {
		if k < 0 || k >= c.m {
			panic("modem: sub-band out of range")
		}
		s.rows = append(s.rows, int32(i))
		s.offs = append(s.offs, 4*c.fft.pos[k])
	}
	return s
}

// bankWork is the scratch of one goroutine running Channeliser.block.
type bankWork struct {
	vb []complex64 // four folded windows, interleaved, then their transforms
}

func (c *Channeliser) newWork() *bankWork {
	return &bankWork{vb: make([]complex64, 4*c.m)}
}

// block is the stateless kernel of Process: win holds the inputs of
// absolute indices a−(N−1) … a+len(win)−N (the N−1 samples before a, then
// the block), and the outputs j whose index n = (j+1)·D − 1 lies in the
// block are written, sub-band sel.bins[i] to out[i·stride + t] for t <
// cnt, the count it returns (stride ≥ cnt). Blocks of a stream may run in
// any order and on any goroutine, each with its own w. Outputs are
// computed four at a time (a batch, one per lane); when the outputs are
// not a multiple of four the last batch runs in the kernel only if win's
// capacity holds the samples its missing lanes would read (3·D past the
// block; else in Go).
func (c *Channeliser) block(out []complex64, stride int, sel *bankSel, win []complex64, a int64, w *bankWork) int {
	d := int64(c.d)
	nb := int64(len(win) - (c.n - 1))
	// first n ≥ a with n ≡ D−1 (mod D)
	n0 := a + ((d-1-a)%d+d)%d
	if n0 >= a+nb {
		return 0
	}
	cnt := int((a+nb-1-n0)/d) + 1
	if cnt > stride {
		panic("modem: channeliser output stride too small")
	}
	vb := w.vb
	mask := int64(c.m - 1)
	span := c.rows * c.m // samples the kernel reads for a batch
	room := cap(win)     // past len(win): samples the kernel may read for lanes beyond the block
	for t := 0; t < cnt; t += bankBatch {
		lanes := min(bankBatch, cnt-t)
		n := n0 + int64(t)*d
		o := int(n - a)                       // window of output t in win
		e := int((n - int64(c.n) + 1) & mask) // its first sample's index mod M
		if haveKernels && c.m >= 8 && o+span <= room {
			// lanes past the block read whatever follows it: each lane
			// is a transform of its own, and they are not copied out
			bankFoldAVX2(&vb[0], &win[:room][o], &c.gp[2*3*c.d], c.m, c.d, c.rows, e)
		} else {
			bankFoldGo(vb, win[o:], c.g, c.m, c.d, e, lanes)
		}
		c.fft.transform(vb)
		bankGather(out[t:], stride, vb, sel.rows, sel.offs, lanes)
	}
	return cnt
}

// bankFoldGo is the reference loop of bankFoldAVX2 for the first lanes
// windows, window j at win[j·d:], whose first sample's absolute index is
// ≡ e + j·d (mod m): each window's products g[i]·w[i] are summed by the
// absolute index of their sample mod m, vb[4r + j] = Σ_{e+j·d+i ≡ r}
// g[i]·win[j·d + i]. The other lanes are cleared.
func bankFoldGo(vb, win []complex64, g []float32, m, d, e, lanes int) {
	clear(vb[:4*m])
	for j := range lanes {
		w := win[j*d : j*d+len(g)]
		r := (e + j*d) % m
		for i, h := range g {
			x := w[i]
			v := &vb[4*r+j]
			*v = complex(real(*v)+h*real(x), imag(*v)+h*imag(x))
			if r++; r == m {
				r = 0
			}
		}
	}
}

// bankGather copies the transforms' bins at vb[offs[i] … +lanes] to
// out[rows[i]·stride …].
func bankGather(out []complex64, stride int, vb []complex64, rows, offs []int32, lanes int) {
	if len(rows) == 0 {
		return
	}
	if lanes == bankBatch && haveKernels {
		bankGatherAVX2(&out[0], 8*stride, &vb[0], &rows[0], &offs[0], len(rows))
		return
	}
	for i, r := range rows {
		copy(out[int(r)*stride:int(r)*stride+lanes], vb[offs[i]:offs[i]+int32(lanes)])
	}
}
