package modem

import (
	"encoding/binary"
	"math"
	"math/rand/v2"
)

// testSignal returns n seeded complex Gaussian samples of unit variance
// per part.
func testSignal(n int, seed uint64) []complex64 {
	r := rand.New(rand.NewPCG(seed, 42))
	x := make([]complex64, n)
	for i := range x {
		x[i] = complex(float32(r.NormFloat64()), float32(r.NormFloat64()))
	}
	return x
}

// testReal returns n seeded real Gaussian samples of unit variance.
func testReal(n int, seed uint64) []float32 {
	r := rand.New(rand.NewPCG(seed, 43))
	x := make([]float32, n)
	for i := range x {
		x[i] = float32(r.NormFloat64())
	}
	return x
}

func itoa(n int) string {
	if n == 0 {
		return "0"
	}
	var b []byte
	for ; n > 0; n /= 10 {
		b = append([]byte{byte('0' + n%10)}, b...)
	}
	return string(b)
}

// cf32Bytes encodes x as little-endian float32 pairs, for RunRaw.
func cf32Bytes(x []complex64) []byte {
	b := make([]byte, 8*len(x))
	for i, v := range x {
		binary.LittleEndian.PutUint32(b[8*i:], math.Float32bits(real(v)))
		binary.LittleEndian.PutUint32(b[8*i+4:], math.Float32bits(imag(v)))
	}
	return b
}

// decodeCF32 is RunRaw's decoder of cf32Bytes.
func decodeCF32(dst []complex64, b []byte) {
	for i := range dst {
		dst[i] = complex(math.Float32frombits(binary.LittleEndian.Uint32(b[8*i:])), math.Float32frombits(binary.LittleEndian.Uint32(b[8*i+4:])))
	}
}

// collect returns n sinks appending to got[i], and got.
func collect(n int) ([]func([]float32) error, [][]float32) {
	got := make([][]float32, n)
	sinks := make([]func([]float32) error, n)
	for i := range sinks {
		sinks[i] = func(a []float32) error { got[i] = append(got[i], a...); return nil }
	}
	return sinks, got
}

// discard returns n sinks that drop the audio.
func discard(n int) []func([]float32) error {
	sinks := make([]func([]float32) error, n)
	for i := range sinks {
		sinks[i] = func([]float32) error { return nil }
	}
	return sinks
}
