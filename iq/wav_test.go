package iq

import (
	"bytes"
	"encoding/binary"
	"errors"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/go-audio/wav"
)

// TestWAVBitExact writes 16-bit PCM and 32-bit float I/Q WAV files and
// reads them back with go-audio/wav, an independent decoder: every PCM
// code and every float bit pattern must be as written (the issue's
// bit-exact round trip), with 2 channels, the rate, and the layout of
// the design (I left, Q right).
func TestWAVBitExact(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 9))
	x := randomIQ(rng, 3001)
	for _, dt := range []Datatype{CI16, CF32} {
		var f memFile
		w, err := NewWriter(&f, ContainerWAV, dt, 44100)
		if err != nil {
			t.Fatal(err)
		}
		for i := 0; i < len(x); i += 1000 {
			w.Write(x[i:min(i+1000, len(x))])
		}
		if err := w.Close(); err != nil {
			t.Fatal(err)
		}
		d := wav.NewDecoder(bytes.NewReader(f.b))
		buf, err := d.FullPCMBuffer()
		if err != nil {
			t.Fatalf("%s: go-audio/wav: %v", dt, err)
		}
		wantTag, wantBits := uint16(1), uint16(16)
		if dt == CF32 {
			wantTag, wantBits = 3, 32
		}
		if d.NumChans != 2 || d.SampleRate != 44100 || d.WavAudioFormat != wantTag || d.BitDepth != wantBits || len(buf.Data) != 2*len(x) {
			t.Fatalf("%s: go-audio/wav sees %d ch, %d Hz, tag %d, %d bits, %d values", dt, d.NumChans, d.SampleRate, d.WavAudioFormat, d.BitDepth, len(buf.Data))
		}
		for i, v := range x {
			var wi, wq int
			if dt == CI16 {
				a, _ := quantize(real(v), 32768, 0, -32768, 32767)
				b, _ := quantize(imag(v), 32768, 0, -32768, 32767)
				wi, wq = int(a), int(b)
			} else {
				wi, wq = int(int32(math.Float32bits(real(v)))), int(int32(math.Float32bits(imag(v))))
			}
			if buf.Data[2*i] != wi || buf.Data[2*i+1] != wq {
				t.Fatalf("%s: frame %d: got %d,%d want %d,%d", dt, i, buf.Data[2*i], buf.Data[2*i+1], wi, wq)
			}
		}
		// And through our own reader: float exactly, PCM as code/32768.
		h, err := readWAVHeader(bytes.NewReader(f.b), "x.wav")
		if err != nil || h.DataSize != int64(len(x)*dt.SampleSize()) {
			t.Fatalf("%s: header %+v, %v", dt, h, err)
		}
	}
}

// wavBytes builds a WAV file by hand (Microsoft RIFF/WAVE layout, common
// practice) with the given fmt fields and data.
func wavBytes(tag uint16, ch, bits int, rate uint32, extensibleSub uint16, data []byte) []byte {
	le := binary.LittleEndian
	var fmtc []byte
	fmtc = le.AppendUint16(fmtc, tag)
	fmtc = le.AppendUint16(fmtc, uint16(ch))
	fmtc = le.AppendUint32(fmtc, rate)
	fmtc = le.AppendUint32(fmtc, rate*uint32(ch*bits/8))
	fmtc = le.AppendUint16(fmtc, uint16(ch*bits/8))
	fmtc = le.AppendUint16(fmtc, uint16(bits))
	if tag == wavExtensible {
		fmtc = le.AppendUint16(fmtc, 22)
		fmtc = le.AppendUint16(fmtc, uint16(bits))
		fmtc = le.AppendUint32(fmtc, 3)
		fmtc = le.AppendUint16(fmtc, extensibleSub)
		fmtc = append(fmtc, 0x00, 0x00, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xAA, 0x00, 0x38, 0x9B, 0x71)
	}
	var b []byte
	b = append(b, "RIFF"...)
	b = le.AppendUint32(b, 0)
	b = append(b, "WAVE"...)
	b = append(b, "LIST"...) // a chunk to skip before fmt
	b = le.AppendUint32(b, 3)
	b = append(b, 'a', 'b', 'c', 0) // odd size: pad byte
	b = append(b, "fmt "...)
	b = le.AppendUint32(b, uint32(len(fmtc)))
	b = append(b, fmtc...)
	b = append(b, "data"...)
	b = le.AppendUint32(b, uint32(len(data)))
	b = append(b, data...)
	le.PutUint32(b[4:], uint32(len(b)-8))
	return b
}

// TestWAVRead24AndExtensible reads 24-bit PCM (v/2^23, common practice)
// and WAVE_FORMAT_EXTENSIBLE float files.
func TestWAVRead24AndExtensible(t *testing.T) {
	dir := t.TempDir()
	// 24-bit I/Q: codes +2^23−1 (rail), −2^22 → 1−2^−23 and −0.5.
	d24 := []byte{0xff, 0xff, 0x7f, 0x00, 0x00, 0xc0}
	p := filepath.Join(dir, "a24.wav")
	os.WriteFile(p, wavBytes(wavExtensible, 2, 24, 8000, wavPCM, d24), 0o644)
	s, err := Open(p, Options{})
	if err != nil {
		t.Fatal(err)
	}
	y := readAll(t, s)
	s.Close()
	if len(y) != 1 || y[0] != complex(float32(1-1.0/(1<<23)), -0.5) || s.Clipped() != 1 || s.Meta().Rate != 8000 {
		t.Errorf("24-bit: %v clipped %d meta %+v", y, s.Clipped(), s.Meta())
	}
	p = filepath.Join(dir, "ext.wav")
	os.WriteFile(p, wavBytes(wavExtensible, 2, 32, 8000, wavFloat, lef32(0.25, -0.125, 0.5, 0.75)), 0o644)
	s, err = Open(p, Options{})
	if err != nil {
		t.Fatal(err)
	}
	y = readAll(t, s)
	s.Close()
	if len(y) != 2 || y[0] != complex(0.25, -0.125) || y[1] != complex(0.5, 0.75) {
		t.Errorf("extensible float: %v", y)
	}
}

// TestWAVBad checks the errors for WAV files ssbkit cannot read.
func TestWAVBad(t *testing.T) {
	dir := t.TempDir()
	cases := []struct {
		name        string
		data        []byte
		want        string
		unsupported bool
	}{
		{"three.wav", wavBytes(wavPCM, 3, 16, 8000, 0, make([]byte, 12)), "3 channels", true},
		{"adpcm.wav", wavBytes(2, 2, 16, 8000, 0, make([]byte, 8)), "format tag 0x2", true},
		{"u8.wav", wavBytes(wavPCM, 2, 8, 8000, 0, make([]byte, 8)), "8 bits", true},
		{"f64.wav", wavBytes(wavFloat, 2, 64, 8000, 0, make([]byte, 16)), "64 bits", true},
		{"cut.wav", wavBytes(wavPCM, 2, 16, 8000, 0, make([]byte, 8))[:60], "runs past the end", false},
		{"nodata.wav", wavBytes(wavPCM, 2, 16, 8000, 0, nil)[:48], "no data chunk", false},
		{"notwav.wav", []byte("hello, this is not a wave file at all"), "not a WAV file", false},
		{"empty.wav", nil, "empty file", false},
		{"zero.wav", wavBytes(wavPCM, 2, 16, 8000, 0, nil), "no samples", false},
		{"half.wav", wavBytes(wavPCM, 2, 16, 8000, 0, make([]byte, 6)), "whole number of 4-byte frames", false},
	}
	for _, c := range cases {
		p := filepath.Join(dir, c.name)
		os.WriteFile(p, c.data, 0o644)
		_, err := Open(p, Options{})
		if err == nil {
			t.Errorf("%s: accepted", c.name)
			continue
		}
		if !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), c.name) {
			t.Errorf("%s: error %q, want the name and %q", c.name, err, c.want)
		}
		var ue *UnsupportedError
		if errors.As(err, &ue) != c.unsupported {
			t.Errorf("%s: error type %T", c.name, err)
		}
	}
}

// TestWAVWriterErrors: unsupported types and rates are refused.
func TestWAVWriterErrors(t *testing.T) {
	var f memFile
	if _, err := NewWriter(&f, ContainerWAV, CU8, 48000); err == nil {
		t.Error("cu8 WAV accepted")
	}
	if _, err := NewWriter(&f, ContainerWAV, CF32, 48000.5); err == nil {
		t.Error("fractional WAV rate accepted")
	}
	if _, err := NewWriter(&f, "mp3", CF32, 48000); err == nil {
		t.Error("mp3 container accepted")
	}
}
