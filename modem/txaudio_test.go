package modem

import (
	"bytes"
	"encoding/binary"
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// wavBytes builds a canonical WAV file (RIFF/WAVE, "fmt " and "data"
// chunks, Microsoft WAVE format: format tag 1 = PCM, 3 = IEEE float) from
// interleaved samples in ±1, written independently of the reader.
func wavBytes(format uint16, ch, bits int, rate uint32, samples []float64) []byte {
	var data bytes.Buffer
	for _, s := range samples {
		switch {
		case format == 3:
			binary.Write(&data, binary.LittleEndian, float32(s))
		case bits == 16:
			binary.Write(&data, binary.LittleEndian, int16(math.Round(s*32767)))
		case bits == 24:
			v := int32(math.Round(s * 8388607))
			data.Write([]byte{byte(v), byte(v >> 8), byte(v >> 16)})
		}
	}
	var b bytes.Buffer
	b.WriteString("RIFF")
	binary.Write(&b, binary.LittleEndian, uint32(36+data.Len()))
	b.WriteString("WAVEfmt ")
	binary.Write(&b, binary.LittleEndian, uint32(16))
	binary.Write(&b, binary.LittleEndian, format)
	binary.Write(&b, binary.LittleEndian, uint16(ch))
	binary.Write(&b, binary.LittleEndian, rate)
	binary.Write(&b, binary.LittleEndian, rate*uint32(ch*bits/8))
	binary.Write(&b, binary.LittleEndian, uint16(ch*bits/8))
	binary.Write(&b, binary.LittleEndian, uint16(bits))
	b.WriteString("data")
	binary.Write(&b, binary.LittleEndian, uint32(data.Len()))
	b.Write(data.Bytes())
	return b.Bytes()
}

func writeTemp(t testing.TB, name string, b []byte) string {
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, b, 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// TestOpenAudio reads 16/24-bit PCM and 32-bit float, mono and stereo
// (mixed down to the channel mean) and compares with the values written.
func TestOpenAudio(t *testing.T) {
	for _, c := range []struct {
		format   uint16
		ch, bits int
		tol      float64 // quantisation step of the format
	}{
		{1, 1, 16, 1.0 / 32768},
		{1, 2, 16, 1.0 / 32768},
		{1, 1, 24, 1.0 / 8388608},
		{1, 2, 24, 1.0 / 8388608},
		{3, 1, 32, 1e-7},
		{3, 2, 32, 1e-7},
	} {
		const n = 3000
		var inter []float64
		want := make([]float64, n)
		for i := range n {
			l := 0.9 * math.Sin(float64(i)*0.01)
			r := -0.5 * math.Cos(float64(i)*0.013)
			if c.ch == 1 {
				inter = append(inter, l)
				want[i] = l
			} else {
				inter = append(inter, l, r)
				want[i] = (l + r) / 2
			}
		}
		p := writeTemp(t, "a.wav", wavBytes(c.format, c.ch, c.bits, 44100, inter))
		a, err := OpenAudio(p)
		if err != nil {
			t.Fatalf("%+v: %v", c, err)
		}
		if a.Rate() != 44100 || a.Frames() != n {
			t.Errorf("%+v: rate %g frames %d", c, a.Rate(), a.Frames())
		}
		var got []float32
		buf := make([]float32, 700)
		for {
			k, err := a.Read(buf)
			got = append(got, buf[:k]...)
			if err == io.EOF {
				break
			}
			if err != nil {
				t.Fatal(err)
			}
		}
		a.Close()
		if len(got) != n {
			t.Fatalf("%+v: %d samples, want %d", c, len(got), n)
		}
		for i := range got {
			if math.Abs(float64(got[i])-want[i]) > 2*c.tol {
				t.Fatalf("%+v: sample %d = %v, want %v", c, i, got[i], want[i])
			}
		}
	}
}

func TestOpenAudioErrors(t *testing.T) {
	for _, c := range []struct {
		name string
		b    []byte
		want string
	}{
		{"text.wav", []byte("this is not audio at all, just some text"), "not a WAV"},
		{"empty.wav", wavBytes(1, 1, 16, 48000, nil), "no audio samples"},
		{"eight.wav", wavBytes(1, 1, 8, 48000, []float64{0, 0}), "unsupported"},
		{"slow.wav", wavBytes(1, 1, 16, 4000, []float64{0, 0}), "outside 8 to 192 kHz"},
		{"zero.wav", nil, "not a WAV"},
		// A fmt chunk claiming 4 GiB (go-audio/wav would allocate it).
		{"fmt4g.wav", func() []byte {
			b := wavBytes(1, 1, 16, 48000, []float64{0, 0})
			copy(b[16:20], []byte{0xf0, 0xff, 0xff, 0xff})
			return b
		}(), `"fmt " chunk of 4294967280 bytes does not fit`},
	} {
		p := writeTemp(t, c.name, c.b)
		_, err := OpenAudio(p)
		if err == nil || !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), c.name) {
			t.Errorf("%s: error %v, want one naming the file and %q", c.name, err, c.want)
		}
	}
	// truncated data: header promises more than the file holds
	b := wavBytes(1, 1, 16, 48000, make([]float64, 1000))
	p := writeTemp(t, "short.wav", b[:len(b)-500])
	a, err := OpenAudio(p)
	if err != nil {
		return // rejected at open: fine too
	}
	defer a.Close()
	buf := make([]float32, 4096)
	_, err = a.Read(buf)
	if !errors.Is(err, io.ErrUnexpectedEOF) {
		t.Errorf("truncated file: %v, want io.ErrUnexpectedEOF", err)
	}
}

// FuzzOpenAudio feeds arbitrary bytes to the WAV reader: it must return
// an error or samples, never panic.
func FuzzOpenAudio(f *testing.F) {
	for _, name := range []string{"testdata/tone16.wav", "testdata/stereo24.wav"} {
		if b, err := os.ReadFile(name); err == nil {
			f.Add(b)
		}
	}
	f.Add(wavBytes(3, 2, 32, 8000, []float64{0.5, -0.5, 0.25, 1}))
	dir := f.TempDir()
	f.Fuzz(func(t *testing.T, b []byte) {
		if len(b) > 1<<16 {
			return
		}
		p := filepath.Join(dir, "f.wav")
		if err := os.WriteFile(p, b, 0o644); err != nil {
			t.Fatal(err)
		}
		a, err := OpenAudio(p)
		if err != nil {
			return
		}
		defer a.Close()
		buf := make([]float32, 256)
		for range 1 << 10 {
			if _, err := a.Read(buf); err != nil {
				return
			}
		}
	})
}

// TestToneSource checks the test tones: amplitude and frequency of each
// cosine (definition) after the on ramp, and the ramp's raised-cosine
// shape.
func TestToneSource(t *testing.T) {
	const tol = 1e-6
	s := NewToneSource([]float64{700, 1900}, 0.5, 8000, 8000)
	x := make([]float32, 8000)
	n, _ := s.Read(x[:3000])
	m, _ := s.Read(x[3000:])
	if n+m != 8000 {
		t.Fatalf("%d samples", n+m)
	}
	if _, err := s.Read(x); err != io.EOF {
		t.Errorf("after the end: %v", err)
	}
	r := int(ToneRamp * 8000)
	for i := r; i < 8000-r; i++ {
		want := 0.5*math.Cos(2*math.Pi*700*float64(i)/8000) + 0.5*math.Cos(2*math.Pi*1900*float64(i)/8000)
		if math.Abs(float64(x[i])-want) > tol {
			t.Fatalf("sample %d = %v, want %v", i, x[i], want)
		}
	}
	if x[0] != 0 && math.Abs(float64(x[0])) > 0.01 {
		t.Errorf("first sample %v not ramped", x[0])
	}
}
