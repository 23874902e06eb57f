package main

import (
	"cmp"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"path/filepath"

	"ssbkit/iq"
	"ssbkit/modem/spectral"
)

const measureUsage = `ssbkit measure CAPTURE [--offset HZ | --freq HZ] [--sideband upper|lower|auto] [--band LOW:HIGH] [flags]`

const measureExamples = `Figures (see DESIGN definitions):
  wanted/unwanted   sideband power over the band, dBFS; suppression their ratio
  PEP               peak of |x|² of the signal isolated around its carrier
                    (band-pass to HIGH+150 Hz), dBFS
  carrier           power of the line at the carrier relative to PEP, dBc
  occupied bw       99 % power bandwidth over the carrier ± 2·HIGH (ITU-R SM.328)
  two-tone          when two tones dominate: IMD3 (2f1−f2, 2f2−f1) and IMD5
                    (3f1−2f2, 3f2−2f1), the stronger of each pair relative to
                    one tone (dBc) and to PEP (dB PEP: 6.02 dB lower for two
                    equal tones)
  I/Q imbalance     blind estimate over the whole capture (Q gain over I,
                    Q's phase departure from 90°, image rejection)

A wide capture is first brought down around the carrier to 48 kHz (or the
lowest whole fraction of its rate above that) by the receiver's decimators
and measured there: the figures are the same, and a minute of 2.4 MS/s
takes seconds. The I/Q imbalance still comes from the whole capture.

Verdicts compare each figure with what is usually expected of an amateur
SSB transmitter (common practice, not a regulation): opposite sideband and
carrier 40 dB or more down, IMD3 better than −30 dBc, IMD5 better than
−35 dBc, 99 % bandwidth within 3 kHz for voice, image rejection of the
recording receiver 30 dB or more. A product or carrier at the noise reads
as the noise: the figure is then an upper bound. A --sideband that picks
the weaker side gives a negative suppression and a hint naming the
stronger side.

Examples:
  ssbkit measure twotone.sigmf-meta
  ssbkit measure tx.cf32 --rate 48k --offset 1500 --band 200:2800 --json
  ssbkit measure wide.cu8 --rate 2.4M --center 7.1M --freq 7.0745M --plot tx.png`

func runMeasure(e *env, args []string) error {
	fs := newFlagSet(e, "measure", measureUsage, measureExamples)
	out := fs.StringP("output", "o", "", "write the report here instead of standard output")
	force := fs.Bool("force", false, "overwrite existing outputs")
	offS := fs.String("offset", "", "carrier offset from the capture centre in Hz (default 0)")
	freqS := fs.String("freq", "", "carrier frequency in Hz (needs a centre frequency)")
	side := fs.String("sideband", "auto", "upper, lower or auto (the stronger)")
	bandS := fs.String("band", "300:2700", "audio band LOW:HIGH in Hz")
	resS := fs.String("resolution", "5", "largest FFT bin spacing in Hz")
	asJSON := fs.Bool("json", false, "print the figures as JSON")
	plotTo := fs.String("plot", "", "draw the spectrum around the carrier with the figures to this PNG")
	quiet := fs.BoolP("quiet", "q", false, "no progress bar")
	cf := addCaptureFlags(fs)
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() != 1 {
		return usagef("want one CAPTURE argument, got %d", fs.NArg())
	}
	if *offS != "" && *freqS != "" {
		return usagef("--offset and --freq exclude each other")
	}
	opt := spectral.MeasureOptions{Sideband: *side}
	switch *side {
	case spectral.Upper, spectral.Lower, spectral.Auto:
	default:
		return usagef("--sideband %q: want upper, lower or auto", *side)
	}
	var err error
	if opt.BandLow, opt.BandHigh, err = iq.ParseBand(*bandS); err != nil {
		return usagef("--band: %v", err)
	}
	if opt.BandLow < 0 {
		return usagef("--band %s: LOW must not be negative", *bandS)
	}
	if opt.Resolution, err = iq.ParseFrequency(*resS); err != nil || !(opt.Resolution > 0) {
		return usagef("--resolution %q: want a positive frequency in Hz", *resS)
	}
	in := fs.Arg(0)
	if err := needFile("--plot", *plotTo); err != nil {
		return err
	}
	for _, o := range []string{*out, *plotTo} {
		if o != "" && o != "-" {
			if err := checkOutput(o, *force, in); err != nil {
				return err
			}
		}
	}
	src, err := openCapture(e, in, cf)
	if err != nil {
		return err
	}
	defer src.Close()
	meta := src.Meta()
	switch {
	case *offS != "":
		if opt.CarrierHz, err = iq.ParseFrequency(*offS); err != nil {
			return usagef("--offset: %v", err)
		}
	case *freqS != "":
		f, err := iq.ParseFrequency(*freqS)
		if err != nil {
			return usagef("--freq: %v", err)
		}
		if !meta.HasCenter {
			return usagef("--freq needs the capture's centre frequency (SigMF metadata or --center); or give --offset")
		}
		opt.CarrierHz = f - meta.Center
	}
	m, err := spectral.NewMeasurer(meta.Rate, meta.Samples, opt)
	if err != nil {
		return fmt.Errorf("%s: %w", in, err)
	}
	var stats iq.Stats
	bar := newProgress(e, *quiet, "measure", meta.Samples)
	if err := readAll(src, bar, func(x []complex64) {
		m.Add(x)
		stats.Add(x)
	}); err != nil {
		return err
	}
	r, err := m.Result()
	// Noise only (a receiver with its input terminated, or the wrong
	// --offset): the sideband figures have nothing to measure, but the
	// capture's I/Q balance is still worth having, so it is reported
	// alone, with a warning. A --plot of nothing is refused.
	noSignal := errors.Is(err, spectral.ErrNoSignal)
	switch {
	case noSignal && *plotTo != "":
		return fmt.Errorf("%s: %w: nothing to plot (without --plot measure reports the I/Q balance alone; so does \"ssbkit info\")", in, err)
	case noSignal:
		e.warnf("%s: %v: sideband, carrier, bandwidth and IMD figures absent; the I/Q balance is the whole capture's (check --offset/--freq and --band; \"ssbkit spectrum --list\" shows what the capture holds)", in, err)
	case err != nil:
		return fmt.Errorf("%s: %w", in, err)
	}
	imb := stats.Imbalance()

	// The picture is committed with the report, so that a failure
	// writing either leaves neither.
	var plot *outFile
	if *plotTo != "" {
		if plot, err = createOutput(*plotTo, *force, in); err != nil {
			return err
		}
		defer plot.Abort()
		if err := writeMeasurePNG(plot, filepath.Base(in), r, 1000, 600); err != nil {
			return fmt.Errorf("%s: %w", *plotTo, err)
		}
	}
	w, report := e.stdout, "standard output"
	var of *outFile
	if *out != "" && *out != "-" {
		of, err = createOutput(*out, *force, in)
		if err != nil {
			return err
		}
		defer of.Abort()
		w, report = of, *out
	}
	sw := &stickyWriter{w: w}
	w = sw
	switch {
	case noSignal && *asJSON:
		err = writeNoSignalJSON(w, meta, opt, imb)
	case noSignal:
		err = writeNoSignalText(w, in, meta, stats.Count(), opt, imb)
	case *asJSON:
		err = writeMeasureJSON(w, r, imb)
	default:
		err = writeMeasureText(w, in, meta, r, imb)
	}
	if err := cmp.Or(sw.err, err); err != nil {
		return fmt.Errorf("%s: %w", report, err)
	}
	if of != nil {
		if err := of.Commit(); err != nil {
			return err
		}
	}
	if plot != nil {
		return plot.Commit()
	}
	return nil
}

// nullable is a float that encodes ±Inf and NaN as JSON null.
type nullable float64

func (v nullable) MarshalJSON() ([]byte, error) {
	f := float64(v)
	if math.IsInf(f, 0) || math.IsNaN(f) {
		return []byte("null"), nil
	}
	return json.Marshal(f)
}

type toneJSON struct {
	OffsetHz float64 `json:"offset_hz"`
	DBFS     float64 `json:"dbfs"`
}

// measureJSON holds the keys of DESIGN.md's measure contract.
type measureJSON struct {
	RateHz              float64    `json:"rate_hz"`
	CarrierOffsetHz     float64    `json:"carrier_offset_hz"`
	Sideband            string     `json:"sideband"`
	BandHz              [2]float64 `json:"band_hz"`
	WantedDBFS          nullable   `json:"wanted_dbfs"`
	UnwantedDBFS        nullable   `json:"unwanted_dbfs"`
	SuppressionDB       nullable   `json:"suppression_db"`
	PEPDBFS             nullable   `json:"pep_dbfs"`
	CarrierDBc          nullable   `json:"carrier_dbc"`
	OccupiedBandwidthHz nullable   `json:"occupied_bandwidth_hz"`
	Tones               []toneJSON `json:"tones,omitempty"`
	IMD3DBc             *nullable  `json:"imd3_dbc,omitempty"`
	IMD5DBc             *nullable  `json:"imd5_dbc,omitempty"`
	IMD3DBPEP           *nullable  `json:"imd3_db_pep,omitempty"`
	IMD5DBPEP           *nullable  `json:"imd5_db_pep,omitempty"`
	IQGainDB            nullable   `json:"iq_gain_imbalance_db"`
	IQPhaseDeg          nullable   `json:"iq_phase_imbalance_deg"`
	ImageRejectionDB    nullable   `json:"image_rejection_db"`
	Note                string     `json:"note,omitempty"`
}

// noSignalNote explains the null figures of a capture without a
// transmission.
const noSignalNote = "no transmission above the noise: sideband, carrier, bandwidth and IMD figures absent; the I/Q balance is the whole capture's"

// writeNoSignalJSON writes the report of a capture that holds no
// transmission: the sideband figures null, sideband "none", the I/Q
// balance and a note.
func writeNoSignalJSON(w io.Writer, meta iq.Meta, opt spectral.MeasureOptions, imb iq.Imbalance) error {
	nan := nullable(math.NaN())
	j := measureJSON{
		RateHz: meta.Rate, CarrierOffsetHz: opt.CarrierHz, Sideband: "none", BandHz: [2]float64{opt.BandLow, opt.BandHigh},
		WantedDBFS: nan, UnwantedDBFS: nan, SuppressionDB: nan, PEPDBFS: nan, CarrierDBc: nan, OccupiedBandwidthHz: nan,
		IQGainDB: rn(imb.GainDB, 3), IQPhaseDeg: rn(imb.PhaseDeg, 3), ImageRejectionDB: rn(imb.ImageRejectionDB, 2),
		Note: noSignalNote,
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(j)
}

// writeNoSignalText is writeMeasureText for a capture that holds no
// transmission: the I/Q balance alone.
func writeNoSignalText(w io.Writer, in string, meta iq.Meta, samples int64, opt spectral.MeasureOptions, imb iq.Imbalance) error {
	p := func(format string, a ...any) { fmt.Fprintf(w, format, a...) }
	p("%s: %.0f S/s, %d samples (%.2f s)\n", in, meta.Rate, samples, float64(samples)/meta.Rate)
	p("no transmission above the noise at %+.1f Hz over %g–%g Hz: sideband, carrier, bandwidth and IMD figures absent\n\n",
		opt.CarrierHz, opt.BandLow, opt.BandHigh)
	writeIQLines(w, imb, "blind estimate over the whole capture")
	return nil
}

// writeIQLines writes the I/Q balance lines of the text report.
func writeIQLines(w io.Writer, imb iq.Imbalance, note string) {
	p := func(format string, a ...any) { fmt.Fprintf(w, format, a...) }
	p("  I/Q gain imbalance  %8.3f dB\n", round(imb.GainDB, 3))
	p("  I/Q phase imbalance %8.3f°\n", round(imb.PhaseDeg, 3))
	p("  image rejection     %8.2f dB     %s (expect ≥ %d dB; %s)\n",
		imb.ImageRejectionDB, verdict(imb.ImageRejectionDB >= goodIRRDB+10, imb.ImageRejectionDB >= goodIRRDB), goodIRRDB, note)
}

func rn(x float64, d int) nullable { return nullable(round(x, d)) }

func rp(x float64, d int) *nullable { v := rn(x, d); return &v }

func writeMeasureJSON(w io.Writer, r *spectral.Result, imb iq.Imbalance) error {
	j := measureJSON{
		RateHz: r.RateHz, CarrierOffsetHz: r.CarrierOffsetHz, Sideband: r.Sideband, BandHz: r.BandHz,
		WantedDBFS: rn(r.WantedDBFS, 2), UnwantedDBFS: rn(r.UnwantedDBFS, 2),
		SuppressionDB: rn(r.SuppressionDB, 2), PEPDBFS: rn(r.PEPDBFS, 2), CarrierDBc: rn(r.CarrierDBc, 2),
		OccupiedBandwidthHz: rn(r.OccupiedBandwidthHz, 1),
		IQGainDB:            rn(imb.GainDB, 3), IQPhaseDeg: rn(imb.PhaseDeg, 3), ImageRejectionDB: rn(imb.ImageRejectionDB, 2),
	}
	if r.TwoTone {
		for _, t := range r.Tones {
			j.Tones = append(j.Tones, toneJSON{round(t.OffsetHz, 1), round(t.DBFS, 2)})
		}
		j.IMD3DBc, j.IMD5DBc = rp(r.IMD3DBc, 2), rp(r.IMD5DBc, 2)
		j.IMD3DBPEP, j.IMD5DBPEP = rp(r.IMD3DBPEP, 2), rp(r.IMD5DBPEP, 2)
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(j)
}

// Expectations for the verdicts (common practice for amateur SSB
// transmitters and receivers, not regulations).
const (
	goodSuppressionDB = 40  // opposite sideband at least this far down
	fairSuppressionDB = 30  //
	goodCarrierDBc    = -40 // carrier at least this far below PEP
	fairCarrierDBc    = -30
	goodIMD3DBc       = -30 // third-order products re one tone
	fairIMD3DBc       = -25
	goodIMD5DBc       = -35
	fairIMD5DBc       = -30
	goodOBWHz         = 3000 // voice SSB
	goodIRRDB         = 30   // image rejection of the recording receiver
	amCarrierDBc      = -15  // a carrier this strong: AM or carrier inserted
)

func verdict(good, fair bool) string {
	switch {
	case good:
		return "good"
	case fair:
		return "fair"
	}
	return "poor"
}

// bound marks a figure that measured the noise (an upper bound).
func bound(atNoise bool) string {
	if atNoise {
		return "≤"
	}
	return " "
}

func atNoiseNote(atNoise bool) string {
	if atNoise {
		return " [at the noise: an upper bound]"
	}
	return ""
}

// otherSideband returns the sideband opposite to side (upper or lower).
func otherSideband(side string) string {
	if side == spectral.Upper {
		return spectral.Lower
	}
	return spectral.Upper
}

func writeMeasureText(w io.Writer, in string, meta iq.Meta, r *spectral.Result, imb iq.Imbalance) error {
	p := func(format string, a ...any) { fmt.Fprintf(w, format, a...) }
	p("%s: %.0f S/s, %d samples (%.2f s)", in, r.RateHz, r.Samples, float64(r.Samples)/r.RateHz)
	if r.MeasureRateHz != r.RateHz {
		p(", measured at %.0f S/s around the carrier", r.MeasureRateHz)
	}
	p("\n")
	car := fmt.Sprintf("%+.1f Hz", r.CarrierOffsetHz)
	if meta.HasCenter {
		car += fmt.Sprintf(" (%.1f Hz)", meta.Center+r.CarrierOffsetHz)
	}
	noise := fmt.Sprintf("%.1f dBFS/Hz", r.NoiseDBFSPerHz)
	if r.NoiseDBFSPerHz <= -300 {
		// a noiseless (synthetic) capture: dB of zero is floored at −400
		noise = "none (below -300 dBFS/Hz)"
	}
	p("carrier at %s, %s sideband, band %g–%g Hz, noise %s\n\n", car, r.Sideband, r.BandHz[0], r.BandHz[1], noise)
	am := r.CarrierDBc >= amCarrierDBc
	p("  wanted sideband     %8.2f dBFS\n", r.WantedDBFS)
	p("  unwanted sideband   %8.2f dBFS\n", r.UnwantedDBFS)
	switch {
	case am:
		p("  suppression         %8.2f dB     (carrier present: AM or carrier inserted, no verdict)\n", r.SuppressionDB)
	case r.UnwantedAtNoise && r.SuppressionDB < goodSuppressionDB:
		p("  suppression       ≥ %8.2f dB     unknown: the opposite sideband is at the noise (expect ≥ %d dB; a stronger recording would tell)\n",
			r.SuppressionDB, goodSuppressionDB)
	case r.UnwantedAtNoise:
		p("  suppression       ≥ %8.2f dB     good (opposite sideband at the noise; expect ≥ %d dB)\n", r.SuppressionDB, goodSuppressionDB)
	default:
		p("  suppression         %8.2f dB     %s (expect ≥ %d dB)\n", r.SuppressionDB,
			verdict(r.SuppressionDB >= goodSuppressionDB, r.SuppressionDB >= fairSuppressionDB), goodSuppressionDB)
	}
	if !am && r.SuppressionDB < 0 {
		// Only a forced --sideband can pick the weaker side (auto takes
		// the stronger): the figures above then describe the wrong one.
		// AM has two equal sidebands: no hint.
		p("  hint: the %s sideband is %.2f dB stronger: measure it with --sideband %s (or auto)\n",
			otherSideband(r.Sideband), -r.SuppressionDB, otherSideband(r.Sideband))
	}
	pepNote := "ok"
	switch {
	case r.PEPDBFS > -0.1:
		pepNote = "at full scale: the recording may clip"
	case r.PEPDBFS < -60:
		pepNote = "very weak"
	}
	p("  PEP                 %8.2f dBFS   %s\n", r.PEPDBFS, pepNote)
	if am {
		p("  carrier             %8.2f dBc    (strong carrier: AM or carrier inserted)\n", r.CarrierDBc)
	} else {
		p("  carrier           %s %8.2f dBc    %s (expect ≤ %d dBc)%s\n", bound(r.CarrierAtNoise), r.CarrierDBc,
			verdict(r.CarrierDBc <= goodCarrierDBc, r.CarrierDBc <= fairCarrierDBc), goodCarrierDBc, atNoiseNote(r.CarrierAtNoise))
	}
	p("  occupied bandwidth  %8.1f Hz     %s (99 %%, %+.0f…%+.0f Hz; expect ≤ %d Hz for voice)\n", r.OccupiedBandwidthHz,
		verdict(r.OccupiedBandwidthHz <= goodOBWHz, r.OccupiedBandwidthHz <= 1.2*goodOBWHz),
		r.OccupiedLowHz, r.OccupiedHighHz, goodOBWHz)
	if r.TwoTone {
		p("  two tones           %+8.1f Hz at %.2f dBFS, %+.1f Hz at %.2f dBFS\n",
			r.Tones[0].OffsetHz, r.Tones[0].DBFS, r.Tones[1].OffsetHz, r.Tones[1].DBFS)
		p("  IMD3              %s %8.2f dBc    %s (expect ≤ %d dBc); %.2f dB PEP%s\n", bound(r.IMD3AtNoise), r.IMD3DBc,
			verdict(r.IMD3DBc <= goodIMD3DBc, r.IMD3DBc <= fairIMD3DBc), goodIMD3DBc, r.IMD3DBPEP, atNoiseNote(r.IMD3AtNoise))
		p("  IMD5              %s %8.2f dBc    %s (expect ≤ %d dBc); %.2f dB PEP%s\n", bound(r.IMD5AtNoise), r.IMD5DBc,
			verdict(r.IMD5DBc <= goodIMD5DBc, r.IMD5DBc <= fairIMD5DBc), goodIMD5DBc, r.IMD5DBPEP, atNoiseNote(r.IMD5AtNoise))
	} else {
		p("  two-tone test       not found (IMD needs two dominant tones)\n")
	}
	writeIQLines(w, imb, "blind estimate, reads low on non-circular signals")
	return nil
}
