// Package iq reads and writes I/Q captures and measures them.
//
// # Sample formats
//
// A complex sample x = I + jQ is stored interleaved, I then Q,
// little-endian, with the scalings of the design's table (common
// practice):
//
//	cu8      x = (v − 127.5)/127.5      v = clamp(round(x·127.5 + 127.5), 0, 255)
//	ci8      x = v/128                  v = clamp(round(x·128), −128, 127)
//	ci16_le  x = v/32768                v = clamp(round(x·32768), −32768, 32767)
//	cf32_le  x = v                      v = x
//
// Rounding is half away from zero. Writers never write NaN or ±Inf: such
// components are written as 0 and counted. On a little-endian machine the
// memory of a []complex64 already is cf32_le, so that encoding is a scan
// for non-finite values (exponent field all ones, IEEE Std 754-2019,
// 3.4) and a copy, or no copy at all when a writer passes a clean piece
// on; only a piece that holds such a value is encoded component by
// component.
//
// Decoding goes through one bulk decoder for Source and DecodeComplex.
// Its reference loops are plain Go (a 256-entry table for the 8-bit
// formats); on amd64 CPUs with AVX2 and FMA a vector kernel gives the
// same bits: widen to int32, convert, and scale — v·2⁻⁷ and v·2⁻¹⁵ are
// exact, and (v − 127.5)/127.5 is a multiply by the reciprocal with one
// FMA correction step, which gives the table's correctly rounded
// quotient for all 256 codes (checked exhaustively). Clipped samples are
// counted from byte masks of the rail codes and popcnt, at no cost worth
// measuring. cf32_le is a copy with an integer comparison of the
// magnitude bits for |v| ≥ 1 and for NaN/±Inf (IEEE Std 754-2019, 3.4:
// non-negative binary32 values order as their bit patterns): by the
// kernel, or elsewhere by a plain Go scan of 64-bit words, one sample
// each; a block holding NaN or ±Inf is decoded again by the reference
// loop. Build with -tags purego to run without the kernels (the integer
// formats then take the reference loops, cf32_le the word scan).
//
// # Containers
//
// Raw files are recognised by extension (.cu8, .cs8/.ci8, .cs16/.ci16,
// .cf32/.raw) or given a datatype with Options.Format, and need
// Options.Rate. WAV files hold I in the left and Q in the right channel
// (16- or 24-bit PCM or 32-bit float in; 16-bit PCM or 32-bit float out).
// SigMF recordings are a .sigmf-meta JSON file beside a .sigmf-data file
// (SigMF Specification v1.0.0); either name may be given.
//
// A one-channel WAV, or raw/SigMF rf32_le/ri16_le, is a real recording.
// Source delivers its analytic signal x + j·H{x} (see Analytic): a real
// tone a·cos(ωn) becomes the complex tone a·e^{jωn}, time-aligned with the
// file and with the same number of samples.
//
// # Bad input
//
// A raw file (or SigMF data file) whose size is not a whole number of
// samples is refused with a *FormatError that gives the size and the bytes
// left over: a wrong --format or a cut file is likelier than a meaningful
// tail. On standard input, where the size is not known in advance, the
// whole samples are delivered and Read then returns a *FormatError for the
// partial one. Empty files, WAV headers that are malformed or cut, and
// SigMF metadata that is not valid JSON (reported with line and column) or
// lacks core:datatype are *FormatError values; a valid input ssbkit does
// not handle (a WAV encoding or channel count, a SigMF datatype) is an
// *UnsupportedError.
//
// NaN and ±Inf components of float captures are replaced by 0 as they are
// read and counted (Source.NonFinite), so no computation downstream sees
// them.
package iq
