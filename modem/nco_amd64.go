//go:build amd64 && !purego

package modem

// mixAVX2 is the inner loop of Oscillator.Mix for n a multiple of 4,
// bit for bit (nco_amd64.s).
//
//go:noescape
func mixAVX2(dst, src *complex64, tab *complex128, n int, base complex128)

// mixRealAVX2 is the inner loop of SSBDemod.Process for n a multiple of
// 8, bit for bit (nco_amd64.s).
//
//go:noescape
func mixRealAVX2(dst *float32, src *complex64, tab *complex128, n int, base complex128)
