package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"strings"
	"sync/atomic"

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
		r, err := parseRate("--rate", cf.rate)
		if err != nil {
			return opt, err
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
// raw-input flags cf (may be nil). Errors name the file. A WAV or SigMF
// file describes itself: a --format or --rate that disagrees with it, or
// a --center that its SigMF metadata overrides, draws a warning.
func openCapture(e *env, path string, cf *captureFlags) (*iq.Source, error) {
	opt, err := cf.options(e)
	if err != nil {
		return nil, err
	}
	src, err := iq.Open(path, opt)
	if err != nil {
		return nil, err
	}
	if m := src.Meta(); !(m.Rate >= minRate && m.Rate <= maxRate) {
		src.Close()
		name := path // the file the rate came from (metadata, not data)
		if path == "-" {
			name = src.Name()
		}
		return nil, fmt.Errorf("%s: sample rate %.10g Hz is out of range (ssbkit reads rates %s)", name, m.Rate, rateRange)
	}
	if m := src.Meta(); m.Container != iq.ContainerRaw {
		if opt.Format != "" && opt.Format != m.Datatype {
			e.warnf("--format %s ignored: %s holds %s", cf.format, path, m.Datatype)
		}
		if opt.Rate != 0 && opt.Rate != m.Rate {
			e.warnf("--rate %s ignored: %s says %.10g Hz", cf.rate, path, m.Rate)
		}
		if opt.HasCenter && m.Center != opt.Center {
			e.warnf("--center %s ignored: %s says %.10g Hz", cf.center, path, m.Center)
		}
		if r := m.Retunes; len(r) > 0 {
			more := ""
			if len(r) > 1 {
				more = fmt.Sprintf("; %d retunes in all", len(r))
			}
			e.warnf("%s is retuned part-way (to %.10g Hz at sample %d%s): frequencies are taken from the first centre, %.10g Hz, throughout",
				path, r[0].Center, r[0].SampleStart, more, m.Center)
		}
	}
	return src, nil
}

// reopenCapture opens path again for another pass, as openCapture did
// but without repeating its warnings.
func reopenCapture(e *env, path string, cf *captureFlags) (*iq.Source, error) {
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
	data    *outFile  // nil for standard output
	metaOut *outFile  // SigMF metadata, nil otherwise
	sink    *fileSink // with captureOpts.writeBehind, nil otherwise
	samples int64
	done    bool
}

// captureOpts are the settings of openCaptureOut. The zero value refuses
// an existing target and writes on the caller's goroutine.
type captureOpts struct {
	// force allows overwriting an existing target.
	force bool
	// writeBehind hands the encoded bytes to a goroutine that makes the
	// write system calls (a fileSink), so that on two cores they overlap
	// the caller's work: for a 1.15 GB tx output they cost about as much
	// as all the filtering. Encoding stays on the caller's goroutine.
	// Memory stays bounded (fileSinkBufs buffers of fileSinkBuf bytes).
	writeBehind bool
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
	return openCaptureOut(stdout, target, meta, captureOpts{force: force}, inputs...)
}

// openCaptureOut is createCaptureTo with the settings in opt (overwrite,
// asynchronous writes). Commit and Abort also stop the write-behind
// goroutine; Commit reports its first write error.
func openCaptureOut(stdout io.Writer, target string, meta iq.Meta, opt captureOpts, inputs ...string) (*captureOut, error) {
	force := opt.force
	c := &captureOut{target: target, meta: meta}
	dt := meta.Datatype
	if dt == "" {
		dt = iq.CF32
	}
	if target == "-" {
		c.target = outName(target)
		var out io.Writer = stdoutWriter{stdout}
		if opt.writeBehind {
			c.sink = newFileSink(out)
			out = c.sink
		}
		w, err := iq.NewRawWriter(out, dt)
		if err != nil {
			c.Abort()
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
	var dst io.WriteSeeker = d
	if opt.writeBehind {
		c.sink = newFileSink(d)
		dst = c.sink
	}
	w, err := iq.NewWriter(dst, kind, dt, meta.Rate)
	if err != nil {
		c.Abort()
		return nil, fmt.Errorf("%s: %w", target, err)
	}
	c.Writer = w
	return c, nil
}

// outName names an output in messages: "standard output" for "-".
func outName(target string) string {
	if target == "-" {
		return "standard output"
	}
	return target
}

// stdoutWriter passes writes to standard output with the *PathError
// ("write /dev/stdout: …") dropped: the message names standard output.
type stdoutWriter struct{ w io.Writer }

func (s stdoutWriter) Write(p []byte) (int, error) {
	n, err := s.w.Write(p)
	return n, unwrapPath(err)
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
	if c.sink != nil {
		if err := c.sink.Close(); err != nil {
			c.Abort()
			return fmt.Errorf("%s: %w", c.target, err)
		}
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
	if c.sink != nil {
		c.sink.Close() // stop the goroutine before the file is closed
	}
	if c.data != nil {
		c.data.Abort()
	}
	if c.metaOut != nil {
		c.metaOut.Abort()
	}
}

// fileSinkBuf is the size of a fileSink buffer and of its writes: larger
// writes cost more system time on a busy machine (measured: 1 MB writes
// of a 1.15 GB file took 0.6 to 3.9 s of system time, 64 kB writes 0.5
// to 0.8 s, on the project's shared 2-core machine).
const fileSinkBuf = 64 << 10

// fileSinkBufs is the number of buffers of a fileSink.
const fileSinkBufs = 16

// fileSink passes bytes to a goroutine that writes them to w, so that the
// system calls overlap the caller's work. Write copies into buffers from
// a fixed pool of fileSinkBufs (memory bounded whatever the output size)
// and returns before the data is written; the first write error is sticky
// and returned by later calls and by Close. Seek waits until everything
// queued is written, then seeks w (which must then be an io.Seeker), so
// a WAV writer can patch its header. Close writes what is queued and
// stops the goroutine; it may be called more than once.
type fileSink struct {
	w       io.Writer
	cur     []byte
	q, free chan []byte
	done    chan struct{}
	err     atomic.Pointer[error]
	closed  bool
	held    [fileSinkBufs][]byte // Flush's scratch: every buffer, back from the goroutine
}

var _ io.WriteSeeker = (*fileSink)(nil)

func newFileSink(w io.Writer) *fileSink {
	s := &fileSink{w: w, q: make(chan []byte, fileSinkBufs), free: make(chan []byte, fileSinkBufs), done: make(chan struct{})}
	for range fileSinkBufs {
		s.free <- make([]byte, 0, fileSinkBuf)
	}
	s.cur = <-s.free
	go func() {
		defer close(s.done)
		for b := range s.q {
			if s.err.Load() == nil {
				if _, err := w.Write(b); err != nil {
					s.err.Store(&err)
				}
			}
			s.free <- b[:0]
		}
	}()
	return s
}

// error returns the first write error, or nil.
func (s *fileSink) error() error {
	if e := s.err.Load(); e != nil {
		return *e
	}
	return nil
}

// Write queues p for writing.
func (s *fileSink) Write(p []byte) (int, error) {
	if err := s.error(); err != nil {
		return 0, err
	}
	if s.closed {
		return 0, errors.New("write after close")
	}
	n := len(p)
	for len(p) > 0 {
		k := copy(s.cur[len(s.cur):cap(s.cur)], p)
		s.cur = s.cur[:len(s.cur)+k]
		p = p[k:]
		if len(s.cur) == cap(s.cur) {
			s.q <- s.cur
			s.cur = <-s.free
		}
	}
	return n, nil
}

// Flush waits until everything written so far has reached w and returns
// the first write error.
func (s *fileSink) Flush() error {
	if s.closed {
		return s.error()
	}
	if len(s.cur) > 0 {
		s.q <- s.cur
		s.cur = nil
	}
	// Every buffer but the one held back is queued or free; once all
	// are free, the queue is written.
	need := fileSinkBufs
	if s.cur != nil {
		need--
	}
	for i := range need {
		s.held[i] = <-s.free
	}
	if s.cur == nil {
		s.cur = s.held[0]
		s.held[0] = nil
	}
	for i := range need {
		if s.held[i] != nil {
			s.free <- s.held[i]
			s.held[i] = nil
		}
	}
	return s.error()
}

// Seek flushes, then seeks the underlying writer.
func (s *fileSink) Seek(offset int64, whence int) (int64, error) {
	if err := s.Flush(); err != nil {
		return 0, err
	}
	sk, ok := s.w.(io.Seeker)
	if !ok {
		return 0, errors.New("output cannot seek")
	}
	return sk.Seek(offset, whence)
}

// Close writes what is queued, stops the goroutine and returns the first
// write error.
func (s *fileSink) Close() error {
	if !s.closed {
		s.closed = true
		if len(s.cur) > 0 {
			s.q <- s.cur
		}
		close(s.q)
		<-s.done
	}
	return s.error()
}
