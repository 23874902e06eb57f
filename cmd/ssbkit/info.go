package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"math"

	"ssbkit/iq"
)

const infoUsage = `ssbkit info CAPTURE [flags]`

const infoExamples = `Reports format, rate, centre, length, peak and RMS level (dBFS, 0 dBFS is
|x| = 1), DC offset, clipped samples and the blind I/Q imbalance estimate.
A raw file whose size is not a whole number of samples is refused (a wrong
--format or a cut file is likelier than a meaningful tail); on standard
input the whole samples are read and the partial one is an error. NaN or
Inf values in a float capture are counted, read as 0, and warned about.

Examples:
  ssbkit info capture.sigmf-meta
  ssbkit info --json band.wav
  ssbkit info --json -o band-info.json band.sigmf-data
  ssbkit info --rate 2.4M --center 7.1M dump.cu8
  some-program | ssbkit info --format cs16 --rate 48k -`

// infoReport is the result of info; the JSON keys are the design's.
type infoReport struct {
	File          string     `json:"file"`
	Format        string     `json:"format"`
	Container     string     `json:"container"`
	Real          bool       `json:"real"`
	RateHz        float64    `json:"rate_hz"`
	CenterHz      *float64   `json:"center_hz"`
	Samples       int64      `json:"samples"`
	DurationS     float64    `json:"duration_s"`
	PeakDBFS      *float64   `json:"peak_dbfs"`
	RMSDBFS       *float64   `json:"rms_dbfs"`
	DCOffset      [2]float64 `json:"dc_offset"`
	Clipped       int64      `json:"clipped"`
	NonFinite     int64      `json:"nonfinite"`
	GainDB        *float64   `json:"iq_gain_imbalance_db"`
	PhaseDeg      *float64   `json:"iq_phase_imbalance_deg"`
	ImageRejectDB *float64   `json:"image_rejection_db"`
}

// finite returns &v, or nil (JSON null) when v is NaN or ±Inf.
func finite(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}

func runInfo(e *env, args []string) error {
	fs := newFlagSet(e, "info", infoUsage, infoExamples)
	jsonOut := fs.Bool("json", false, "print the report as JSON")
	out := fs.StringP("output", "o", "", "write the report here instead of standard output")
	force := fs.Bool("force", false, "overwrite an existing output")
	cf := addCaptureFlags(fs)
	quiet := fs.BoolP("quiet", "q", false, "no progress bar")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() != 1 {
		return usagef("want one CAPTURE (see ssbkit info --help)")
	}
	path := fs.Arg(0)
	inputs := append([]string{path}, sigmfPartners([]string{path})...)
	if *out != "" && *out != "-" {
		// Refuse a bad output before reading a long capture.
		if err := checkOutput(*out, *force, inputs...); err != nil {
			return err
		}
	}
	src, err := openCapture(e, path, cf)
	if err != nil {
		return err
	}
	defer src.Close()
	rep, _, err := measureCapture(e, src, *quiet)
	if err != nil {
		return err
	}
	rep.File = path
	if rep.NonFinite > 0 {
		// Reported, not fatal: info's job is to describe the capture.
		e.warnf("%s: %d NaN or Inf values (read as 0 in these figures)", src.Name(), rep.NonFinite)
	}
	w := e.stdout
	var of *outFile
	if *out != "" && *out != "-" {
		if of, err = createOutput(*out, *force, inputs...); err != nil {
			return err
		}
		defer of.Abort()
		w = of
	}
	var b bytes.Buffer
	if *jsonOut {
		enc := json.NewEncoder(&b)
		enc.SetIndent("", "  ")
		if err := enc.Encode(rep); err != nil {
			return err
		}
	} else {
		printInfo(&b, rep)
	}
	if _, err := w.Write(b.Bytes()); err != nil {
		if of != nil {
			return fmt.Errorf("%s: %w", *out, unwrapPath(err))
		}
		return err
	}
	if of != nil {
		return of.Commit()
	}
	return nil
}

// measureCapture reads src to the end and returns its report and the
// accumulated statistics.
func measureCapture(e *env, src *iq.Source, quiet bool) (*infoReport, *iq.Stats, error) {
	m := src.Meta()
	bar := newProgress(e, quiet, "reading", m.Samples)
	defer bar.Done()
	var st iq.Stats
	buf := make([]complex64, 1<<15)
	for {
		n, err := src.Read(buf)
		st.Add(buf[:n])
		bar.Add(n)
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, nil, err
		}
	}
	if st.Count() == 0 {
		return nil, nil, fmt.Errorf("%s: no samples", src.Name())
	}
	dc := st.Mean()
	im := st.Imbalance()
	rep := &infoReport{
		Format:        string(m.Datatype),
		Container:     m.Container,
		Real:          m.Real,
		RateHz:        m.Rate,
		Samples:       st.Count(),
		DurationS:     float64(st.Count()) / m.Rate,
		PeakDBFS:      finite(st.PeakDBFS()),
		RMSDBFS:       finite(st.RMSDBFS()),
		DCOffset:      [2]float64{real(dc), imag(dc)},
		Clipped:       src.Clipped(),
		NonFinite:     src.NonFinite(),
		GainDB:        finite(im.GainDB),
		PhaseDeg:      finite(im.PhaseDeg),
		ImageRejectDB: finite(im.ImageRejectionDB),
	}
	if m.HasCenter {
		rep.CenterHz = &m.Center
	}
	return rep, &st, nil
}

func printInfo(w io.Writer, r *infoReport) {
	opt := func(p *float64, format string) string {
		if p == nil {
			return "-"
		}
		return fmt.Sprintf(format, *p)
	}
	kind := r.Container
	if r.Real {
		kind += ", real recording read as its analytic signal"
	}
	fmt.Fprintf(w, "file              %s\n", r.File)
	fmt.Fprintf(w, "format            %s (%s)\n", r.Format, kind)
	fmt.Fprintf(w, "rate              %.10g Hz\n", r.RateHz)
	fmt.Fprintf(w, "center            %s\n", opt(r.CenterHz, "%.10g Hz"))
	fmt.Fprintf(w, "samples           %d (%.6g s)\n", r.Samples, r.DurationS)
	fmt.Fprintf(w, "peak              %s\n", opt(r.PeakDBFS, "%.2f dBFS"))
	fmt.Fprintf(w, "rms               %s\n", opt(r.RMSDBFS, "%.2f dBFS"))
	fmt.Fprintf(w, "dc offset         I %+.6f  Q %+.6f\n", r.DCOffset[0], r.DCOffset[1])
	fmt.Fprintf(w, "clipped           %d samples\n", r.Clipped)
	if r.NonFinite > 0 {
		fmt.Fprintf(w, "non-finite        %d values (NaN/Inf, read as 0)\n", r.NonFinite)
	}
	fmt.Fprintf(w, "iq gain           %s (Q over I)\n", opt(r.GainDB, "%+.3f dB"))
	fmt.Fprintf(w, "iq phase          %s (Q from 90° after I)\n", opt(r.PhaseDeg, "%+.3f°"))
	fmt.Fprintf(w, "image rejection   %s (blind estimate)\n", opt(r.ImageRejectDB, "%.1f dB"))
}
