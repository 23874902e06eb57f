package iq

import (
	"bytes"
	"io"
	"os"
	"testing"
)

// The fuzz targets check that no input makes a parser panic or read
// without bound; seeds are under testdata/ and testdata/fuzz/.

func FuzzReadSigMFMeta(f *testing.F) {
	if b, err := os.ReadFile("testdata/handwritten.sigmf-meta"); err == nil {
		f.Add(b)
	}
	f.Add([]byte(`{"global":{"core:datatype":"cu8","core:sample_rate":1e6,"core:version":"1.0.0"},"captures":[{"core:sample_start":0,"core:frequency":7.1e6}],"annotations":[]}`))
	f.Add([]byte(`{"global":{}}`))
	f.Add([]byte(`[1,2,3]`))
	f.Fuzz(func(t *testing.T, b []byte) {
		if len(b) > 1<<16 {
			return
		}
		m, err := ReadSigMFMeta(bytes.NewReader(b), "fuzz")
		if err == nil {
			var out bytes.Buffer
			if err := WriteSigMFMeta(&out, m); err != nil {
				t.Fatalf("parsed metadata does not write: %v", err)
			}
		}
	})
}

func FuzzReadWAVHeader(f *testing.F) {
	f.Add(wavBytes(wavPCM, 2, 16, 48000, 0, make([]byte, 8)))
	f.Add(wavBytes(wavExtensible, 1, 24, 8000, wavPCM, make([]byte, 6)))
	f.Add(wavBytes(wavFloat, 2, 32, 8000, 0, make([]byte, 8)))
	f.Add([]byte("RIFF\x00\x00\x00\x00WAVEfmt \xff\xff\xff\xff"))
	f.Fuzz(func(t *testing.T, b []byte) {
		if len(b) > 1<<16 {
			return
		}
		h, err := readWAVHeader(bytes.NewReader(b), "fuzz.wav")
		if err != nil {
			return
		}
		if h.Channels < 1 || h.Channels > 2 || h.frameSize() == 0 || h.DataOffset > int64(len(b)) {
			t.Fatalf("accepted header %+v", h)
		}
	})
}

// FuzzRawStdin decodes arbitrary bytes as each datatype from a stream.
func FuzzRawStdin(f *testing.F) {
	f.Add([]byte{0, 255, 1, 2, 3}, uint8(0))
	f.Add(lef32(1, 2, 3), uint8(3))
	f.Fuzz(func(t *testing.T, b []byte, k uint8) {
		if len(b) > 1<<16 {
			return
		}
		dt := Datatypes[int(k)%len(Datatypes)]
		s, err := Open("-", Options{Format: dt, Rate: 1000, Stdin: bytes.NewReader(b)})
		if err != nil {
			t.Fatal(err)
		}
		buf := make([]complex64, 777)
		total := 0
		for err == nil {
			var n int
			n, err = s.Read(buf)
			total += n
		}
		clean := len(b)%dt.SampleSize() == 0
		if (err == io.EOF) != clean {
			t.Fatalf("%s: %d bytes ended with %v", dt, len(b), err)
		}
		if clean && total != len(b)/dt.SampleSize() {
			t.Fatalf("%s: %d samples from %d bytes", dt, total, len(b))
		}
	})
}
