package main

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"strconv"
	"strings"

	"ssbkit/hilbert"
)

const splitterUsage = `ssbkit splitter [--design NAME] [--taps N | --sections N] [--rate HZ] [--band LOW:HIGH] [--bits B] [--coeffs FILE.csv] [--export go|c] [--plot FILE.png] [--json] [-o PATH]`

const splitterExamples = `Prints the response summary of one phase-splitter design: suppression of
the opposite sideband over the band (minimum and mean), wanted-sideband
ripple, delay and cost, and the suppression at the band edges and centre.
--coeffs writes the I and Q path coefficients as CSV (header
path,index,coefficient; one coefficient a row; for FIR designs index k
weights x[n−k], the input k samples back; for allpass the section
coefficients a of (a − z⁻²)/(1 − a·z⁻²), the Q path behind one extra
sample of delay). --export writes them as Go or C arrays, with a header
comment giving design, rate, band, delay and suppression, to -o or
standard output. --plot draws the analytic filter's response over the
whole circle (negative frequencies are the opposite sideband) and the
phase-difference error of the two paths over the band.

--bits B quantises the coefficients to signed B-bit fractions, as
firmware stores them, and reports the quantised filter beside the exact
one. The scale is the largest power of two that keeps the largest
coefficient in range (2^-15 for 16-bit Hilbert taps, whose largest is
2/π); the I path of the FIR designs is a delay and needs none. The
all-pass pair also runs its sections in integer arithmetic: 16-bit data
(B up to 24 bits when B > 16), the input's full scale 2 bits below the
data range, y = a·(x + y[n-2]) - x[n-2] formed exactly in a B+D+2-bit
accumulator and rounded back; tones measured through it are reported.
With --bits, --export writes the integers (int16 up to 16 bits, int32
above) and the scale in the header comment, and --coeffs adds an
integer column. FIR taps are re-rounded (each within 1.5 steps of its
exact value) to the choice that keeps the band's suppression highest.
Quantising costs about 6 dB of floor per bit removed (a 63-tap
equiripple design at 16 bits floors near 79-88 dB).

Examples:
  ssbkit splitter
  ssbkit splitter --design kaiser --taps 95 --rate 48k --band 200:3000 --plot kaiser95.png
  ssbkit splitter --design allpass --sections 6 --export c -o splitter.h
  ssbkit splitter --design equiripple --taps 63 --coeffs taps.csv --json
  ssbkit splitter --design equiripple --taps 63 --bits 16 --export c -o hilbert63_q15.h`

// splitterJSON is the --json summary: the sweep row keys plus the rate,
// the band and the suppression at the band edges and centre.
type splitterJSON struct {
	RateHz float64    `json:"rate_hz"`
	BandHz [2]float64 `json:"band_hz"`
	sweepRow
	EdgesDB [3]float64 `json:"suppression_at_low_center_high_db"`
	// With --bits: the word length, the scale 2^-fraction_bits and the
	// quantised filter's figures.
	Bits         int            `json:"bits,omitempty"`
	FractionBits *int           `json:"fraction_bits,omitempty"`
	Quantized    *quantizedJSON `json:"quantized,omitempty"`
}

// quantizedJSON is the quantised filter's summary; the all-pass pair adds
// its integer arithmetic and the tones measured through it.
type quantizedJSON struct {
	SuppressionMinDB  float64  `json:"suppression_min_db"`
	SuppressionMeanDB float64  `json:"suppression_mean_db"`
	RippleDB          float64  `json:"ripple_db"`
	DelaySamples      float64  `json:"delay_samples"`
	DelayMS           float64  `json:"delay_ms"`
	DataBits          int      `json:"data_bits,omitempty"`
	AccumulatorBits   int      `json:"accumulator_bits,omitempty"`
	MeasuredMinDB     *float64 `json:"measured_min_db,omitempty"`
}

func runSplitter(e *env, args []string) error {
	fs := newFlagSet(e, "splitter", splitterUsage, splitterExamples)
	out := fs.StringP("output", "o", "", "write the summary (or the --export source) here instead of standard output")
	force := fs.Bool("force", false, "overwrite existing outputs")
	design := fs.String("design", "equiripple", "design: "+strings.Join(hilbert.Designs, ", "))
	taps := fs.Int("taps", 63, "FIR taps (odd), Weaver low-pass taps (odd) or FFT block size")
	sections := fs.Int("sections", 6, "all-pass sections (one multiply each; total order 2·sections+1); implies --design allpass")
	rateS := fs.String("rate", "8000", "sample rate in Hz")
	bandS := fs.String("band", "300:2700", "audio band LOW:HIGH in Hz")
	coeffs := fs.String("coeffs", "", "write the coefficients as CSV to this file")
	export := fs.String("export", "", "write the coefficients as source arrays: go or c")
	plotTo := fs.String("plot", "", "draw the whole-circle response and phase error to this PNG")
	bits := fs.Int("bits", 0, "quantise the coefficients to signed B-bit fractions (2 to 32) and report the quantised filter too")
	asJSON := fs.Bool("json", false, "print the summary as JSON")
	fs.BoolP("quiet", "q", false, "no progress output (this command has none)")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() != 0 {
		return usagef("splitter takes no arguments, got %q", fs.Arg(0))
	}
	if !isDesign(*design) {
		return usagef("--design: unknown design %q (allowed: %s)", *design, strings.Join(hilbert.Designs, ", "))
	}
	// As in tx: a length for the other kind of design would be ignored.
	switch allpass := *design == "allpass"; {
	case fs.Changed("taps") && fs.Changed("sections"):
		return usagef("--taps and --sections exclude each other (taps for FIR, Weaver and FFT designs, sections for allpass)")
	case fs.Changed("taps") && allpass:
		return usagef("--taps does not apply to --design allpass (use --sections)")
	case fs.Changed("sections") && fs.Changed("design") && !allpass:
		return usagef("--sections applies to --design allpass only (use --taps)")
	case fs.Changed("sections"):
		*design = "allpass" // --sections alone picks the all-pass pair
	}
	if *export != "" && *export != "go" && *export != "c" {
		return usagef("--export %q: want go or c", *export)
	}
	if *export != "" && *asJSON {
		return usagef("--export and --json both write to the output; choose one")
	}
	if err := checkBits(fs.Changed("bits"), *bits); err != nil {
		return err
	}
	rate, low, high, err := parseRateBand(*rateS, *bandS)
	if err != nil {
		return err
	}
	// standard output carries the summary (or export): the side outputs need files
	if err := needFile("--coeffs", *coeffs); err != nil {
		return err
	}
	if err := needFile("--plot", *plotTo); err != nil {
		return err
	}
	for _, o := range []string{*out, *coeffs, *plotTo} {
		if o != "" && o != "-" {
			if err := checkOutput(o, *force); err != nil {
				return err
			}
		}
	}
	spec := hilbert.Spec{Design: *design, Taps: *taps, Sections: *sections, Rate: rate, Low: low, High: high}
	sp, err := hilbert.New(spec)
	if err != nil {
		return usagef("%v", err)
	}
	a := hilbert.Analyze(sp, low, high)
	row := analysisRow(spec, a)
	var edges [3]float64
	for k, f := range []float64{low, (low + high) / 2, high} {
		edges[k] = round(hilbert.SuppressionAt(sp, f), 2)
	}
	length := row.Length

	// With --bits the coefficients written are the quantised ones.
	var (
		qsp hilbert.Splitter
		qj  *quantizedJSON
		fx  hilbert.Fixed
	)
	if *bits != 0 {
		qs := spec
		qs.Bits = *bits
		if qsp, err = hilbert.New(qs); err != nil {
			return usagef("%v", err)
		}
		fx, _ = hilbert.Quantized(qsp)
		qa := hilbert.Analyze(qsp, low, high)
		qr := analysisRow(qs, qa)
		qj = &quantizedJSON{SuppressionMinDB: qr.SuppressionMinDB, SuppressionMeanDB: qr.SuppressionMeanDB, RippleDB: qr.RippleDB,
			DelaySamples: qr.DelaySamples, DelayMS: qr.DelayMS}
		if spec.Design == "allpass" {
			m, _ := measuredMin(qsp, low, high)
			qj.DataBits, qj.AccumulatorBits, qj.MeasuredMinDB = fx.DataBits, fx.AccBits, &m
		}
	}
	coefSrc := sp
	if qsp != nil {
		coefSrc = qsp
	}
	iPath, qPath, fir := hilbert.Coefficients(coefSrc)
	if !fir {
		iPath, qPath, _ = hilbert.Sections(coefSrc)
	}

	if *coeffs != "" {
		err := writeOutputTo(e, *coeffs, *force, func(w io.Writer) error {
			if qsp != nil {
				return writeCoeffsCSVFixed(w, iPath, qPath, fx)
			}
			return writeCoeffsCSV(w, iPath, qPath)
		})
		if err != nil {
			return err
		}
	}
	title := fmt.Sprintf("%s, %s %d, %s Hz, band %s–%s Hz: min suppression %.1f dB", spec.Design, lengthName(spec.Design), length,
		fmtHz(rate), fmtHz(low), fmtHz(high), a.SuppressionMinDB)
	if *plotTo != "" {
		err := writeOutputTo(e, *plotTo, *force, func(w io.Writer) error { return writeSplitterPNG(w, title, sp, low, high, a.SuppressionMinDB) })
		if err != nil {
			return err
		}
	}
	return writeOutputTo(e, *out, *force, func(w io.Writer) error {
		switch {
		case *export != "" && qsp != nil:
			return writeExportFixed(w, *export, spec, row, qj, fx)
		case *export != "":
			return writeExport(w, *export, spec, row, iPath, qPath, fir)
		case *asJSON:
			enc := json.NewEncoder(w)
			enc.SetIndent("", "  ")
			j := splitterJSON{RateHz: rate, BandHz: [2]float64{low, high}, sweepRow: row, EdgesDB: edges, Bits: *bits, Quantized: qj}
			if qsp != nil {
				j.FractionBits = &fx.Frac
			}
			return enc.Encode(j)
		}
		if err := writeSplitterText(w, spec, row, edges, iPath, qPath, fir); err != nil {
			return err
		}
		if qsp != nil {
			writeQuantizedText(w, fx, qj)
		}
		return nil
	})
}

// checkBits validates --bits when given.
func checkBits(changed bool, bits int) error {
	if changed && (bits < hilbert.MinBits || bits > hilbert.MaxBits) {
		return usagef("--bits %d: want %d to %d", bits, hilbert.MinBits, hilbert.MaxBits)
	}
	return nil
}

// analysisRow turns an analysis into a sweep row (DESIGN.md's keys).
func analysisRow(s hilbert.Spec, a hilbert.Analysis) sweepRow {
	r := sweepRow{
		Design: s.Design, Length: s.Taps,
		SuppressionMinDB: round(a.SuppressionMinDB, 2), SuppressionMeanDB: round(a.SuppressionMeanDB, 2),
		RippleDB: round(a.RippleDB, 4), DelaySamples: round(a.DelaySamples, 3), DelayMS: round(a.DelayMS, 4),
		MACsPerSample: round(a.MACsPerSample, 2),
	}
	if s.Design == "allpass" {
		r.Length = s.Sections
	}
	return r
}

func writeQuantizedText(w io.Writer, fx hilbert.Fixed, q *quantizedJSON) {
	fmt.Fprintf(w, "fixed point      %d-bit coefficients, scale 2^-%d (one step %.6g)\n", fx.Bits, fx.Frac, fx.Scale())
	fmt.Fprintf(w, "  quantised      min %.2f dB, mean %.2f dB; ripple %.4f dB; delay %.3f samples, %.4f ms\n",
		q.SuppressionMinDB, q.SuppressionMeanDB, q.RippleDB, q.DelaySamples, q.DelayMS)
	if q.MeasuredMinDB != nil {
		fmt.Fprintf(w, "  arithmetic     %d-bit data (input full scale 2 bits below), %d-bit accumulator; tones through it: min %.2f dB\n",
			q.DataBits, q.AccumulatorBits, *q.MeasuredMinDB)
	}
}

func lengthName(design string) string {
	switch design {
	case "allpass":
		return "sections"
	case "fft":
		return "block"
	}
	return "taps"
}

func writeSplitterText(w io.Writer, s hilbert.Spec, r sweepRow, edges [3]float64, i, q []float64, fir bool) error {
	fmt.Fprintf(w, "design           %s, %s %d\n", s.Design, lengthName(s.Design), r.Length)
	fmt.Fprintf(w, "rate, band       %s Hz, %s–%s Hz\n", fmtHz(s.Rate), fmtHz(s.Low), fmtHz(s.High))
	fmt.Fprintf(w, "suppression      min %.2f dB, mean %.2f dB over the band\n", r.SuppressionMinDB, r.SuppressionMeanDB)
	fmt.Fprintf(w, "  at low/centre/high  %.2f / %.2f / %.2f dB\n", edges[0], edges[1], edges[2])
	fmt.Fprintf(w, "ripple           %.4f dB peak to peak (wanted sideband)\n", r.RippleDB)
	fmt.Fprintf(w, "delay            %.3f samples, %.4f ms", r.DelaySamples, r.DelayMS)
	if s.Design == "allpass" {
		fmt.Fprintf(w, " (group delay at the band centre)")
	}
	fmt.Fprintln(w)
	fmt.Fprintf(w, "cost             %.2f real multiply-adds per sample\n", r.MACsPerSample)
	if fir {
		fmt.Fprintf(w, "coefficients     I %d taps, Q %d taps (--coeffs, --export)\n", len(i), len(q))
	} else {
		fmt.Fprintf(w, "coefficients     I %d sections, Q %d sections + one sample delay (--coeffs, --export)\n", len(i), len(q))
	}
	return nil
}

func writeCoeffsCSV(w io.Writer, i, q []float64) error {
	cw := csv.NewWriter(w)
	cw.Write([]string{"path", "index", "coefficient"})
	for _, p := range []struct {
		name string
		v    []float64
	}{{"i", i}, {"q", q}} {
		for k, v := range p.v {
			cw.Write([]string{p.name, strconv.Itoa(k), strconv.FormatFloat(v, 'g', 17, 64)})
		}
	}
	cw.Flush()
	return cw.Error()
}

// writeCoeffsCSVFixed writes the quantised coefficients with their
// integers (value = integer × 2^-frac); the I path of a FIR design is a
// delay and has none. The Weaver design's integers are its low-pass taps,
// added as path "lowpass".
func writeCoeffsCSVFixed(w io.Writer, i, q []float64, fx hilbert.Fixed) error {
	cw := csv.NewWriter(w)
	cw.Write([]string{"path", "index", "coefficient", "integer"})
	for _, p := range []struct {
		name string
		v    []float64
		n    []int64
	}{{"i", i, fx.I}, {"q", q, fx.Q}, {"lowpass", nil, fx.LowPass}} {
		v := p.v
		if p.name == "lowpass" {
			for _, n := range p.n {
				v = append(v, float64(n)*fx.Scale())
			}
		}
		for k, c := range v {
			n := ""
			if len(p.n) == len(v) {
				n = strconv.FormatInt(p.n[k], 10)
			}
			cw.Write([]string{p.name, strconv.Itoa(k), strconv.FormatFloat(c, 'g', 17, 64), n})
		}
	}
	cw.Flush()
	return cw.Error()
}

// writeExportFixed writes the quantised coefficients as Go or C integer
// arrays with the scale in the header comment.
func writeExportFixed(w io.Writer, lang string, s hilbert.Spec, exact sweepRow, q *quantizedJSON, fx hilbert.Fixed) error {
	ctype, gotype := "int16_t", "int16"
	if fx.Bits > 16 {
		ctype, gotype = "int32_t", "int32"
	}
	head := []string{
		fmt.Sprintf("Phase splitter made by ssbkit %s: design %s, %s %d, %d-bit coefficients.", version, s.Design, lengthName(s.Design), exact.Length, fx.Bits),
		fmt.Sprintf("Scale: value = integer * 2^-%d (one step = %s); the largest coefficient uses the %d-bit range.", fx.Frac, strconv.FormatFloat(fx.Scale(), 'g', -1, 64), fx.Bits),
		fmt.Sprintf("Rate %s Hz, band %s-%s Hz, delay %.3f samples (%.4f ms).", fmtHz(s.Rate), fmtHz(s.Low), fmtHz(s.High), q.DelaySamples, q.DelayMS),
		fmt.Sprintf("Opposite-sideband suppression over the band: quantised min %.2f dB, mean %.2f dB (exact design %.2f dB).", q.SuppressionMinDB, q.SuppressionMeanDB, exact.SuppressionMinDB),
	}
	var names []string
	var arrays [][]int64
	switch {
	case s.Design == "allpass":
		head = append(head,
			"All-pass sections (a - z^-2)/(1 - a*z^-2) in series; the Q chain is fed x[n-1].",
			fmt.Sprintf("Per section, exact in an accumulator of %d bits: acc = A*(x[n] + y[n-2]) - (x[n-2] << %d);", fx.AccBits, fx.Frac),
			fmt.Sprintf("y[n] = saturate((acc + 2^%d) >> %d) to %d-bit data, the input's full scale 2 bits below the data range.", fx.Frac-1, fx.Frac, fx.DataBits),
			"out[n] = I-chain output + j*Q-chain output.")
		names, arrays = []string{"allpassI", "allpassQ"}, [][]int64{fx.I, fx.Q}
	case fx.LowPass != nil:
		head = append(head,
			"Weaver method: mix the band centre to 0 Hz, filter I and Q with this symmetric low-pass, mix back.",
			fmt.Sprintf("Band centre %s Hz.", fmtHz((s.Low+s.High)/2)))
		names, arrays = []string{"weaverLowpass"}, [][]int64{fx.LowPass}
	default:
		head = append(head,
			fmt.Sprintf("I path: the input delayed by %d samples (no multiplications).", (len(fx.Q)-1)/2),
			"Q path: FIR taps in convolution order (k = 0 weights the newest input x[n]): Q[n] = sum_k splitterQ[k]*x[n-k].")
		names, arrays = []string{"splitterQ"}, [][]int64{fx.Q}
	}
	for _, h := range head {
		fmt.Fprintf(w, "// %s\n", h)
	}
	if lang == "go" {
		fmt.Fprintf(w, "\npackage splitter\n\n// splitterFrac is the scale exponent: value = integer * 2^-splitterFrac.\nconst splitterFrac = %d\n\n", fx.Frac)
	} else {
		fmt.Fprintf(w, "\n#include <stdint.h>\n\n/* value = integer * 2^-SPLITTER_FRAC */\n#define SPLITTER_FRAC %d\n\n", fx.Frac)
	}
	for k, v := range arrays {
		if lang == "go" {
			fmt.Fprintf(w, "var %s = [%d]%s{\n", names[k], len(v), gotype)
		} else {
			fmt.Fprintf(w, "static const %s %s[%d] = {\n", ctype, names[k], len(v))
		}
		for _, c := range v {
			fmt.Fprintf(w, "\t%d,\n", c)
		}
		if lang == "go" {
			fmt.Fprintf(w, "}\n\n")
		} else {
			fmt.Fprintf(w, "};\n\n")
		}
	}
	return nil
}

// writeExport writes the coefficients as Go or C source arrays.
func writeExport(w io.Writer, lang string, s hilbert.Spec, r sweepRow, i, q []float64, fir bool) error {
	cm := "//"
	head := []string{
		fmt.Sprintf("Phase splitter made by ssbkit %s: design %s, %s %d.", version, s.Design, lengthName(s.Design), r.Length),
		fmt.Sprintf("Rate %s Hz, band %s-%s Hz, delay %.3f samples (%.4f ms).", fmtHz(s.Rate), fmtHz(s.Low), fmtHz(s.High), r.DelaySamples, r.DelayMS),
		fmt.Sprintf("Opposite-sideband suppression over the band: min %.2f dB, mean %.2f dB.", r.SuppressionMinDB, r.SuppressionMeanDB),
	}
	if fir {
		head = append(head,
			"FIR taps in convolution order (k = 0 weights the newest input x[n]):",
			"out[n] = sum_k I[k]*x[n-k] + j*sum_k Q[k]*x[n-k].")
	} else {
		head = append(head,
			"All-pass sections (a - z^-2)/(1 - a*z^-2) in series, y[n] = a*(x[n] + y[n-2]) - x[n-2];",
			"the Q chain is fed x[n-1]. out[n] = I-chain output + j*Q-chain output.")
	}
	for _, h := range head {
		fmt.Fprintf(w, "%s %s\n", cm, h)
	}
	names := [2]string{"splitterI", "splitterQ"}
	if !fir {
		names = [2]string{"allpassI", "allpassQ"}
	}
	if lang == "go" {
		fmt.Fprintf(w, "\npackage splitter\n\n")
	} else {
		fmt.Fprintf(w, "\n")
	}
	for k, v := range [2][]float64{i, q} {
		if lang == "go" {
			fmt.Fprintf(w, "var %s = [%d]float64{\n", names[k], len(v))
		} else {
			fmt.Fprintf(w, "static const double %s[%d] = {\n", names[k], len(v))
		}
		for _, c := range v {
			fmt.Fprintf(w, "\t%s,\n", strconv.FormatFloat(c, 'e', 17, 64))
		}
		if lang == "go" {
			fmt.Fprintf(w, "}\n\n")
		} else {
			fmt.Fprintf(w, "};\n\n")
		}
	}
	return nil
}
