//go:build !amd64 || purego

package iq

// haveDecodeKernels is false: the integer datatypes decode with their
// reference loops, cf32_le with the portable word scan and copy.
const haveDecodeKernels = false

func decodeCU8(dst []complex64, b []byte) int  { return decodeCU8Go(dst, b) }
func decodeCI8(dst []complex64, b []byte) int  { return decodeCI8Go(dst, b) }
func decodeCI16(dst []complex64, b []byte) int { return decodeCI16Go(dst, b) }

func decodeCF32(dst []complex64, b []byte) (clipped, nonfinite int) {
	return decodeCF32Words(dst, b)
}
