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

const splitterUsage = `ssbkit splitter [--design NAME] [--taps N | --sections N] [--rate HZ] [--band LOW:HIGH] [--coeffs FILE.csv] [--export go|c] [--plot FILE.png] [--json] [-o PATH]`

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

Examples:
  ssbkit splitter
  ssbkit splitter --design kaiser --taps 95 --rate 48k --band 200:3000 --plot kaiser95.png
  ssbkit splitter --design allpass --sections 6 --export c -o splitter.h
  ssbkit splitter --design equiripple --taps 63 --coeffs taps.csv --json`

// splitterJSON is the --json summary: the sweep row keys plus the rate,
// the band and the suppression at the band edges and centre.
type splitterJSON struct {
	RateHz float64    `json:"rate_hz"`
	BandHz [2]float64 `json:"band_hz"`
	sweepRow
	EdgesDB [3]float64 `json:"suppression_at_low_center_high_db"`
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
	length := spec.Taps
	if spec.Design == "allpass" {
		length = spec.Sections
	}
	row := sweepRow{
		Design: spec.Design, Length: length,
		SuppressionMinDB: round(a.SuppressionMinDB, 2), SuppressionMeanDB: round(a.SuppressionMeanDB, 2),
		RippleDB: round(a.RippleDB, 4), DelaySamples: round(a.DelaySamples, 3), DelayMS: round(a.DelayMS, 4),
		MACsPerSample: round(a.MACsPerSample, 2),
	}
	var edges [3]float64
	for k, f := range []float64{low, (low + high) / 2, high} {
		edges[k] = round(hilbert.SuppressionAt(sp, f), 2)
	}
	iPath, qPath, fir := hilbert.Coefficients(sp)
	if !fir {
		iPath, qPath, _ = hilbert.Sections(sp)
	}

	if *coeffs != "" {
		err := writeOutputTo(e, *coeffs, *force, func(w io.Writer) error { return writeCoeffsCSV(w, iPath, qPath) })
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
		case *export != "":
			return writeExport(w, *export, spec, row, iPath, qPath, fir)
		case *asJSON:
			enc := json.NewEncoder(w)
			enc.SetIndent("", "  ")
			return enc.Encode(splitterJSON{RateHz: rate, BandHz: [2]float64{low, high}, sweepRow: row, EdgesDB: edges})
		}
		return writeSplitterText(w, spec, row, edges, iPath, qPath, fir)
	})
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
