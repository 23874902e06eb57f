package main

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"runtime"
	"text/tabwriter"

	"gonum.org/v1/plot/vg"

	"ssbkit/iq"
	"ssbkit/modem/spectral"
)

const spectrumUsage = `ssbkit spectrum CAPTURE -o OUT.png [--list | --json] [flags]`

const spectrumExamples = `The picture shows the spectrum averaged over the whole capture and, below
it, a waterfall (time downwards) with a dBFS/Hz colour bar. The frequency
axis is absolute when the centre frequency is known (SigMF metadata or
--center), else an offset from the centre.

--list and --json print the signals found: the noise floor is a low
quantile of the smoothed spectrum (but no lower than 100 dB under its
strongest bin, so that a noiseless synthetic file does not list every
rounding spur), bins 8 dB (--threshold) above it are
occupied, nearby runs are grouped, each group's edges leave out the
window's skirts of its stronger bins (so a clean tone is listed about
two bins wide), and each group gets a kind from its
shape (usb, lsb, am, carrier, unknown). offset_hz is the estimated carrier.
For SSB it is then found from the voice itself: a second pass over the
first minute of the capture tunes each usb/lsb channel by the harmonics of
the speaker's pitch, in 3 s windows (offset_hz: the median of the windows
that gave an estimate; tuning_confidence: 0–1, the mean window confidence,
0 when the voice gave none). edge_offset_hz keeps the first estimate, 300 Hz
(the usual low audio edge, common practice) outside the steep edge of the
voice spectrum; without voiced speech (or from standard input, which
cannot be read twice) offset_hz stays there. A picture alone (no --list
or --json) skips that second pass and marks the first estimates. Frequencies are offsets from
the capture centre; freq_hz is absolute when the centre is known.

The average is a Welch average over every sample of the capture (Hann
window, 50 % overlap), streamed in bounded memory on all cores. --fast
instead transforms at most 16 M samples' worth of segments spread evenly
over a longer capture: a quick look at very long recordings, a sampled
average rather than a full one (its noise floor is less smooth and a
short burst between segments is missed).

Examples:
  ssbkit spectrum band.sigmf-meta -o band.png
  ssbkit spectrum capture.cu8 --rate 2.4M --center 7.1M -o wide.png --list
  ssbkit spectrum audio-if.wav --json --resolution 10
  ssbkit spectrum hour.cu8 --rate 2.4M --fast -o hour.png`

// fftBudget is the number of samples --fast transforms, however long the
// capture (segments are then spread evenly over it).
const fftBudget = 16 << 20

// maxPicture bounds --width and --height in points: 4000 points draw
// 5333 pixels at vgimg's 96 dpi, 114 MB of image at the largest.
const maxPicture = 4000

// minSpectrumBins is the fewest FFT bins --resolution may ask for; fewer
// show no spectrum worth the name.
const minSpectrumBins = 16

func runSpectrum(e *env, args []string) error {
	fs := newFlagSet(e, "spectrum", spectrumUsage, spectrumExamples)
	out := fs.StringP("output", "o", "", "PNG picture to write")
	force := fs.Bool("force", false, "overwrite an existing output")
	list := fs.Bool("list", false, "print the detected signals as a table")
	asJSON := fs.Bool("json", false, "print the detected signals as JSON")
	resS := fs.String("resolution", "50", "largest FFT bin spacing in Hz (sets the FFT length, a power of two)")
	rows := fs.Int("rows", 300, "about this many waterfall rows (between it and twice it)")
	thr := fs.Float64("threshold", 8, "detection threshold in dB above the noise floor")
	fast := fs.Bool("fast", false, "sample at most 16 M samples' worth of segments spread over a long capture instead of averaging all")
	width := fs.Int("width", 1200, "picture width in points")
	height := fs.Int("height", 900, "picture height in points")
	quiet := fs.BoolP("quiet", "q", false, "no progress bar")
	cf := addCaptureFlags(fs)
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() != 1 {
		return usagef("want one CAPTURE argument, got %d", fs.NArg())
	}
	if *out == "" && !*list && !*asJSON {
		return usagef("nothing to do: give -o OUT.png, --list or --json")
	}
	if *list && *asJSON {
		return usagef("--list and --json exclude each other")
	}
	res, err := iq.ParseFrequency(*resS)
	if err != nil || !(res > 0) {
		return usagef("--resolution %q: want a positive frequency in Hz", *resS)
	}
	if !(*thr > 0 && *thr <= 100) {
		// 0 would also read as "the default" to spectral.DetectOptions
		return usagef("--threshold %g: want a level above 0 and at most 100 dB", *thr)
	}
	if *rows < 1 || *rows > 4000 {
		return usagef("--rows %d: want 1…4000", *rows)
	}
	if *width < 200 || *height < 200 || *width > maxPicture || *height > maxPicture {
		return usagef("--width %d, --height %d: want 200 to %d points each", *width, *height, maxPicture)
	}
	in := fs.Arg(0)
	if err := needFile("-o", *out); err != nil {
		return err
	}
	if *out != "" {
		if err := checkOutput(*out, *force, in); err != nil {
			return err
		}
	}
	src, err := openCapture(e, in, cf)
	if err != nil {
		return err
	}
	defer src.Close()
	meta := src.Meta()
	if res > meta.Rate/minSpectrumBins {
		return usagef("--resolution %s: coarser than the capture allows (at most rate/%d = %.4g Hz for %.10g Hz)", *resS, minSpectrumBins, meta.Rate/minSpectrumBins, meta.Rate)
	}
	n := spectral.FFTSizeFor(meta.Rate, res)
	if meta.Samples >= 0 && meta.Samples < int64(n) {
		coarser := meta.Rate / float64(max(2, prevPow2(int(meta.Samples))))
		return fmt.Errorf("%s: %d samples (%.3g s) are too few for a resolution of %g Hz, which needs %d: use --resolution %.3g or coarser",
			in, meta.Samples, float64(meta.Samples)/meta.Rate, res, n, coarser)
	}
	hop := n / 2
	if *fast && meta.Samples > fftBudget {
		segs := max(1, fftBudget/n)
		hop = max(hop, int(meta.Samples/int64(segs)))
	}
	wf := spectral.NewWaterfall(n, meta.Rate, *rows, min(n, 1024), spectral.Options{Hop: hop, Workers: runtime.GOMAXPROCS(0)})
	defer wf.Close()
	bar := newProgress(e, *quiet, "spectrum", meta.Samples)
	var total int64
	if err := readAll(src, bar, func(x []complex64) {
		wf.Add(x)
		total += int64(len(x))
	}); err != nil {
		return err
	}
	acc := wf.Accumulator()
	if acc.Segments() == 0 {
		return fmt.Errorf("%s: %d samples are too few for a resolution of %g Hz, which needs %d: use a coarser --resolution",
			in, total, res, n)
	}
	spec := acc.Spectrum()
	dopt := spectral.DetectOptions{ThresholdDB: *thr}
	signals := spectral.Detect(spec.Density, meta.Rate, dopt)
	floor := spectral.DetectionFloor(spec.Density, meta.Rate, dopt)
	// Only a listing needs the refined SSB carriers: on the picture a
	// marker moves by at most a few hundred hertz, so a picture alone
	// skips the second pass.
	if *list || *asJSON {
		if err := refineCarriers(e, in, cf, meta, signals, 0, *quiet); err != nil {
			return err
		}
	}

	if *out != "" {
		f, err := createOutput(*out, *force, in)
		if err != nil {
			return err
		}
		defer f.Abort()
		rowsP := wf.Rows()
		pic := &spectrumPicture{
			name: filepath.Base(in), spec: spec, rows: rowsP, rowSeconds: wf.RowSeconds(),
			lastRow: wf.LastRowSeconds(), axis: newFreqAxis(meta.Center, meta.HasCenter, meta.Rate),
			floor: floor, signals: signals,
		}
		if err := writeSpectrumPNG(f, pic, vg.Length(*width), vg.Length(*height)); err != nil {
			return fmt.Errorf("%s: %w", *out, err)
		}
		if err := f.Commit(); err != nil {
			return err
		}
	}
	switch {
	case *asJSON:
		return writeSignalsJSON(e.stdout, meta, floor, *thr, signals)
	case *list:
		return writeSignalsList(e.stdout, meta, floor, *thr, signals)
	}
	return nil
}

// readAhead reads a capture on its own goroutine, a few blocks ahead of
// the caller, so that reading and decoding the file overlap the work on
// the blocks already read.
type readAhead struct {
	full   chan readBlock
	free   chan []complex64
	done   chan struct{}
	exited chan struct{}
}

type readBlock struct {
	x   []complex64
	err error
}

// newReadAhead starts reading src in blocks of size samples, at most
// depth blocks ahead.
func newReadAhead(src interface {
	Read([]complex64) (int, error)
}, size, depth int) *readAhead {
	r := &readAhead{
		full: make(chan readBlock, depth), free: make(chan []complex64, depth),
		done: make(chan struct{}), exited: make(chan struct{}),
	}
	for range depth {
		r.free <- make([]complex64, size)
	}
	go func() {
		defer close(r.exited)
		defer close(r.full)
		for {
			var buf []complex64
			select {
			case buf = <-r.free:
			case <-r.done:
				return
			}
			k, err := src.Read(buf[:cap(buf)])
			select {
			case r.full <- readBlock{buf[:k], err}:
			case <-r.done:
				return
			}
			if err != nil {
				return
			}
		}
	}()
	return r
}

// next returns the next block with the error the read ended on (io.EOF
// at the end of the capture). The block is the caller's until release.
func (r *readAhead) next() ([]complex64, error) {
	b, ok := <-r.full
	if !ok {
		return nil, io.EOF
	}
	return b.x, b.err
}

// release hands a block from next back for reuse.
func (r *readAhead) release(x []complex64) { r.free <- x[:cap(x)] }

// stop ends the reading and waits for the reader to leave the source.
func (r *readAhead) stop() {
	close(r.done)
	<-r.exited
}

// readAll reads src to the end with a read-ahead goroutine, handing each
// block to f (on this goroutine) and counting it on bar, which it closes.
// It returns the first read error other than io.EOF.
func readAll(src interface {
	Read([]complex64) (int, error)
}, bar *progress, f func([]complex64)) error {
	defer bar.Done()
	ra := newReadAhead(src, 1<<16, 4)
	defer ra.stop()
	for {
		x, err := ra.next()
		f(x)
		bar.Add(len(x))
		ra.release(x)
		if err == io.EOF {
			return nil
		}
		if err != nil {
			return err
		}
	}
}

// refineCarriers tunes the usb and lsb signals by their voices
// (spectral.CarrierRefiner) in a second pass over the first seconds of
// the capture (spectral.RefineSeconds when 0). Standard input cannot be
// read twice: the edge estimates stay, with a warning.
func refineCarriers(e *env, in string, cf *captureFlags, meta iq.Meta, signals []spectral.Signal, seconds float64, quiet bool) error {
	r := spectral.NewCarrierRefiner(meta.Rate, signals, seconds)
	if !r.Needed() {
		return nil
	}
	if in == "-" {
		e.warnf("standard input cannot be read twice: SSB carriers are placed from the spectrum's edges (tuning_confidence 0)")
		r.Refine(signals)
		return nil
	}
	src, err := reopenCapture(e, in, cf)
	if err != nil {
		return err
	}
	defer src.Close()
	if seconds <= 0 {
		seconds = spectral.RefineSeconds
	}
	total := int64(math.Ceil(seconds * meta.Rate))
	if meta.Samples >= 0 {
		total = min(total, meta.Samples)
	}
	bar := newProgress(e, quiet, "tune", total)
	defer bar.Done()
	ra := newReadAhead(src, 1<<16, 4)
	defer ra.stop()
	for {
		x, err := ra.next()
		done := r.Write(x)
		bar.Add(len(x))
		ra.release(x)
		if err != nil && err != io.EOF {
			return err
		}
		if done || err == io.EOF {
			break
		}
	}
	r.Refine(signals)
	return nil
}

// prevPow2 returns the largest power of two ≤ n (n ≥ 1).
func prevPow2(n int) int {
	p := 1
	for p*2 <= n {
		p *= 2
	}
	return p
}

// round rounds x to d decimals (for JSON and tables).
func round(x float64, d int) float64 {
	k := math.Pow(10, float64(d))
	return math.Round(x*k)/k + 0 // + 0 turns −0 into 0
}

type signalJSON struct {
	OffsetHz   float64  `json:"offset_hz"`
	FreqHz     *float64 `json:"freq_hz,omitempty"`
	LowHz      float64  `json:"low_hz"`
	HighHz     float64  `json:"high_hz"`
	SNRdB      float64  `json:"snr_db"`
	Kind       string   `json:"kind"`
	EdgeHz     *float64 `json:"edge_offset_hz,omitempty"`
	Confidence *float64 `json:"tuning_confidence,omitempty"`
}

func signalsJSON(meta iq.Meta, signals []spectral.Signal) []signalJSON {
	out := make([]signalJSON, 0, len(signals))
	for _, s := range signals {
		j := signalJSON{
			OffsetHz: round(s.OffsetHz, 1), LowHz: round(s.LowHz, 1), HighHz: round(s.HighHz, 1),
			SNRdB: round(s.SNRdB, 1), Kind: s.Kind,
		}
		if meta.HasCenter {
			f := round(meta.Center+s.OffsetHz, 1)
			j.FreqHz = &f
		}
		if s.Kind == spectral.KindUSB || s.Kind == spectral.KindLSB {
			edge, conf := round(s.EdgeOffsetHz, 1), round(s.TuningConfidence, 2)
			j.EdgeHz, j.Confidence = &edge, &conf
		}
		out = append(out, j)
	}
	return out
}

func writeSignalsJSON(w io.Writer, meta iq.Meta, floor, thr float64, signals []spectral.Signal) error {
	doc := struct {
		RateHz     float64      `json:"rate_hz"`
		CenterHz   *float64     `json:"center_hz,omitempty"`
		NoiseDBFS  float64      `json:"noise_dbfs_per_hz"`
		ThreshDB   float64      `json:"threshold_db"`
		SignalList []signalJSON `json:"signals"`
	}{RateHz: meta.Rate, NoiseDBFS: round(spectral.DB(floor), 2), ThreshDB: thr, SignalList: signalsJSON(meta, signals)}
	if meta.HasCenter {
		c := meta.Center
		doc.CenterHz = &c
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(doc)
}

func writeSignalsList(w io.Writer, meta iq.Meta, floor, thr float64, signals []spectral.Signal) error {
	fmt.Fprintf(w, "noise floor %.1f dBFS/Hz, threshold %.1f dB above it: %d signal(s)\n", spectral.DB(floor), thr, len(signals))
	if len(signals) == 0 {
		return nil
	}
	tw := tabwriter.NewWriter(w, 0, 4, 2, ' ', tabwriter.AlignRight)
	head := "offset_hz\t"
	if meta.HasCenter {
		head += "freq_hz\t"
	}
	fmt.Fprintln(tw, head+"low_hz\thigh_hz\tsnr_db\tkind\tedge_offset_hz\ttuning_confidence\t")
	for _, s := range signals {
		row := fmt.Sprintf("%.1f\t", s.OffsetHz)
		if meta.HasCenter {
			row += fmt.Sprintf("%.1f\t", meta.Center+s.OffsetHz)
		}
		tune := "-\t-\t"
		if s.Kind == spectral.KindUSB || s.Kind == spectral.KindLSB {
			tune = fmt.Sprintf("%.1f\t%.2f\t", s.EdgeOffsetHz, s.TuningConfidence)
		}
		fmt.Fprintf(tw, "%s%.1f\t%.1f\t%.1f\t%s\t%s\n", row, s.LowHz, s.HighHz, s.SNRdB, s.Kind, tune)
	}
	return tw.Flush()
}
