package iq_test

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"

	"ssbkit/iq"
)

// Reading raw cu8 samples from a stream: the bytes say nothing of their
// rate, so Options carries it.
func ExampleOpen() {
	data := bytes.NewReader([]byte{255, 0, 128, 128, 0, 255})
	src, err := iq.Open("-", iq.Options{Format: iq.CU8, Rate: 2.4e6, Stdin: data})
	if err != nil {
		fmt.Println(err)
		return
	}
	buf := make([]complex64, 8)
	n, _ := src.Read(buf)
	for _, v := range buf[:n] {
		fmt.Printf("%+.4f\n", v)
	}
	fmt.Println("clipped:", src.Clipped())
	// Output:
	// (+1.0000-1.0000i)
	// (+0.0039+0.0039i)
	// (-1.0000+1.0000i)
	// clipped: 2
}

// Writing raw ci16_le samples: clamp(round(x·32768)), little-endian.
func ExampleNewRawWriter() {
	var out bytes.Buffer
	w, _ := iq.NewRawWriter(&out, iq.CI16)
	w.Write([]complex64{complex(0.5, -1), complex(2, 0)})
	w.Close()
	fmt.Printf("% x\n", out.Bytes())
	// Output:
	// 00 40 00 80 ff 7f 00 00
}

// Writing and reading SigMF metadata.
func ExampleWriteSigMFMeta() {
	var meta bytes.Buffer
	m := iq.Meta{Datatype: iq.CI16, Rate: 48000, Center: 7.1e6, HasCenter: true}
	if err := iq.WriteSigMFMeta(&meta, m); err != nil {
		fmt.Println(err)
		return
	}
	back, _ := iq.ReadSigMFMeta(&meta, "example.sigmf-meta")
	fmt.Println(back.Datatype, back.Rate, back.Center)
	// Output:
	// ci16_le 48000 7.1e+06
}

// Estimating and removing I/Q imbalance from a capture's statistics.
func ExampleStats_Imbalance() {
	truth := iq.ImbalanceOf(1.02, 2) // Q gain 1.02, 2° phase error
	// A circular test signal: a few complex tones of different frequencies.
	x := make([]complex64, 1<<16)
	for i := range x {
		var v complex128
		for k, f := range []float64{0.0123, -0.071, 0.2019} {
			v += cmplx.Rect(0.2/float64(k+1), 2*math.Pi*f*float64(i))
		}
		x[i] = complex64(truth.Mu*v + truth.Nu*cmplx.Conj(v))
	}
	var st iq.Stats
	st.Add(x)
	est := st.Imbalance()
	fmt.Printf("image rejection: true %.1f dB, estimated %.1f dB\n", truth.ImageRejectionDB, est.ImageRejectionDB)
	fix := iq.NewCorrector(st.Mean(), est)
	fix.Process(x, x)
	var after iq.Stats
	after.Add(x)
	fmt.Printf("after correction: more than 60 dB: %v\n", after.Imbalance().ImageRejectionDB > 60)
	// Output:
	// image rejection: true 34.0 dB, estimated 34.0 dB
	// after correction: more than 60 dB: true
}

// A real tone becomes a complex tone at the positive frequency.
func ExampleAnalytic() {
	a := iq.NewAnalytic(255)
	x := make([]float32, 4096)
	for i := range x {
		x[i] = float32(0.5 * math.Cos(2*math.Pi*0.1*float64(i)))
	}
	y := a.Process(nil, x)
	v := y[len(y)-1]
	fmt.Printf("magnitude %.3f\n", cmplx.Abs(complex128(v)))
	// Output:
	// magnitude 0.500
}

// Reading a SigMF recording block by block: Read fills the caller's slice
// and returns io.EOF after the last sample, so a capture of any size is
// read in bounded memory. Here a tone of amplitude 0.5 (−6.02 dBFS) is
// written as ci16_le and its level measured on the way back.
func ExampleSource_Read() {
	dir, err := os.MkdirTemp("", "iq-example")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer os.RemoveAll(dir)
	base := filepath.Join(dir, "tone")

	// Write the recording: a data file and its metadata.
	const rate, n = 48000, 10000
	tone := make([]complex64, n)
	for i := range tone {
		tone[i] = complex64(cmplx.Rect(0.5, 2*math.Pi*1000*float64(i)/rate))
	}
	data, _ := os.Create(base + ".sigmf-data")
	w, _ := iq.NewRawWriter(data, iq.CI16)
	w.Write(tone)
	w.Close()
	data.Close()
	meta, _ := os.Create(base + ".sigmf-meta")
	iq.WriteSigMFMeta(meta, iq.Meta{Datatype: iq.CI16, Rate: rate, Center: 7.1e6, HasCenter: true})
	meta.Close()

	// Read it back, either name will do, 4096 samples at a time.
	src, err := iq.Open(base+".sigmf-meta", iq.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	defer src.Close()
	m := src.Meta()
	fmt.Printf("%s, %.0f Hz, centre %.3f MHz, %d samples\n", m.Datatype, m.Rate, m.Center/1e6, m.Samples)
	var st iq.Stats
	buf := make([]complex64, 4096)
	for {
		k, err := src.Read(buf)
		if k > 0 {
			st.Add(buf[:k])
			fmt.Println("block of", k)
		}
		if err == io.EOF {
			break
		}
		if err != nil {
			fmt.Println(err)
			return
		}
	}
	fmt.Printf("RMS %.2f dBFS, clipped %d\n", st.RMSDBFS(), src.Clipped())
	// Output:
	// ci16_le, 48000 Hz, centre 7.100 MHz, 10000 samples
	// block of 4096
	// block of 4096
	// block of 1808
	// RMS -6.02 dBFS, clipped 0
}
