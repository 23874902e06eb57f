package spectral

import (
	"math"
	"runtime"
	"sync"

	"gonum.org/v1/gonum/dsp/fourier"

	"ssbkit/internal/fft"
)

// Options configures an Accumulator. The zero value is a Hann window with
// 50 % overlap, run on the caller's goroutine.
type Options struct {
	// Window tapers each segment (default Hann).
	Window Window
	// Hop is the number of samples from one segment's start to the next:
	// 0 means half the FFT length (50 % overlap); a hop larger than the
	// FFT length skips samples between segments, which samples a long
	// capture evenly at a bounded cost.
	Hop int
	// Workers is the number of goroutines, the caller's included, that
	// transform segments: 0 or 1 runs everything in Add; more collects a
	// batch of segments and shares it out. The result is the same, bit
	// for bit, for any number of workers. Close releases the helpers.
	Workers int
}

// Accumulator averages the periodograms of windowed, possibly overlapping
// segments of a streamed complex signal: Welch's method (P. D. Welch,
// IEEE Trans. Audio Electroacoust. AU-15(2), 1967). Blocks of any length
// may be added; the segmentation does not depend on how the stream is cut.
// Memory is a few slices of the FFT length per batched segment, whatever
// the stream's length.
//
// Power-of-two lengths use the package's radix-4 FFT, others gonum's
// dsp/fourier. Each bin's sum is built segment by segment in stream
// order, so batching and workers change nothing in the result.
type Accumulator struct {
	k    *kernel
	hop  int
	rate float64
	win  Window

	// segments wait in slots until a batch is full: slots[pending] is
	// being filled with fill samples
	slots   [][]complex64
	pending int
	fill    int
	skip    int // samples still to drop before the next segment (hop > n)
	segs    int // segments transformed

	sum  []float64 // Σ|X|² by transform position (see kernel.perm)
	pow  [][]float64
	cols [][]float64 // per slot: column sums (waterfall)

	workers []*worker // workers[0] runs on the caller
	helpers *helpers
	closed  bool

	// each, when set, sees every segment's column sums (centred, see
	// Waterfall) in stream order.
	each func(c []float64)
}

// kernel is what every worker shares, read only.
type kernel struct {
	n      int
	w      []float64
	s1, s2 float64
	radix  *fft.Radix4 // nil: gonum per worker
	perm   []int32     // position → bin in FFT order (nil: natural order)
	inv    []int32     // bin → position
	ncols  int
	colOf  []int32 // position → waterfall column
}

// worker transforms segments with its own scratch space.
type worker struct {
	k    *kernel
	fft  transformer
	work []complex128
	jobs chan job
	done chan struct{}
}

// job is one share of a batch: phase 1 transforms slots [from, to) into
// pow (and cols); phase 2 adds the count rows of pow into sum over
// positions [from, to).
type job struct {
	phase    int
	from, to int
	count    int
	slots    [][]complex64
	pow      [][]float64
	cols     [][]float64
	sum      []float64
}

// maxBatchSamples bounds a batch's slots (and power rows) to about this
// many samples each.
const maxBatchSamples = 1 << 19

// NewAccumulator returns a Welch accumulator with a Hann window and 50 %
// overlap for FFT length fftSize at the given sample rate (Hz).
// It panics if fftSize < 2 or rate ≤ 0.
func NewAccumulator(fftSize int, rate float64) *Accumulator {
	return NewAccumulatorOptions(fftSize, rate, Options{})
}

// NewAccumulatorOptions is NewAccumulator with a chosen window, hop and
// number of workers. It panics if fftSize < 2, rate ≤ 0, opt.Hop < 0 or
// opt.Workers < 0.
func NewAccumulatorOptions(fftSize int, rate float64, opt Options) *Accumulator {
	if fftSize < 2 {
		panic("spectral: FFT length < 2")
	}
	if !(rate > 0) || math.IsInf(rate, 0) {
		panic("spectral: rate must be positive")
	}
	if opt.Hop < 0 {
		panic("spectral: negative hop")
	}
	if opt.Workers < 0 {
		panic("spectral: negative worker count")
	}
	hop := opt.Hop
	if hop == 0 {
		hop = fftSize / 2
	}
	n := fftSize
	k := &kernel{n: n, w: opt.Window.Coefficients(n)}
	k.s1, k.s2 = windowSums(k.w)
	if n&(n-1) == 0 {
		k.radix = fft.NewRadix4(n)
		k.perm = k.radix.Perm()
		k.inv = make([]int32, n)
		for p, b := range k.perm {
			k.inv[b] = int32(p)
		}
	}
	nw := max(1, opt.Workers)
	batch := 1
	if nw > 1 {
		batch = nw * max(1, min(4, maxBatchSamples/n))
	}
	a := &Accumulator{
		k: k, hop: hop, rate: rate, win: opt.Window,
		slots: make([][]complex64, batch),
		sum:   make([]float64, n),
	}
	for i := range a.slots {
		a.slots[i] = make([]complex64, n)
	}
	if batch > 1 {
		a.pow = make([][]float64, batch)
		for i := range a.pow {
			a.pow[i] = make([]float64, n)
		}
	}
	for i := range nw {
		w := &worker{k: k, work: make([]complex128, n)}
		if k.radix != nil {
			w.fft = k.radix
		} else {
			w.fft = gonumFFT{fourier.NewCmplxFFT(n)}
		}
		if i > 0 {
			w.jobs, w.done = make(chan job), make(chan struct{})
			go w.run()
		}
		a.workers = append(a.workers, w)
	}
	if nw > 1 {
		// the helpers hold no reference to a: stop them if a is dropped
		// without Close
		a.helpers = &helpers{}
		for _, w := range a.workers[1:] {
			a.helpers.chans = append(a.helpers.chans, w.jobs)
		}
		runtime.AddCleanup(a, (*helpers).stop, a.helpers)
	}
	return a
}

// helpers are the job channels of an Accumulator's helper goroutines.
type helpers struct {
	once  sync.Once
	chans []chan job
}

// stop closes the channels once, ending the goroutines.
func (h *helpers) stop() {
	h.once.Do(func() {
		for _, c := range h.chans {
			close(c)
		}
	})
}

// Close stops the helper goroutines of an Accumulator with Workers > 1
// after transforming any waiting segments; Add may not be called after
// it. Close of a one-worker Accumulator only flushes.
func (a *Accumulator) Close() {
	if a.closed {
		return
	}
	a.flush()
	a.closed = true
	if a.helpers != nil {
		a.helpers.stop()
	}
	a.workers = a.workers[:1]
}

// columns makes every segment also report its power summed over ncols
// columns of centred bins (column c holds bins [c·n/ncols, (c+1)·n/ncols))
// to fn. It must be called before the first Add.
func (a *Accumulator) columns(ncols int, fn func(c []float64)) {
	k := a.k
	k.ncols = ncols
	k.colOf = make([]int32, k.n)
	h := k.n / 2
	for p := range k.colOf {
		b := p
		if k.perm != nil {
			b = int(k.perm[p])
		}
		j := (b + h) % k.n // centred index
		k.colOf[p] = int32(j * ncols / k.n)
	}
	a.cols = make([][]float64, len(a.slots))
	for i := range a.cols {
		a.cols[i] = make([]float64, ncols)
	}
	a.each = fn
}

// Len returns the FFT length.
func (a *Accumulator) Len() int { return a.k.n }

// Rate returns the sample rate in Hz.
func (a *Accumulator) Rate() float64 { return a.rate }

// Hop returns the samples between segment starts.
func (a *Accumulator) Hop() int { return a.hop }

// Segments returns the number of complete segments added so far.
func (a *Accumulator) Segments() int { return a.segs + a.pending }

// Reset forgets every sample and segment.
func (a *Accumulator) Reset() {
	a.fill, a.skip, a.segs, a.pending = 0, 0, 0, 0
	clear(a.sum)
}

// Add feeds the next block of the stream. It does not allocate.
// It panics if called after Close.
func (a *Accumulator) Add(block []complex64) {
	if a.closed {
		panic("spectral: Add after Close")
	}
	n := a.k.n
	for len(block) > 0 {
		if a.skip > 0 {
			k := min(a.skip, len(block))
			a.skip -= k
			block = block[k:]
			continue
		}
		cur := a.slots[a.pending]
		k := copy(cur[a.fill:], block)
		a.fill += k
		block = block[k:]
		if a.fill < n {
			return
		}
		a.pending++
		if a.pending == len(a.slots) {
			a.run()
		}
		// the next segment starts with the overlap; run leaves the slots
		// as they were
		if a.hop < n {
			copy(a.slots[a.pending], cur[a.hop:])
			a.fill = n - a.hop
		} else {
			a.fill = 0
			a.skip = a.hop - n
		}
	}
}

// flush transforms the waiting segments and moves the partly filled one
// to the first slot.
func (a *Accumulator) flush() {
	if a.pending == 0 {
		return
	}
	last := a.pending
	a.run()
	if a.fill > 0 {
		copy(a.slots[0][:a.fill], a.slots[last][:a.fill])
	}
}

// run transforms the pending segments and adds them to the sums.
func (a *Accumulator) run() {
	cnt := a.pending
	if cnt == 0 {
		return
	}
	nw := len(a.workers)
	if nw == 1 {
		// one worker: each bin's sum gets the segments in order directly
		for j := range cnt {
			var cols []float64
			if a.cols != nil {
				cols = a.cols[j]
			}
			a.workers[0].segment(a.slots[j], a.sum, cols, true)
		}
	} else {
		a.share(job{phase: 1, count: cnt, slots: a.slots, pow: a.pow, cols: a.cols}, cnt)
		a.share(job{phase: 2, count: cnt, pow: a.pow, sum: a.sum}, a.k.n)
	}
	if a.each != nil {
		for j := range cnt {
			a.each(a.cols[j])
		}
	}
	a.segs += cnt
	a.pending = 0
}

// share splits [0, total) of j among the workers, the caller taking the
// first share, and waits for all.
func (a *Accumulator) share(j job, total int) {
	nw := len(a.workers)
	for i := 1; i < nw; i++ {
		jj := j
		jj.from, jj.to = i*total/nw, (i+1)*total/nw
		a.workers[i].jobs <- jj
	}
	j.from, j.to = 0, total/nw
	a.workers[0].do(j)
	for i := 1; i < nw; i++ {
		<-a.workers[i].done
	}
}

func (w *worker) run() {
	for j := range w.jobs {
		w.do(j)
		w.done <- struct{}{}
	}
}

func (w *worker) do(j job) {
	switch j.phase {
	case 1:
		for s := j.from; s < j.to; s++ {
			var cols []float64
			if j.cols != nil {
				cols = j.cols[s]
			}
			w.segment(j.slots[s], j.pow[s], cols, false)
		}
	case 2:
		sum := j.sum[j.from:j.to]
		for _, p := range j.pow[:j.count] {
			p = p[j.from:j.to]
			p = p[:len(sum)]
			for i, v := range p {
				sum[i] += v
			}
		}
	}
}

// segment windows, transforms and squares one segment: |X|² by position
// is added to out (add) or stored in it, and summed per column into cols
// when cols is not nil.
func (w *worker) segment(seg []complex64, out, cols []float64, add bool) {
	k := w.k
	if cols != nil {
		clear(cols)
	}
	if k.radix != nil && fused(k.radix) {
		segmentPower(k.radix, w.work, seg, k.w, out, add, cols, k.colOf)
		return
	}
	win, work := k.w, w.work[:len(k.w)]
	seg = seg[:len(win)]
	for i, v := range seg {
		work[i] = complex(float64(real(v))*win[i], float64(imag(v))*win[i])
	}
	w.fft.Transform(work)
	out = out[:len(work)]
	switch {
	case cols != nil:
		colOf := k.colOf[:len(work)]
		for p, c := range work {
			re, im := real(c), imag(c)
			v := re*re + im*im
			if add {
				out[p] += v
			} else {
				out[p] = v
			}
			cols[colOf[p]] += v
		}
	case add:
		for p, c := range work {
			re, im := real(c), imag(c)
			out[p] += re*re + im*im
		}
	default:
		for p, c := range work {
			re, im := real(c), imag(c)
			out[p] = re*re + im*im
		}
	}
}

// densityScale turns a sum of |X_k|² over segs segments into power per Hz:
// P_k = Σ|X_k|² / (segs · rate · Σw²), the density scaling of Welch's
// estimate (scipy.signal.welch scaling="density" uses the same).
func (a *Accumulator) densityScale(segs int) float64 {
	return 1 / (float64(segs) * a.rate * a.k.s2)
}

// Spectrum returns the averaged power spectral density so far, centred
// (index 0 is −rate/2). It returns nil before the first full segment.
func (a *Accumulator) Spectrum() *Spectrum {
	a.flush()
	if a.segs == 0 {
		return nil
	}
	k := a.k
	s := &Spectrum{
		Rate: a.rate, Window: a.win, Segments: a.segs,
		ENBW:    float64(k.n) * k.s2 / (k.s1 * k.s1),
		Density: make([]float64, k.n),
	}
	centre(s.Density, a.sum, k.inv, a.densityScale(a.segs))
	return s
}

// PSD returns the averaged power spectral density in (full-scale
// amplitude)² per Hz, centred: element j is the frequency
// (j − n/2)·rate/n, n the FFT length. It returns nil before the first
// full segment. Detect takes this slice.
func (a *Accumulator) PSD() []float64 {
	s := a.Spectrum()
	if s == nil {
		return nil
	}
	return s.Density
}

// centre writes src scaled by k into dst in centred order; src holds bin
// i (FFT order) at position inv[i] (at i when inv is nil).
func centre(dst, src []float64, inv []int32, k float64) {
	n := len(src)
	h := n / 2
	for j := range dst {
		i := j - h
		if i < 0 {
			i += n
		}
		if inv != nil {
			i = int(inv[i])
		}
		dst[j] = src[i] * k
	}
}

// Spectrum is an averaged power spectral density in centred order.
type Spectrum struct {
	// Rate is the sample rate in Hz; the spectrum covers
	// Centre + [−Rate/2, Rate/2).
	Rate float64
	// Centre is the frequency of the middle bin Len()/2: 0 for a capture,
	// the carrier offset for one measured after narrowing (Measurer).
	Centre float64
	// Density[j] is the power per Hz at Freq(j), in (full-scale
	// amplitude)² per Hz: white noise with E|x|² = σ² reads σ²/Rate.
	Density []float64
	// Window is the segment taper and ENBW its equivalent noise bandwidth
	// in bins.
	Window Window
	ENBW   float64
	// Segments is the number of averaged segments.
	Segments int
}

// Len returns the number of bins.
func (s *Spectrum) Len() int { return len(s.Density) }

// BinHz returns the bin spacing in Hz.
func (s *Spectrum) BinHz() float64 { return s.Rate / float64(len(s.Density)) }

// Freq returns the frequency of bin j in Hz.
func (s *Spectrum) Freq(j int) float64 {
	return s.Centre + float64(j-len(s.Density)/2)*s.BinHz()
}

// Index returns the fractional bin index of frequency f.
func (s *Spectrum) Index(f float64) float64 {
	return (f-s.Centre)/s.BinHz() + float64(len(s.Density)/2)
}

// BandPower returns the power between lo and hi Hz: the integral of the
// density, each bin standing for a band one bin wide around its frequency
// (edge bins count in proportion to their overlap). Frequencies outside
// the spectrum are ignored.
func (s *Spectrum) BandPower(lo, hi float64) float64 {
	if hi < lo {
		lo, hi = hi, lo
	}
	b := s.BinHz()
	j0 := max(0, int(math.Floor(s.Index(lo)-0.5)))
	j1 := min(len(s.Density)-1, int(math.Ceil(s.Index(hi)+0.5)))
	var p float64
	for j := j0; j <= j1; j++ {
		f := s.Freq(j)
		ov := math.Min(hi, f+b/2) - math.Max(lo, f-b/2)
		if ov > 0 {
			p += s.Density[j] * ov
		}
	}
	return p
}

// BinPower returns the power a tone centred on bin j would have:
// Density[j]·BinHz·ENBW. Read from a FlatTop spectrum it is the tone's
// power wherever the tone falls within the bin.
func (s *Spectrum) BinPower(j int) float64 {
	return s.Density[j] * s.BinHz() * s.ENBW
}

// Tone returns the strongest bin within ±search Hz of f as a tone: its
// frequency (refined by a parabola through the dB values of the peak and
// its neighbours) and its power (BinPower). ok is false when the range
// holds no bin.
func (s *Spectrum) Tone(f, search float64) (freq, power float64, ok bool) {
	j0 := max(0, int(math.Ceil(s.Index(f-search))))
	j1 := min(len(s.Density)-1, int(math.Floor(s.Index(f+search))))
	if j1 < j0 {
		// search narrower than a bin: the nearest bin
		j := int(math.Round(s.Index(f)))
		if j < 0 || j >= len(s.Density) {
			return 0, 0, false
		}
		j0, j1 = j, j
	}
	best := j0
	for j := j0 + 1; j <= j1; j++ {
		if s.Density[j] > s.Density[best] {
			best = j
		}
	}
	freq = s.Freq(best)
	if best > 0 && best < len(s.Density)-1 {
		a, b, c := dB(s.Density[best-1]), dB(s.Density[best]), dB(s.Density[best+1])
		if d := a - 2*b + c; d < 0 {
			freq += 0.5 * (a - c) / d * s.BinHz()
		}
	}
	return freq, s.BinPower(best), true
}

// dB returns 10·log10(p), with a floor at −400 dB for p ≤ 0.
func dB(p float64) float64 {
	if p <= 0 {
		return -400
	}
	return 10 * math.Log10(p)
}

// DB is 10·log10(p) with −400 dB for zero or negative p.
func DB(p float64) float64 { return dB(p) }
