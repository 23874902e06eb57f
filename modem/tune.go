package modem

import (
	"cmp"
	"errors"
	"fmt"
	"math"
	"slices"

	"ssbkit/internal/fft"
)

// Tuning estimator defaults.
const (
	DefaultTuneRange  = 300 // Hz, the largest carrier correction searched
	DefaultTuneWindow = 3   // s, analysis window
	DefaultTuneHop    = 1   // s, between window starts
)

// TuneConfig describes the SSB channel a TuneEstimator analyses. The
// zero value of every field but Rate is a default.
type TuneConfig struct {
	// Rate is the sample rate of the complex baseband, Hz (required).
	Rate float64
	// Carrier is where the (suppressed) carrier is assumed to lie in the
	// baseband, Hz. The analysed band, 200 − Range to 2400 + Range Hz
	// above (USB) or below (LSB) it, must lie inside ±Rate/2.
	Carrier float64
	// Mode is USB or LSB.
	Mode Mode
	// Range bounds the correction searched, ±Hz (default 300).
	Range float64
	// Window is the length of one analysis window and Hop the step
	// between windows, in seconds (defaults 3 and 1). The window is made
	// a whole number of hops.
	Window, Hop float64
}

// TuneEstimate is the carrier correction found in one analysis window.
type TuneEstimate struct {
	// Start and End bound the window, in seconds from the first sample
	// given to the estimator.
	Start, End float64
	// OffsetHz is the correction: the true carrier minus the assumed one,
	// in Hz. It is 0 unless OK.
	OffsetHz float64
	// Confidence is 1 − (the best score at least half a pitch away from
	// the chosen offset) / (the chosen offset's score): 0 when another
	// offset explains the voice as well, towards 1 when only one does.
	Confidence float64
	// Voiced is the voiced speech in the window, seconds.
	Voiced float64
	// PitchHz is the mean pitch of the voiced frames (0 without any).
	PitchHz float64
	// OK reports a usable estimate: enough voice (MinTuneVoiced), a
	// confidence of at least MinTuneConfidence, and no line at the
	// estimated carrier.
	OK bool
}

// Time returns the middle of the window, s.
func (e TuneEstimate) Time() float64 { return (e.Start + e.End) / 2 }

// Acceptance of a window estimate (tuned on the synthetic voices of
// tune_test.go and the demo band; see TestTuneNoVoice for the refusals).
const (
	// MinTuneVoiced is the voiced speech a window needs, s.
	MinTuneVoiced = 0.6
	// MinTuneConfidence is the confidence a window needs.
	MinTuneConfidence = 0.1
)

// Frame analysis constants.
const (
	tuneFrame      = 0.064 // s per analysis frame (a few pitch periods; harmonics 16 Hz apart resolved)
	tuneLowHz      = 200   // analysed band, audio Hz relative to the assumed carrier
	tuneHighHz     = 2400  //
	tuneWhitenHz   = 250   // width of the moving average removed from the compressed spectrum
	tunePitchLo    = 70    // Hz, pitch search range (adult voices, common practice)
	tunePitchHi    = 400   //
	tuneValley     = 0.6   // largest |R(T₀/2)|/|R(T₀)| of a voiced frame
	tuneVoicing    = 0.45  // normalised periodicity above which a frame is voiced
	tuneLagSpan    = 0.75  // the comb uses lags up to this fraction of the frame (and M/2)
	tuneLineHz     = 60    // half-width of the carrier zone that must be empty, Hz
	tuneLineFrac   = 0.1   // largest carrier-zone density relative to the voice band's
	tuneTooth      = 3.0   // Hz, standard deviation of a frame's offset (the width of its teeth)
	tuneGate       = 1e-3  // frames 30 dB below the loudest recent one are not analysed (pauses)
	tuneGateFall   = 10    // dB per second the loudest recent frame's level falls
	tuneToothReach = 4 * tuneTooth
)

// TuneEstimator finds the carrier error of an SSB voice channel from the
// pitch harmonics of the voice. Derived from first principles here:
//
// Voiced speech is nearly periodic, so its spectrum is a set of lines at
// the harmonics k·f0 of the pitch f0. Heard through an SSB receiver tuned
// δ Hz below the carrier (USB), the lines sit at audio k·f0 + δ: the
// carrier error is the offset that makes the lines a harmonic series
// through the origin. In the lag domain: let S(f) be the frame's
// compressed, whitened magnitude spectrum around the assumed carrier C
// and R(τ) = Σ_f S(f)·e^{j2πfτ} its inverse transform. Lines at
// C + s·(k·f0 + ε) (s = +1 USB, −1 LSB, ε = s·δ) give at the pitch
// period's multiples τ = m/f0
//
//	R(m/f0) = e^{j2π(C + s·ε)·m/f0} · Σ_k S_k,
//
// since e^{j2πskm} = 1: the phases of R at the pitch period's multiples
// rotate with the offset. |R(τ)| does not depend on ε, so the pitch is
// found first (the strongest peak of |R| over 1/400 … 1/70 s); then
//
//	g(ε) = Σ_{m≥1} Re(R(m/f0)·e^{−j2π(C + s·ε)·m/f0}) / Σ_f |S(f)|
//
// is a comb in ε with teeth at ε + n·f0, the frame's harmonic score. One
// frame cannot tell ε from ε ± f0 (a harmonic series shifted by its own
// spacing is again one, and the k = 0 line at the carrier is outside the
// voice band); but the pitch changes from frame to frame while ε does
// not, so the sum of g over the voiced frames of a window of a few
// seconds peaks at the true ε only. Confidence compares that peak with
// the best one at least half a pitch away. A steady signal (one pitch
// throughout, a tone, two tones) leaves its aliases as high as the peak
// and gets no confidence; noise has no voiced frames.
//
// Frames are 64 ms, Hann-windowed, zero-padded to a power of two at
// least 4/3 of their length (R is read out to 3/4 of the frame or half
// the transform, whichever is shorter: at 6 kHz, 384 samples in 512 and
// lags to 251, where the transform's circular wrap meets only the far
// tail of the window's autocorrelation); S is the magnitude |X| (compressing the dynamic range so the
// weaker harmonics count) over 200–2400 Hz above (USB) or below (LSB)
// the assumed carrier, less its 250 Hz moving average (whitening: the
// formant envelope would otherwise dominate R at short lags; the
// average's own transform is divided out of |R| where the pitch is
// read, so it does not pull the peak). The period T₀ is refined on
// Σ_m |R(m·T)|, whose later peaks fix it more finely. A frame is voiced
// when |R(T₀)|/Σ|S| ≥ 0.45 (noise stays below about 0.35) at an interior
// peak of the lag range and |R(T₀/2)| ≤ 0.6·|R(T₀)| (the harmonics of a
// periodic signal alternate in sign at half its period; a tone's |R| is
// flat). R at fractional lags is interpolated (Catmull–Rom) after
// removing the band centre's rotation.
//
// Each voiced frame then contributes, rather than g itself, a comb of
// narrow Gaussian teeth (σ = 3 Hz) at its best ε + n·f0 weighted by the
// peak of g: the frame's ε is good to a hertz or two, and narrow teeth
// let a pitch change of a few hertz between frames separate the true
// offset from ε ± f0, which g's broad teeth (about f0/4 wide) would not.
// The window's estimate must also leave the carrier's neighbourhood
// empty (lineAtCarrier).
//
// Process takes the baseband in blocks of any size and returns the
// estimates of the windows that completed; memory is bounded by one
// window's partial sums.
type TuneEstimator struct {
	cfg     TuneConfig
	sign    float64
	n, m    int // frame and FFT lengths
	fft     *fft.Radix4
	hann    []float64
	bins    []int     // FFT bin of each analysed band point, low to high audio frequency
	binPos  []int32   // position of bins[i] in the transform's digit-reversed output
	binU    []float64 // audio frequency (relative to the assumed carrier) of each
	cLo     int       // bins[cLo:] are the comb's band (tuneLowHz and up); all go into the power
	pow     []float64 // a window's power per bin
	sorted  []float64
	centre  float64 // baseband frequency of the band's middle
	tauLo   int
	mw      int // whitening width, bins
	tauHi   int
	maxLag  float64
	gridLo  float64 // offset of grid point 0 (ε), Hz; step 1 Hz
	grid    int     // grid points
	frame   []complex64
	fill    int
	buf     []complex128
	fft2    *fft.Radix4  // half length, for the real spectrum's transform
	posA    []int32      // position of bin τ of fft2 over the lags used
	posB    []int32      // position of bin (M/2 − τ) mod M/2
	half    []complex128 // its buffer
	rtw     []complex128 // e^{−j2πτ/M} over the lags used
	demod   []complex128 // e^{−j2π·centre·τ/fs} over the lags used
	mag     []float64
	white   []float64
	period  []float64 // one frame's comb over one pitch period, 1 Hz steps
	rm      []complex128
	g       []float64    // a window's comb
	rt      []complex128 // R̃ over the lags used
	lift    []float64    // 1/(1 − D(τ)): the whitening's lifter undone
	level   float64      // the loudest recent frame's energy (the pause gate)
	fall    float64      // its fall per frame
	hopFr   int          // frames per hop
	winHops int          // hops per window
	hops    []tuneHop
	frames  int64 // frames analysed
	lastWin int64 // frames at the end of the last window evaluated
}

// tuneHop holds the partial sums of the frames of one hop.
type tuneHop struct {
	g      []float64 // comb scores on the ε grid
	pow    []float64 // power per band point
	voiced int
	pitch  float64 // sum of the voiced frames' pitches
	frames int
}

// NewTuneEstimator returns an estimator for cfg.
func NewTuneEstimator(cfg TuneConfig) (*TuneEstimator, error) {
	if cfg.Range == 0 {
		cfg.Range = DefaultTuneRange
	}
	if cfg.Window == 0 {
		cfg.Window = DefaultTuneWindow
	}
	if cfg.Hop == 0 {
		cfg.Hop = DefaultTuneHop
	}
	switch {
	case cfg.Mode != USB && cfg.Mode != LSB:
		return nil, fmt.Errorf("tuning needs usb or lsb, not %s", cfg.Mode)
	case !(cfg.Range > 0 && cfg.Range <= 1000):
		return nil, fmt.Errorf("tuning range %g Hz: want 0 < range ≤ 1000", cfg.Range)
	case !(cfg.Rate > 0) || math.IsInf(cfg.Rate, 0):
		return nil, errors.New("baseband rate must be positive")
	case !(math.Abs(cfg.Carrier) < cfg.Rate/2):
		return nil, fmt.Errorf("assumed carrier %g Hz outside the baseband ±%g Hz", cfg.Carrier, cfg.Rate/2)
	case !(cfg.Hop >= tuneFrame && cfg.Window >= cfg.Hop && cfg.Window <= 60):
		return nil, fmt.Errorf("tuning window %g s and hop %g s: want frame ≤ hop ≤ window ≤ 60 s", cfg.Window, cfg.Hop)
	}
	e := &TuneEstimator{cfg: cfg, sign: 1}
	if cfg.Mode == LSB {
		e.sign = -1
	}
	fs := cfg.Rate
	for _, u := range []float64{tuneLowHz - cfg.Range, tuneHighHz + cfg.Range} {
		if f := cfg.Carrier + e.sign*u; !(math.Abs(f) < fs/2) {
			return nil, fmt.Errorf("tuning band (%g…%g Hz from the carrier at %.0f Hz) outside the baseband ±%.0f Hz",
				tuneLowHz-cfg.Range, tuneHighHz+cfg.Range, cfg.Carrier, fs/2)
		}
	}
	e.n = int(math.Round(tuneFrame * fs))
	e.m = 1
	for e.m < e.n*4/3 {
		e.m *= 2
	}
	e.fft = fft.NewRadix4(e.m)
	e.fft2 = fft.NewRadix4(e.m / 2)
	e.half = make([]complex128, e.m/2)
	e.hann = make([]float64, e.n)
	for i := range e.hann {
		e.hann[i] = 0.5 - 0.5*math.Cos(2*math.Pi*(float64(i)+0.5)/float64(e.n))
	}
	df := fs / float64(e.m)
	for j := 0; j < e.m; j++ {
		f := float64(j) * df
		if j >= e.m/2 {
			f -= fs
		}
		u := e.sign * (f - cfg.Carrier)
		if u >= -cfg.Range-tuneLineHz && u <= tuneHighHz {
			e.bins = append(e.bins, j)
			e.binU = append(e.binU, u)
		}
	}
	// sort by audio frequency (LSB runs the other way, and the band may wrap)
	sortByU(e.bins, e.binU)
	pos := inversePerm(e.fft.Perm())
	for _, j := range e.bins {
		e.binPos = append(e.binPos, pos[j])
	}
	e.cLo = len(e.binU)
	for i, u := range e.binU {
		if u >= tuneLowHz {
			e.cLo = min(e.cLo, i)
		}
	}
	e.centre = cfg.Carrier + e.sign*(tuneLowHz+tuneHighHz)/2
	e.tauLo = int(math.Ceil(fs / tunePitchHi))
	e.tauHi = int(math.Floor(fs / tunePitchLo))
	e.maxLag = math.Min(tuneLagSpan*float64(e.n), float64(e.m/2-5))
	ext := cfg.Range + tunePitchHi
	e.gridLo = -math.Ceil(ext)
	e.grid = 2*int(math.Ceil(ext)) + 1
	e.frame = make([]complex64, e.n)
	e.buf = make([]complex128, e.m)
	e.mag = make([]float64, len(e.bins)-e.cLo)
	e.white = make([]float64, len(e.bins)-e.cLo)
	e.pow = make([]float64, len(e.bins))
	e.sorted = make([]float64, len(e.bins))
	e.g = make([]float64, e.grid)
	e.period = make([]float64, int(math.Ceil(fs/float64(e.tauLo-1)))+4)
	e.rm = make([]complex128, int(e.maxLag/float64(e.tauLo))+2)
	e.rt = make([]complex128, int(e.maxLag)+4)
	e.rtw = make([]complex128, len(e.rt))
	e.demod = make([]complex128, len(e.rt))
	pos2 := inversePerm(e.fft2.Perm())
	h2 := e.m / 2
	e.posA = make([]int32, len(e.rt))
	e.posB = make([]int32, len(e.rt))
	for tau := range e.rt {
		e.posA[tau] = pos2[tau]
		e.posB[tau] = pos2[(h2-tau)&(h2-1)]
	}
	for tau := range e.rt {
		s, c := math.Sincos(-2 * math.Pi * float64(tau) / float64(e.m))
		e.rtw[tau] = complex(c, s)
		s, c = math.Sincos(-2 * math.Pi * e.centre * float64(tau) / fs)
		e.demod[tau] = complex(c, s)
	}
	// Removing the moving average of w points from the spectrum
	// multiplies R(τ) by 1 − D(τ), D the average's transform (the
	// Dirichlet kernel sin(πwτ/M)/(w·sin(πτ/M))); R's magnitude is read
	// with that factor undone, so it does not pull the pitch peak.
	e.mw = max(1, int(math.Round(tuneWhitenHz*float64(e.m)/fs))) | 1
	e.lift = make([]float64, len(e.rt))
	for tau := range e.lift {
		d := 1.0
		if tau > 0 {
			x := math.Pi * float64(tau) / float64(e.m)
			d = math.Sin(float64(e.mw)*x) / (float64(e.mw) * math.Sin(x))
		}
		e.lift[tau] = 1 / math.Max(1-d, 0.1)
	}
	e.fall = math.Pow(10, -tuneGateFall*tuneFrame/10)
	e.hopFr = max(1, int(math.Round(cfg.Hop*fs/float64(e.n))))
	e.winHops = max(1, int(math.Round(cfg.Window/cfg.Hop)))
	e.hops = make([]tuneHop, e.winHops)
	for i := range e.hops {
		e.hops[i].g = make([]float64, e.grid)
		e.hops[i].pow = make([]float64, len(e.bins))
	}
	return e, nil
}

// sortByU sorts bins and u together by u.
func sortByU(bins []int, u []float64) {
	idx := make([]int, len(u))
	for i := range idx {
		idx[i] = i
	}
	slices.SortFunc(idx, func(a, b int) int { return cmp.Compare(u[a], u[b]) })
	b2, u2 := slices.Clone(bins), slices.Clone(u)
	for i, k := range idx {
		bins[i], u[i] = b2[k], u2[k]
	}
}

// Config returns the configuration with defaults filled in.
func (e *TuneEstimator) Config() TuneConfig { return e.cfg }

// FrameSamples returns the analysis frame length in samples.
func (e *TuneEstimator) FrameSamples() int { return e.n }

// WindowSamples returns the window length in samples (a whole number of
// frames).
func (e *TuneEstimator) WindowSamples() int { return e.n * e.hopFr * e.winHops }

// HopSamples returns the step between windows in samples.
func (e *TuneEstimator) HopSamples() int { return e.n * e.hopFr }

// Reset forgets everything seen.
func (e *TuneEstimator) Reset() {
	e.fill, e.frames, e.lastWin, e.level = 0, 0, 0, 0
	for i := range e.hops {
		e.hops[i].clear()
	}
}

func (h *tuneHop) clear() {
	clear(h.g)
	clear(h.pow)
	h.voiced, h.pitch, h.frames = 0, 0, 0
}

// Process analyses src and appends to dst the estimates of the windows
// that src completed, returning it.
func (e *TuneEstimator) Process(dst []TuneEstimate, src []complex64) []TuneEstimate {
	for len(src) > 0 {
		k := copy(e.frame[e.fill:], src)
		e.fill += k
		src = src[k:]
		if e.fill < e.n {
			break
		}
		e.fill = 0
		h := &e.hops[(e.frames/int64(e.hopFr))%int64(e.winHops)]
		if e.frames%int64(e.hopFr) == 0 {
			h.clear()
		}
		e.analyse(h)
		e.frames++
		if e.frames%int64(e.hopFr) == 0 && e.frames >= int64(e.hopFr*e.winHops) {
			dst = append(dst, e.window(e.frames))
			e.lastWin = e.frames
		}
	}
	return dst
}

// Flush appends the estimate of a last window ending at the last whole
// frame, when frames were analysed since the last window (the end of a
// stream, or a stream shorter than a window), and returns dst.
func (e *TuneEstimator) Flush(dst []TuneEstimate) []TuneEstimate {
	if e.frames == e.lastWin || e.frames == 0 {
		return dst
	}
	est := e.window(e.frames)
	e.lastWin = e.frames
	return append(dst, est)
}

// window evaluates the window of the hops held, ending after frame end.
func (e *TuneEstimator) window(end int64) TuneEstimate {
	frameSec := float64(e.n) / e.cfg.Rate
	first := max(0, end-int64(e.hopFr*e.winHops))
	if r := end % int64(e.hopFr); r != 0 {
		// a partial last hop: the window reaches back over whole hops
		first = max(0, end-r-int64(e.hopFr*(e.winHops-1)))
	}
	est := TuneEstimate{Start: float64(first) * frameSec, End: float64(end) * frameSec}
	g, pow := e.g, e.pow
	clear(g)
	clear(pow)
	voiced := 0
	var pitch float64
	for i := range e.hops {
		h := &e.hops[i]
		if h.frames == 0 {
			continue
		}
		for i, v := range h.g {
			g[i] += v
		}
		for i, v := range h.pow {
			pow[i] += v
		}
		voiced += h.voiced
		pitch += h.pitch
	}
	est.Voiced = float64(voiced) * frameSec
	if voiced == 0 {
		return est
	}
	est.PitchHz = pitch / float64(voiced)
	// the peak within ±Range
	lo := int(math.Ceil(-e.cfg.Range - e.gridLo))
	hi := int(math.Floor(e.cfg.Range - e.gridLo))
	best := lo
	for i := lo; i <= hi; i++ {
		if g[i] > g[best] {
			best = i
		}
	}
	p1 := g[best]
	eps := e.gridLo + float64(best)
	if best > 0 && best < e.grid-1 {
		a, b, c := g[best-1], g[best], g[best+1]
		if d := a - 2*b + c; d < 0 {
			eps += 0.5 * (a - c) / d
		}
	}
	excl := 0.5 * est.PitchHz
	var p2 float64
	for i, v := range g {
		if math.Abs(e.gridLo+float64(i)-eps) >= excl && v > p2 {
			p2 = v
		}
	}
	if p1 > 0 {
		est.Confidence = math.Max(0, math.Min(1, 1-p2/p1))
	}
	ok := est.Voiced >= MinTuneVoiced && est.Confidence >= MinTuneConfidence
	if ok && e.lineAtCarrier(pow, eps) {
		ok = false
		est.Confidence = 0
	}
	if ok {
		est.OK = true
		est.OffsetHz = e.sign * eps
	}
	return est
}

// lineAtCarrier reports whether the mean power density within tuneLineHz
// of the carrier implied by ε stands above the noise floor by more than
// tuneLineFrac of what the voice band (300–2700 Hz above it) does: a
// suppressed-carrier voice signal has nothing there, a tone taken for the
// k = 0 harmonic does. The floor is the 20 % quantile of the window's
// power over the analysed bins.
func (e *TuneEstimator) lineAtCarrier(pow []float64, eps float64) bool {
	var near, voice float64
	var nn, nv int
	for i, u := range e.binU {
		a := u - eps
		switch {
		case math.Abs(a) <= tuneLineHz:
			near += pow[i]
			nn++
		case a >= DefaultSSBLow && a <= DefaultSSBHigh:
			voice += pow[i]
			nv++
		}
	}
	if nn == 0 || nv == 0 {
		return false
	}
	copy(e.sorted, pow)
	floor := nthSmallest(e.sorted, len(e.sorted)/5)
	near = near/float64(nn) - floor
	voice = voice/float64(nv) - floor
	return near > 0 && near > tuneLineFrac*voice
}

// nthSmallest returns the k-th smallest of x (from 0), reordering x:
// Hoare's selection (Find, Comm. ACM 4(7), 1961), hand-written because
// the standard library only sorts.
func nthSmallest(x []float64, k int) float64 {
	lo, hi := 0, len(x)-1
	for lo < hi {
		p := x[(lo+hi)/2]
		i, j := lo, hi
		for i <= j {
			for x[i] < p {
				i++
			}
			for x[j] > p {
				j--
			}
			if i <= j {
				x[i], x[j] = x[j], x[i]
				i++
				j--
			}
		}
		switch {
		case k <= j:
			hi = j
		case k >= i:
			lo = i
		default:
			return x[k]
		}
	}
	return x[k]
}

// analyse runs the frame in e.frame and adds it to hop h.
func (e *TuneEstimator) analyse(h *tuneHop) {
	h.frames++
	// a pause between words: skip the transforms (the frame would be
	// found unvoiced); the reference is the loudest recent frame, falling
	// by tuneGateFall dB per second
	var energy float64
	for _, v := range e.frame {
		r, i := float64(real(v)), float64(imag(v))
		energy += r*r + i*i
	}
	e.level = math.Max(energy, e.level*e.fall)
	if energy < e.level*tuneGate {
		return
	}
	// the windowed frame, zero-padded
	clear(e.buf)
	for i, v := range e.frame {
		w := e.hann[i]
		e.buf[i] = complex(w*float64(real(v)), w*float64(imag(v)))
	}
	e.fft.Transform(e.buf)
	var total float64
	for i, j := range e.binPos {
		x := e.buf[j]
		p := real(x)*real(x) + imag(x)*imag(x)
		h.pow[i] += p
		if i >= e.cLo {
			total += p
			e.mag[i-e.cLo] = math.Sqrt(p)
		}
	}
	if !(total > 0) {
		return
	}
	// whitening: remove the moving average over tuneWhitenHz
	MovingAverage(e.white, e.mag, e.mw)
	var z float64
	for i := range e.white {
		e.white[i] = e.mag[i] - e.white[i]
		z += math.Abs(e.white[i])
	}
	if !(z > 0) {
		return
	}
	// R(τ) = Σ_j S_j·e^{j2πjτ/M} = conj(X[τ]), X the transform of the real
	// S: one transform of half the length of y_k = S_{2k} + j·S_{2k+1},
	// split into the transforms of the even and odd points (Brigham 1988,
	// ch. 9, two real transforms by one complex one),
	// X[τ] = E[τ] + e^{−j2πτ/M}·O[τ], τ < M/2.
	y := e.half
	clear(y)
	for i, j := range e.bins[e.cLo:] {
		v := e.white[i]
		if j&1 == 0 {
			y[j>>1] += complex(v, 0)
		} else {
			y[j>>1] += complex(0, v)
		}
	}
	e.fft2.Transform(y)
	// R̃(τ) = R(τ)·e^{−j2π·centre·τ/fs}: without the band centre's
	// rotation R varies smoothly enough to interpolate
	rt := e.rt
	rtw, demod := e.rtw[:len(rt)], e.demod[:len(rt)]
	posA, posB := e.posA[:len(rt)], e.posB[:len(rt)]
	for tau := range rt {
		// products written out (Go's complex128 multiply also handles
		// infinities, which costs here)
		a := y[posA[tau]]
		b := y[posB[tau]]
		er, ei := real(a)+real(b), imag(a)-imag(b) // a + conj(b)
		or, oi := imag(a)+imag(b), real(b)-real(a) // (a − conj(b))·(−j)
		w := rtw[tau]
		xr := 0.5 * (er + real(w)*or - imag(w)*oi)
		xi := 0.5 * (ei + real(w)*oi + imag(w)*or)
		// conj(x)·e^{−j2π·centre·τ/fs}
		d := demod[tau]
		rt[tau] = complex(xr*real(d)+xi*imag(d), xr*imag(d)-xi*real(d))
	}
	// pitch: the strongest interior peak of |R| (undone the whitening's
	// lifter) over the lag range
	mag := func(tau int) float64 { return cmplxAbs(rt[tau]) * e.lift[tau] }
	t0, best := -1, 0.0
	prev, cur := mag(e.tauLo-1), mag(e.tauLo)
	for tau := e.tauLo; tau <= e.tauHi; tau++ {
		next := mag(tau + 1)
		if cur >= prev && cur > next && cur > best {
			t0, best = tau, cur
		}
		prev, cur = cur, next
	}
	if t0 < 0 || best/z < tuneVoicing {
		return
	}
	tau := float64(t0)
	if a, b, c := mag(t0-1), best, mag(t0+1); a-2*b+c < 0 {
		tau += 0.5 * (a - c) / (a - 2*b + c)
	}
	// an octave error: a strong peak at half the lag is the real period
	if half := tau / 2; half >= float64(e.tauLo) && e.magAt(half) >= 0.8*best {
		tau = half
	}
	// a periodic signal has |R| low at half its period (its harmonics
	// alternate in sign there); a tone or noise band is as high there
	if v := e.magAt(tau / 2); v > tuneValley*e.magAt(tau) {
		return
	}
	// refine the period on all its multiples within reach: the m-th peak
	// fixes m·T₀ about as well as the first fixes T₀
	nm := int(e.maxLag / (tau + 1))
	if nm > 1 {
		const h = 0.25
		a, b, c := e.combMag(tau-h, nm), e.combMag(tau, nm), e.combMag(tau+h, nm)
		if d := a - 2*b + c; d < 0 {
			tau += h * math.Max(-1, math.Min(1, 0.5*(a-c)/d))
		}
	}
	h.voiced++
	f0 := e.cfg.Rate / tau
	h.pitch += f0
	// R at the multiples of the period, and the comb over one period
	// (ε = −1 … ⌈f0⌉+1 Hz, so that every point of [0, f0) has neighbours)
	rm := e.rm[:nm]
	for mi := range rm {
		lag := tau * float64(mi+1)
		s, c := math.Sincos(2 * math.Pi * e.centre * lag / e.cfg.Rate)
		rm[mi] = e.interp(lag) * complex(c, s)
	}
	np := int(math.Ceil(f0)) + 3
	per := e.period[:np]
	clear(per)
	fs := e.cfg.Rate
	for mi, r := range rm {
		m := float64(mi + 1)
		// e^{−j2π(C + s·ε)·m·τ/fs}, ε = −1, 0, 1, … Hz
		s0, c0 := math.Sincos(-2 * math.Pi * (e.cfg.Carrier - e.sign) * m * tau / fs)
		ss, cs := math.Sincos(-2 * math.Pi * e.sign * m * tau / fs)
		pr, pi := c0, s0
		rr, ri := real(r), imag(r)
		for k := range per {
			per[k] += rr*pr - ri*pi
			pr, pi = pr*cs-pi*ss, pr*ss+pi*cs
		}
	}
	// the frame's offset modulo its pitch, and its weight
	pk := 1
	for k := 1; float64(k-1) < f0; k++ {
		if per[k] > per[pk] {
			pk = k
		}
	}
	w := per[pk] / z
	if !(w > 0) {
		return
	}
	eps := float64(pk - 1)
	if a, b, c := per[pk-1], per[pk], per[pk+1]; a-2*b+c < 0 {
		eps += 0.5 * (a - c) / (a - 2*b + c)
	}
	// teeth at eps + n·f0 over the grid
	n0 := math.Ceil((e.gridLo - tuneToothReach - eps) / f0)
	for c := eps + n0*f0; c-e.gridLo <= float64(e.grid-1)+tuneToothReach; c += f0 {
		x := c - e.gridLo
		lo := max(0, int(math.Ceil(x-tuneToothReach)))
		hi := min(e.grid-1, int(math.Floor(x+tuneToothReach)))
		for i := lo; i <= hi; i++ {
			d := math.Abs(float64(i)-x) * toothSteps
			h.g[i] += w * toothShape[int(d+0.5)]
		}
	}
}

// toothShape is the Gaussian exp(−d²/2σ²), σ = tuneTooth, tabulated at
// 1/toothSteps Hz out to tuneToothReach (a table rather than math.Exp
// for every grid point of every tooth).
const toothSteps = 16

var toothShape = func() []float64 {
	t := make([]float64, int(tuneToothReach*toothSteps)+2)
	for i := range t {
		d := float64(i) / toothSteps / tuneTooth
		t[i] = math.Exp(-0.5 * d * d)
	}
	return t
}()

// interp returns R̃ at a fractional lag by Catmull–Rom interpolation.
func (e *TuneEstimator) interp(tau float64) complex128 {
	k := int(tau)
	t := complex(tau-float64(k), 0)
	p0, p1, p2, p3 := e.rt[k-1], e.rt[k], e.rt[k+1], e.rt[k+2]
	return p1 + 0.5*t*(p2-p0+t*(2*p0-5*p1+4*p2-p3+t*(3*(p1-p2)+p3-p0)))
}

// magAt returns |R| at a fractional lag with the whitening's lifter
// undone.
func (e *TuneEstimator) magAt(tau float64) float64 {
	k := int(tau)
	t := tau - float64(k)
	return cmplxAbs(e.interp(tau)) * (e.lift[k] + t*(e.lift[k+1]-e.lift[k]))
}

// combMag returns Σ |R(m·tau)|, m = 1 … nm, with the lifter undone.
func (e *TuneEstimator) combMag(tau float64, nm int) float64 {
	var s float64
	for m := 1; m <= nm; m++ {
		s += e.magAt(tau * float64(m))
	}
	return s
}

// cmplxAbs is |x| without math.Hypot's guard against overflow (the
// values here are far from it).
func cmplxAbs(x complex128) float64 { return math.Sqrt(real(x)*real(x) + imag(x)*imag(x)) }

// MovingAverage writes to dst[:len(x)] (reallocated when short) the mean
// of x over w points (w odd) centred on each point, the ends averaging
// over the points present, and returns it. dst must not overlap x.
func MovingAverage(dst, x []float64, w int) []float64 {
	if cap(dst) < len(x) {
		dst = make([]float64, len(x))
	}
	dst = dst[:len(x)]
	h := w / 2
	var acc float64
	cnt := 0
	for j := 0; j < h && j < len(x); j++ {
		acc += x[j]
		cnt++
	}
	for j := range x {
		if k := j + h; k < len(x) {
			acc += x[k]
			cnt++
		}
		if k := j - h - 1; k >= 0 {
			acc -= x[k]
			cnt--
		}
		dst[j] = acc / float64(cnt)
	}
	return dst
}

// inversePerm returns pos with pos[perm[p]] = p: where a transform's
// output holds each bin.
func inversePerm(perm []int32) []int32 {
	pos := make([]int32, len(perm))
	for p, b := range perm {
		pos[b] = int32(p)
	}
	return pos
}
