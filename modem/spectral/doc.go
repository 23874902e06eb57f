// Package spectral estimates spectra of complex baseband captures and
// measures single-sideband and AM transmissions in them.
//
// # Welch spectra
//
// An Accumulator cuts the stream into segments of n samples x_m[i], a hop
// apart, tapers each with a window w[i] and averages the periodograms
// (Welch's method):
//
//	P[k] = 1/(M·fs·Σw²) · Σ_m |Σ_i w[i]·x_m[i]·e^{−j2πik/n}|²
//
// P is a two-sided power spectral density in (full-scale amplitude)² per
// Hz: complex white noise with E|x|² = σ² reads σ²/fs in every bin, and
// ∫P df over a band is the power in that band (the window's equivalent
// noise bandwidth ENBW = n·Σw²/(Σw)² bins is what makes both true at
// once; F. J. Harris, Proc. IEEE 66(1), 1978, eq. 11). The scaling is
// scipy.signal.welch's "density" scaling. A tone of amplitude A centred on
// bin k reads P[k]·(fs/n)·ENBW = A²: with the FlatTop window that holds to
// 0.01 dB wherever the tone falls between bins, so tone and carrier levels
// are read from a flat-top spectrum and band powers from a Hann one.
// Windows are periodic ("DFT-even") versions of gonum's dsp/window
// weights. Power-of-two lengths are transformed by the package's radix-4
// FFT, which leaves the bins in digit-reversed order: the periodograms
// are summed in that order and put in frequency order once, when the
// spectrum is read (other lengths use gonum's dsp/fourier). With
// Options.Workers > 1 a batch of segments is transformed on several
// goroutines and each bin's sum still takes the segments in stream order,
// so the result does not depend on the number of workers.
//
// A Waterfall keeps, beside the average, a bounded time–frequency picture:
// rows of summed periodograms that merge pairwise when they reach twice
// the row limit, so any stream length fits in fixed memory.
//
// # Occupied bandwidth
//
// Spectrum.OccupiedBandwidth returns the band outside which 0.5 % of the
// power lies on each side (99 % bandwidth, ITU-R Recommendation SM.328).
//
// # Detection
//
// Detect finds signals in a PSD: noise floor from a low quantile of the
// smoothed spectrum, a threshold above it, grouping of occupied bins,
// edges that leave out the Hann window's skirts (a bin within the
// threshold of the leakage 1/(πx(x²−1))² of a stronger bin x bins away,
// Harris 1978, is the window's, not the signal's), and a kind from the
// spectral shape. For SSB the suppressed carrier is put
// AudioLowHz (default 300 Hz, the usual low edge of a voice transmitter,
// common practice) outside the steep edge nearest the voice energy.
//
// CarrierRefiner then finds an SSB carrier from the voice itself in a
// second pass over the capture: each usb/lsb signal is narrowed to about
// 6 kHz around the middle of its pass band and analysed by
// modem.TuneEstimator (the pitch harmonics of voiced speech, 3 s windows
// 1 s apart); the carrier becomes the median of the windows' estimates,
// the edge estimate is kept beside it, with a confidence.
//
// # Measuring a transmission
//
// A Measurer reports, for a carrier at offset c and an audio band
// [lo, hi]:
//
//   - wanted and unwanted sideband power, ∫P over c+[lo, hi] and
//     c−[hi, lo], and their ratio, the opposite-sideband suppression;
//   - PEP, the peak of |y|² in the time domain, where y is the capture
//     isolated around the carrier by a linear-phase band-pass filter
//     (pass |f−c| ≤ hi+150 Hz, stop from hi+850 Hz): other signals in a
//     wide capture do not inflate the peak; when that band already covers
//     the capture no filter is applied. Outputs during the filter's
//     start and end are ignored;
//   - the carrier level (flat-top line at c) relative to PEP, in dBc;
//   - the 99 % occupied bandwidth over c ± 2·hi;
//   - when two tones hold 80 % of the wanted power and are within 6 dB
//     of each other, the products at 2f₁−f₂, 2f₂−f₁ (third order) and
//     3f₁−2f₂, 3f₂−2f₁ (fifth order): the stronger of each pair relative
//     to one tone (the mean of the two tone powers), dBc, and relative to
//     PEP. For two equal tones PEP is four times one tone's power, so
//     the PEP figures are 6.02 dB lower (common practice).
//
// A product or carrier below the noise reads as the noise in its bin: the
// figure is then an upper bound.
//
// Every figure lies within P = max(2·hi, 3·hi − 2·lo, hi + 850 Hz) + 200 Hz
// of the carrier. A capture at least four times wider than
// max(48 kHz, 2.5·P) is therefore first narrowed (modem.Narrower): the
// carrier is mixed to zero and the capture decimated by an integer to at
// least that rate, aliases into ±P at least 100 dB down, and the figures
// are measured there (the noise floor from the bins within ±P). 48 kHz
// keeps the envelope sampled finely enough for PEP: a peak of a signal
// within ±2.85 kHz falls between samples by at most
// 1 − cos²(π·2850/48000) ≈ 0.15 dB. The I/Q imbalance is a property of
// the whole capture and is estimated from it by the iq package.
package spectral
