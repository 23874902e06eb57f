package main

import (
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"runtime"
	"strconv"
	"strings"

	"ssbkit/iq"
	"ssbkit/modem"
	"ssbkit/modem/spectral"
)

const rxUsage = `ssbkit rx CAPTURE -o OUT.wav [--offset HZ[:MODE] | --freq HZ[:MODE]]... [flags]`

const rxExamples = `Tuning: --offset is relative to the capture's centre, --freq is absolute and
needs the centre (SigMF metadata or --center). The tuned frequency is the
(suppressed) carrier for usb/lsb and the carrier for am/sam. Several
channels are decoded in one pass; -o must then contain {freq}, replaced by
the tuned frequency in whole Hz (or the signed offset without a centre).

AGC figures (common practice): slow attack 2 ms, hang 1 s, decay 6 dB/s;
medium 2 ms, 0.3 s, 20 dB/s; fast 2 ms, 0.1 s, 60 dB/s; target peak −6 dBFS.
For usb/lsb the AGC follows the channel's envelope (the complex signal's
magnitude, before detection) rather than the audio's peaks; the audio may
then peak up to about 0.7 dB above the target.
With --agc off the gain is --gain dB (0 = unity: a usb tone of magnitude a
gives audio of amplitude a).

Examples:
  ssbkit rx capture.sigmf-meta --freq 7.0743M -o ssb.wav
  ssbkit rx band.cu8 --rate 2.4M --offset 120k --agc off -o ch.wav
  ssbkit rx band.cu8 --rate 2.4M --offset -300k --offset 120k:lsb --offset 500k:am -o 'ch_{freq}.wav'
  ssbkit rx band.cu8 --rate 2.4M --center 14.2M --auto -o 'auto_{freq}.wav'
  ssbkit rx band.sigmf-meta --freq 7.1405M:lsb --fine-tune --json -o net.wav

--auto reads the capture twice: first to find the signals (as "spectrum
--list": Hann segments, 50 % overlap, at most 256 of them; a longer capture
is sampled by 256 segments spread evenly over it, which finds the same
signals at a fraction of the cost of averaging every sample; SSB carriers
then placed from the voice over the first 10 s), then to decode them. Signals of unknown kind (a few discrete lines, such as
test tones, whose sideband the spectrum cannot tell) are skipped with a
warning; tune them with --offset HZ:usb or HZ:lsb.

With 16 channels or more (--auto on a busy band, say) the capture is split
once by a channeliser, a polyphase filter bank, and each channel decoded
from its nearest sub-band, at a fraction of the cost of giving every
channel its own first stage; the audio is the same to within the
filters' 80 dB rejection. Fewer channels each have their own.

--fine-tune (on with --auto, off otherwise; --fine-tune=false turns it off)
finds each usb/lsb carrier from the voice itself, within ±300 Hz of the one
given: voiced speech is a series of harmonics of the speaker's pitch, and
the offset that makes the heard lines a harmonic series again, the same
while the pitch moves, is the tuning error. It is estimated in 3 s windows,
1 s apart, and removed before the channel filter by a correction that
moves smoothly from window to window, so a drifting station is followed
without clicks; the audio stays aligned with the capture and as long. The
summary (and --json) gives the correction at the start and end and the
largest, in Hz (true carrier minus tuned). A channel without voiced speech
(noise, tones, one held pitch) keeps its carrier, with a warning; am and
sam channels are not affected.`

// minBandwidth is the narrowest --bandwidth: narrower than any voice or
// AM channel, and the channel filter's length grows as its inverse (0.01 Hz
// took minutes to design).
const minBandwidth = 100

// rxChannel is one channel requested on the command line.
type rxChannel struct {
	offset float64 // from the capture centre
	label  string  // the {freq} replacement
	cfg    modem.RxConfig
}

func runRx(e *env, args []string) error {
	fs := newFlagSet(e, "rx", rxUsage, rxExamples)
	out := fs.StringP("output", "o", "", "output WAV file (mono 16-bit); {freq} is replaced per channel")
	var offsets, freqs []string
	fs.StringArrayVar(&offsets, "offset", nil, "channel offset from the capture centre in Hz, HZ or HZ:MODE (repeatable)")
	fs.StringArrayVar(&freqs, "freq", nil, "absolute channel frequency in Hz, HZ or HZ:MODE (repeatable; needs the centre)")
	mode := fs.String("mode", "usb", "demodulation: usb, lsb, am, sam")
	bw := fs.String("bandwidth", "", "audio bandwidth in Hz (default 2700 usb/lsb with a 300 Hz low edge, 5000 am/sam)")
	agc := fs.String("agc", "medium", "automatic gain control: off, slow, medium, fast")
	gain := fs.Float64("gain", 0, "fixed gain in dB with --agc off (0 = unity)")
	ar := fs.String("audio-rate", "48k", "audio sample rate in Hz (default 48k, or the capture's rate when that is lower)")
	auto := fs.Bool("auto", false, "decode every signal that signal detection finds (as `spectrum --list`)")
	fine := fs.Bool("fine-tune", false, "find each usb/lsb carrier from the voice (within ±300 Hz) and follow its drift (default on with --auto)")
	asJSON := fs.Bool("json", false, "print what was decoded as JSON on standard output")
	force := fs.Bool("force", false, "overwrite existing outputs")
	quiet := fs.BoolP("quiet", "q", false, "no progress bar and no summary")
	cf := addCaptureFlags(fs)
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() != 1 {
		return usagef("need exactly one capture (got %d arguments)", fs.NArg())
	}
	in := fs.Arg(0)
	if *out == "" {
		return usagef("no output path given (-o OUT.wav)")
	}
	if err := needFile("-o", *out); err != nil {
		return err
	}
	defMode, err := modem.ParseMode(*mode)
	if err != nil {
		return usagef("--mode: %v", err)
	}
	agcMode, err := modem.ParseAGC(*agc)
	if err != nil {
		return usagef("--agc: %v", err)
	}
	if *gain != 0 && agcMode != modem.AGCOff {
		return usagef("--gain needs --agc off")
	}
	audioRate, err := iq.ParseFrequency(*ar)
	if err != nil || !(audioRate >= 8000) || audioRate > 384000 || audioRate != math.Trunc(audioRate) {
		return usagef("--audio-rate: want a whole number of Hz from 8k to 384k, got %q", *ar)
	}
	var bandwidth float64
	if *bw != "" {
		if bandwidth, err = iq.ParseFrequency(*bw); err != nil || !(bandwidth >= minBandwidth) {
			return usagef("--bandwidth %s: want an audio bandwidth of at least %d Hz", *bw, minBandwidth)
		}
	}
	if *auto && (len(offsets) > 0 || len(freqs) > 0) {
		return usagef("--auto and --offset/--freq exclude each other")
	}
	if *auto && !fs.Changed("fine-tune") {
		*fine = true
	}
	if !*auto && len(offsets) == 0 && len(freqs) == 0 {
		offsets = []string{"0"}
	}

	src, err := openCapture(e, in, cf)
	if err != nil {
		return err
	}
	defer src.Close()
	meta := src.Meta()

	var chans []rxChannel
	add := func(spec string, absolute bool) error {
		f, m, err := parseChannelSpec(spec, defMode)
		if err != nil {
			if absolute {
				return usagef("--freq %s: %v", spec, err)
			}
			return usagef("--offset %s: %v", spec, err)
		}
		off := f
		if absolute {
			if !meta.HasCenter {
				return usagef("--freq %s: the capture's centre frequency is unknown (give --center or use --offset)", spec)
			}
			off = f - meta.Center
		}
		chans = append(chans, rxChannel{offset: off, cfg: modem.RxConfig{Mode: m}})
		return nil
	}
	for _, s := range offsets {
		if err := add(s, false); err != nil {
			return err
		}
	}
	for _, s := range freqs {
		if err := add(s, true); err != nil {
			return err
		}
	}
	if *auto {
		if in == "-" {
			return usagef("--auto needs a file: it reads the capture twice")
		}
		found, undecided, err := detectChannels(e, in, cf, *quiet)
		if err != nil {
			return err
		}
		if len(found) == 0 && len(undecided) > 0 {
			u := undecided[0]
			return fmt.Errorf("%s: signal detection found nothing to decode: the signal at %+.0f…%+.0f Hz has no carrier or speech-like spectrum to tell its sideband (test tones?); give --offset HZ:usb or HZ:lsb", in, u.LowHz, u.HighHz)
		}
		if len(found) == 0 {
			return fmt.Errorf("%s: signal detection found nothing to decode", in)
		}
		for _, u := range undecided {
			fmt.Fprintf(e.stderr, "ssbkit: rx: warning: skipping the signal at %+.0f…%+.0f Hz: its sideband cannot be told (test tones?)\n", u.LowHz, u.HighHz)
		}
		chans = found
		src.Close()
		if src, err = reopenCapture(e, in, cf); err != nil {
			return err
		}
		defer src.Close()
	}
	if len(chans) > 1 && !strings.Contains(*out, "{freq}") {
		return usagef("-o %s: with %d channels the output name must contain {freq}", *out, len(chans))
	}
	if !fs.Changed("audio-rate") && meta.Rate < audioRate && meta.Rate >= 8000 && meta.Rate == math.Trunc(meta.Rate) {
		// A receiver's audio recorded at 44.1 kHz, say: keep its rate
		// rather than refuse the default.
		audioRate = meta.Rate
	}
	cfgs := make([]modem.RxConfig, len(chans))
	targets := make([]string, len(chans))
	seen := map[string]bool{}
	for i := range chans {
		c := &chans[i]
		c.cfg.Rate = meta.Rate
		c.cfg.Offset = c.offset
		c.cfg.AudioRate = audioRate
		c.cfg.AGC = agcMode
		c.cfg.GainDB = *gain
		if bandwidth > 0 {
			c.cfg.High = bandwidth
		}
		if meta.HasCenter {
			c.label = strconv.FormatInt(int64(math.Round(meta.Center+c.offset)), 10)
		} else {
			c.label = fmt.Sprintf("%+d", int64(math.Round(c.offset)))
		}
		if *fine {
			if c.cfg.Mode == modem.USB || c.cfg.Mode == modem.LSB {
				c.cfg.FineTune = true
			} else if fs.Changed("fine-tune") {
				e.warnf("--fine-tune: the %s channel at %s Hz keeps its carrier (fine tuning is for usb and lsb voices)", c.cfg.Mode, c.label)
			}
		}
		if meta.Real && c.cfg.Mode != modem.AM && c.cfg.Mode != modem.SAM && c.offset < 0 {
			return fmt.Errorf("%s is a real recording: offsets are positive audio frequencies, not %g Hz", in, c.offset)
		}
		cfgs[i] = c.cfg
		targets[i] = strings.ReplaceAll(*out, "{freq}", c.label)
		if seen[targets[i]] {
			return usagef("two channels write %s", targets[i])
		}
		seen[targets[i]] = true
	}
	rcv, err := modem.NewReceiver(cfgs)
	if errors.Is(err, modem.ErrFineTune) {
		// a channel too narrow for the search, say: decode untuned
		e.warnf("--fine-tune: %v; the given carriers are kept", strings.TrimPrefix(err.Error(), "fine tuning: "))
		for i := range cfgs {
			cfgs[i].FineTune = false
		}
		rcv, err = modem.NewReceiver(cfgs)
	}
	if err != nil {
		return channelError(err, meta, chans)
	}

	files := make([]*outFile, len(chans))
	defer func() {
		for _, f := range files {
			if f != nil {
				f.Abort()
			}
		}
	}()
	writers := make([]*wavMono, len(chans))
	sinks := make([]func([]float32) error, len(chans))
	for i := range chans {
		f, err := createOutput(targets[i], *force, in)
		if err != nil {
			return err
		}
		files[i] = f
		w, err := newWAVMono(f, int(audioRate))
		if err != nil {
			return fmt.Errorf("%s: %w", targets[i], err)
		}
		w.size = max(wavMinFlush, min(wavFlush, wavBuffers/len(chans)))
		writers[i] = w
		t := targets[i]
		sinks[i] = func(a []float32) error {
			if err := w.Write(a); err != nil {
				return fmt.Errorf("%s: %w", t, unwrapPath(err))
			}
			return nil
		}
	}
	bar := newProgress(e, *quiet, "rx", meta.Samples)
	rcv.Progress = bar.Add
	if raw, size, dec := rawData(in, meta); raw != nil {
		err = rcv.RunRaw(raw, size, dec, sinks)
		raw.Close()
	} else {
		err = rcv.Run(src, sinks)
	}
	bar.Done()
	if err != nil {
		return err
	}
	for i := range chans {
		if err := writers[i].Close(); err != nil {
			return fmt.Errorf("%s: %w", targets[i], unwrapPath(err))
		}
	}
	for i, f := range files {
		if err := f.Commit(); err != nil {
			return err
		}
		files[i] = nil
	}
	if !*quiet {
		if b := rcv.Channeliser(); b != nil {
			fmt.Fprintf(e.stderr, "rx: %d channels through one channeliser: %d sub-bands %.0f Hz apart, each at %.0f Hz\n",
				len(chans), b.Bands(), meta.Rate/float64(b.Bands()), b.OutRate())
		}
		for i, c := range rcv.Channels() {
			cfg := c.Config()
			fmt.Fprintf(e.stderr, "rx: %s: %s %s at %s Hz, %d audio samples", targets[i], cfg.Mode, bandText(cfg), chans[i].label, writers[i].n)
			if t := c.FineTuner(); t != nil && t.Report().Accepted > 0 {
				r := t.Report()
				fmt.Fprintf(e.stderr, ", carrier corrected by %+.1f Hz at the start, %+.1f Hz at the end, %+.1f Hz at most (%d of %d windows)",
					r.Start, r.End, r.Largest, r.Accepted, r.Windows)
			}
			if writers[i].clipped > 0 {
				fmt.Fprintf(e.stderr, ", %d samples clipped (lower --gain or use --agc)", writers[i].clipped)
			}
			fmt.Fprintln(e.stderr)
		}
	}
	// Warnings are not silenced by -q.
	for i, c := range rcv.Channels() {
		if *quiet && writers[i].clipped > 0 {
			e.warnf("%s: %d samples clipped", targets[i], writers[i].clipped)
		}
		if s := c.SAM(); s != nil && s.LockTime() < 0 {
			e.warnf("%s: sam found no carrier to lock to; the audio is the unlocked in-phase part", targets[i])
		}
		if t := c.FineTuner(); t != nil && t.Report().Accepted == 0 {
			e.warnf("%s: --fine-tune found no voice to tune by (no voiced speech, or one held pitch); the carrier at %s Hz is kept", targets[i], chans[i].label)
		}
	}
	if *asJSON {
		return writeRxJSON(e.stdout, meta, rcv, chans, targets, writers)
	}
	return nil
}

// rxChannelJSON is one channel of rx --json.
type rxChannelJSON struct {
	Output   string        `json:"output"`
	Mode     string        `json:"mode"`
	OffsetHz float64       `json:"offset_hz"`
	FreqHz   *float64      `json:"freq_hz,omitempty"`
	Samples  int64         `json:"audio_samples"`
	Clipped  int64         `json:"clipped"`
	FineTune *fineTuneJSON `json:"fine_tune,omitempty"`
}

// fineTuneJSON is a channel's carrier correction: the true carrier minus
// the tuned one, Hz.
type fineTuneJSON struct {
	StartHz   float64 `json:"start_hz"`
	EndHz     float64 `json:"end_hz"`
	LargestHz float64 `json:"largest_hz"`
	Windows   int     `json:"windows"`
	Accepted  int     `json:"accepted"`
}

func writeRxJSON(w io.Writer, meta iq.Meta, rcv *modem.Receiver, chans []rxChannel, targets []string, writers []*wavMono) error {
	doc := struct {
		RateHz      float64         `json:"rate_hz"`
		AudioRateHz float64         `json:"audio_rate_hz"`
		Channels    []rxChannelJSON `json:"channels"`
	}{RateHz: meta.Rate}
	for i, c := range rcv.Channels() {
		cfg := c.Config()
		doc.AudioRateHz = cfg.AudioRate
		j := rxChannelJSON{Output: targets[i], Mode: cfg.Mode.String(), OffsetHz: round(chans[i].offset, 1),
			Samples: writers[i].n, Clipped: writers[i].clipped}
		if meta.HasCenter {
			f := round(meta.Center+chans[i].offset, 1)
			j.FreqHz = &f
		}
		if t := c.FineTuner(); t != nil {
			r := t.Report()
			j.FineTune = &fineTuneJSON{StartHz: round(r.Start, 1), EndHz: round(r.End, 1), LargestHz: round(r.Largest, 1),
				Windows: r.Windows, Accepted: r.Accepted}
		}
		doc.Channels = append(doc.Channels, j)
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(doc)
}

func bandText(c modem.RxConfig) string {
	if c.Mode == modem.USB || c.Mode == modem.LSB {
		return fmt.Sprintf("%g–%g Hz", c.Low, c.High)
	}
	return fmt.Sprintf("±%g Hz", c.High)
}

// channelError turns a receiver configuration error into a message naming
// the channel; a channel outside the band says the band.
func channelError(err error, meta iq.Meta, chans []rxChannel) error {
	msg := err.Error()
	if errors.Is(err, modem.ErrOutsideCapture) {
		lo, hi := -meta.Rate/2, meta.Rate/2
		if meta.HasCenter {
			return fmt.Errorf("%s (capture band %.0f…%.0f Hz)", msg, meta.Center+lo, meta.Center+hi)
		}
		return fmt.Errorf("%s (capture band %+.0f…%+.0f Hz around its centre)", msg, lo, hi)
	}
	if errors.Is(err, modem.ErrAudioRate) {
		return usagef("%s", msg)
	}
	return err
}

// parseChannelSpec parses HZ or HZ:MODE.
func parseChannelSpec(s string, def modem.Mode) (float64, modem.Mode, error) {
	m := def
	if i := strings.LastIndexByte(s, ':'); i >= 0 {
		var err error
		if m, err = modem.ParseMode(s[i+1:]); err != nil {
			return 0, 0, err
		}
		s = s[:i]
	}
	f, err := iq.ParseFrequency(s)
	if err != nil {
		return 0, 0, err
	}
	return f, m, nil
}

// autoRefineSeconds is how much of the capture rx --auto reads to place
// SSB carriers by the voice, as spectrum --list does over its first minute
// (spectral.RefineSeconds): a shorter look, since the decode's fine tuning
// follows the carrier through the whole file anyway; it puts the tuned
// frequency (and the file name's {freq}) within a few hertz of the
// carrier instead of up to a hundred off.
const autoRefineSeconds = 10

// autoSegments is the most segments rx --auto transforms to find signals
// (enough that the averaged noise floor is steady to about ±0.3 dB:
// Welch's variance falls as 1/segments, from memory).
const autoSegments = 256

// detectChannels runs signal detection over the capture and returns a
// channel for every usb, lsb and am signal found, and the signals of
// unknown kind (whose sideband the spectrum cannot tell, test tones for
// one), which rx skips with a warning.
func detectChannels(e *env, in string, cf *captureFlags, quiet bool) (found []rxChannel, undecided []spectral.Signal, err error) {
	src, err := reopenCapture(e, in, cf)
	if err != nil {
		return nil, nil, err
	}
	defer src.Close()
	meta := src.Meta()
	n := 1 << 14
	for float64(n) < meta.Rate/20 && n < 1<<18 {
		n *= 2
	}
	// Hann segments with 50 % overlap, as `spectrum` averages, up to
	// autoSegments of them; a longer capture is sampled by that many
	// segments spread evenly over it. Measured on 60 s of 2.4 MS/s cu8
	// (3 signals): averaging every sample found the same signals with
	// SNRs within 0.2 dB and made the whole `rx --auto` 2.3 times as
	// long (1.1 → 2.5 s, CPU 1.4 → 4.1 s on two cores).
	hop := n / 2
	if meta.Samples > int64(autoSegments*hop) {
		hop = int(meta.Samples / autoSegments)
	}
	acc := spectral.NewAccumulatorOptions(n, meta.Rate, spectral.Options{Hop: hop, Workers: runtime.GOMAXPROCS(0)})
	defer acc.Close()
	buf := make([]complex64, 1<<16)
	bar := newProgress(e, quiet, "detect", meta.Samples)
	for {
		k, err := src.Read(buf)
		acc.Add(buf[:k])
		bar.Add(k)
		if err == io.EOF || (err == nil && k == 0) {
			break
		}
		if err != nil {
			bar.Done()
			return nil, nil, err
		}
	}
	bar.Done()
	signals := spectral.Detect(acc.PSD(), meta.Rate, spectral.DetectOptions{})
	if err := refineCarriers(e, in, cf, meta, signals, autoRefineSeconds, quiet); err != nil {
		return nil, nil, err
	}
	for _, s := range signals {
		var m modem.Mode
		switch s.Kind {
		case spectral.KindUSB:
			m = modem.USB
		case spectral.KindLSB:
			m = modem.LSB
		case spectral.KindAM:
			m = modem.AM
		case spectral.KindUnknown:
			undecided = append(undecided, s)
			continue
		default:
			continue
		}
		found = append(found, rxChannel{offset: math.Round(s.OffsetHz), cfg: modem.RxConfig{Mode: m}})
		if !quiet {
			fmt.Fprintf(e.stderr, "rx: found %s at %+.0f Hz (SNR %.1f dB)\n", s.Kind, s.OffsetHz, s.SNRdB)
		}
	}
	return found, undecided, nil
}

// wavMono writes mono 16-bit PCM WAV. Written here rather than with
// go-audio/wav, whose encoder converts sample by sample through
// binary.Write (an allocation per sample); the tests read the files back
// with go-audio/wav.
type wavMono struct {
	w       io.WriteSeeker
	rate    int
	buf     []byte // quantised samples not yet written, up to size bytes
	size    int    // bytes per write
	n       int64  // samples written
	clipped int64  // samples beyond full scale, clamped
	err     error
}

// wavFlush is the size of wavMono's writes: a few per second of audio
// rather than one per decoded block (a system call each). With many
// channels the writers share wavBuffers bytes (down to wavMinFlush each),
// so that the pending audio of 256 channels stays a few MB.
const (
	wavFlush    = 1 << 16
	wavMinFlush = 1 << 14
	wavBuffers  = 4 << 20
)

func newWAVMono(w io.WriteSeeker, rate int) (*wavMono, error) {
	m := &wavMono{w: w, rate: rate, size: wavFlush}
	if _, err := w.Write(m.header(0)); err != nil {
		return nil, unwrapPath(err)
	}
	return m, nil
}

// header returns the 44-byte RIFF/WAVE header for n samples.
func (m *wavMono) header(n int64) []byte {
	h := make([]byte, 44)
	data := uint32(min(n*2, math.MaxUint32-36))
	copy(h[0:], "RIFF")
	binary.LittleEndian.PutUint32(h[4:], 36+data)
	copy(h[8:], "WAVEfmt ")
	binary.LittleEndian.PutUint32(h[16:], 16)
	binary.LittleEndian.PutUint16(h[20:], 1) // PCM
	binary.LittleEndian.PutUint16(h[22:], 1) // mono
	binary.LittleEndian.PutUint32(h[24:], uint32(m.rate))
	binary.LittleEndian.PutUint32(h[28:], uint32(m.rate*2))
	binary.LittleEndian.PutUint16(h[32:], 2)
	binary.LittleEndian.PutUint16(h[34:], 16)
	copy(h[36:], "data")
	binary.LittleEndian.PutUint32(h[40:], data)
	return h
}

// Write quantises a (full scale ±1 to ±32767, iq.QuantizeS16) to 16
// bits, clamping and counting samples beyond full scale (NaN among them),
// and writes them once m.size bytes are pending (Close writes the
// rest). An error is sticky.
func (m *wavMono) Write(a []float32) error {
	if m.err != nil {
		return m.err
	}
	if len(m.buf)+2*len(a) > m.size && len(m.buf) > 0 {
		if err := m.flush(); err != nil {
			return err
		}
	}
	k := len(m.buf)
	if cap(m.buf)-k < 2*len(a) {
		nb := make([]byte, k, max(m.size, k+2*len(a)))
		copy(nb, m.buf)
		m.buf = nb
	}
	c, nf := iq.QuantizeS16(m.buf[k:k+2*len(a)], a, 32767)
	m.clipped += int64(c + nf)
	m.buf = m.buf[:k+2*len(a)]
	m.n += int64(len(a))
	if len(m.buf) >= m.size {
		return m.flush()
	}
	return nil
}

// flush writes the pending samples.
func (m *wavMono) flush() error {
	if m.err != nil {
		return m.err
	}
	if len(m.buf) > 0 {
		if _, err := m.w.Write(m.buf); err != nil {
			m.err = err
			return err
		}
		m.buf = m.buf[:0]
	}
	return nil
}

// Close writes the final sizes into the header.
func (m *wavMono) Close() error {
	if err := m.flush(); err != nil {
		return err
	}
	if m.n*2 > math.MaxUint32-36 {
		return errors.New("audio longer than a WAV file can hold (4 GiB)")
	}
	if _, err := m.w.Seek(0, io.SeekStart); err != nil {
		return err
	}
	if _, err := m.w.Write(m.header(m.n)); err != nil {
		return err
	}
	_, err := m.w.Seek(0, io.SeekEnd)
	return err
}

// rawData opens the sample data of a raw or SigMF capture file for
// Receiver.RunRaw, which decodes on its worker goroutines instead of the
// reading goroutine (iq.Source decodes as it reads, which caps a
// one-channel decode at the speed of one core). It returns nil for other
// captures, which go through iq.Source.
func rawData(in string, meta iq.Meta) (io.ReadCloser, int, func([]complex64, []byte)) {
	if in == "-" || meta.Real {
		return nil, 0, nil
	}
	path := in
	switch meta.Container {
	case iq.ContainerRaw:
	case "sigmf":
		_, path = iq.SigMFPaths(in)
	default:
		return nil, 0, nil
	}
	size, dec := rawDecoder(meta.Datatype)
	if dec == nil {
		return nil, 0, nil
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, 0, nil
	}
	if meta.Samples >= 0 {
		return struct {
			io.Reader
			io.Closer
		}{io.LimitReader(f, meta.Samples*int64(size)), f}, size, dec
	}
	return f, size, dec
}

// rawDecoder returns the sample size and the decoder (iq.DecodeComplex)
// of a complex datatype, or nil for a real or unknown one.
func rawDecoder(dt iq.Datatype) (int, func([]complex64, []byte)) {
	if !dt.Valid() || dt.IsReal() {
		return 0, nil
	}
	size := dt.SampleSize()
	return size, func(dst []complex64, b []byte) {
		iq.DecodeComplex(dst, b[:len(dst)*size], dt)
	}
}
