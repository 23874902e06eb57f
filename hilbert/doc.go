// Package hilbert designs and analyses phase splitters: pairs of real
// filters I and Q, 90° apart over an audio band, whose combination
// I + j·Q turns a real signal into its analytic signal (positive
// frequencies only). A phasing SSB modulator is such a splitter followed
// by a complex mixer; how well the opposite sideband is suppressed is
// decided here.
//
// # Model
//
// A splitter is described by its analytic filter H(f) = I(f) + j·Q(f),
// scaled so that H ≈ 2 at positive audio frequencies and H ≈ 0 at negative
// ones: a real tone a·cos(2πfn/rate) then leaves the streaming Filter as
// a·e^{j2πfn/rate} (delayed), and what is left at −f is the opposite
// sideband. The suppression at f is
//
//	S(f) = 20·log10(|H(f)| / |H(−f)|)   dB.
//
// If the Q path has gain g relative to I and departs from quadrature by ε,
// H(±f) ∝ 1 ± g·e^{jε}, which gives SuppressionDB; with g = 1,
// S = 20·log10(cot(ε/2)) (1° → 41.2 dB).
//
// # Designs
//
// The ideal Hilbert transformer has h[n] = 2/(πn) for odd n, 0 for even n,
// and response −j·sgn(ω) (Oppenheim & Schafer, Discrete-Time Signal
// Processing, 3rd ed., sec. 12.4). The FIR designs keep N = 2M+1 taps of
// it around n = 0, delay the I path by M and differ in how the taps are
// chosen:
//
//   - rect, hamming, blackman, kaiser: the ideal taps times a window
//     (Kaiser β by Kaiser's 1974 formulas from the band edge and length);
//   - equiripple: the minimax (Parks–McClellan) design over the band
//     mirrored about rate/4, [fe, rate/2 − fe], fe = min(low, rate/2 − high);
//   - fft: the FFT analytic-signal mask applied by overlap-save with a block
//     of Taps samples (an FIR of about half the block, plus block latency);
//   - weaver: mix the band centre to 0 Hz, low-pass, mix back (the Weaver
//     method), with its leakage through the low-pass stop band.
//
// The IIR design allpass is a pair of all-pass chains from the half-band
// elliptic filter (closed-form Jacobi-nome coefficients), equiripple in
// phase over the band, one multiplication per section and sample.
//
// # Analog networks
//
// Analog (NewAnalog) is the continuous-time counterpart of the all-pass
// pair: two chains of first-order RC all-pass sections, equiripple in
// phase over the band, for builders of phasing exciters and receivers.
// Series and Snap give the IEC 60063 preferred values (E6 … E192) its
// resistors and capacitors are bought in.
//
// Analyze reports the minimum and mean suppression over a band, the
// wanted-sideband ripple, delay and cost for any design, so designs of
// different kinds compare on one footing.
package hilbert
