// Package samples builds ssbkit's invented demo scenario: seeded audio
// generators (speech-like formant synthesis, tones, two tones, keyed tones,
// noise), an evening on a 40 m-like band as a wideband I/Q capture, and a
// bench test of the user's own transmitter with known imperfections. Every
// generator is seeded and streaming, so the scenario is reproducible (the
// same bytes on a given architecture; Go may fuse multiply–adds on some)
// and needs memory bounded by the block size, not by its length. The
// scenario also describes itself (Truth), which the demo and its tests
// compare the measurements against.
//
// # Audio generators
//
// Every audio generator implements [Source]: Generate fills a caller-owned
// block and keeps its state between calls, so the output does not depend on
// how the signal is cut into blocks.
//
// [Tone] is a·cos(2πfn/fs + φ) with the phase computed from the sample
// index n, so it does not drift. [TwoTone] is the sum of two such tones of
// equal amplitude: its peak is twice one tone's amplitude, so one tone sits
// 6.02 dB below the peak envelope power (common practice for the two-tone
// test). [KeyedTone] keys a tone on and off with the International Morse
// code timing of ITU-R M.1677-1 (dot 1 unit, dash 3, gap inside a
// character 1, between characters 3, between words 7) and raised-cosine
// edges. [Noise] is white Gaussian noise; [BandNoise] passes it through a
// Kaiser-windowed band-pass filter.
//
// # Speech-like voices
//
// [Voice] is a source–filter model of voiced speech (Fant, Acoustic Theory
// of Speech Production, 1960): a glottal pulse train excites a cascade of
// formant resonators.
//
// The glottal flow over one pitch period T is Rosenberg's trigonometric
// pulse (Rosenberg, "Effect of glottal pulse shape on the quality of
// natural vowels", J. Acoust. Soc. Am. 49(2B), 1971, shape C):
//
//	g(t) = ½(1 − cos(πt/Tp))       0 ≤ t ≤ Tp
//	g(t) = cos(π(t − Tp)/(2Tn))    Tp < t ≤ Tp + Tn
//	g(t) = 0                       otherwise
//
// and the voice uses its first difference, which adds the +6 dB/octave of
// radiation at the lips. Each formant is Klatt's second-order resonator
// (Klatt, "Software for a cascade/parallel formant synthesizer",
// J. Acoust. Soc. Am. 67(3), 1980):
//
//	y[n] = A·x[n] + B·y[n−1] + C·y[n−2]
//	C = −exp(−2πBW/fs),  B = 2·exp(−πBW/fs)·cos(2πF/fs),  A = 1 − B − C
//
// with unity gain at 0 Hz. The formant targets are the average vowel
// formants of adult men measured by Peterson and Barney (J. Acoust. Soc.
// Am. 24(2), 1952), scaled for higher voices. Speech is organised as
// phrases of words of one to three syllables: each syllable glides between
// two vowels, may start with a noise burst (a fricative-like consonant),
// and has a raised-cosine envelope; the pitch falls through each phrase
// (declination), rises on one stressed syllable and carries a little
// period-to-period jitter; phrases are separated by pauses. It is not
// intelligible speech, but it has the spectral and temporal shape of
// speech — a pitch harmonic comb under formant peaks, syllabic envelope,
// pauses — which is what a receiver, a spectrum display and a signal
// detector see.
//
// # The scenario and the bench test
//
// [NewBand] returns the evening-band scene (DefaultBandConfig: 24 s at
// 48 kHz around 7.150 MHz): four SSB stations (upper and lower sideband,
// different voices and levels, one drifting slowly in frequency), an AM
// station, a steady carrier, a keyed carrier and white band noise. The
// voices are made at 8 kHz, modulated with modem.NewModulator (phasing,
// its default splitter, audio band 300–2700 Hz), mixed to their offsets and
// summed with the noise into one complex baseband capture. [NewBench]
// composes a two-tone test transmission
// directly as complex exponentials with exactly injected imperfections: an
// opposite sideband, a carrier leak, third-order intermodulation and an
// I/Q imbalance of the capturing receiver. The carrier sits 6 kHz off the
// centre so that the receiver's image of the transmission falls outside
// the measured sidebands: the opposite sideband and the receiver imbalance
// are then separately measurable. The imbalance is y = μx + νx* with
//
//	μ = (1 + g·e^{−jφ})/2,  ν = (1 − g·e^{jφ})/2,
//
// g the Q path gain over the I path and φ the Q path's departure from 90°,
// so that the image rejection is 10·log10(|μ|²/|ν|²) =
// 10·log10((1 + 2g·cosφ + g²)/(1 − 2g·cosφ + g²)).
package samples
