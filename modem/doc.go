// Package modem holds ssbkit's streaming signal blocks: the oscillator and
// mixer, FIR filters and their Kaiser-window design, the rational polyphase
// resampler, the SSB/AM/DSB modulators, and the receive side (channeliser,
// demodulators, AGC).
//
// # Streaming model
//
// Every block keeps its state in a struct made by New…, has Reset, and
// processes one block at a time with
//
//	Process(dst, src []complex64) []complex64
//
// (or float32 for real signals): dst is caller-owned, a nil or short dst is
// allocated (in practice only on the first call), and the written part is
// returned. The output does not depend on how a signal is cut into blocks,
// and a block allocates nothing in the steady state, so files of any size
// run in memory bounded by the block size. Delay reports the group delay in
// output samples.
//
// # Oscillator
//
// Oscillator produces o[n] = e^{jφ[n]} with φ[n] = 2π·n·f/fs held in a
// 64-bit fixed-point accumulator (2⁶⁴ ≙ one cycle). Each sample is a base
// phasor computed with math.Sincos from the accumulator every 1024 samples
// times a table entry e^{j2π·k·step/2⁶⁴}, so the phase after n samples is
// exact up to the 2⁻⁶⁴-cycle rounding of the step: measured 3.7·10⁻¹⁰ rad
// after 10⁹ samples of 1234.5678 Hz at 2.4 MS/s (TestOscillatorNoDrift).
//
// # Filter design
//
// KaiserLowpass designs h[n] = 2fc/fs·sinc(2fc/fs·(n − M/2))·w[n] with the
// Kaiser window w[n] = I₀(β√(1 − (2n/M − 1)²))/I₀(β) (Oppenheim & Schafer,
// Discrete-Time Signal Processing, 3rd ed., sec. 7.5.3). For an
// attenuation A = −20·log10 δ and a transition Δω (rad/sample):
//
//	β = 0.1102(A − 8.7)                        A > 50
//	β = 0.5842(A − 21)^0.4 + 0.07886(A − 21)   21 ≤ A ≤ 50
//	M = ⌈(A − 7.95) / (2.285·Δω)⌉
//
// The formulas are empirical; KaiserLowpass checks the response near the
// band edges and tightens the design until the ripple and the stop-band
// gain are at most δ.
//
// # Resampler
//
// Resampler changes the rate by L/M = fout/fin (reduced from the rates) as
// a chain of up to three polyphase stages (Crochiere & Rabiner, Multirate
// Digital Signal Processing, 1983). A stage interpolates by L_s, filters
// with a Kaiser low-pass at fin_s·L_s and keeps every M_s-th sample,
// computing only the outputs kept: y[m] = Σₖ h[p + kL]·x[n − k] with
// mM = nL + p. Given the pass band |f| ≤ P to keep, a stage's stop band
// begins at min(fin_s, fout_s) − P (the nearest image or alias of the pass
// band), so later stages of a large interpolation have wide transitions and
// few taps. The planner tries the rational stage first (upsampling) or last
// (downsampling) with every split of the integer remainder into at most two
// factors and keeps the chain with the fewest multiply-adds per second;
// 8 kHz → 2.4 MHz with P = 2.7 kHz becomes ×4 then ×75. Resampler and
// RealResampler run the same chain code on complex and real samples. The
// taps of a phase are padded to a multiple of four (four independent sums
// per pass); complex interpolation stages compute two phases per pass over
// the input window, so the two share its loads.
//
// # Transmit chain
//
// Modulator runs
//
//	audio (any rate) → RealResampler → band-pass → modulation → gain
//	  → Resampler → Oscillator mix to the offset
//
// The audio is brought to a low internal rate fi (8 kHz for the default
// 300–2700 Hz band; the lowest of 8, 12, 16, 24 … kHz with
// fi ≥ 2·High + 2.6 kHz otherwise), where a Kaiser band-pass
// (KaiserBandpass, 200 Hz transitions, 70 dB) limits it and the phase
// splitter of package hilbert works where 300 Hz is not a tiny fraction of
// the rate — the figures of "ssbkit sweep" at 8 kHz apply unchanged. The
// default splitter, equiripple with 63 taps, predicts 81 dB of
// opposite-sideband suppression over 300–2700 Hz. Then:
//
//	usb: x = g·(z + c),  z = a + j·H{a} (the splitter's analytic signal)
//	lsb: x = g·(z + c)*  (the complex conjugate: the mirror image)
//	am:  x = g·(P/m + a), P the audio's band-limited peak, m the depth
//	dsb: x = g·a
//
// so that a tone a·cos(2πft) becomes, in usb with g = 1, a·e^{j2πft} (the
// unity convention of the design). A usb/lsb carrier at C dB relative to
// PEP (R3E, H3E) is c = k·E/(1 − k) with k = 10^(C/20) and E the peak of
// |z|, which makes c/(E + c) = k. The complex baseband is resampled from fi
// to the output rate keeping |f| ≤ High with 90 dB of image rejection, and
// mixed to the offset. Where the last stage is an integer interpolation and
// the CPU has AVX2/FMA, the mixer is folded into that stage: its taps become
// h[l]·e^{jωl} and its input is pre-mixed at the lower rate with step U·ω,
// which gives the same carrier phase at every output as mixing afterwards;
// without the kernel the plain loop would be slower than real taps and a
// mixer, so the chain mixes after the Resampler. Survey measures P and E
// in a first pass (8× interpolated so that peaks between samples count),
// for the depth, the carrier and peak normalisation.
//
// Delay reports the whole chain's delay in output samples; a caller that
// drops the first round(Delay) samples to align I/Q and audio sets the
// carrier phase with SetCarrierPhase so that it is 0 at the first kept
// sample. Every stage streams, so memory is bounded by the block size.
//
// # Receive chain
//
// Channel tunes one station out of a capture:
//
//	ShiftDecimator → Decimators → channel low-pass
//	  → Interpolator or Resampler → demodulator → AGC or fixed gain
//
// The first stage mixes the channel centre to 0 Hz (for SSB the carrier
// plus the middle of the audio band, ±(Low + High)/2) and decimates in
// one, the mixer folded into complex taps (ShiftDecimator; a comb-shaped
// low-pass whose nulls fall on the aliases that would land in the
// channel). Further Kaiser decimators planned by PlanChannel keep every
// alias into the channel at least RxConfig.AttenDB (80 dB by default)
// down. At the work rate the channel filter, a Kaiser low-pass of half the
// channel's width, selects one sideband: on the capture it is a complex
// band-pass over Low…High on one side of the carrier. An integer
// interpolator or the Resampler then reaches the audio rate.
// Demodulators: SSBDemod (product detection: mix back by the centre
// shift, compute the real part only), AMDemod (envelope, mean removed),
// SAMDemod (a second-order carrier-tracking loop that reports lock).
// Receiver reads a capture once and runs several channels concurrently.
// Narrower reuses the same stages to bring one frequency down to a narrow
// rate for analysis (package spectral's measurement).
//
// # Tuning by the voice
//
// An SSB signal has no carrier to tune to. TuneEstimator finds the
// carrier error of a voice channel from its baseband: voiced speech is a
// set of harmonics k·f0, which a mistuning by δ moves to k·f0 + δ. The
// phases of the frame's (compressed, whitened) spectral autocorrelation
// at the pitch period's multiples rotate by 2π·δ·m/f0, which gives δ
// modulo f0 in every voiced frame; the pitch changes from frame to frame
// and δ does not, so the frames of a window of a few seconds agree on
// one δ only. Windows without voice, or whose pitch never moves, give no
// estimate; a sequence of windows is a drift track.
//
// # Kernels
//
// The hot loops of both chains have AVX2/FMA kernels in Go assembly, built
// with "amd64 && !purego" and chosen at run time by CPU detection; each has
// a plain Go twin, the reference loop, that tests compare against within a
// named rounding bound. Build with -tags purego to run the twins alone.
package modem
