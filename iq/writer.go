package iq

import (
	"errors"
	"fmt"
	"io"
)

// Writer writes complex samples to a capture file. Write encodes src
// following the design's format table (NaN and ±Inf components become 0;
// integers are clamped); errors are sticky. Close flushes and finalises
// the container (the WAV sizes) but does not close the underlying file.
type Writer interface {
	Write(src []complex64) (int, error)
	Close() error
}

// writeChunk is the number of samples encoded per underlying write.
const writeChunk = 8192

// NewWriter returns a Writer of samples of datatype dt at rate samples per
// second in container "raw" or "wav". WAV supports CI16 (16-bit PCM) and
// CF32 (32-bit IEEE float), two channels, I left and Q right. Raw supports
// CU8, CI8, CI16 and CF32. A raw writer never seeks, so w may be a pipe
// wrapped in a type with a failing Seek; see NewRawWriter.
func NewWriter(w io.WriteSeeker, container string, dt Datatype, rate float64) (Writer, error) {
	switch container {
	case ContainerRaw:
		return NewRawWriter(w, dt)
	case ContainerWAV:
		return newWAVWriter(w, dt, rate)
	}
	return nil, &UnsupportedError{What: fmt.Sprintf("output container %q (want raw or wav)", container)}
}

// RawWriter writes interleaved I/Q samples with no header.
type RawWriter struct {
	w   io.Writer
	enc encoder
	err error
}

var (
	_ Writer = (*RawWriter)(nil)
	_ Writer = (*wavWriter)(nil)
)

// NewRawWriter returns a Writer of headerless samples of datatype dt, which
// must be complex (CU8, CI8, CI16 or CF32).
func NewRawWriter(w io.Writer, dt Datatype) (*RawWriter, error) {
	if !dt.Valid() || dt.IsReal() {
		return nil, &UnsupportedError{What: "raw output datatype " + quote(string(dt)) + " (want cu8, ci8, ci16_le or cf32_le)"}
	}
	return &RawWriter{w: w, enc: encoder{dt: dt}}, nil
}

// Write encodes and writes src. It does not allocate after the first call.
func (rw *RawWriter) Write(src []complex64) (int, error) {
	if rw.err != nil {
		return 0, rw.err
	}
	nb, err := rw.enc.write(rw.w, src)
	if err != nil {
		rw.err = err
	}
	return int(nb / int64(rw.enc.dt.SampleSize())), err
}

// Close returns the first write error, if any. It does not close the
// underlying writer.
func (rw *RawWriter) Close() error {
	err := rw.err
	if rw.err == nil {
		rw.err = errors.New("iq: write after Close")
	}
	return err
}

// NonFinite returns the number of NaN or ±Inf components written as 0.
func (rw *RawWriter) NonFinite() int64 { return rw.enc.nonfin }

// encoder encodes samples of one datatype for a writer (RawWriter and
// the WAV writer share it) and counts the non-finite components.
type encoder struct {
	dt     Datatype
	buf    []byte // writeChunk samples, allocated on first use
	nonfin int64
}

// write encodes src in pieces of at most writeChunk samples and writes
// each piece to w. It returns the number of bytes written (a partial
// piece on error) and the first write error.
//
// For cf32_le on a little-endian machine a piece with no NaN or ±Inf is
// written straight from the memory of src (see encodeCF32): io.Writer
// implementations may neither modify nor retain p, so this saves the
// copy through buf without changing what is written.
func (e *encoder) write(w io.Writer, src []complex64) (int64, error) {
	ss := e.dt.SampleSize()
	var written int64
	for len(src) > 0 {
		k := min(len(src), writeChunk)
		var b []byte
		if e.dt == CF32 && nativeLE && finiteCF32(cf32View(src[:k])) {
			b = cf32View(src[:k])
		} else {
			if e.buf == nil {
				e.buf = make([]byte, writeChunk*ss)
			}
			b = e.buf[:k*ss]
			e.nonfin += int64(encodeComplex(e.dt, b, src[:k]))
		}
		m, err := w.Write(b)
		written += int64(m)
		if err != nil {
			return written, err
		}
		src = src[k:]
	}
	return written, nil
}
