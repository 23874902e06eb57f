package main

import (
	"fmt"
	"io"

	"ssbkit/iq"
)

const convertUsage = `ssbkit convert IN OUT [flags]
  ssbkit convert IN -o OUT [flags]`

const convertExamples = `The output format comes from OUT's extension: .wav, .sigmf-meta/.sigmf-data,
or raw .cu8 .cs8 .ci8 .cs16 .ci16 .cf32 .raw ("-" writes raw to standard
output). --to picks the sample type inside WAV, SigMF and "-".
A capture holding NaN or Inf values is refused rather than written with
zeros in their place; "ssbkit info" counts them. A raw file whose size is
not a whole number of samples is refused as well.

Examples:
  ssbkit convert --rate 2.4M --center 7.1M dump.cu8 dump.sigmf-meta
  ssbkit convert --to ci16_le capture.sigmf-meta capture.wav
  ssbkit convert --correct-iq skewed.wav straight.wav
  ssbkit convert --format cf32 --rate 48k - out.wav < samples.cf32`

func runConvert(e *env, args []string) error {
	fs := newFlagSet(e, "convert", convertUsage, convertExamples)
	output := fs.StringP("output", "o", "", "output capture (instead of the second argument)")
	to := fs.String("to", "cf32_le", "sample type inside WAV/SigMF: cf32_le, ci16_le, ci8, cu8 (WAV: cf32_le or ci16_le)")
	correct := fs.Bool("correct-iq", false, "remove the blind-estimated I/Q imbalance and the DC offset (reads IN twice)")
	force := fs.Bool("force", false, "overwrite an existing output")
	cf := addCaptureFlags(fs)
	quiet := fs.BoolP("quiet", "q", false, "no progress bar")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	var in, out string
	switch {
	case fs.NArg() == 2 && *output == "":
		in, out = fs.Arg(0), fs.Arg(1)
	case fs.NArg() == 1 && *output != "":
		in, out = fs.Arg(0), *output
	case fs.NArg() == 2:
		return usagef("OUT given twice: as the second argument and with -o %s", *output)
	default:
		return usagef("want IN and OUT, got %d arguments (see ssbkit convert --help)", fs.NArg())
	}
	dt, err := iq.ParseDatatype(*to)
	if err != nil {
		return usagef("--to: %v", err)
	}
	if dt.IsReal() {
		return usagef("--to %s: outputs are complex I/Q; want cf32_le, ci16_le, ci8 or cu8", dt)
	}
	switch iq.ContainerOf(out) {
	case iq.ContainerWAV:
		if dt != iq.CF32 && dt != iq.CI16 {
			return usagef("--to %s: WAV holds cf32_le (32-bit float) or ci16_le (16-bit PCM)", dt)
		}
	case iq.ContainerRaw:
		if ext, _ := iq.DatatypeFromExt(out); fs.Changed("to") && ext != dt {
			return usagef("--to %s contradicts the extension of %s (%s)", dt, out, ext)
		}
	}
	if *correct && in == "-" {
		return usagef("--correct-iq reads the input twice: give a file, not standard input")
	}

	src, err := openCapture(e, in, cf)
	if err != nil {
		return err
	}
	defer src.Close()
	m := src.Meta()

	var corr *iq.Corrector
	if *correct {
		rep, st, err := measureCapture(e, src, *quiet)
		if err != nil {
			return err
		}
		if rep.NonFinite > 0 {
			return nonFiniteError(in, rep.NonFinite)
		}
		src.Close()
		if src, err = reopenCapture(e, in, cf); err != nil {
			return err
		}
		defer src.Close()
		im := st.Imbalance()
		if !(im.ImageRejectionDB > 0) {
			return fmt.Errorf("%s: no usable I/Q imbalance estimate (silent or real-valued signal)", in)
		}
		corr = iq.NewCorrector(st.Mean(), im)
		fmt.Fprintf(e.stderr, "convert: correcting DC (%+.5f, %+.5f), gain %+.3f dB, phase %+.3f°, image rejection was %.1f dB\n",
			rep.DCOffset[0], rep.DCOffset[1], im.GainDB, im.PhaseDeg, im.ImageRejectionDB)
	}

	outMeta := iq.Meta{Datatype: dt, Rate: m.Rate, Center: m.Center, HasCenter: m.HasCenter,
		Description: m.Description, Datetime: m.Datetime, Annotations: m.Annotations}
	w, err := createCaptureTo(e.stdout, out, outMeta, *force, in)
	if err != nil {
		return err
	}
	defer w.Abort()

	bar := newProgress(e, *quiet, "converting", m.Samples)
	defer bar.Done()
	buf := make([]complex64, 1<<15)
	for {
		n, rerr := src.Read(buf)
		if src.NonFinite() > 0 {
			return nonFiniteError(in, src.NonFinite())
		}
		if n > 0 {
			blk := buf[:n]
			if corr != nil {
				corr.Process(blk, blk)
			}
			if _, err := w.Write(blk); err != nil {
				return fmt.Errorf("%s: %w", outName(out), err)
			}
			bar.Add(n)
		}
		if rerr == io.EOF {
			break
		}
		if rerr != nil {
			return rerr
		}
	}
	if w.Samples() == 0 {
		return fmt.Errorf("%s: no samples", src.Name())
	}
	return w.Commit()
}

func nonFiniteError(in string, n int64) error {
	return fmt.Errorf("%s: %d NaN or Inf values; refusing to convert (ssbkit info counts them)", in, n)
}
