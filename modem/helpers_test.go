package modem

import "math/rand/v2"

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
