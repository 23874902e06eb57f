//go:build amd64 && !purego

package modem

// The Channeliser's kernels (bank_amd64.s); their Go twins in bank.go and
// bank_fft.go are the reference loops, compared on random data by
// TestBankKernelsMatchGo.

// bankFoldAVX2 is bankFoldGo for four whole windows: the taps from g0
// (the tap g[0] of the layout gp: each tap twice, 3D zero taps before and
// after), m a multiple of eight, the windows spanning rows·m samples.
//
//go:noescape
func bankFoldAVX2(vb, win *complex64, g0 *float32, m, d, rows, e int)

// bankPassAVX2 is bankPassGo over the m four-lane elements at x, blocks
// of length l ≥ 8, the twiddles tw interleaved as in bankFFT.
//
//go:noescape
func bankPassAVX2(x *complex64, m, l int, tw *complex64)

// bankLast4AVX2 is bankLast4Go over m four-lane elements.
//
//go:noescape
func bankLast4AVX2(x *complex64, m int)

// bankLast2AVX2 is bankLast2Go over m four-lane elements.
//
//go:noescape
func bankLast2AVX2(x *complex64, m int)

// bankGatherAVX2 is bankGather for four lanes: for i < n, the 32 bytes at
// vb[offs[i]] to out + rows[i]·stride bytes.
//
//go:noescape
func bankGatherAVX2(out *complex64, stride int, vb *complex64, rows, offs *int32, n int)
