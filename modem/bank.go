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
	// Pass is the half-width (Hz) of the band around each sub-band's centre
	// that is kept flat (ripple ±δ) and free of aliases (at most δ, δ =
	// 10^(−AttenDB/20)); it must be below Rate/Bands. 0 means
	// Rate/(2·Bands), half the spacing of the sub-bands.
	Pass    float64
	AttenDB float64 // default 80
}

// Channeliser is a 2×-oversampled polyphase DFT analysis filter bank: it
// splits a complex capture at rate fs into M sub-bands centred on
// k·fs/M (k = 0…M−1; k ≥ M/2 are the negative frequencies (k−M)·fs/M),
// each mixed to zero, low-pass filtered by the prototype h and decimated
// by D = M/2 to the rate 2fs/M:
//
//	y_k[j] = Σ_l h[l]·x[n−l]·e^{−j2πk(n−l)/M},  n = (j+1)·D − 1,
//
// which is what a ShiftDecimator with taps h tuned to k·fs/M computes, for
// all k at the cost of one filter and one FFT. With the window of the N =
// K·M samples ending at n, w[i] = x[n−N+1+i], and g[i] = h[N−1−i] (h zero
// past its length),
//
//	y_k[j] = e^{−j2πk(n−N+1)/M} · Σ_{q<M} v[q]·e^{−j2πkq/M},
//	v[q] = Σ_{p<K} g[q+pM]·w[q+pM],
//
// the windowed frame time-aliased (folded) to M samples and transformed by
// an M-point FFT — the polyphase analysis of J. O. Smith III, Spectral
// Audio Signal Processing, W3K Publishing, 2011, sections "Polyphase
// Analysis of Portnoff STFT" (the polyphase filters compute the
// time-aliased windowed frame) and "Portnoff Windows"; the polyphase
// structure of R. E. Crochiere & L. R. Rabiner, Multirate Digital Signal
// Processing, 1983, ch. 7 (DFT filter banks, integer oversampling). With
// n − N + 1 ≡ 0 or D (mod M) the leading factor is 1 or (−1)^k.
//
// The prototype is a Kaiser-window low-pass (KaiserLowpass) with its
// pass band to Pass Hz and its stop band from 2fs/M − Pass: after the
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
	rate    float64
	m, d, k int
	n       int       // window length K·M
	pass    float64   // Hz
	atten   float64   // dB
	proto   []float64 // the prototype h, odd length, symmetric
	g       []float32 // window-order taps g[i] = h[N−1−i], zero before the prototype
	gq      []float32 // g in the kernel's layout (bankTapsLayout)
	fft     *bankFFT
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

// NewChanneliser designs the bank for spec.
func NewChanneliser(spec ChanneliserSpec) (*Channeliser, error) {
	m := spec.Bands
	if !(spec.Rate > 0) || math.IsInf(spec.Rate, 0) {
		return nil, errors.New("modem: channeliser rate must be positive")
	}
	if m < 4 || m > maxBankBands || m&(m-1) != 0 {
		return nil, fmt.Errorf("modem: %d sub-bands: want a power of two from 4 to %d", m, maxBankBands)
	}
	atten := spec.AttenDB
	if atten == 0 {
		atten = DefaultRxAtten
	}
	spacing := spec.Rate / float64(m)
	pass := spec.Pass
	if pass == 0 {
		pass = spacing / 2
	}
	if !(pass > 0) || !(pass < spacing) {
		return nil, fmt.Errorf("modem: channeliser pass band ±%g Hz does not fit sub-bands %g Hz apart", pass, spacing)
	}
	c := &Channeliser{rate: spec.Rate, m: m, d: m / 2, pass: pass, atten: atten}
	// cutoff at the spacing: pass band to pass, stop band from 2·spacing − pass
	c.proto = KaiserLowpass(spacing, 2*(spacing-pass), spec.Rate, atten)
	c.k = (len(c.proto) + m - 1) / m
	c.n = c.k * m
	c.g = make([]float32, c.n)
	off := c.n - len(c.proto)
	for i, h := range c.proto {
		// h symmetric: g[off + i] = h[N−1−off−i] = h[len−1−i] = h[i]
		c.g[off+i] = float32(h)
	}
	c.gq = bankTapsLayout(c.g, m)
	c.fft = newBankFFT(m)
	c.Reset()
	return c, nil
}

// Bands returns the number of sub-bands M.
func (c *Channeliser) Bands() int { return c.m }

// Decim returns the decimation D = M/2.
func (c *Channeliser) Decim() int { return c.d }

// Rate returns the input rate in Hz.
func (c *Channeliser) Rate() float64 { return c.rate }

// OutRate returns the sub-band rate 2fs/M in Hz.
func (c *Channeliser) OutRate() float64 { return c.rate / float64(c.d) }

// Pass returns the half-width of the flat, alias-free band in Hz.
func (c *Channeliser) Pass() float64 { return c.pass }

// Taps returns the prototype low-pass (a copy).
func (c *Channeliser) Taps() []float64 { return append([]float64(nil), c.proto...) }

// TapsPerBranch returns K, the prototype's length over M rounded up.
func (c *Channeliser) TapsPerBranch() int { return c.k }

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

// Reset clears the history and returns to input index 0.
func (c *Channeliser) Reset() {
	c.buf = make([]complex64, c.n-1, c.n-1+stageChunk)
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
// by: row i of the output matrix holds sub-band bins[i]; the rows of even
// and odd sub-bands are listed apart, with the position of each bin in
// the transform's output (times the four lanes), since odd sub-bands
// change sign on every other output (the (−1)^k of the Channeliser doc).
type bankSel struct {
	bins               []int
	evenRows, evenOffs []int32
	oddRows, oddOffs   []int32
}

// selection returns the layout of the sub-bands bands. It panics if one
// lies outside [0, M).
func (c *Channeliser) selection(bands []int) *bankSel {
	s := &bankSel{bins: append([]int(nil), bands...)}
	for i, k := range bands {
		if k < 0 || k >= c.m {
			panic("modem: sub-band out of range")
		}
		off := 4 * c.fft.pos[k]
		if k%2 == 0 {
			s.evenRows = append(s.evenRows, int32(i))
			s.evenOffs = append(s.evenOffs, off)
		} else {
			s.oddRows = append(s.oddRows, int32(i))
			s.oddOffs = append(s.oddOffs, off)
		}
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

// bankSigns[s] negates the lanes whose outputs take the factor (−1)^k for
// odd k: s = 0 the lanes 0 and 2, s = 1 the lanes 1 and 3.
var bankSigns = [2][8]uint32{
	{1 << 31, 1 << 31, 0, 0, 1 << 31, 1 << 31, 0, 0},
	{0, 0, 1 << 31, 1 << 31, 0, 0, 1 << 31, 1 << 31},
}

// block is the stateless kernel of Process: win holds the inputs of
// absolute indices a−(N−1) … a+len(win)−N (the N−1 samples before a, then
// the block), and the outputs j whose index n = (j+1)·D − 1 lies in the
// block are written, sub-band sel.bins[i] to out[i·stride + t] for t <
// cnt, the count it returns (stride ≥ cnt). Blocks of a stream may run in
// any order and on any goroutine, each with its own w.
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
	for t := 0; t < cnt; t += bankBatch {
		lanes := min(bankBatch, cnt-t)
		o := int(n0-a) + t*c.d // window of output t in win
		if lanes == bankBatch && haveKernels && c.m >= 8 {
			bankFoldAVX2(&vb[0], &win[o], &c.gq[0], c.m, c.k)
		} else {
			bankFoldGo(vb, win[o:], c.d, c.m, c.g, lanes)
		}
		c.fft.transform(vb)
		// (j+1) odd ⇔ window start ≡ D (mod M): sign (−1)^k. Output t has
		// j = (n0+1)/D − 1 + t.
		j0 := (n0+1)/d - 1 + int64(t)
		sg := &bankSigns[j0&1]
		bankGather(out[t:], stride, vb, sel.evenRows, sel.evenOffs, nil, lanes)
		bankGather(out[t:], stride, vb, sel.oddRows, sel.oddOffs, sg, lanes)
	}
	return cnt
}

// bankFoldGo is the reference loop of bankFoldAVX2 for the first lanes
// windows (the others are cleared): lane j folds the window at
// win[j·lane:], vb[4q + j] = Σ_{p<K} g[q+pM]·win[j·lane + q + pM].
func bankFoldGo(vb, win []complex64, lane, m int, g []float32, lanes int) {
	k := len(g) / m
	for q := range m {
		for j := range 4 {
			var sr, si float32
			if j < lanes {
				w := win[j*lane+q:]
				for p := range k {
					h := g[q+p*m]
					x := w[p*m]
					sr += h * real(x)
					si += h * imag(x)
				}
			}
			vb[4*q+j] = complex(sr, si)
		}
	}
}

// bankTapsLayout returns the window-order taps g (K·m of them) in the
// order bankFoldAVX2 reads them: for each group of four positions q, the
// K taps g[q + p·m] … g[q+3 + p·m], p < K, each twice (both parts of a
// complex sample).
func bankTapsLayout(g []float32, m int) []float32 {
	k := len(g) / m
	gq := make([]float32, 0, 2*len(g))
	for q := 0; q < m; q += 4 {
		for p := range k {
			for r := range 4 {
				v := g[q+r+p*m]
				gq = append(gq, v, v)
			}
		}
	}
	return gq
}

// bankGather copies the transforms' bins at vb[offs[i] … +lanes] to
// out[rows[i]·stride …], negating the lanes sign selects (nil: none).
func bankGather(out []complex64, stride int, vb []complex64, rows, offs []int32, sign *[8]uint32, lanes int) {
	if len(rows) == 0 {
		return
	}
	if lanes == bankBatch && haveKernels {
		var zero [8]uint32
		if sign == nil {
			sign = &zero
		}
		bankGatherAVX2(&out[0], 8*stride, &vb[0], &rows[0], &offs[0], len(rows), sign)
		return
	}
	for i, r := range rows {
		src := vb[offs[i] : offs[i]+4]
		dst := out[int(r)*stride:]
		for j := range lanes {
			v := src[j]
			if sign != nil && sign[2*j] != 0 {
				v = -v
			}
			dst[j] = v
		}
	}
}
