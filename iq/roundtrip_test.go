package iq

import (
	"bytes"
	"io"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"
)

// memFile is an in-memory io.WriteSeeker.
type memFile struct {
	b   []byte
	pos int64
}

func (m *memFile) Write(p []byte) (int, error) {
	end := m.pos + int64(len(p))
	if end > int64(len(m.b)) {
		m.b = append(m.b, make([]byte, end-int64(len(m.b)))...)
	}
	copy(m.b[m.pos:], p)
	m.pos = end
	return len(p), nil
}

func (m *memFile) Seek(off int64, whence int) (int64, error) {
	switch whence {
	case io.SeekStart:
		m.pos = off
	case io.SeekCurrent:
		m.pos += off
	case io.SeekEnd:
		m.pos = int64(len(m.b)) + off
	}
	return m.pos, nil
}

func newRng() *rand.Rand { return rand.New(rand.NewPCG(1, 1)) }

func randomIQ(rng *rand.Rand, n int) []complex64 {
	x := make([]complex64, n)
	for i := range x {
		x[i] = complex(float32(rng.Float64()*1.98-0.99), float32(rng.Float64()*1.98-0.99))
	}
	return x
}

func readAll(t testing.TB, s *Source) []complex64 {
	t.Helper()
	var out []complex64
	buf := make([]complex64, 1000)
	for {
		n, err := s.Read(buf)
		out = append(out, buf[:n]...)
		if err == io.EOF {
			return out
		}
		if err != nil {
			t.Fatal(err)
		}
	}
}

// TestRoundTripFiles writes each container and datatype to a file and
// reads it back through Open: the values come back within half a
// quantisation step (the design's format table, common practice), and
// the file's sample count and rate survive.
func TestRoundTripFiles(t *testing.T) {
	dir := t.TempDir()
	rng := rand.New(rand.NewPCG(1, 2))
	x := randomIQ(rng, 5000)
	cases := []struct {
		name, container string
		dt              Datatype
		step            float64 // quantisation step of the format
	}{
		{"a.cu8", ContainerRaw, CU8, 1 / 127.5},
		{"a.cs8", ContainerRaw, CI8, 1.0 / 128},
		{"a.cs16", ContainerRaw, CI16, 1.0 / 32768},
		{"a.cf32", ContainerRaw, CF32, 0},
		{"a16.wav", ContainerWAV, CI16, 1.0 / 32768},
		{"af.wav", ContainerWAV, CF32, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			path := filepath.Join(dir, c.name)
			f, err := os.Create(path)
			if err != nil {
				t.Fatal(err)
			}
			w, err := NewWriter(f, c.container, c.dt, 48000)
			if err != nil {
				t.Fatal(err)
			}
			if _, err := w.Write(x); err != nil {
				t.Fatal(err)
			}
			if err := w.Close(); err != nil {
				t.Fatal(err)
			}
			f.Close()
			s, err := Open(path, Options{Rate: 48000})
			if err != nil {
				t.Fatal(err)
			}
			defer s.Close()
			if m := s.Meta(); m.Samples != int64(len(x)) || m.Rate != 48000 || m.Datatype != c.dt {
				t.Fatalf("meta %+v", m)
			}
			y := readAll(t, s)
			if len(y) != len(x) {
				t.Fatalf("read %d samples, want %d", len(y), len(x))
			}
			tol := c.step/2 + 1e-7
			for i := range x {
				if d := cmplx.Abs(complex128(y[i] - x[i])); d > tol*math.Sqrt2 {
					t.Fatalf("sample %d: got %v want %v", i, y[i], x[i])
				}
			}
		})
	}
}

// TestRealToAnalyticQuick reads a real rf32_le tone through Open: the
// analytic signal of a·cos(ωn) is a·e^{jωn} (Oppenheim & Schafer,
// Discrete-Time Signal Processing, 3rd ed., Sec. 12.4), same length.
func TestRealToAnalyticQuick(t *testing.T) {
	const n, rate, f, a = 20000, 48000.0, 1000.0, 0.5
	// An image 80 dB down (TestAnalyticImage) is 1e-4 of a; float32
	// rounding adds about 1e-7.
	const tol = 1e-4 * a
	var b bytes.Buffer
	for i := 0; i < n; i++ {
		v := float32(a * math.Cos(2*math.Pi*f*float64(i)/rate))
		var s [4]byte
		bits := math.Float32bits(v)
		s[0], s[1], s[2], s[3] = byte(bits), byte(bits>>8), byte(bits>>16), byte(bits>>24)
		b.Write(s[:])
	}
	s, err := Open("-", Options{Format: RF32, Rate: rate, Stdin: &b})
	if err != nil {
		t.Fatal(err)
	}
	y := readAll(t, s)
	if len(y) != n {
		t.Fatalf("got %d samples, want %d", len(y), n)
	}
	for i := 5000; i < 15000; i += 1111 {
		want := complex(a*math.Cos(2*math.Pi*f*float64(i)/rate), a*math.Sin(2*math.Pi*f*float64(i)/rate))
		if d := cmplx.Abs(complex128(y[i]) - want); d > tol {
			t.Fatalf("sample %d: got %v want %v", i, y[i], want)
		}
	}
}

func bytesReader(b []byte) io.Reader { return bytes.NewReader(b) }
