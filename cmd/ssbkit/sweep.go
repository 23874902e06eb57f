package main

import (
	"cmp"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"text/tabwriter"

	"ssbkit/hilbert"
	"ssbkit/iq"
)

const sweepUsage = `ssbkit sweep [--designs LIST] [--taps START:STOP:STEP|N,N,…] [--sections START:STOP:STEP] [--rate HZ] [--band LOW:HIGH] [--bits B] [--verify] [--csv FILE] [--plot FILE.png] [--json] [-o PATH]`

const sweepExamples = `Columns: minimum and mean opposite-sideband suppression over the band
(20·log10 |H(f)|/|H(−f)| on a fine grid, minimum right to 0.05 dB),
wanted-sideband ripple (peak to peak), delay, and cost in real
multiply-adds per sample. Length is FIR taps, the Weaver low-pass taps,
the FFT block size, or the number of all-pass sections (one multiply
each; total order 2·sections+1). With --verify a tone at each band edge
and the centre runs through the real streaming filter and the worst
measured suppression is shown beside the prediction (they agree within
1 dB up to about 100 dB; float32 streaming stops near 130 dB). Equiripple
designs level off near 160 dB: past that the Remez exchange runs out of
float64 precision and the design is kept at about 160 dB.

--bits B adds the minimum suppression with the coefficients quantised to
signed B-bit fractions (as splitter --bits does; JSON "quantized_min_db"
in each row and "bits" in the object). The design "analog" is the
continuous-time RC network of "ssbkit analog" with ideal parts, its
length the number of first-order sections (both paths), beside the
digital designs: it has no samples, multiplications or coefficients to
quantise (delay_samples is its group delay counted in samples of --rate,
macs_per_sample 0; it is left out of the plot against cost).

Examples:
  ssbkit sweep
  ssbkit sweep --designs all --taps 7:255:8 --sections 1:10:1 --plot sweep.png
  ssbkit sweep --designs kaiser,equiripple --taps 31,63,127 --rate 48k --band 200:3000 --json
  ssbkit sweep --designs allpass --sections 2:8:1 --verify --csv allpass.csv
  ssbkit sweep --designs equiripple,allpass,analog --taps 31:127:16 --sections 2:10:2 --bits 16`

// sweepRow is one line of the sweep; the JSON keys are DESIGN.md's.
type sweepRow struct {
	Design            string   `json:"design"`
	Length            int      `json:"length"`
	SuppressionMinDB  float64  `json:"suppression_min_db"`
	SuppressionMeanDB float64  `json:"suppression_mean_db"`
	RippleDB          float64  `json:"ripple_db"`
	DelaySamples      float64  `json:"delay_samples"`
	DelayMS           float64  `json:"delay_ms"`
	MACsPerSample     float64  `json:"macs_per_sample"`
	MeasuredMinDB     *float64 `json:"measured_min_db,omitempty"`
	QuantizedMinDB    *float64 `json:"quantized_min_db,omitempty"`
	// tonesDB is the predicted minimum at the --verify tones, for the
	// table (the measured value is compared with it, not with the band
	// minimum, which may fall between the tones).
	tonesDB float64
}

type sweepJSON struct {
	RateHz float64    `json:"rate_hz"`
	BandHz [2]float64 `json:"band_hz"`
	Bits   int        `json:"bits,omitempty"`
	Rows   []sweepRow `json:"rows"`
}

func runSweep(e *env, args []string) error {
	fs := newFlagSet(e, "sweep", sweepUsage, sweepExamples)
	out := fs.StringP("output", "o", "", "write the table (or JSON) here instead of standard output")
	force := fs.Bool("force", false, "overwrite existing outputs")
	designsS := fs.String("designs", "kaiser,equiripple,allpass", "comma list of designs, or all: "+strings.Join(sweepDesigns(), ", "))
	tapsS := fs.String("taps", "7:255:8", "FIR taps, Weaver low-pass taps and FFT block sizes: START:STOP:STEP (STOP inclusive) or a comma list")
	secS := fs.String("sections", "1:10:1", "all-pass and analog sections: START:STOP:STEP or a comma list")
	rateS := fs.String("rate", "8000", "sample rate in Hz")
	bandS := fs.String("band", "300:2700", "audio band LOW:HIGH in Hz")
	bits := fs.Int("bits", 0, "also report the minimum suppression with B-bit coefficients (2 to 32)")
	verify := fs.Bool("verify", false, "also measure each design with tones through its streaming filter")
	csvTo := fs.String("csv", "", "also write the rows as CSV to this file")
	plotTo := fs.String("plot", "", "draw suppression against length and against cost to this PNG")
	asJSON := fs.Bool("json", false, "print one JSON object")
	quiet := fs.BoolP("quiet", "q", false, "no progress bar")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() != 0 {
		return usagef("sweep takes no arguments, got %q", fs.Arg(0))
	}
	designs, err := parseDesigns(*designsS)
	if err != nil {
		return err
	}
	taps, err := parseLengths("--taps", *tapsS)
	if err != nil {
		return err
	}
	sections, err := parseLengths("--sections", *secS)
	if err != nil {
		return err
	}
	rate, low, high, err := parseRateBand(*rateS, *bandS)
	if err != nil {
		return err
	}
	if err := checkBits(fs.Changed("bits"), *bits); err != nil {
		return err
	}
	// standard output carries the table (or JSON): the side outputs need files
	if err := needFile("--csv", *csvTo); err != nil {
		return err
	}
	if err := needFile("--plot", *plotTo); err != nil {
		return err
	}
	for _, o := range []string{*out, *csvTo, *plotTo} {
		if o != "" && o != "-" {
			if err := checkOutput(o, *force); err != nil {
				return err
			}
		}
	}

	// Build every spec first so that a bad length is a usage error before
	// any work.
	var specs []hilbert.Spec
	for _, d := range designs {
		lens := taps
		if d == "allpass" || d == "analog" {
			lens = sections
		}
		for _, n := range lens {
			s := hilbert.Spec{Design: d, Taps: n, Sections: n, Rate: rate, Low: low, High: high}
			if d == "fft" && n < hilbert.MinFFT {
				// a warning: it survives -q, as rx's do
				e.warnf("fft block size %d skipped (at least %d)", n, hilbert.MinFFT)
				continue
			}
			specs = append(specs, s)
		}
	}
	rows := make([]sweepRow, 0, len(specs))
	bar := newProgressCount(e, *quiet || len(specs) < 50 && !*verify, "sweep", int64(len(specs)))
	for _, s := range specs {
		if s.Design == "analog" {
			r, err := analogRow(s, low, high, rate)
			if err != nil {
				bar.Done()
				return err
			}
			rows = append(rows, r)
			bar.Add(1)
			continue
		}
		sp, err := hilbert.New(s)
		if err != nil {
			bar.Done()
			return usagef("%s length %d: %v", s.Design, max(s.Taps, s.Sections), err)
		}
		r := analysisRow(s, hilbert.Analyze(sp, low, high))
		if *verify {
			m, p := measuredMin(sp, low, high)
			r.MeasuredMinDB, r.tonesDB = &m, p
		}
		if *bits != 0 {
			s.Bits = *bits
			qsp, err := hilbert.New(s)
			if err != nil {
				bar.Done()
				return usagef("%s length %d: %v", s.Design, max(s.Taps, s.Sections), err)
			}
			q := round(hilbert.Analyze(qsp, low, high).SuppressionMinDB, 2)
			r.QuantizedMinDB = &q
		}
		rows = append(rows, r)
		bar.Add(1)
	}
	bar.Done()

	if *csvTo != "" {
		if err := writeOutputTo(e, *csvTo, *force, func(w io.Writer) error { return writeSweepCSV(w, rows, *verify, *bits) }); err != nil {
			return err
		}
	}
	if *plotTo != "" {
		title := fmt.Sprintf("Opposite-sideband suppression, %s–%s Hz at %s Hz", fmtHz(low), fmtHz(high), fmtHz(rate))
		if err := writeOutputTo(e, *plotTo, *force, func(w io.Writer) error { return writeSweepPNG(w, title, designs, rows) }); err != nil {
			return err
		}
	}
	return writeOutputTo(e, *out, *force, func(w io.Writer) error {
		if *asJSON {
			enc := json.NewEncoder(w)
			enc.SetIndent("", "  ")
			return enc.Encode(sweepJSON{RateHz: rate, BandHz: [2]float64{low, high}, Bits: *bits, Rows: rows})
		}
		return writeSweepText(w, rate, low, high, rows, *verify, *bits)
	})
}

// analogRow analyses the ideal analog network of s.Sections sections over
// the band: its delay is counted in samples of rate as well as in ms.
func analogRow(s hilbert.Spec, low, high, rate float64) (sweepRow, error) {
	a, err := hilbert.NewAnalog(s.Sections, low, high)
	if err != nil {
		return sweepRow{}, usagef("analog length %d: %v", s.Sections, err)
	}
	an := a.Analyze(low, high)
	an.DelaySamples = an.DelayMS / 1000 * rate
	r := analysisRow(s, an)
	r.Length = s.Sections
	return r, nil
}

// measuredMin runs tones at the band edges and centre through the
// streaming filter and returns the worst measured suppression in dB, and
// the worst predicted by the response at the same tones.
func measuredMin(sp hilbert.Splitter, low, high float64) (measured, predicted float64) {
	measured, predicted = math.Inf(1), math.Inf(1)
	for _, f := range []float64{low, (low + high) / 2, high} {
		measured = math.Min(measured, hilbert.MeasureDB(sp, f))
		predicted = math.Min(predicted, hilbert.SuppressionAt(sp, f))
	}
	return round(measured, 2), round(predicted, 2)
}

// writeOutputTo writes through createOutput to path, or to standard output
// for "" and "-".
func writeOutputTo(e *env, path string, force bool, fill func(io.Writer) error) error {
	if path == "" || path == "-" {
		sw := &stickyWriter{w: e.stdout}
		if err := fill(sw); err != nil || sw.err != nil {
			return fmt.Errorf("standard output: %w", cmp.Or(sw.err, err))
		}
		return nil
	}
	f, err := createOutput(path, force)
	if err != nil {
		return err
	}
	defer f.Abort()
	sw := &stickyWriter{w: f}
	if err := fill(sw); err != nil || sw.err != nil {
		return fmt.Errorf("%s: %w", path, cmp.Or(sw.err, err))
	}
	return f.Commit()
}

func writeSweepText(w io.Writer, rate, low, high float64, rows []sweepRow, verify bool, bits int) error {
	fmt.Fprintf(w, "Phase splitters at %s Hz over %s–%s Hz (suppression of the opposite sideband)\n\n", fmtHz(rate), fmtHz(low), fmtHz(high))
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	head := "design\tlength\tmin dB\tmean dB\tripple dB\tdelay\tdelay ms\tmult-adds/S\t"
	if bits != 0 {
		head += fmt.Sprintf("%d-bit min dB\t", bits)
	}
	if verify {
		head += "tones: predicted dB\tmeasured dB\t"
	}
	fmt.Fprintln(tw, head)
	opt := func(v *float64) string {
		if v == nil {
			return "–"
		}
		return fmt.Sprintf("%.2f", *v)
	}
	for _, r := range rows {
		line := fmt.Sprintf("%s\t%d\t%.2f\t%.2f\t%.4f\t%.2f\t%.3f\t%.1f\t", r.Design, r.Length, r.SuppressionMinDB, r.SuppressionMeanDB,
			r.RippleDB, r.DelaySamples, r.DelayMS, r.MACsPerSample)
		if bits != 0 {
			line += opt(r.QuantizedMinDB) + "\t"
		}
		if verify {
			tones := "–"
			if r.MeasuredMinDB != nil {
				tones = fmt.Sprintf("%.2f", r.tonesDB)
			}
			line += tones + "\t" + opt(r.MeasuredMinDB) + "\t"
		}
		fmt.Fprintln(tw, line)
	}
	return tw.Flush()
}

func writeSweepCSV(w io.Writer, rows []sweepRow, verify bool, bits int) error {
	cw := csv.NewWriter(w)
	head := []string{"design", "length", "suppression_min_db", "suppression_mean_db", "ripple_db", "delay_samples", "delay_ms", "macs_per_sample"}
	if verify {
		head = append(head, "measured_min_db")
	}
	if bits != 0 {
		head = append(head, "quantized_min_db")
	}
	cw.Write(head)
	g := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	opt := func(v *float64) string {
		if v == nil {
			return ""
		}
		return g(*v)
	}
	for _, r := range rows {
		rec := []string{r.Design, strconv.Itoa(r.Length), g(r.SuppressionMinDB), g(r.SuppressionMeanDB), g(r.RippleDB),
			g(r.DelaySamples), g(r.DelayMS), g(r.MACsPerSample)}
		if verify {
			rec = append(rec, opt(r.MeasuredMinDB))
		}
		if bits != 0 {
			rec = append(rec, opt(r.QuantizedMinDB))
		}
		cw.Write(rec)
	}
	cw.Flush()
	return cw.Error()
}

// sweepDesigns lists what sweep compares: the digital designs and the
// analog RC network.
func sweepDesigns() []string { return append(append([]string(nil), hilbert.Designs...), "analog") }

// parseDesigns parses a comma list of design names ("all" for every one).
func parseDesigns(s string) ([]string, error) {
	if strings.TrimSpace(s) == "all" {
		return sweepDesigns(), nil
	}
	var out []string
	seen := map[string]bool{}
	for _, d := range strings.Split(s, ",") {
		d = strings.TrimSpace(d)
		if !isDesign(d) && d != "analog" {
			return nil, usagef("--designs: unknown design %q (allowed: %s, or all)", d, strings.Join(sweepDesigns(), ", "))
		}
		if !seen[d] {
			out = append(out, d)
			seen[d] = true
		}
	}
	return out, nil
}

func isDesign(d string) bool {
	for _, x := range hilbert.Designs {
		if x == d {
			return true
		}
	}
	return false
}

// maxSweepRows bounds the number of lengths one flag may ask for.
const maxSweepRows = 10000

// parseLengths parses START:STOP:STEP (STOP inclusive; STEP defaults to 1)
// or a comma list of positive integers.
func parseLengths(flag, s string) ([]int, error) {
	bad := func(why string) error {
		return usagef("%s %q: %s (want START:STOP:STEP or a comma list, e.g. 7:255:8 or 31,63,127)", flag, s, why)
	}
	s = strings.TrimSpace(s)
	if strings.Contains(s, ":") {
		parts := strings.Split(s, ":")
		if len(parts) < 2 || len(parts) > 3 {
			return nil, bad("wrong number of fields")
		}
		var v [3]int
		v[2] = 1
		for i, p := range parts {
			n, err := strconv.Atoi(strings.TrimSpace(p))
			if err != nil {
				return nil, bad("not an integer: " + p)
			}
			v[i] = n
		}
		if v[0] < 1 || v[1] < v[0] || v[2] < 1 {
			return nil, bad("need 1 ≤ START ≤ STOP and STEP ≥ 1")
		}
		if (v[1]-v[0])/v[2] >= maxSweepRows {
			return nil, bad("too many lengths")
		}
		var out []int
		for n := v[0]; n <= v[1]; n += v[2] {
			out = append(out, n)
		}
		return out, nil
	}
	var out []int
	for _, p := range strings.Split(s, ",") {
		n, err := strconv.Atoi(strings.TrimSpace(p))
		if err != nil || n < 1 {
			return nil, bad("not a positive integer: " + p)
		}
		out = append(out, n)
	}
	if len(out) > maxSweepRows {
		return nil, bad("too many lengths")
	}
	return out, nil
}

// parseRateBand parses --rate and --band and checks 0 < low < high < rate/2.
func parseRateBand(rateS, bandS string) (rate, low, high float64, err error) {
	if rate, err = parseRate("--rate", rateS); err != nil {
		return 0, 0, 0, err
	}
	if low, high, err = iq.ParseBand(bandS); err != nil {
		return 0, 0, 0, usagef("--band: %v", err)
	}
	if !(low > 0 && high < rate/2) {
		return 0, 0, 0, usagef("--band %s: want 0 < LOW < HIGH < rate/2 = %s Hz", bandS, fmtHz(rate/2))
	}
	return rate, low, high, nil
}

// fmtHz formats a frequency in Hz without trailing zeros.
func fmtHz(f float64) string { return strconv.FormatFloat(f, 'f', -1, 64) }
