package iq

import (
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
)

// The WAV header is read and written here rather than with go-audio/wav:
// its v1.1.0 decoder drops the sub-format of WAVE_FORMAT_EXTENSIBLE (so
// 24-bit and float files cannot be told apart), allocates the fmt chunk's
// declared size unchecked (unsafe for untrusted headers), and its encoder
// reserves a minute of audio in memory at construction (gigabytes at I/Q
// rates) and writes one sample per binary.Write. The tests read our files
// back with go-audio/wav as an independent check.

// WAV format tags (Microsoft RIFF/WAVE, common practice).
const (
	wavPCM        = 1
	wavFloat      = 3
	wavExtensible = 0xFFFE
)

// wavGUIDBase is bytes 2 to 15 of the KSDATAFORMAT_SUBTYPE GUIDs
// {0000XXXX-0000-0010-8000-00AA00389B71} as stored in a WAVE_FORMAT_EXTENSIBLE
// fmt chunk (Microsoft's mmreg.h, common practice), XXXX the format tag.
const wavGUIDBase = "\x00\x00\x00\x00\x10\x00\x80\x00\x00\xaa\x00\x38\x9b\x71"

// guidString formats the 16 bytes of a GUID stored little-endian.
func guidString(g []byte) string {
	le := binary.LittleEndian
	return fmt.Sprintf("{%08X-%04X-%04X-%X-%X}", le.Uint32(g[0:4]), le.Uint16(g[4:6]), le.Uint16(g[6:8]), g[8:10], g[10:16])
}

// wavHeader is what ssbkit needs of a WAV file's header.
type wavHeader struct {
	Channels   int
	Rate       uint32
	Bits       int
	Float      bool
	DataOffset int64 // byte offset of the first sample
	DataSize   int64 // bytes of sample data
}

// frameSize is the size in bytes of one frame (all channels).
func (h wavHeader) frameSize() int { return h.Channels * h.Bits / 8 }

// maxFmtSize bounds the fmt chunk; real ones are 16 to 40 bytes.
const maxFmtSize = 1 << 10

// readWAVHeader reads a RIFF/WAVE header from r up to the start of the
// data chunk. It accepts 1 (real) or 2 (I/Q) channels of 16- or 24-bit
// PCM or 32-bit float, plain or WAVE_FORMAT_EXTENSIBLE; name is used in
// errors. It never allocates more than a small fixed buffer.
func readWAVHeader(r io.Reader, name string) (wavHeader, error) {
	var h wavHeader
	var off int64
	var b [40]byte
	if _, err := io.ReadFull(r, b[:12]); err != nil {
		if err == io.EOF {
			return h, formatErr(name, -1, "empty file")
		}
		return h, formatErr(name, 0, "not a WAV file: too short")
	}
	if string(b[0:4]) != "RIFF" || string(b[8:12]) != "WAVE" {
		return h, formatErr(name, 0, "not a WAV file (no RIFF/WAVE header)")
	}
	off = 12
	haveFmt := false
	for {
		if _, err := io.ReadFull(r, b[:8]); err != nil {
			if !haveFmt {
				return h, formatErr(name, off, "no fmt chunk")
			}
			return h, formatErr(name, off, "no data chunk")
		}
		id := string(b[0:4])
		size := int64(binary.LittleEndian.Uint32(b[4:8]))
		off += 8
		switch id {
		case "fmt ":
			if size < 16 || size > maxFmtSize {
				return h, formatErr(name, off-4, "fmt chunk size %d is not valid", size)
			}
			n := min(size, int64(len(b)))
			if _, err := io.ReadFull(r, b[:n]); err != nil {
				return h, formatErr(name, off, "fmt chunk cut short")
			}
			if err := skip(r, size-n+size%2); err != nil {
				return h, formatErr(name, off, "fmt chunk cut short")
			}
			tag := binary.LittleEndian.Uint16(b[0:2])
			h.Channels = int(binary.LittleEndian.Uint16(b[2:4]))
			h.Rate = binary.LittleEndian.Uint32(b[4:8])
			blockAlign := int(binary.LittleEndian.Uint16(b[12:14]))
			h.Bits = int(binary.LittleEndian.Uint16(b[14:16]))
			if tag == wavExtensible {
				if n < 40 {
					return h, formatErr(name, off, "WAVE_FORMAT_EXTENSIBLE fmt chunk too short")
				}
				// The sub-format GUID: a format tag in the first two
				// bytes of the standard base GUID; any other is unknown.
				if string(b[26:40]) != wavGUIDBase {
					return h, &UnsupportedError{File: name, What: "WAV sub-format " + guidString(b[24:40]) + " (want PCM or IEEE float)"}
				}
				tag = binary.LittleEndian.Uint16(b[24:26])
			}
			switch {
			case tag == wavPCM && (h.Bits == 16 || h.Bits == 24):
			case tag == wavFloat && h.Bits == 32:
				h.Float = true
			case tag == wavPCM || tag == wavFloat:
				return h, &UnsupportedError{File: name, What: fmt.Sprintf("WAV sample size %d bits (want 16- or 24-bit PCM or 32-bit float)", h.Bits)}
			default:
				return h, &UnsupportedError{File: name, What: fmt.Sprintf("WAV encoding (format tag %#x; want PCM or IEEE float)", tag)}
			}
			if h.Channels < 1 || h.Channels > 2 {
				return h, &UnsupportedError{File: name, What: fmt.Sprintf("WAV with %d channels (want 1 for a real recording, 2 for I/Q)", h.Channels)}
			}
			if h.Rate == 0 {
				return h, formatErr(name, off+4, "sample rate is 0")
			}
			if blockAlign != h.frameSize() {
				return h, formatErr(name, off+12, "block align %d does not match %d channels of %d bits", blockAlign, h.Channels, h.Bits)
			}
			haveFmt = true
			off += size + size%2
		case "data":
			if !haveFmt {
				return h, formatErr(name, off-8, "data chunk before fmt chunk")
			}
			h.DataOffset = off
			h.DataSize = size
			return h, nil
		default:
			if err := skip(r, size+size%2); err != nil {
				return h, formatErr(name, off, "%q chunk cut short", id)
			}
			off += size + size%2
		}
	}
}

// skip discards n bytes of r, seeking when it can.
func skip(r io.Reader, n int64) error {
	if n == 0 {
		return nil
	}
	if s, ok := r.(io.Seeker); ok {
		cur, err := s.Seek(0, io.SeekCurrent)
		if err == nil {
			end, err := s.Seek(0, io.SeekEnd)
			if err != nil {
				return err
			}
			if cur+n > end {
				s.Seek(end, io.SeekStart)
				return io.ErrUnexpectedEOF
			}
			_, err = s.Seek(cur+n, io.SeekStart)
			return err
		}
	}
	m, err := io.CopyN(io.Discard, r, n)
	if m < n {
		if err == nil || err == io.EOF {
			err = io.ErrUnexpectedEOF
		}
		return err
	}
	return nil
}

// wavWriter writes two-channel I/Q WAV data: 16-bit PCM (CI16) or 32-bit
// IEEE float (CF32). The sizes in the header are filled in by Close.
type wavWriter struct {
	w      io.WriteSeeker
	dt     Datatype
	enc    encoder
	start  int64 // offset of the RIFF header
	hdrLen int64
	data   int64 // bytes of sample data written
	err    error
	closed bool
}

// maxWAVData is the largest data chunk a RIFF file can describe.
const maxWAVData = math.MaxUint32 - 64

func newWAVWriter(w io.WriteSeeker, dt Datatype, rate float64) (*wavWriter, error) {
	if dt != CI16 && dt != CF32 {
		return nil, &UnsupportedError{What: "WAV sample type " + string(dt) + " (want ci16_le or cf32_le)"}
	}
	if rate <= 0 || rate != math.Trunc(rate) || rate > math.MaxUint32 {
		return nil, fmt.Errorf("WAV needs a whole positive sample rate, got %g", rate)
	}
	start, err := w.Seek(0, io.SeekCurrent)
	if err != nil {
		return nil, err
	}
	ww := &wavWriter{w: w, dt: dt, enc: encoder{dt: dt}, start: start}
	hdr := ww.header(uint32(rate), 0)
	ww.hdrLen = int64(len(hdr))
	if _, err := w.Write(hdr); err != nil {
		return nil, err
	}
	return ww, nil
}

// header returns the RIFF/WAVE header for data bytes of sample data:
// a canonical 44-byte PCM header, or for float the extended fmt chunk
// (cbSize 0) and the fact chunk that non-PCM WAV files carry.
func (ww *wavWriter) header(rate uint32, data uint32) []byte {
	le := binary.LittleEndian
	bits, tag, fmtSize := 16, uint16(wavPCM), uint32(16)
	if ww.dt == CF32 {
		bits, tag, fmtSize = 32, wavFloat, 18
	}
	frame := 2 * bits / 8
	var h []byte
	h = append(h, "RIFF"...)
	h = le.AppendUint32(h, 0) // patched below
	h = append(h, "WAVE"...)
	h = append(h, "fmt "...)
	h = le.AppendUint32(h, fmtSize)
	h = le.AppendUint16(h, tag)
	h = le.AppendUint16(h, 2)
	h = le.AppendUint32(h, rate)
	h = le.AppendUint32(h, rate*uint32(frame))
	h = le.AppendUint16(h, uint16(frame))
	h = le.AppendUint16(h, uint16(bits))
	if fmtSize == 18 {
		h = le.AppendUint16(h, 0)
		h = append(h, "fact"...)
		h = le.AppendUint32(h, 4)
		h = le.AppendUint32(h, data/uint32(frame))
	}
	h = append(h, "data"...)
	h = le.AppendUint32(h, data)
	le.PutUint32(h[4:8], uint32(len(h))-8+data)
	return h
}

func (ww *wavWriter) Write(src []complex64) (int, error) {
	if ww.err != nil {
		return 0, ww.err
	}
	if ww.closed {
		return 0, errors.New("iq: write after Close")
	}
	ss := ww.dt.SampleSize()
	if ww.data+int64(len(src)*ss) > maxWAVData {
		ww.err = errors.New("WAV files end at 4 GiB: write SigMF or raw for longer captures")
		return 0, ww.err
	}
	nb, err := ww.enc.write(ww.w, src)
	ww.data += nb
	if err != nil {
		ww.err = err
	}
	return int(nb / int64(ss)), err
}

// Close writes the final sizes into the header and leaves the underlying
// writer positioned at the end of the data. It does not close it.
func (ww *wavWriter) Close() error {
	if ww.closed {
		return ww.err
	}
	ww.closed = true
	if ww.err != nil {
		return ww.err
	}
	hdr := ww.header(0, uint32(ww.data))
	// Only the size fields change: RIFF size, fact length, data size.
	le := binary.LittleEndian
	if _, err := ww.w.Seek(ww.start+4, io.SeekStart); err != nil {
		ww.err = err
		return err
	}
	if _, err := ww.w.Write(hdr[4:8]); err != nil {
		ww.err = err
		return err
	}
	if ww.dt == CF32 {
		if _, err := ww.w.Seek(ww.start+ww.hdrLen-12, io.SeekStart); err != nil {
			ww.err = err
			return err
		}
		var f [4]byte
		le.PutUint32(f[:], uint32(ww.data/8))
		if _, err := ww.w.Write(f[:]); err != nil {
			ww.err = err
			return err
		}
	}
	if _, err := ww.w.Seek(ww.start+ww.hdrLen-4, io.SeekStart); err != nil {
		ww.err = err
		return err
	}
	if _, err := ww.w.Write(hdr[len(hdr)-4:]); err != nil {
		ww.err = err
		return err
	}
	_, err := ww.w.Seek(ww.start+ww.hdrLen+ww.data, io.SeekStart)
	ww.err = err
	return err
}

// NonFinite returns the number of NaN or ±Inf components written as 0.
func (ww *wavWriter) NonFinite() int64 { return ww.enc.nonfin }
