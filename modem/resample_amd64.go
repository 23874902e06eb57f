//go:build amd64 && !purego

package modem

// resampRationalAVX2 is the rational branch of cstage.process (down > 1)
// on the duplicated tap layout (dupTaps), bit for bit; see
// resample_amd64.s.
//
//go:noescape
func resampRationalAVX2(dst, buf *complex64, c int, phd *float32, k, up, down int, state *[2]int) (n int)
