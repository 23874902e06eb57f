//go:build amd64 && !purego

package fft

import "golang.org/x/sys/cpu"

// HaveAVX2 reports whether butterfliesAVX2 runs on this CPU; without it
// the radix-4 passes use their Go loop (butterfliesGo), the reference.
var HaveAVX2 = cpu.X86.HasAVX2 && cpu.X86.HasFMA

// butterfliesAVX2 is butterfliesGo for m a multiple of 2, two butterflies
// per step in 256-bit registers (fft_amd64.s). The complex products use
// fused multiply-adds, so results may differ from the Go loop in the last
// bit.
//
//go:noescape
func butterfliesAVX2(x0, x1, x2, x3, w1, w2, w3 *complex128, m int)
