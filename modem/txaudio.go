package modem

import (
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"os"

	"github.com/go-audio/wav"
)

// AudioSource delivers mono audio in float32 full scale ±1.
type AudioSource interface {
	// Read fills dst and returns the count; io.EOF when done.
	Read(dst []float32) (int, error)
	// Rate is the sample rate in Hz.
	Rate() float64
	// Frames is the number of samples in all, −1 if unknown.
	Frames() int64
}

// WAV formats (the fmt chunk's format tag).
const (
	wavPCM        = 1
	wavFloat      = 3
	wavExtensible = 0xFFFE
)

// AudioFile reads a WAV audio file: mono or stereo (mixed down to the mean
// of the channels), 8 to 192 kHz, 16- or 24-bit PCM or 32-bit float.
// go-audio/wav parses the header and finds the data chunk; the samples are
// decoded here in bulk from a reused buffer, since the library's
// PCMBuffer decodes one sample at a time through an io.Reader and
// allocates on every call, and returns float samples as raw bits.
type AudioFile struct {
	name   string
	f      *os.File
	r      io.Reader
	ch     int
	bits   int
	float  bool
	rate   float64
	frames int64
	left   int64 // bytes of sample data left
	buf    []byte
}

var _ AudioSource = (*AudioFile)(nil)

// OpenAudio opens a WAV file for reading. Errors name the file and say
// what is wrong with it.
func OpenAudio(name string) (*AudioFile, error) {
	f, err := os.Open(name)
	if err != nil {
		return nil, err
	}
	a, err := openAudio(f, name)
	if err != nil {
		f.Close()
		return nil, err
	}
	return a, nil
}

func openAudio(f *os.File, name string) (*AudioFile, error) {
	if err := checkChunkSizes(f, name); err != nil {
		return nil, err
	}
	d := wav.NewDecoder(f)
	if !d.IsValidFile() {
		return nil, fmt.Errorf("%s: not a WAV audio file", name)
	}
	if err := d.FwdToPCM(); err != nil || d.PCMChunk == nil {
		return nil, fmt.Errorf("%s: WAV file without a data chunk", name)
	}
	a := &AudioFile{name: name, f: f, r: d.PCMChunk.R, ch: int(d.NumChans), bits: int(d.BitDepth), rate: float64(d.SampleRate)}
	switch {
	case d.WavAudioFormat == wavFloat && a.bits == 32:
		a.float = true
	case d.WavAudioFormat == wavExtensible && a.bits == 32:
		// WAVE_FORMAT_EXTENSIBLE: 32-bit is taken as float, the common
		// use; the sub-format GUID is not exposed by go-audio/wav.
		a.float = true
	case (d.WavAudioFormat == wavPCM || d.WavAudioFormat == wavExtensible) && (a.bits == 16 || a.bits == 24):
	default:
		return nil, fmt.Errorf("%s: unsupported WAV encoding (format %d, %d bits; want 16/24-bit PCM or 32-bit float)", name, d.WavAudioFormat, a.bits)
	}
	if a.ch < 1 || a.ch > 2 {
		return nil, fmt.Errorf("%s: %d channels (want mono or stereo)", name, a.ch)
	}
	if a.rate < 8000 || a.rate > 192000 {
		return nil, fmt.Errorf("%s: sample rate %g Hz outside 8 to 192 kHz", name, a.rate)
	}
	frame := int64(a.ch * a.bits / 8)
	a.left = int64(d.PCMChunk.Size) / frame * frame
	a.frames = a.left / frame
	if a.frames == 0 {
		return nil, fmt.Errorf("%s: no audio samples", name)
	}
	return a, nil
}

// maxFmtChunk bounds the fmt chunk; real ones are 16 to 40 bytes.
const maxFmtChunk = 1 << 10

// checkChunkSizes refuses a RIFF file whose chunks before the data chunk
// claim more bytes than the file holds, or whose fmt chunk is larger than
// maxFmtChunk: go-audio/wav v1.1.0 allocates (and the runtime zeroes) a
// fmt chunk's declared size before reading it, gigabytes for a damaged
// header, which stalled the fuzzer. Files that are not RIFF are left to
// the decoder to refuse.
func checkChunkSizes(f *os.File, name string) error {
	st, err := f.Stat()
	if err != nil {
		return fmt.Errorf("%s: %w", name, err)
	}
	size := st.Size()
	var h [12]byte
	if _, err := f.ReadAt(h[:], 0); err != nil || string(h[:4]) != "RIFF" || string(h[8:]) != "WAVE" {
		return nil
	}
	var c [8]byte
	for off := int64(12); off+8 <= size; {
		if _, err := f.ReadAt(c[:], off); err != nil {
			return fmt.Errorf("%s: %w", name, err)
		}
		id, n := string(c[:4]), int64(binary.LittleEndian.Uint32(c[4:]))
		if id == "data" {
			return nil
		}
		if n > size-off-8 || id == "fmt " && n > maxFmtChunk {
			return fmt.Errorf("%s: byte %d: %q chunk of %d bytes does not fit the %d-byte file", name, off+4, id, n, size)
		}
		off += 8 + n + n%2
	}
	return nil
}

// Rate returns the sample rate in Hz.
func (a *AudioFile) Rate() float64 { return a.rate }

// Frames returns the number of (mono) samples.
func (a *AudioFile) Frames() int64 { return a.frames }

// Close closes the file.
func (a *AudioFile) Close() error { return a.f.Close() }

// Read decodes up to len(dst) samples; io.EOF at the end of the data,
// io.ErrUnexpectedEOF (with the file name) if the file is shorter than
// its header says.
func (a *AudioFile) Read(dst []float32) (int, error) {
	if a.left == 0 {
		return 0, io.EOF
	}
	bps := a.bits / 8
	frame := a.ch * bps
	n := min(int64(len(dst)), a.left/int64(frame))
	if cap(a.buf) < int(n)*frame {
		a.buf = make([]byte, int(n)*frame)
	}
	b := a.buf[:int(n)*frame]
	if _, err := io.ReadFull(a.r, b); err != nil {
		if errors.Is(err, io.EOF) || errors.Is(err, io.ErrUnexpectedEOF) {
			return 0, fmt.Errorf("%s: audio data ends early: %w", a.name, io.ErrUnexpectedEOF)
		}
		return 0, fmt.Errorf("%s: %w", a.name, err)
	}
	a.left -= int64(len(b))
	scale := float32(1) / float32(a.ch)
	for i := range int(n) {
		fr := b[i*frame : i*frame+frame]
		var s float32
		for c := range a.ch {
			v := fr[c*bps : c*bps+bps]
			switch {
			case a.float:
				s += math.Float32frombits(binary.LittleEndian.Uint32(v))
			case bps == 2:
				s += float32(int16(binary.LittleEndian.Uint16(v))) * (1.0 / 32768)
			default: // 24-bit
				s += float32(int32(uint32(v[0])<<8|uint32(v[1])<<16|uint32(v[2])<<24)>>8) * (1.0 / 8388608)
			}
		}
		dst[i] = s * scale
	}
	return int(n), nil
}

// ToneSource generates a sum of equal-amplitude cosines,
// a·Σᵢ cos(2πfᵢn/rate), for a fixed number of samples: the one- and
// two-tone test signals. Each tone is an Oscillator, so the phase is exact
// over any length. The first and last ToneRamp seconds are shaped by a
// raised-cosine ramp so that switching the tones on and off neither
// splatters nor overshoots in the band filter (common practice for keyed
// test signals).
type ToneSource struct {
	osc    []*Oscillator
	amp    float32
	rate   float64
	frames int64
	left   int64
	ramp   []float32
	buf    []complex64
}

// ToneRamp is the length of the raised-cosine on/off ramps of ToneSource.
const ToneRamp = 0.01

var _ AudioSource = (*ToneSource)(nil)

// NewToneSource returns n samples of tones at freqs Hz, each of amplitude
// amp, at rate Hz.
func NewToneSource(freqs []float64, amp, rate float64, n int64) *ToneSource {
	t := &ToneSource{amp: float32(amp), rate: rate, frames: n, left: n}
	r := min(int64(ToneRamp*rate), n/2)
	t.ramp = make([]float32, r)
	for i := range t.ramp {
		t.ramp[i] = float32(0.5 - 0.5*math.Cos(math.Pi*(float64(i)+0.5)/float64(r)))
	}
	for _, f := range freqs {
		t.osc = append(t.osc, NewOscillator(f, rate))
	}
	return t
}

// Rate returns the sample rate in Hz.
func (t *ToneSource) Rate() float64 { return t.rate }

// Frames returns the number of samples.
func (t *ToneSource) Frames() int64 { return t.frames }

// Read fills dst with the next samples; io.EOF at the end.
func (t *ToneSource) Read(dst []float32) (int, error) {
	if t.left == 0 {
		return 0, io.EOF
	}
	n := int(min(int64(len(dst)), t.left))
	if cap(t.buf) < n {
		t.buf = make([]complex64, n)
	}
	d := dst[:n]
	clear(d)
	for _, o := range t.osc {
		b := o.Generate(t.buf[:n])
		for i, v := range b {
			d[i] += t.amp * real(v)
		}
	}
	pos := t.frames - t.left // index of d[0]
	r := int64(len(t.ramp))
	for i := range d {
		k := pos + int64(i)
		switch {
		case k < r:
			d[i] *= t.ramp[k]
		case k >= t.frames-r:
			d[i] *= t.ramp[t.frames-1-k]
		}
	}
	t.left -= int64(n)
	return n, nil
}

// Reset starts the tones again from the first sample.
func (t *ToneSource) Reset() {
	t.left = t.frames
	for _, o := range t.osc {
		o.Reset()
	}
}
