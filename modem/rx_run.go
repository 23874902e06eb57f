package modem

import (
	"errors"
	"fmt"
	"io"
	"math"
	"runtime"
	"sync"
	"sync/atomic"
)

// SampleReader is the source of a Receiver: Read fills dst with the next
// capture samples and returns io.EOF after the last (iq.Source is one).
type SampleReader interface {
	Read(dst []complex64) (int, error)
}

// Receiver decodes several channels of one capture in one pass. The
// capture is read once, in blocks, by a reader goroutine; the first stage
// of every channel (the costly part, at the capture rate) runs on a pool
// of worker goroutines, block by block in any order (ShiftDecimator.Block
// needs only the block and the samples before it); the rest of each chain
// runs on a goroutine per channel, in block order. Memory is bounded by
// the blocks in flight, whatever the capture's length.
type Receiver struct {
	chans []*Channel
	bank  *Channeliser // nil: per-channel first stages
	bands []int        // with bank: the sub-band of each channel
	sel   *bankSel
	// Workers is the number of first-stage goroutines; 0 means
	// runtime.GOMAXPROCS(0).
	Workers int
	// Block is the number of capture samples per block; 0 means 65536.
	Block int
	// Progress, when set, is called from the reader goroutine with the
	// number of samples just read.
	Progress func(n int)
}

// NewReceiver returns a receiver for the channels cfgs, its front end
// chosen by the planner rule (NewReceiverFront with FrontAuto).
func NewReceiver(cfgs []RxConfig) (*Receiver, error) {
	return NewReceiverFront(cfgs, FrontAuto)
}

// NewReceiverFront returns a receiver for the channels cfgs with the
// given front end. FrontAuto uses a Channeliser when there are at least
// ChanneliserMinChannels channels (the measured break-even) of one
// capture rate and rejection and a bank of at least 16 sub-bands fits
// the widest of them (planBank); otherwise every channel has its own
// first stage. FrontChanneliser reports an error when no bank fits.
func NewReceiverFront(cfgs []RxConfig, front FrontEnd) (*Receiver, error) {
	if len(cfgs) == 0 {
		return nil, errors.New("no channel to decode")
	}
	full := make([]RxConfig, len(cfgs))
	for i, cfg := range cfgs {
		c, err := cfg.withDefaults()
		if err != nil {
			return nil, err
		}
		full[i] = c
	}
	r := &Receiver{}
	bp, ok := planBank(full)
	if testBankPlan != nil {
		bp, ok = *testBankPlan, true
	}
	useBank := front == FrontChanneliser || (front == FrontAuto && ok && len(cfgs) >= ChanneliserMinChannels)
	if useBank {
		if !ok {
			return nil, errors.New("modem: no channeliser fits these channels (rates, rejections or widths differ, or the capture is too narrow)")
		}
		var err error
		r.bank, r.bands, r.chans, err = bankChains(full, bp)
		switch {
		case err == nil:
			r.sel = r.bank.selection(r.bands)
			return r, nil
		case front == FrontChanneliser:
			return nil, err
		}
		// a chain the planner's count admitted but that cannot be built
		// (a rational resampler with no plan at the sub-band rate): the
		// per-channel first stages, as with fewer channels
		r = &Receiver{}
	}
	for _, cfg := range full {
		c, err := buildChannel(cfg, chainInput{rate: cfg.Rate, offset: cfg.Offset})
		if err != nil {
			return nil, err
		}
		r.chans = append(r.chans, c)
	}
	return r, nil
}

// Channels returns the receive chains, in the order of the configurations.
func (r *Receiver) Channels() []*Channel { return r.chans }

// rxJob is one block of capture samples with the history the first stages
// need before it.
type rxJob struct {
	win   []complex64 // Run: hist samples before a, then n samples from a
	raw   []byte      // RunRaw: the encoded samples (hist before a, then n)
	from  int         // RunRaw: win[from:to] is decoded from raw, the rest is 0
	to    int
	a     int64
	n     int
	outs  [][]complex64 // first-stage (or sub-band) outputs per channel
	mat   []complex64   // with a Channeliser: the sub-band outputs, channel i from mat[i·stride]
	done  chan struct{}
	refs  atomic.Int32
	last  bool  // the block after which no samples follow
	total int64 // with last: the number of capture samples
}

// Run decodes src to the end. sinks[i] receives the audio of channel i,
// delay-compensated: audio sample k is the capture at time k/AudioRate,
// and the audio lasts as long as the capture (round(N·AudioRate/Rate)
// samples for N capture samples). The slice passed to a sink is reused
// after it returns. The first error of the reader or a sink stops Run and
// is returned.
func (r *Receiver) Run(src SampleReader, sinks []func([]float32) error) error {
	return r.run(src, nil, 0, nil, sinks)
}

// RunRaw is Run for a capture of encoded samples of size bytes each, which
// decode turns into complex samples: the decoding then runs on the worker
// goroutines rather than on the reader's. decode(dst, b) decodes
// len(dst) samples from b.
func (r *Receiver) RunRaw(src io.Reader, size int, decode func(dst []complex64, b []byte), sinks []func([]float32) error) error {
	if size < 1 || decode == nil {
		panic("modem: RunRaw needs a sample size and a decoder")
	}
	return r.run(nil, src, size, decode, sinks)
}

func (r *Receiver) run(src SampleReader, raw io.Reader, ss int, decode func([]complex64, []byte), sinks []func([]float32) error) error {
	if len(sinks) != len(r.chans) {
		panic("modem: one sink per channel")
	}
	workers := r.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	block := r.Block
	chunk := rawChunk // samples a worker decodes at a time
	pad := 0          // room after a window that the Channeliser's kernel may read
	if r.bank != nil {
		// whole batches of four outputs per chunk and block
		b := 4 * r.bank.Decim()
		chunk = b * max(1, rawChunk/b)
		if block <= 0 {
			block = chunk * max(1, (1<<16)/chunk)
		}
		pad = 3 * r.bank.Decim()
	}
	if block <= 0 {
		// The first-stage outputs of the blocks in flight, one slot per
		// channel, stay within rxOutBudget bytes (many channels, small
		// decimations), down to one decoding chunk a block.
		dmin := 1 << 16
		for _, c := range r.chans {
			dmin = min(dmin, c.first.d)
		}
		per := len(r.chans) * 8 * (2*workers + 4) // bytes per output of every channel in flight
		block = max(rawChunk, min(1<<16, rxOutBudget/per*dmin/rawChunk*rawChunk))
	}
	hist := 0
	var flushIn int64 // capture samples of zeros that push the delayed tail out
	for _, c := range r.chans {
		hist = max(hist, c.first.l-1)
		flushIn = max(flushIn, r.flushSamples(c))
	}
	stride := 0 // with a Channeliser: the outputs a block can give per channel
	if r.bank != nil {
		hist = r.bank.n - 1
		stride = r.bank.MaxOut(block)
	}
	nch := len(r.chans)
	inflight := 2*workers + 4
	free := make(chan *rxJob, inflight)
	for range inflight {
		j := &rxJob{outs: make([][]complex64, nch)}
		if raw != nil {
			j.raw = make([]byte, (hist+block)*ss)
		} else {
			j.win = make([]complex64, hist+block, hist+block+pad)
		}
		if r.bank != nil {
			j.mat = make([]complex64, nch*stride)
		} else {
			for i, c := range r.chans {
				j.outs[i] = make([]complex64, 0, c.first.MaxOut(block))
			}
		}
		free <- j
	}
	work := make(chan *rxJob, inflight)
	order := make(chan *rxJob, inflight)
	stop := make(chan struct{})
	var errOnce sync.Once
	var firstErr error
	fail := func(err error) {
		errOnce.Do(func() { firstErr = err; close(stop) })
	}

	// Reader: fills blocks, copying the last hist samples of the previous
	// block before each, then zeros for the flush.
	go func() {
		defer close(work)
		defer close(order)
		prev := make([]complex64, hist)
		var a int64
		var total int64 = -1
		var flushed int64
		zeroFrom := -1 // RunRaw: start of the zeros in the previous window (−1: none)
		prevN := 0
		prevRaw := make([]byte, hist*ss)
		for {
			var j *rxJob
			select {
			case j = <-free:
			case <-stop:
				return
			}
			n := 0
			if raw != nil {
				copy(j.raw, prevRaw)
			}
			if total < 0 {
				var k int
				var err error
				if raw != nil {
					k, err = io.ReadFull(raw, j.raw[hist*ss:(hist+block)*ss])
					if err == io.ErrUnexpectedEOF {
						err = nil
						if k%ss != 0 {
							err = fmt.Errorf("capture ends inside a sample (%d of %d bytes)", k%ss, ss)
						}
					}
					k /= ss
				} else {
					copy(j.win, prev)
					k, err = src.Read(j.win[hist : hist+block])
				}
				n = k
				if err != nil && err != io.EOF {
					fail(err)
					return
				}
				if r.Progress != nil && k > 0 {
					r.Progress(k)
				}
				if err == io.EOF || k == 0 {
					total = a + int64(k)
				}
			} else if raw == nil {
				copy(j.win, prev)
			}
			data := n
			if total >= 0 {
				// zeros after the end
				m := min(int64(block-n), flushIn-flushed)
				if raw == nil {
					clear(j.win[hist+n : hist+n+int(m)])
				}
				n += int(m)
				flushed += m
			}
			if raw != nil {
				j.from, j.to = 0, hist+data
				if a == 0 {
					j.from = hist
				}
				if zeroFrom >= 0 {
					j.to = min(j.to, max(0, zeroFrom-prevN))
				}
				if j.to < hist+n {
					zeroFrom = j.to
				} else {
					zeroFrom = -1
				}
				prevN = n
				copy(prevRaw, j.raw[n*ss:(n+hist)*ss])
			} else {
				copy(prev, j.win[n:n+hist])
			}
			j.a, j.n = a, n
			j.last = total >= 0 && flushed >= flushIn
			j.total = total
			j.done = make(chan struct{})
			j.refs.Store(int32(nch))
			a += int64(n)
			select {
			case work <- j:
			case <-stop:
				return
			}
			order <- j
			if j.last {
				return
			}
		}
	}()

	// Workers: the first stage of every channel. Encoded samples are
	// decoded rawChunk at a time into a small buffer of the worker's, which
	// stays in cache while the first stages read it.
	units := r.firstUnits()
	for range workers {
		go func() {
			var gouts [4][]complex64
			var w []complex64
			if raw != nil {
				w = make([]complex64, hist+chunk, hist+chunk+pad)
			}
			var bw *bankWork
			if r.bank != nil {
				bw = r.bank.newWork()
			}
			for j := range work {
				for i := range j.outs {
					j.outs[i] = j.outs[i][:0]
				}
				cnt := 0 // sub-band outputs so far
				first := func(win []complex64, a int64) {
					if r.bank != nil {
						cnt += r.bank.block(j.mat[cnt:], stride, r.sel, win, a, bw)
						return
					}
					r.firstStages(units, j.outs, &gouts, win, hist, a)
				}
				if raw == nil {
					first(j.win[:hist+j.n], j.a)
				} else {
					for s := 0; s < j.n; s += chunk {
						e := min(s+chunk, j.n)
						// job window indices s … hist+e into w[0 : hist+e−s]
						ww := w[:hist+e-s]
						lo, hi := max(s, j.from), min(hist+e, j.to)
						if lo >= hi {
							clear(ww)
						} else {
							clear(ww[:lo-s])
							decode(ww[lo-s:hi-s], j.raw[lo*ss:hi*ss])
							clear(ww[hi-s:])
						}
						first(ww, j.a+int64(s))
					}
				}
				if r.bank != nil {
					for i := range j.outs {
						j.outs[i] = j.mat[i*stride : i*stride+cnt]
					}
				}
				close(j.done)
			}
		}()
	}

	// Channel goroutines: the rest of each chain, in order.
	feeds := make([]chan *rxJob, nch)
	var wg sync.WaitGroup
	for i, c := range r.chans {
		feeds[i] = make(chan *rxJob, inflight)
		wg.Add(1)
		go func() {
			defer wg.Done()
			var audio []float32
			skip := c.delay
			var emitted int64
			failed := false
			for j := range feeds[i] {
				if !failed {
					if r.bank != nil {
						audio = c.Process(audio, j.outs[i])
					} else {
						audio = c.ProcessFirst(audio, j.outs[i])
					}
					if j.last {
						audio = c.Flush(audio)
					}
					out := audio
					d := min(skip, len(out))
					out, skip = out[d:], skip-d
					if j.total >= 0 {
						want := int64(math.Round(float64(j.total) * c.cfg.AudioRate / c.cfg.Rate))
						out = out[:max(0, min(int64(len(out)), want-emitted))]
					}
					emitted += int64(len(out))
					if len(out) > 0 {
						if err := sinks[i](out); err != nil {
							fail(err)
							failed = true
						}
					}
				}
				if j.refs.Add(-1) == 0 {
					free <- j
				}
			}
		}()
	}

	// Sequencer: hand the blocks on in order once their first stages ran.
	for j := range order {
		<-j.done
		for i := range feeds {
			feeds[i] <- j
		}
	}
	for i := range feeds {
		close(feeds[i])
	}
	wg.Wait()
	return firstErr
}

// firstUnit is one or more channels whose first stages a worker runs
// together: a shiftGroup, or a single channel when g is nil.
type firstUnit struct {
	idx []int // channel indices
	g   *shiftGroup
}

// firstUnits groups the channels whose first-stage windows coincide into
// shiftGroups of four, then of two, and runs the rest alone (three as two
// and one: BenchmarkShiftGroup, per 4096 samples, 2.55 µs for four, 1.4
// µs for two, 1.0 µs for one).
func (r *Receiver) firstUnits() []firstUnit {
	if r.bank != nil {
		return nil
	}
	type key struct{ l, d, phase int }
	var order []key
	same := map[key][]int{}
	var units []firstUnit
	for i, c := range r.chans {
		f := c.first
		if f.st == nil || !haveKernels {
			units = append(units, firstUnit{idx: []int{i}})
			continue
		}
		k := key{f.l, f.d, f.phase}
		if _, ok := same[k]; !ok {
			order = append(order, k)
		}
		same[k] = append(same[k], i)
	}
	for _, k := range order {
		idx := same[k]
		for len(idx) >= 2 {
			n := 2
			if len(idx) >= 4 {
				n = 4
			}
			sds := make([]*ShiftDecimator, n)
			for m, i := range idx[:n] {
				sds[m] = r.chans[i].first
			}
			if g := newShiftGroup(sds); g != nil {
				units = append(units, firstUnit{idx: idx[:n], g: g})
			} else {
				for _, i := range idx[:n] {
					units = append(units, firstUnit{idx: []int{i}})
				}
			}
			idx = idx[n:]
		}
		for _, i := range idx {
			units = append(units, firstUnit{idx: []int{i}})
		}
	}
	return units
}

// rxOutBudget bounds the first-stage outputs a per-channel Receiver
// keeps for its blocks in flight (bytes).
const rxOutBudget = 16 << 20

// rawChunk is the number of encoded capture samples a Receiver worker
// decodes at a time (32 KiB of complex64 plus the history): small enough
// to stay in the core's cache for the first stages that read them.
const rawChunk = 4096

// firstStages appends to outs the first-stage outputs of every channel
// for the window w, whose first hist samples precede absolute index a.
func (r *Receiver) firstStages(units []firstUnit, outs [][]complex64, gouts *[4][]complex64, w []complex64, hist int, a int64) {
	for _, u := range units {
		first := r.chans[u.idx[0]].first
		win := w[hist-(first.l-1):]
		if u.g == nil {
			outs[u.idx[0]] = first.Block(outs[u.idx[0]], win, a)
			continue
		}
		for k, i := range u.idx {
			gouts[k] = outs[i]
		}
		u.g.block(gouts[:len(u.idx)], win, a)
		for k, i := range u.idx {
			outs[i] = gouts[k]
		}
	}
}
