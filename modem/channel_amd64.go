//go:build amd64 && !purego

package modem

import "golang.org/x/sys/cpu"

// haveKernels reports whether the AVX2/FMA kernels of channel_amd64.s
// run on this CPU; without them the decimators use their Go loops.
var haveKernels = cpu.X86.HasAVX2 && cpu.X86.HasFMA

// dotComplexAVX2 is dotComplexGo then rotate, on the kernel layout (see
// kernelTaps): len(dst) outputs from windows of 4·full + rem taps at x,
// x+step, …, output m multiplied by p·rᵐ.
//
//go:noescape
func dotComplexAVX2(dst []complex64, x *complex64, step int, crd, cid *float32, full int, mask *[8]int32, rem int, p, r complex128)

// dotRealAVX2 is dotRealGo on the kernel layout.
//
//go:noescape
func dotRealAVX2(dst []complex64, x *complex64, step int, hd *float32, full int, mask *[8]int32, rem int)

// interpAVX2 is interpGo on the transposed layout of interpTaps.
//
//go:noescape
func interpAVX2(dst *complex64, x *complex64, n int, taps *float32, k, full int, mask *[8]int32, part, stride int)

// dotSymAVX2 is the symmetric form of ShiftDecimator.blockSym on the
// layout of symTaps, two outputs a pass: n outputs from windows of L taps
// at x, x+step, …, output 2i multiplied by q₀·r²ⁱ and output 2i+1 by
// q₁·r²ⁱ, q = (q₀, q₁) as float64 (re, im, re, im). hi is 8·(L−4).
//
//go:noescape
func dotSymAVX2(dst *complex64, n int, x *complex64, step int, pa, pb *float32, groups, hi int, q *[4]float64, r2 complex128)

// dotSym4AVX2 is dotSymAVX2 for four channels whose windows coincide, on
// the layout of shiftGroup: n outputs of each channel c to out[c], output
// m rotated by q_c·r_cᵐ.
//
//go:noescape
func dotSym4AVX2(out *[4]*complex64, n int, x *complex64, step int, taps *float32, groups, hi int, q *[8]float64, rd *[16]float64)

// dotRealSymAVX2 is dotRealGo for symmetric taps on the layout of
// realSymTaps, two outputs a pass: n outputs from windows of L taps at x,
// x+step, …; hi is 8·(L−4).
//
//go:noescape
func dotRealSymAVX2(dst *complex64, n int, x *complex64, step int, hd *float32, groups, hi int)

// dotSym2x2AVX2 is dotSym4AVX2 for two channels, two outputs a pass, on
// the two-channel layout of shiftGroup: n outputs of each channel c to
// out[c], output m rotated by q_c·r_cᵐ.
//
//go:noescape
func dotSym2x2AVX2(out *[2]*complex64, n int, x *complex64, step int, taps *float32, groups, hi int, q *[8]float64, rd *[16]float64)

// interpRealAVX2 is interpRealGo for n inputs on the transposed layout of
// interpTaps (groups of four phases, the last of them partial when part =
// 1, its u mod 4 outputs stored under mask): four inputs a pass, eight
// accumulators, then the last n mod 4 one at a time.
//
//go:noescape
func interpRealAVX2(dst *float32, x *complex64, n int, taps *float32, k, groups, u, part int, mask *[4]int32)

// dotRealSym1AVX2 is dotRealSymAVX2 for step 1 and n a multiple of 4,
// the outputs in the lanes (see channel_amd64.s); slots = ⌈L/2⌉.
//
//go:noescape
func dotRealSym1AVX2(dst *complex64, n int, x *complex64, hd *float32, slots, l int)

// dotReal1AVX2 is dotRealAVX2 for step 1 and n a multiple of 4, the
// outputs in the lanes (see channel_amd64.s); hd is the duplicated layout
// of kernelTaps.re, l the number of taps.
//
//go:noescape
func dotReal1AVX2(dst *complex64, n int, x *complex64, hd *float32, l int)
