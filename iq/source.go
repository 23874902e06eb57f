package iq

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"time"
)

// Meta describes a capture.
type Meta struct {
	Datatype    Datatype  // sample type in the file (ci24_le/ri24_le for 24-bit WAV)
	Rate        float64   // samples per second
	Center      float64   // centre frequency in Hz, valid when HasCenter
	HasCenter   bool      // Center is known
	Real        bool      // the file holds a real recording; Open delivers its analytic signal
	Samples     int64     // complex samples delivered, −1 if unknown (standard input)
	Container   string    // "raw", "wav" or "sigmf"
	Description string    // SigMF core:description
	Datetime    time.Time // start of the capture; zero if unknown
	Annotations []Annotation
	// Retunes lists the SigMF capture segments after the first whose
	// core:frequency differs from the segment's before (a recording
	// retuned part-way).
	// Center is the first segment's; offsets are relative to it
	// throughout, so frequencies after a retune are not the air's.
	Retunes []Retune
}

// Retune is a change of centre frequency at a sample of the recording.
type Retune struct {
	SampleStart int64
	Center      float64 // Hz
}

// Duration returns the length of the capture in seconds, or −1 when the
// number of samples or the rate is unknown.
func (m Meta) Duration() float64 {
	if m.Samples < 0 || m.Rate <= 0 {
		return -1
	}
	return float64(m.Samples) / m.Rate
}

// Annotation is a SigMF annotation (core namespace keys). SampleCount 0
// means to the end of the capture; frequency edges of 0 and 0 mean none.
type Annotation struct {
	SampleStart, SampleCount     int64
	FreqLowerEdge, FreqUpperEdge float64 // Hz, absolute
	Label, Comment               string
}

// Reader reads complex samples in the manner of io.Reader: it returns the
// number of samples written to dst and io.EOF at a clean end.
type Reader interface {
	Read(dst []complex64) (n int, err error)
}

// Options says what the bytes of a raw file or of standard input are.
// The zero value takes the datatype from the file extension.
type Options struct {
	Format    Datatype  // raw datatype; "" = from the extension
	Rate      float64   // sample rate, required for raw input
	Center    float64   // centre frequency, valid when HasCenter
	HasCenter bool      // Center was given
	Stdin     io.Reader // the data of path "-"
}

// readChunk is the number of file samples decoded per underlying read.
const readChunk = 16384

// complex24 is the internal layout of two-channel 24-bit PCM WAV data.
const complex24 Datatype = "ci24_le"

// Source streams the samples of a capture file as complex64. Real
// recordings are delivered as their analytic signal, time-aligned with
// the file and with the same number of samples. Source counts clipped
// samples and non-finite components (which it replaces by 0).
type Source struct {
	name      string
	meta      Meta
	f         *os.File // nil for standard input
	r         io.Reader
	layout    Datatype // sample layout in the file
	ss        int      // bytes per file sample
	remain    int64    // data bytes left, −1 if unknown
	off       int64    // byte offset of the next data byte in the file
	buf       []byte
	rbuf      []float32
	cbuf      []complex64
	an        *Analytic
	skip      int // analytic outputs still to drop
	tail      int // zero inputs still to feed after the end
	eof       bool
	err       error // sticky
	clipped   int64
	nonfinite int64
}

var _ Reader = (*Source)(nil)

// Open opens the capture at path. The container comes from the extension:
// .wav, .sigmf-meta or .sigmf-data, or a raw extension of the format table
// (.cu8, .cs8, .ci8, .cs16, .ci16, .cf32, .raw); opt.Format makes any other
// name raw. Path "-" reads opt.Stdin as raw data and needs opt.Format.
// Raw input needs opt.Rate; opt.Center gives raw and WAV files a centre
// frequency (SigMF metadata takes precedence). Errors name the file.
func Open(path string, opt Options) (*Source, error) {
	if path == "-" {
		if opt.Format == "" {
			return nil, errors.New("standard input: give the sample format (--format)")
		}
		if opt.Stdin == nil {
			return nil, errors.New("standard input: not available")
		}
		s, err := newRawSource("standard input", opt.Stdin, opt, -1)
		if err != nil {
			return nil, err
		}
		return s, nil
	}
	container := ContainerOf(path)
	if container == "" || (container == ContainerRaw && opt.Format != "") {
		if opt.Format == "" {
			// A missing file is the likelier mistake: say so first.
			if _, err := os.Stat(path); err != nil {
				return nil, errorWithoutOp(path, err)
			}
			return nil, fmt.Errorf("%s: unknown extension: give --format (cu8, ci8, ci16_le, cf32_le, rf32_le, ri16_le)", path)
		}
		container = ContainerRaw
	}
	switch container {
	case ContainerSigMF:
		return openSigMF(path, opt)
	case ContainerWAV:
		return openWAV(path, opt)
	}
	if opt.Format == "" {
		opt.Format, _ = DatatypeFromExt(path)
	}
	f, size, err := openFile(path)
	if err != nil {
		return nil, err
	}
	s, err := newRawSource(path, f, opt, size)
	if err != nil {
		f.Close()
		return nil, err
	}
	s.f = f
	return s, nil
}

// openFile opens a regular file and returns its size; an empty file is
// an error.
func openFile(path string) (*os.File, int64, error) {
	if err := checkRegular(path); err != nil {
		return nil, 0, err
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, 0, errorWithoutOp(path, err)
	}
	st, err := f.Stat()
	if err != nil {
		f.Close()
		return nil, 0, errorWithoutOp(path, err)
	}
	if st.Size() == 0 {
		f.Close()
		return nil, 0, formatErr(path, -1, "empty file")
	}
	return f, st.Size(), nil
}

// checkRegular refuses what is not a regular file before it is opened:
// opening a named pipe blocks until a writer comes, a device such as
// /dev/zero never ends, and both would be read once where commands read
// a capture twice. Standard input ("-") takes a stream.
func checkRegular(path string) error {
	st, err := os.Stat(path)
	if err != nil {
		return errorWithoutOp(path, err)
	}
	m := st.Mode()
	switch {
	case m.IsRegular():
		return nil
	case m.IsDir():
		return fmt.Errorf("%s: is a folder", path)
	case m&os.ModeNamedPipe != 0:
		return fmt.Errorf("%s: is a named pipe, not a file: pipe it to standard input instead (- with --format and --rate)", path)
	case m&os.ModeDevice != 0:
		return fmt.Errorf("%s: is a device, not a file: copy a bounded part to a file, or read it as standard input (- with --format and --rate)", path)
	}
	return fmt.Errorf("%s: is not a regular file (%v)", path, m.Type())
}

// errorWithoutOp reports a *PathError as "path: reason".
func errorWithoutOp(path string, err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		if errors.Is(pe.Err, os.ErrNotExist) {
			return fmt.Errorf("%s: no such file", path)
		}
		return fmt.Errorf("%s: %v", path, pe.Err)
	}
	return err
}

// newRawSource reads headerless samples of opt.Format from r holding size
// bytes (−1 if unknown). A size that is not a whole number of samples is
// refused.
func newRawSource(name string, r io.Reader, opt Options, size int64) (*Source, error) {
	dt := opt.Format
	if !dt.Valid() {
		if _, err := ParseDatatype(string(dt)); err != nil {
			return nil, &UnsupportedError{File: name, What: "datatype " + quote(string(dt))}
		}
		dt, _ = ParseDatatype(string(dt))
	}
	if !(opt.Rate > 0) {
		return nil, fmt.Errorf("%s: raw samples carry no sample rate: give --rate", name)
	}
	ss := dt.SampleSize()
	if size >= 0 && size%int64(ss) != 0 {
		return nil, formatErr(name, -1, "size %s is not a whole number of %d-byte %s samples (%s left over): wrong --format or a cut file", plural(size, "byte"), ss, dt, plural(size%int64(ss), "byte"))
	}
	m := Meta{Datatype: dt, Rate: opt.Rate, Center: opt.Center, HasCenter: opt.HasCenter, Real: dt.IsReal(), Samples: -1, Container: ContainerRaw}
	if size >= 0 {
		m.Samples = size / int64(ss)
	}
	return newSource(name, r, m, dt, size), nil
}

func newSource(name string, r io.Reader, m Meta, layout Datatype, size int64) *Source {
	s := &Source{name: name, meta: m, r: r, layout: layout, remain: size}
	switch layout {
	case complex24:
		s.ss = 6
	case pcm24:
		s.ss = 3
	default:
		s.ss = layout.SampleSize()
	}
	s.buf = make([]byte, readChunk*s.ss)
	if m.Real {
		s.an = NewAnalytic(DefaultAnalyticTaps)
		s.skip = s.an.Delay()
		s.tail = s.an.Delay()
		s.rbuf = make([]float32, readChunk)
		s.cbuf = make([]complex64, readChunk)
	}
	return s
}

// CheckWAV reads the header of the WAV file at path and checks it
// against the file as Open does (a regular file; 1 or 2 channels of 16-
// or 24-bit PCM or 32-bit float; a data chunk of whole frames within the
// file), without reading the samples. Errors name the file and the fault.
func CheckWAV(path string) error {
	f, _, err := openWAVFile(path)
	if err != nil {
		return err
	}
	return f.Close()
}

// openWAVFile opens a WAV file, reads and checks its header and leaves
// the file positioned at the first sample.
func openWAVFile(path string) (*os.File, wavHeader, error) {
	f, size, err := openFile(path)
	if err != nil {
		return nil, wavHeader{}, err
	}
	h, err := readWAVHeader(f, path)
	if err == nil {
		err = h.check(path, size)
	}
	if err != nil {
		f.Close()
		return nil, h, err
	}
	return f, h, nil
}

// check checks the data chunk against a file of size bytes.
func (h wavHeader) check(path string, size int64) error {
	if h.DataOffset+h.DataSize > size {
		return formatErr(path, h.DataOffset-4, "data chunk of %d bytes runs past the end of the %d-byte file (cut file?)", h.DataSize, size)
	}
	fs := int64(h.frameSize())
	if h.DataSize%fs != 0 {
		return formatErr(path, h.DataOffset-4, "data chunk of %d bytes is not a whole number of %d-byte frames", h.DataSize, fs)
	}
	if h.DataSize == 0 {
		return formatErr(path, h.DataOffset, "no samples")
	}
	return nil
}

func openWAV(path string, opt Options) (*Source, error) {
	f, h, err := openWAVFile(path)
	if err != nil {
		return nil, err
	}
	fs := int64(h.frameSize())
	var layout, dt Datatype
	switch {
	case h.Channels == 2 && h.Float:
		layout, dt = CF32, CF32
	case h.Channels == 2 && h.Bits == 16:
		layout, dt = CI16, CI16
	case h.Channels == 2:
		layout, dt = complex24, complex24
	case h.Float:
		layout, dt = RF32, RF32
	case h.Bits == 16:
		layout, dt = RI16, RI16
	default:
		layout, dt = pcm24, pcm24
	}
	m := Meta{Datatype: dt, Rate: float64(h.Rate), Center: opt.Center, HasCenter: opt.HasCenter,
		Real: h.Channels == 1, Samples: h.DataSize / fs, Container: ContainerWAV}
	s := newSource(path, f, m, layout, h.DataSize)
	s.f = f
	s.off = h.DataOffset
	return s, nil
}

func openSigMF(path string, opt Options) (*Source, error) {
	if strings.EqualFold(filepath.Ext(path), ".sigmf") {
		// The SigMF archive format: a tar file of the pair, not read here.
		if st, err := os.Stat(path); err == nil && st.Mode().IsRegular() {
			return nil, &UnsupportedError{File: path, What: "SigMF archive (a tar file): extract its .sigmf-meta and .sigmf-data files and give either"}
		}
	}
	metaPath, dataPath := SigMFPaths(path)
	if err := checkRegular(metaPath); err != nil {
		return nil, err
	}
	mf, err := os.Open(metaPath)
	if err != nil {
		return nil, errorWithoutOp(metaPath, err)
	}
	m, x, err := readSigMFMeta(mf, metaPath)
	mf.Close()
	if err != nil {
		return nil, err
	}
	if err := x.checkDataset(metaPath, dataPath); err != nil {
		return nil, err
	}
	if m.Rate == 0 {
		if !(opt.Rate > 0) {
			return nil, fmt.Errorf("%s: no core:sample_rate: give --rate", metaPath)
		}
		m.Rate = opt.Rate
	}
	if !m.HasCenter && opt.HasCenter {
		m.Center, m.HasCenter = opt.Center, true
	}
	f, size, err := openFile(dataPath)
	if err != nil {
		return nil, err
	}
	ss := int64(m.Datatype.SampleSize())
	if size%ss != 0 {
		f.Close()
		return nil, formatErr(dataPath, -1, "size %s is not a whole number of %d-byte %s samples (%s left over)", plural(size, "byte"), ss, m.Datatype, plural(size%ss, "byte"))
	}
	m.Samples = size / ss
	if err := x.checkLength(metaPath, dataPath, m.Samples); err != nil {
		f.Close()
		return nil, err
	}
	s := newSource(dataPath, f, m, m.Datatype, size)
	s.f = f
	return s, nil
}

// Meta returns the description of the capture.
func (s *Source) Meta() Meta { return s.meta }

// Name returns the file name used in errors ("standard input" for "-").
func (s *Source) Name() string { return s.name }

// Clipped returns the number of samples read so far with a component at
// full scale: the rail code for integer formats, |v| ≥ 1 for floats. For
// real recordings it counts the real samples.
func (s *Source) Clipped() int64 { return s.clipped }

// NonFinite returns the number of NaN or ±Inf components read so far;
// each was delivered as 0.
func (s *Source) NonFinite() int64 { return s.nonfinite }

// Close closes the file (not standard input).
func (s *Source) Close() error {
	if s.f != nil {
		err := s.f.Close()
		s.f = nil
		return err
	}
	return nil
}

// Read fills dst with the next samples and returns how many it wrote. It
// fills dst completely unless the capture ends or an error occurs first;
// it returns 0, io.EOF after the last sample. A partial sample at the end
// of standard input is a *FormatError. Read does not allocate.
func (s *Source) Read(dst []complex64) (int, error) {
	if s.meta.Real {
		return s.readReal(dst)
	}
	n := 0
	for n < len(dst) {
		k, err := s.readComplex(dst[n:min(len(dst), n+readChunk)])
		n += k
		if err != nil {
			if n > 0 && err == io.EOF {
				return n, nil
			}
			if n > 0 {
				return n, nil // the error is sticky and returned next
			}
			return 0, err
		}
	}
	return n, nil
}

// fill reads up to k whole file samples into s.buf and returns how many.
func (s *Source) fill(k int) (int, error) {
	if s.err != nil {
		return 0, s.err
	}
	want := int64(k * s.ss)
	if s.remain >= 0 {
		want = min(want, s.remain)
	}
	if want == 0 {
		s.err = io.EOF
		return 0, io.EOF
	}
	got, err := io.ReadFull(s.r, s.buf[:want])
	s.off += int64(got)
	if s.remain >= 0 {
		s.remain -= int64(got)
	}
	whole := got / s.ss
	switch {
	case err == nil:
	case err == io.EOF:
		if s.remain > 0 {
			s.err = formatErr(s.name, s.off, "file ended early")
		} else {
			s.err = io.EOF
		}
	case err == io.ErrUnexpectedEOF:
		if got%s.ss != 0 {
			s.err = formatErr(s.name, s.off-int64(got%s.ss), "input ends inside a sample (%d of %d bytes)", got%s.ss, s.ss)
		} else if s.remain > 0 {
			s.err = formatErr(s.name, s.off, "file ended early")
		} else {
			s.err = io.EOF
		}
	default:
		s.err = fmt.Errorf("%s: %w", s.name, err)
	}
	if whole == 0 {
		return 0, s.err
	}
	return whole, nil
}

func (s *Source) readComplex(dst []complex64) (int, error) {
	k, err := s.fill(len(dst))
	if k == 0 {
		return 0, err
	}
	var c, nf int
	if s.layout == complex24 {
		c = decodeComplex24(dst[:k], s.buf)
	} else {
		c, nf = decodeComplex(s.layout, dst[:k], s.buf)
	}
	s.clipped += int64(c)
	s.nonfinite += int64(nf)
	return k, nil
}

// readReal delivers the analytic signal of a real recording: the
// converter's output with its first Delay samples dropped and Delay zero
// inputs fed after the end, so output sample i lines up with input i.
func (s *Source) readReal(dst []complex64) (int, error) {
	n := 0
	for n < len(dst) {
		k := min(readChunk, len(dst)-n+s.skip)
		var in []float32
		if !s.eof {
			m, err := s.fill(k)
			if m > 0 {
				c, nf := decodeReal(s.layout, s.rbuf[:m], s.buf)
				s.clipped += int64(c)
				s.nonfinite += int64(nf)
				in = s.rbuf[:m]
			} else if err == io.EOF {
				s.eof = true
			} else {
				if n > 0 {
					return n, nil
				}
				return 0, err
			}
		}
		if s.eof {
			if s.tail == 0 {
				break
			}
			m := min(k, s.tail)
			in = s.rbuf[:m]
			clear(in)
			s.tail -= m
		}
		out := s.an.Process(s.cbuf[:len(in)], in)
		drop := min(s.skip, len(out))
		s.skip -= drop
		n += copy(dst[n:], out[drop:])
	}
	if n == 0 {
		return 0, io.EOF
	}
	return n, nil
}

// plural returns "1 byte", "2 bytes" and so on.
func plural(n int64, unit string) string {
	if n == 1 {
		return "1 " + unit
	}
	return fmt.Sprintf("%d %ss", n, unit)
}
