package iq

import (
	"encoding/binary"
	"math"
	"path/filepath"
	"strconv"
	"strings"
)

// Datatype names a sample format with its SigMF core:datatype string.
type Datatype string

// The sample formats of the design's table (common practice): complex
// interleaved I then Q, and real single-channel recordings.
const (
	CU8  Datatype = "cu8"     // unsigned 8-bit I/Q, (v − 127.5)/127.5
	CI8  Datatype = "ci8"     // signed 8-bit I/Q, v/128
	CI16 Datatype = "ci16_le" // signed 16-bit little-endian I/Q, v/32768
	CF32 Datatype = "cf32_le" // 32-bit IEEE float little-endian I/Q, as is
	RF32 Datatype = "rf32_le" // real 32-bit float; read as its analytic signal
	RI16 Datatype = "ri16_le" // real signed 16-bit; read as its analytic signal
)

// Datatypes lists the supported datatypes in the order of the design's table.
var Datatypes = []Datatype{CU8, CI8, CI16, CF32, RF32, RI16}

// Valid reports whether d is one of the supported datatypes.
func (d Datatype) Valid() bool {
	switch d {
	case CU8, CI8, CI16, CF32, RF32, RI16:
		return true
	}
	return false
}

// IsReal reports whether d holds a real (one-component) recording.
func (d Datatype) IsReal() bool { return d == RF32 || d == RI16 }

// IsFloat reports whether d holds IEEE floats.
func (d Datatype) IsFloat() bool { return d == CF32 || d == RF32 }

// ComponentSize is the size in bytes of one component (I, Q or a real
// sample); 0 for an unknown datatype.
func (d Datatype) ComponentSize() int {
	switch d {
	case CU8, CI8:
		return 1
	case CI16, RI16:
		return 2
	case CF32, RF32:
		return 4
	}
	return 0
}

// SampleSize is the size in bytes of one sample of the file: two
// components for complex datatypes, one for real ones.
func (d Datatype) SampleSize() int {
	if d.IsReal() {
		return d.ComponentSize()
	}
	return 2 * d.ComponentSize()
}

// ParseDatatype returns the datatype named s. Besides the SigMF names it
// accepts the short forms ci16, cf32, rf32, ri16 and cs8, cs16.
func ParseDatatype(s string) (Datatype, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "cu8":
		return CU8, nil
	case "ci8", "cs8":
		return CI8, nil
	case "ci16_le", "ci16", "cs16":
		return CI16, nil
	case "cf32_le", "cf32":
		return CF32, nil
	case "rf32_le", "rf32":
		return RF32, nil
	case "ri16_le", "ri16":
		return RI16, nil
	}
	return "", &UnsupportedError{What: "datatype " + quote(s) + " (known: cu8, ci8, ci16_le, cf32_le, rf32_le, ri16_le)"}
}

// rawExtensions maps raw file extensions to their datatypes (the design's
// table).
var rawExtensions = map[string]Datatype{
	".cu8":  CU8,
	".cs8":  CI8,
	".ci8":  CI8,
	".cs16": CI16,
	".ci16": CI16,
	".cf32": CF32,
	".raw":  CF32,
}

// DatatypeFromExt returns the datatype of a raw file named path by its
// extension, and false when the extension is not a raw one.
func DatatypeFromExt(path string) (Datatype, bool) {
	d, ok := rawExtensions[strings.ToLower(filepath.Ext(path))]
	return d, ok
}

// Container kinds.
const (
	ContainerRaw   = "raw"
	ContainerWAV   = "wav"
	ContainerSigMF = "sigmf"
)

// ContainerOf returns the container of path from its extension: "wav",
// "sigmf" (.sigmf-meta or .sigmf-data), "raw" (a raw extension of the
// table), or "" when the extension is unknown.
func ContainerOf(path string) string {
	switch ext := strings.ToLower(filepath.Ext(path)); ext {
	case ".wav":
		return ContainerWAV
	case ".sigmf-meta", ".sigmf-data", ".sigmf":
		return ContainerSigMF
	default:
		if _, ok := rawExtensions[ext]; ok {
			return ContainerRaw
		}
	}
	return ""
}

// SigMFPaths returns the metadata and data file names of a SigMF recording
// given either name (or the base name without extension).
func SigMFPaths(path string) (meta, data string) {
	base := path
	switch strings.ToLower(filepath.Ext(path)) {
	case ".sigmf-meta", ".sigmf-data", ".sigmf":
		base = strings.TrimSuffix(path, filepath.Ext(path))
	}
	return base + ".sigmf-meta", base + ".sigmf-data"
}

// Decoding tables and scalings (the design's format table, common
// practice).
var (
	cu8Table  [256]float32 // (v − 127.5)/127.5
	ci8Table  [256]float32 // int8(v)/128
	cu8Rail   [256]uint8   // 1 for the rail codes 0 and 255
	ci8Rail   [256]uint8   // 1 for the rail codes −128 and 127
	ci8Scale  = float32(1.0 / 128)
	ci16Scale = float32(1.0 / 32768)
)

func init() {
	for v := 0; v < 256; v++ {
		cu8Table[v] = float32((float64(v) - 127.5) / 127.5)
		ci8Table[v] = float32(int8(uint8(v))) * ci8Scale
	}
	cu8Rail[0], cu8Rail[255] = 1, 1
	ci8Rail[0x80], ci8Rail[0x7f] = 1, 1
}

// decodeReal decodes len(dst) real samples of datatype d (RF32, RI16, or
// the 24-bit PCM of a WAV, given as pcm24) from b into dst, with the same
// counts as decodeComplex.
func decodeReal(d Datatype, dst []float32, b []byte) (clipped, nonfinite int) {
	n := len(dst)
	if n == 0 {
		return 0, 0
	}
	switch d {
	case RI16:
		b = b[: 2*n : 2*n]
		for i := range dst {
			v := int16(binary.LittleEndian.Uint16(b[2*i : 2*i+2]))
			dst[i] = float32(v) * ci16Scale
			if v == math.MaxInt16 || v == math.MinInt16 {
				clipped++
			}
		}
	case RF32:
		b = b[: 4*n : 4*n]
		for i := range dst {
			v := math.Float32frombits(binary.LittleEndian.Uint32(b[4*i : 4*i+4]))
			if v-v != 0 {
				v = 0
				nonfinite++
			}
			if v >= 1 || v <= -1 {
				clipped++
			}
			dst[i] = v
		}
	case pcm24:
		b = b[: 3*n : 3*n]
		for i := range dst {
			v := decode24(b[3*i : 3*i+3])
			dst[i] = float32(v) * pcm24Scale
			if v == 1<<23-1 || v == -1<<23 {
				clipped++
			}
		}
	default:
		panic("iq: decodeReal of a complex or unknown datatype")
	}
	return clipped, nonfinite
}

// pcm24 is the internal datatype of 24-bit PCM WAV data (v/2^23); it is
// read but never written.
const pcm24 Datatype = "ri24_le"

const pcm24Scale = float32(1.0 / (1 << 23))

func decode24(s []byte) int32 {
	_ = s[2]
	return int32(uint32(s[0])<<8|uint32(s[1])<<16|uint32(s[2])<<24) >> 8
}

// decodeComplex24 decodes interleaved 24-bit PCM I/Q (a two-channel WAV).
func decodeComplex24(dst []complex64, b []byte) (clipped int) {
	n := len(dst)
	if n == 0 {
		return 0
	}
	b = b[: 6*n : 6*n]
	for i := range dst {
		vi := decode24(b[6*i : 6*i+3])
		vq := decode24(b[6*i+3 : 6*i+6])
		dst[i] = complex(float32(vi)*pcm24Scale, float32(vq)*pcm24Scale)
		if vi == 1<<23-1 || vi == -1<<23 || vq == 1<<23-1 || vq == -1<<23 {
			clipped++
		}
	}
	return clipped
}

// encodeComplex encodes src as datatype d into dst, which must hold
// len(src)*d.SampleSize() bytes, following the design's table: integers
// are clamp(round(x·scale + offset)); floats are copied. NaN and ±Inf
// components are written as 0 and counted, so no file ssbkit writes holds
// them.
func encodeComplex(d Datatype, dst []byte, src []complex64) (nonfinite int) {
	n := len(src)
	if n == 0 {
		return 0
	}
	switch d {
	case CU8:
		dst = dst[: 2*n : 2*n]
		for i, v := range src {
			a, c1 := quantize(real(v), 127.5, 127.5, 0, 255)
			b, c2 := quantize(imag(v), 127.5, 127.5, 0, 255)
			dst[2*i], dst[2*i+1] = uint8(a), uint8(b)
			nonfinite += c1 + c2
		}
	case CI8:
		dst = dst[: 2*n : 2*n]
		for i, v := range src {
			a, c1 := quantize(real(v), 128, 0, -128, 127)
			b, c2 := quantize(imag(v), 128, 0, -128, 127)
			dst[2*i], dst[2*i+1] = uint8(int8(a)), uint8(int8(b))
			nonfinite += c1 + c2
		}
	case CI16:
		_, nonfinite = QuantizeS16(dst[:4*n], floatView(src), 32768)
	case CF32:
		return encodeCF32(dst, src)
	default:
		panic("iq: encodeComplex of a real or unknown datatype")
	}
	return nonfinite
}

// quantize returns clamp(round(x·scale + offset), lo, hi), rounding half
// away from zero, and 1 when x was NaN or ±Inf (then the result is the
// code of 0).
func quantize(x float32, scale, offset float64, lo, hi int32) (int32, int) {
	if x-x != 0 {
		return int32(math.Round(offset)), 1
	}
	v := math.Round(float64(x)*scale + offset)
	if v < float64(lo) {
		return lo, 0
	}
	if v > float64(hi) {
		return hi, 0
	}
	return int32(v), 0
}

// quote returns s in Go quotes, control characters escaped, so an error
// naming it stays one line.
func quote(s string) string { return strconv.Quote(s) }
