package iq

import (
	"encoding/binary"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

// quantizeCases returns the ties ±(k + 0.5)/scale and their float32
// neighbours, the rails, values beyond them, NaN, ±Inf, tiny values and
// seeded random ones, in a mixed order.
func quantizeCases(scale float64) []float32 {
	var in []float32
	for _, k := range []float64{0, 1, 2, 1000, 16383, 32766, 32767, 32768} {
		for _, s := range []float64{1, -1} {
			v := float32(s * (k + 0.5) / scale)
			in = append(in, v, math.Nextafter32(v, 2), math.Nextafter32(v, -2))
		}
	}
	in = append(in, 0, float32(math.Copysign(0, -1)), 0.5, -0.5, 1, -1, 1.0001, -1.0001, 2, -2,
		float32(math.NaN()), float32(math.Inf(1)), float32(math.Inf(-1)), 1e-30, -1e-30,
		math.MaxFloat32, -math.MaxFloat32)
	r := rand.New(rand.NewPCG(11, 12))
	for range 4000 {
		in = append(in, float32(r.Float64()*2.4-1.2))
	}
	r.Shuffle(len(in), func(i, j int) { in[i], in[j] = in[j], in[i] })
	return in
}

// TestQuantizeS16 checks the codes against math.Round and an explicit
// clamp (the DESIGN.md format table: round half away from zero, clamp to
// the int16 range; NaN/Inf written as 0), for both scales and every
// length modulo the kernel's step of 8.
func TestQuantizeS16(t *testing.T) {
	for _, scale := range []float64{32768, 32767} {
		in := quantizeCases(scale)
		for _, n := range []int{0, 1, 7, 8, 9, 15, 16, 17, 100, len(in)} {
			t.Run(fmt.Sprintf("%g_%d", scale, n), func(t *testing.T) {
				src := in[:n]
				var wantClip, wantNF int
				dst := make([]byte, 2*n+2)
				dst[2*n], dst[2*n+1] = 0xAA, 0x55
				clip, nf := QuantizeS16(dst, src, scale)
				for i, v := range src {
					x := math.Round(float64(v) * scale)
					switch {
					case math.IsNaN(x) || math.IsInf(x, 0):
						wantNF++
						x = 0
					case x > 32767 || x < -32768:
						wantClip++
						x = math.Max(-32768, math.Min(32767, x))
					}
					if got := int16(binary.LittleEndian.Uint16(dst[2*i:])); got != int16(x) {
						t.Fatalf("sample %d (%g): code %d, want %d", i, v, got, int16(x))
					}
				}
				if clip != wantClip || nf != wantNF {
					t.Errorf("clipped %d, nonfinite %d; want %d, %d", clip, nf, wantClip, wantNF)
				}
				if dst[2*n] != 0xAA || dst[2*n+1] != 0x55 {
					t.Error("wrote past 2·len(src) bytes")
				}
			})
		}
	}
}

// TestQuantizeKernelMatchesGo compares the AVX2 kernel with its Go twin
// on the same cases, bit for bit.
func TestQuantizeKernelMatchesGo(t *testing.T) {
	if !haveQuantizeKernel {
		t.Skip("no quantize kernel in this build or on this CPU")
	}
	for _, scale := range []float64{32768, 32767} {
		in := quantizeCases(scale)
		in = in[:len(in)&^7]
		got := make([]byte, 2*len(in))
		want := make([]byte, 2*len(in))
		c1, n1 := quantizeS16AVX2(&got[0], &in[0], len(in), scale)
		c2, n2 := quantizeS16Go(want, in, scale)
		if c1 != c2 || n1 != n2 {
			t.Errorf("scale %g: kernel counts %d, %d; Go %d, %d", scale, c1, n1, c2, n2)
		}
		for i := range want {
			if got[i] != want[i] {
				t.Fatalf("scale %g: byte %d: kernel %#x, Go %#x (sample %g)", scale, i, got[i], want[i], in[i/2])
			}
		}
	}
}

// TestQuantizeFastKernel checks the kernel of in-range audio against the
// Go loop: each case (ties, their neighbours, the rails, beyond them,
// non-finite values) in a group of eight with seven ordinary samples at
// every position. The kernel must report ok exactly when the Go loop
// clamps and zeroes nothing, and then write the same bytes.
func TestQuantizeFastKernel(t *testing.T) {
	if !haveQuantizeKernel {
		t.Skip("no quantize kernel in this build or on this CPU")
	}
	r := rand.New(rand.NewPCG(21, 22))
	for _, scale := range []float64{32768, 32767} {
		for _, v := range quantizeCases(scale) {
			for pos := range 8 {
				in := make([]float32, 16)
				for i := range in {
					in[i] = float32(r.Float64()*1.8 - 0.9)
				}
				in[8+pos] = v
				got := make([]byte, 2*len(in))
				want := make([]byte, 2*len(in))
				ok := quantizeS16FastAVX2(&got[0], &in[0], len(in), scale)
				c, nf := quantizeS16Go(want, in, scale)
				if ok != (c == 0 && nf == 0) {
					t.Fatalf("scale %g, %g at %d: ok = %v with %d clamped, %d non-finite", scale, v, pos, ok, c, nf)
				}
				if ok && string(got) != string(want) {
					t.Fatalf("scale %g, %g at %d: kernel % x, Go % x", scale, v, pos, got, want)
				}
			}
		}
	}
}

func TestQuantizeS16Panics(t *testing.T) {
	defer func() {
		if recover() == nil {
			t.Error("no panic for a short destination")
		}
	}()
	QuantizeS16(make([]byte, 3), make([]float32, 2), 32768)
}

func BenchmarkQuantizeS16(b *testing.B) {
	src := make([]float32, 4800)
	r := rand.New(rand.NewPCG(1, 2))
	for i := range src {
		src[i] = float32(r.Float64()*1.8 - 0.9)
	}
	dst := make([]byte, 2*len(src))
	b.SetBytes(int64(len(src)))
	b.Run("kernel", func(b *testing.B) {
		for b.Loop() {
			QuantizeS16(dst, src, 32767)
		}
	})
	b.Run("go", func(b *testing.B) {
		for b.Loop() {
			quantizeS16Go(dst, src, 32767)
		}
	})
}
