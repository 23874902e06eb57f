package main

import (
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/spf13/pflag"

	"ssbkit/iq"
)

// captureFlags are --format, --rate and --center for inputs that do not
// describe themselves (raw files and "-").
type captureFlags struct{ format, rate, center string }

// addCaptureFlags registers --format, --rate and --center on fs.
func addCaptureFlags(fs *pflag.FlagSet) *captureFlags {
	cf := &captureFlags{}
	fs.StringVar(&cf.format, "format", "", "sample format of a raw input or -: cu8, ci8, ci16_le, cf32_le, rf32_le, ri16_le (default: from the extension)")
	fs.StringVar(&cf.rate, "rate", "", "sample rate of a raw input in Hz (k/M suffixes: 48k, 2.4M)")
	fs.StringVar(&cf.center, "center", "", "centre frequency of the capture in Hz (7.1M); SigMF metadata takes precedence")
	return cf
}

// options turns the flags into iq.Options; bad values are usage errors.
func (cf *captureFlags) options(e *env) (iq.Options, error) {
	opt := iq.Options{Stdin: e.stdin}
	if cf == nil {
		return opt, nil
	}
	if cf.format != "" {
		dt, err := iq.ParseDatatype(cf.format)
		if err != nil {
			return opt, usagef("--format: %v", err)
		}
		opt.Format = dt
	}
	if cf.rate != "" {
		r, err := iq.ParseFrequency(cf.rate)
		if err != nil {
			return opt, usagef("--rate: %v", err)
		}
		if r <= 0 {
			return opt, usagef("--rate: must be positive")
		}
		opt.Rate = r
	}
	if cf.center != "" {
		c, err := iq.ParseFrequency(cf.center)
		if err != nil {
			return opt, usagef("--center: %v", err)
		}
		opt.Center, opt.HasCenter = c, true
	}
	return opt, nil
}

// openCapture opens the capture at path ("-" for standard input) with the
// raw-input flags cf (may be nil). Errors name the file.
func openCapture(e *env, path string, cf *captureFlags) (*iq.Source, error) {
	opt, err := cf.options(e)
	if err != nil {
		return nil, err
	}
	return iq.Open(path, opt)
}

// captureOut is an I/Q output being written: samples go to temporary
// files beside the target, which Commit renames into place (both files of
// a SigMF pair) and Abort removes.
type captureOut struct {
	iq.Writer
	target  string
	meta    iq.Meta
	data    *outFile // nil for standard output
	metaOut *outFile // SigMF metadata, nil otherwise
	samples int64
	done    bool
}

// Write writes src and counts the samples for the SigMF metadata.
func (c *captureOut) Write(src []complex64) (int, error) {
	n, err := c.Writer.Write(src)
	c.samples += int64(n)
	return n, err
}

// Samples returns the number of samples written so far.
func (c *captureOut) Samples() int64 { return c.samples }

// createCapture opens an I/Q output chosen by the extension of target: a
// raw extension of the format table (datatype from the extension), .wav
// (meta.Datatype ci16_le → 16-bit PCM, otherwise 32-bit float), or
// .sigmf-meta/.sigmf-data (both files, datatype meta.Datatype, default
// cf32_le). Target "-" writes raw meta.Datatype (default cf32_le) to
// standard output. meta.Rate is the sample rate. inputs are refused as
// targets; an existing target needs force.
func createCapture(target string, meta iq.Meta, force bool, inputs ...string) (*captureOut, error) {
	return createCaptureTo(os.Stdout, target, meta, force, inputs...)
}

// createCaptureTo is createCapture with target "-" written to stdout (a
// command's env.stdout, so tests can read it).
func createCaptureTo(stdout io.Writer, target string, meta iq.Meta, force bool, inputs ...string) (*captureOut, error) {
	c := &captureOut{target: target, meta: meta}
	dt := meta.Datatype
	if dt == "" {
		dt = iq.CF32
	}
	if target == "-" {
		w, err := iq.NewRawWriter(stdout, dt)
		if err != nil {
			return nil, err
		}
		c.Writer = w
		return c, nil
	}
	container := iq.ContainerOf(target)
	switch container {
	case iq.ContainerRaw:
		dt, _ = iq.DatatypeFromExt(target)
	case iq.ContainerWAV:
		if dt != iq.CI16 {
			dt = iq.CF32
		}
	case iq.ContainerSigMF:
		if !dt.Valid() || dt.IsReal() {
			return nil, fmt.Errorf("%s: SigMF output datatype %q not supported (want cu8, ci8, ci16_le or cf32_le)", target, dt)
		}
	default:
		return nil, usagef("output %s: unknown extension (want .wav, .sigmf-meta, .sigmf-data, %s)", target, strings.Join(rawExtList(), ", "))
	}
	c.meta.Datatype = dt
	dataPath := target
	var metaPath string
	if container == iq.ContainerSigMF {
		metaPath, dataPath = iq.SigMFPaths(target)
		// Each file of the pair is checked against the other's inputs too.
		mo, err := createOutput(metaPath, force, append(inputs, sigmfPartners(inputs)...)...)
		if err != nil {
			return nil, err
		}
		c.metaOut = mo
	}
	d, err := createOutput(dataPath, force, append(inputs, sigmfPartners(inputs)...)...)
	if err != nil {
		if c.metaOut != nil {
			c.metaOut.Abort()
		}
		return nil, err
	}
	c.data = d
	kind := iq.ContainerRaw
	if container == iq.ContainerWAV {
		kind = iq.ContainerWAV
	}
	w, err := iq.NewWriter(d, kind, dt, meta.Rate)
	if err != nil {
		c.Abort()
		return nil, fmt.Errorf("%s: %w", target, err)
	}
	c.Writer = w
	return c, nil
}

// sigmfPartners returns the other file of each SigMF input pair, so that
// writing x.sigmf-data while reading x.sigmf-meta is refused.
func sigmfPartners(inputs []string) []string {
	var out []string
	for _, in := range inputs {
		if iq.ContainerOf(in) == iq.ContainerSigMF {
			m, d := iq.SigMFPaths(in)
			out = append(out, m, d)
		}
	}
	return out
}

func rawExtList() []string {
	return []string{".cu8", ".cs8", ".ci8", ".cs16", ".ci16", ".cf32", ".raw"}
}

// Commit finishes the writer, writes the SigMF metadata (with the sample
// count) and renames every temporary file onto its target. On error
// nothing is left behind.
func (c *captureOut) Commit() error {
	if c.done {
		return nil
	}
	if err := c.Writer.Close(); err != nil {
		c.Abort()
		return fmt.Errorf("%s: %w", c.target, err)
	}
	if c.data == nil { // standard output
		c.done = true
		return nil
	}
	if c.metaOut != nil {
		if err := iq.WriteSigMFMeta(c.metaOut, c.meta); err != nil {
			c.Abort()
			return fmt.Errorf("%s: %w", c.metaOut.target, err)
		}
		// Data first: a metadata file never points at missing data.
		if err := c.data.Commit(); err != nil {
			c.Abort()
			return err
		}
		c.done = true
		if err := c.metaOut.Commit(); err != nil {
			os.Remove(c.data.target)
			return err
		}
		return nil
	}
	c.done = true
	return c.data.Commit()
}

// Abort removes the temporary files; after Commit it does nothing.
func (c *captureOut) Abort() {
	if c.done {
		return
	}
	c.done = true
	if c.data != nil {
		c.data.Abort()
	}
	if c.metaOut != nil {
		c.metaOut.Abort()
	}
}
