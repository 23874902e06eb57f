package main

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strings"

	"ssbkit/hilbert"
	"ssbkit/iq"
	"ssbkit/modem"
)

const txUsage = `ssbkit tx [AUDIO.wav] -o OUT [flags]
  ssbkit tx --tone HZ | --two-tone HZ,HZ [--seconds S] -o OUT [flags]`

const txExamples = `The output format follows OUT's extension: .cf32 .raw .cs16 .ci16 .cs8 .ci8
.cu8, .wav (two channels, I left, Q right; 32-bit float) or .sigmf-meta /
.sigmf-data (both files; the metadata records the rate, --center and an
annotation with the occupied band and the mode). "-" writes cf32 to
standard output. PEP, average power and their ratio are printed on stderr.

Level: by default the peak envelope is normalised to --peak dBFS; --gain DB
gives a fixed gain instead (0 = unity: an audio tone of amplitude a becomes,
in usb, a complex exponential of magnitude a at +f above the carrier).
Test tones have amplitude 1 (--tone) or 0.5 each (--two-tone) before the
level is set.

--bits B quantises the phase splitter's coefficients to signed B-bit
fractions (see "ssbkit splitter --help"; the all-pass pair then also
runs in integer arithmetic), so the file shows what firmware with such
coefficients would send; the predicted suppression of the exact and the
quantised splitter are both reported.

CAUTION: these files are for test and licensed use. Transmitting one needs
the right licence and band; check the spectral purity of the file (for
example with "ssbkit measure" and "ssbkit spectrum") before putting it on
the air. Local regulations and licensed practice take precedence over
anything here.

Examples:
  ssbkit tx voice.wav -o voice_usb.cf32
  ssbkit tx voice.wav --mode lsb --rate 2.4M --offset 100k -o lsb.cu8
  ssbkit tx --two-tone 700,1900 --seconds 10 -o twotone.sigmf-meta --center 7.1M
  ssbkit tx --tone 1k --mode am --depth 0.5 -o am.wav
  ssbkit tx voice.wav --design allpass --sections 6 --carrier -20 -o r3e.cs16
  ssbkit tx voice.wav --method weaver --band 200:3000 --gain 0 -o weaver.cf32`

// outOfBandDB is how far the band-limited audio's peak may sit below the
// file's before tx warns that the audio lies mostly outside --band. Voice
// loses a few dB to a 300–2700 Hz band (common practice); a tone outside
// the band keeps only the clicks of its start and end, some 15–20 dB
// down (a 5 kHz tone at 22.05 kHz, measured).
const outOfBandDB = 12

// maxToneSeconds caps --seconds: an hour of test tones is 1.4 GB of
// cf32 at 48 kHz and far more at receiver rates; a longer run is more
// likely a slip of the keyboard than a need.
const maxToneSeconds = 3600

// txBlock is the number of audio samples modulated at a time.
const txBlock = 1024

// txReport is the summary printed when done (text on stderr, or JSON on
// stdout with --json).
type txReport struct {
	Output          string  `json:"output"`
	Mode            string  `json:"mode"`
	RateHz          float64 `json:"rate_hz"`
	Samples         int64   `json:"samples"`
	DurationS       float64 `json:"duration_s"`
	PEPdBFS         float64 `json:"pep_dbfs"`
	AverageDBFS     float64 `json:"average_dbfs"`
	PEPToAverageDB  float64 `json:"pep_to_average_db"`
	SuppressionDB   float64 `json:"predicted_suppression_db,omitempty"`
	Bits            int     `json:"bits,omitempty"`
	QuantizedDB     float64 `json:"quantized_suppression_db,omitempty"`
	GainDB          float64 `json:"gain_db"`
	InternalRateHz  float64 `json:"internal_rate_hz"`
	CarrierOffsetHz float64 `json:"carrier_offset_hz"`
}

func runTx(e *env, args []string) error {
	fs := newFlagSet(e, "tx", txUsage, txExamples)
	out := fs.StringP("output", "o", "", "output I/Q file (format from the extension), - for cf32 on stdout")
	tone := fs.String("tone", "", "test tone at HZ instead of audio")
	twoTone := fs.String("two-tone", "", "two equal test tones HZ,HZ instead of audio")
	seconds := fs.Float64("seconds", 10, "length of the test tones in seconds")
	mode := fs.String("mode", "usb", "modulation: usb, lsb, am, dsb")
	method := fs.String("method", "phasing", "SSB method: phasing, weaver")
	design := fs.String("design", modem.DefaultSplitterDesign, "phase splitter: "+strings.Join(hilbert.Designs[:7], ", ")+" (with --band off: allpass, 12 sections)")
	taps := fs.Int("taps", 0, fmt.Sprintf("splitter length: FIR taps (odd), Weaver low-pass taps or FFT block size (default %d, fft 1024, grown until %g dB over the band)", modem.DefaultSplitterTaps, float64(modem.DefaultSuppressionDB)))
	sections := fs.Int("sections", 0, "all-pass sections of both paths together (default 6; as in sweep); implies --design allpass")
	bits := fs.Int("bits", 0, "quantise the splitter's coefficients to signed B-bit fractions (2 to 32)")
	band := fs.String("band", "300:2700", "audio pass band LOW:HIGH in Hz, or off")
	offset := fs.String("offset", "0", "where the (suppressed) carrier sits in the output baseband, Hz")
	rate := fs.String("rate", "48k", "output I/Q sample rate in Hz")
	center := fs.String("center", "", "centre frequency of the capture for SigMF metadata, Hz (7.1M)")
	carrier := fs.Float64("carrier", 0, "usb/lsb carrier level in dB relative to PEP, below 0 (default: suppressed)")
	depth := fs.Float64("depth", 0.8, "AM modulation depth reached at the audio's peak, (0, 1]")
	peak := fs.Float64("peak", -1, "normalise the peak envelope to this level in dBFS")
	gain := fs.Float64("gain", 0, "fixed gain in dB instead of peak normalisation (0 = unity)")
	asJSON := fs.Bool("json", false, "print the report as JSON on stdout")
	force := fs.Bool("force", false, "overwrite an existing output")
	quiet := fs.BoolP("quiet", "q", false, "no progress bar and no report on stderr")
	if err := parseFlags(fs, args); err != nil {
		return err
	}

	// The audio: a file or test tones.
	if fs.NArg() > 1 {
		return usagef("at most one audio file (got %d arguments)", fs.NArg())
	}
	var tones []float64
	switch {
	case *tone != "" && *twoTone != "":
		return usagef("--tone and --two-tone exclude each other")
	case *tone != "":
		f, err := iq.ParseFrequency(*tone)
		if err != nil {
			return usagef("--tone: %v", err)
		}
		tones = []float64{f}
	case *twoTone != "":
		a, b, ok := strings.Cut(*twoTone, ",")
		if !ok {
			return usagef("--two-tone: want HZ,HZ (e.g. 700,1900)")
		}
		fa, err := iq.ParseFrequency(a)
		if err != nil {
			return usagef("--two-tone: %v", err)
		}
		fb, err := iq.ParseFrequency(b)
		if err != nil {
			return usagef("--two-tone: %v", err)
		}
		if fa == fb {
			return usagef("--two-tone: the two tones must differ")
		}
		tones = []float64{fa, fb}
	}
	if len(tones) > 0 && fs.NArg() == 1 {
		return usagef("give either an audio file or test tones, not both")
	}
	if len(tones) == 0 && fs.NArg() == 0 {
		return usagef("no audio: give AUDIO.wav, --tone HZ or --two-tone HZ,HZ")
	}
	if len(tones) == 0 && fs.Changed("seconds") {
		return usagef("--seconds applies to test tones (an audio file has its own length)")
	}
	if len(tones) > 0 && !(*seconds > 0 && *seconds <= maxToneSeconds) {
		return usagef("--seconds %g: want more than 0 and at most %d (an hour of test tones)", *seconds, maxToneSeconds)
	}
	if *out == "" {
		return usagef("no output path given (-o OUT)")
	}
	if *out == "-" && *asJSON {
		return usagef("-o - and --json both write to standard output; choose one")
	}

	// Settings.
	cfg := modem.TxConfig{Mode: *mode, Method: *method}
	switch cfg.Mode {
	case "usb", "lsb", "am", "dsb":
	default:
		return usagef("--mode %q: want usb, lsb, am or dsb", *mode)
	}
	switch cfg.Method {
	case "phasing", "weaver":
	default:
		return usagef("--method %q: want phasing or weaver", *method)
	}
	if cfg.Method == "weaver" && fs.Changed("design") {
		return usagef("--design does not apply to --method weaver (use --taps for its low-pass)")
	}
	cfg.Splitter = hilbert.Spec{Taps: *taps, Sections: *sections}
	if fs.Changed("design") {
		cfg.Splitter.Design = *design
	}
	if *design == "weaver" {
		return usagef("--design weaver: use --method weaver")
	}
	if fs.Changed("taps") && *taps <= 0 || fs.Changed("sections") && *sections <= 0 {
		// 0 would read as "the default" to modem.TxConfig
		return usagef("--taps and --sections: want a positive length")
	}
	// --taps sizes FIR, Weaver and FFT splitters, --sections the all-pass
	// pair: a length for the other kind would be silently dropped.
	switch allpass := cfg.Splitter.Design == "allpass"; {
	case fs.Changed("taps") && fs.Changed("sections"):
		return usagef("--taps and --sections exclude each other (taps for FIR, Weaver and FFT splitters, sections for allpass)")
	case fs.Changed("taps") && allpass:
		return usagef("--taps does not apply to --design allpass (use --sections)")
	case fs.Changed("sections") && (cfg.Method == "weaver" || fs.Changed("design") && !allpass):
		return usagef("--sections applies to --design allpass only (use --taps)")
	case fs.Changed("sections"):
		cfg.Splitter.Design = "allpass" // --sections alone picks the all-pass pair
	}
	if *band != "off" {
		lo, hi, err := iq.ParseBand(*band)
		if err != nil {
			return usagef("--band: %v", err)
		}
		if lo <= 0 {
			return usagef("--band: LOW must be above 0 Hz (or --band off)")
		}
		cfg.BandLow, cfg.BandHigh = lo, hi
	}
	var err error
	if cfg.OutRate, err = parseRate("--rate", *rate); err != nil {
		return err
	}
	if cfg.Offset, err = iq.ParseFrequency(*offset); err != nil {
		return usagef("--offset: %v", err)
	}
	meta := iq.Meta{Rate: cfg.OutRate}
	if *center != "" {
		c, err := iq.ParseFrequency(*center)
		if err != nil {
			return usagef("--center: %v", err)
		}
		meta.Center, meta.HasCenter = c, true
	}
	if fs.Changed("carrier") {
		if cfg.Mode != "usb" && cfg.Mode != "lsb" {
			return usagef("--carrier applies to usb and lsb (am has its carrier, dsb none)")
		}
		if !(*carrier < 0) {
			return usagef("--carrier %g dB: want a level below 0 dB relative to PEP", *carrier)
		}
		cfg.Carrier, cfg.CarrierDB = true, *carrier
	}
	if err := checkBits(fs.Changed("bits"), *bits); err != nil {
		return err
	}
	if *bits != 0 && cfg.Mode != "usb" && cfg.Mode != "lsb" {
		return usagef("--bits applies to usb and lsb (am and dsb use no phase splitter)")
	}
	if fs.Changed("depth") && cfg.Mode != "am" {
		return usagef("--depth applies to --mode am")
	}
	if !(*depth > 0 && *depth <= 1) {
		return usagef("--depth %g: want a value in (0, 1]", *depth)
	}
	cfg.Depth = *depth
	if fs.Changed("peak") && fs.Changed("gain") {
		return usagef("--peak and --gain exclude each other")
	}
	if fs.Changed("peak") && !(*peak <= 0 && *peak > -100) {
		return usagef("--peak %g dBFS: want a level from −100 to 0", *peak)
	}
	if math.IsNaN(*gain) || math.Abs(*gain) > 200 {
		return usagef("--gain %g dB: out of range", *gain)
	}

	// The source, opened twice: a survey of its levels, then the run.
	var input string
	open := func() (modem.AudioSource, func(), error) {
		if len(tones) > 0 {
			amp := 1.0
			if len(tones) == 2 {
				amp = 0.5
			}
			return modem.NewToneSource(tones, amp, 48000, int64(math.Round(*seconds*48000))), func() {}, nil
		}
		// iq's WAV reader names a damaged header's fault precisely.
		if err := iq.CheckWAV(input); err != nil {
			return nil, nil, err
		}
		a, err := modem.OpenAudio(input)
		if err != nil {
			return nil, nil, err
		}
		return a, func() { a.Close() }, nil
	}
	if fs.NArg() == 1 {
		input = fs.Arg(0)
	}
	src, closeSrc, err := open()
	if err != nil {
		return err
	}
	cfg.AudioRate = src.Rate()
	for _, f := range tones {
		if f <= 0 {
			return usagef("test tone %g Hz: want a positive audio frequency", f)
		}
		if cfg.BandHigh > 0 && (f < cfg.BandLow || f > cfg.BandHigh) {
			return usagef("test tone %g Hz lies outside the pass band %g:%g Hz", f, cfg.BandLow, cfg.BandHigh)
		}
		if f >= cfg.OutRate/2 {
			return usagef("test tone %g Hz is above half the output rate (%g Hz)", f, cfg.OutRate/2)
		}
		if f >= cfg.AudioRate/2 {
			return usagef("test tone %g Hz is above half the audio rate (%g Hz)", f, cfg.AudioRate/2)
		}
	}
	top := cfg.BandHigh
	if top == 0 {
		top = 0.45 * cfg.AudioRate
	}
	if math.Abs(cfg.Offset)+top >= cfg.OutRate/2 {
		closeSrc()
		return usagef("--offset %g Hz puts the signal (up to %g Hz from the carrier) beyond the output's Nyquist band ±%g Hz", cfg.Offset, top, cfg.OutRate/2)
	}

	// --bits: the splitter's length is chosen as without it (the default
	// grows on the exact design), then its coefficients are quantised.
	var exactDB float64
	if *bits != 0 {
		m0, err := modem.NewModulator(cfg)
		if err != nil {
			return usagef("%v", err)
		}
		sp := m0.Splitter()
		s := sp.Spec()
		exactDB = hilbert.Analyze(sp, s.Low, s.High).SuppressionMinDB
		cfg.Splitter = hilbert.Spec{Design: s.Design, Taps: s.Taps, Sections: s.Sections, Bits: *bits}
	}

	sv, err := modem.NewSurvey(cfg)
	if err != nil {
		closeSrc()
		return usagef("%v", err)
	}
	buf := make([]float32, 8192)
	var rawPeak float64 // of the audio before the band filter
	for {
		n, err := src.Read(buf)
		if n > 0 {
			sv.Process(buf[:n])
			for _, v := range buf[:n] {
				rawPeak = max(rawPeak, math.Abs(float64(v)))
			}
		}
		if err == io.EOF {
			break
		}
		if err != nil {
			closeSrc()
			return err
		}
	}
	closeSrc()
	sv.Flush()
	cfg.Levels = sv.Levels()
	if cfg.Levels.Peak == 0 || cfg.Levels.EnvelopePeak == 0 {
		// Test tones lie in the band (checked above): only a file is silent.
		if cfg.BandHigh == 0 {
			return fmt.Errorf("%s: the audio is silent", input)
		}
		return fmt.Errorf("%s: the audio is silent within the pass band %g:%g Hz (see --band)", input, cfg.BandLow, cfg.BandHigh)
	}
	if d := 20 * math.Log10(rawPeak/cfg.Levels.Peak); input != "" && d > outOfBandDB {
		// Normalising the peak would lift little but the band filter's
		// leakage and the audio's edges.
		e.warnf("%s: the audio within the pass band %g:%g Hz peaks %.1f dB below the file's peak: most of it lies outside the band (see --band)",
			input, cfg.BandLow, cfg.BandHigh, d)
	}

	// Gain: fixed, or the peak envelope normalised.
	var env float64 // peak envelope at unity gain
	switch cfg.Mode {
	case "usb", "lsb":
		env = cfg.Levels.EnvelopePeak
		if cfg.Carrier {
			k := math.Pow(10, cfg.CarrierDB/20)
			env += k * env / (1 - k)
		}
	case "am":
		env = cfg.Levels.Peak/cfg.Depth + cfg.Levels.Max
	case "dsb":
		env = cfg.Levels.Peak
	}
	if fs.Changed("gain") {
		cfg.Gain = math.Pow(10, *gain/20)
	} else {
		cfg.Gain = math.Pow(10, *peak/20) / env
	}

	m, err := modem.NewModulator(cfg)
	if err != nil {
		return usagef("%v", err)
	}
	cfg = m.Config()

	// Metadata: the occupied band and the mode.
	lo, hi := cfg.BandLow, cfg.BandHigh
	if hi == 0 {
		lo, hi = 100, 0.45*m.InternalRate()
	}
	var edgeLo, edgeHi float64
	switch cfg.Mode {
	case "usb":
		edgeLo, edgeHi = lo, hi
	case "lsb":
		edgeLo, edgeHi = -hi, -lo
	default:
		edgeLo, edgeHi = -hi, hi
	}
	// ITU emission classes: J3E SSB suppressed carrier, A3E double
	// sideband (with or without carrier), R3E/H3E reduced/full carrier.
	emission := map[string]string{"usb": "J3E", "lsb": "J3E", "am": "A3E", "dsb": "A3E"}[cfg.Mode]
	if cfg.Carrier {
		emission = "R3E"
		if cfg.CarrierDB > -6.1 {
			emission = "H3E"
		}
	}
	comment := fmt.Sprintf("ssbkit tx: %s (%s), carrier at %+g Hz from centre", strings.ToUpper(cfg.Mode), emission, cfg.Offset)
	var predictedDB float64 // the splitter's opposite-sideband suppression over the band
	if sp := m.Splitter(); sp != nil {
		a := hilbert.Analyze(sp, lo, hi)
		predictedDB = a.SuppressionMinDB
		s := sp.Spec()
		l := s.Taps
		if s.Design == "allpass" {
			l = s.Sections
		}
		comment += fmt.Sprintf("; %s splitter %s %d, predicted opposite-sideband suppression %.1f dB", cfg.Method, s.Design, l, a.SuppressionMinDB)
		if s.Bits != 0 {
			comment += fmt.Sprintf(" with %d-bit coefficients (exact design %.1f dB)", s.Bits, exactDB)
		}
	}
	meta.Description = comment
	meta.Annotations = []iq.Annotation{{
		SampleStart: 0, SampleCount: 0,
		FreqLowerEdge: meta.Center + cfg.Offset + edgeLo,
		FreqUpperEdge: meta.Center + cfg.Offset + edgeHi,
		Label:         strings.ToUpper(cfg.Mode) + " " + emission,
		Comment:       comment,
	}}

	// The run.
	src, closeSrc, err = open()
	if err != nil {
		return err
	}
	defer closeSrc()
	total := int64(math.Round(float64(src.Frames()) * cfg.OutRate / cfg.AudioRate))
	skip := int64(math.Round(m.Delay()))
	// Carrier phase 0 at the first sample written.
	m.SetCarrierPhase(-2 * math.Pi * math.Mod(cfg.Offset*float64(skip)/cfg.OutRate, 1))
	// With write-behind, this goroutine reads, modulates, measures the
	// level and encodes, and another makes the write system calls (for a
	// 1.15 GB output as costly as all the filtering), so on two cores they
	// overlap. A block of txBlock audio samples (51 200 I/Q samples,
	// 400 kB, at 48 kHz → 2.4 MS/s) stays within a core's L2 cache.
	w, err := openCaptureOut(e.stdout, *out, meta, captureOpts{force: *force, writeBehind: true}, input)
	if err != nil {
		return err
	}
	defer w.Abort()
	bar := newProgress(e, *quiet, "tx", total)
	abuf := make([]float32, txBlock)
	blk := make([]complex64, 0, m.MaxOut(len(abuf)))
	var (
		written int64
		lv      modem.LevelMeter
		werr    error
	)
	// emit trims the delay at the start and the tail beyond the audio's
	// length, measures the kept part and writes it.
	emit := func(y []complex64) {
		d := 0
		if skip > 0 {
			d = int(min(skip, int64(len(y))))
			skip -= int64(d)
		}
		end := len(y)
		if rest := total - written; int64(end-d) > rest {
			end = d + int(rest)
		}
		if end <= d {
			return
		}
		y = y[d:end]
		written += int64(len(y))
		lv.Add(y)
		if werr == nil {
			if _, err := w.Write(y); err != nil {
				werr = fmt.Errorf("%s: %w", outName(*out), err)
			}
			bar.Add(len(y))
		}
	}
	var rerr error
	for rerr == nil && werr == nil {
		var n int
		n, rerr = src.Read(abuf)
		if n > 0 {
			emit(m.Process(blk[:0], abuf[:n]))
		}
	}
	if rerr == io.EOF {
		for written < total && werr == nil {
			before := written
			emit(m.Flush(blk[:0]))
			if written == before && skip == 0 {
				break
			}
		}
	}
	if werr != nil {
		return werr
	}
	if rerr != io.EOF {
		return rerr
	}
	bar.Done()
	if err := w.Commit(); err != nil {
		return err
	}

	rep := txReport{Output: *out, Mode: cfg.Mode, RateHz: cfg.OutRate, Samples: written,
		DurationS: float64(written) / cfg.OutRate, GainDB: 20 * math.Log10(cfg.Gain),
		InternalRateHz: m.InternalRate(), CarrierOffsetHz: cfg.Offset}
	pep := lv.Peak()
	rep.PEPdBFS = 10 * math.Log10(pep)
	rep.AverageDBFS = 10 * math.Log10(lv.Energy()/math.Max(1, float64(written)))
	rep.PEPToAverageDB = rep.PEPdBFS - rep.AverageDBFS
	rep.SuppressionDB = math.Round(10*predictedDB) / 10
	if *bits != 0 {
		// predicted_suppression_db keeps its meaning (the exact design);
		// the file was made with the quantised one.
		rep.Bits, rep.QuantizedDB = *bits, rep.SuppressionDB
		rep.SuppressionDB = math.Round(10*exactDB) / 10
	}
	if *asJSON {
		enc := json.NewEncoder(e.stdout)
		enc.SetIndent("", "  ")
		if err := enc.Encode(rep); err != nil {
			return err
		}
	}
	if !*quiet {
		fmt.Fprintf(e.stderr, "tx: %s %s, %d samples at %g Hz (%.2f s): PEP %.2f dBFS, average %.2f dBFS, PEP-to-average %.2f dB\n",
			*out, strings.ToUpper(cfg.Mode), written, cfg.OutRate, rep.DurationS, rep.PEPdBFS, rep.AverageDBFS, rep.PEPToAverageDB)
		used := rep.SuppressionDB
		if rep.Bits != 0 {
			used = rep.QuantizedDB
			fmt.Fprintf(e.stderr, "tx: splitter with %d-bit coefficients: predicted suppression %.1f dB (exact design %.1f dB)\n", rep.Bits, rep.QuantizedDB, rep.SuppressionDB)
		}
		if used > 0 && used < 60 {
			e.warnf("the splitter's predicted opposite-sideband suppression is only %.1f dB over %g:%g Hz (more --taps, --sections or --bits raise it)", used, lo, hi)
		}
		if pep > 1 {
			e.warnf("PEP above full scale; integer formats clip")
		}
	}
	return nil
}
