// Package resample oversamples a signal by an integer factor around a
// processor that must run faster than the base rate, such as a nonlinear
// circuit solver whose harmonics would otherwise fold back into the audio
// band.
//
// The chain is Up (factor N, polyphase FIR interpolator), the caller's
// Inner processor at N·fs, and Down (the same FIR, evaluated only at the
// kept outputs). Oversampler bundles the three; Aligner strips the known
// delay and flushes the tail so that output sample n lines up with input
// sample n and the output is exactly as long as the input.
//
// # Filter
//
// Design returns one linear-phase lowpass prototype per (factor, base
// rate), a Kaiser-windowed ideal lowpass:
//
//   - passband 0 to 20 kHz (scaled as fs·20000/44100 below 44.1 kHz),
//     ripple at most 0.01 dB;
//   - stopband from the base-rate Nyquist fs/2 to N·fs/2, attenuation at
//     least 100 dB.
//
// The stopband starts at fs/2, not at fs−20 kHz: on the way down nothing
// above fs/2 is let through to fold back anywhere in the base band, and on
// the way up every spectral image of the base band, which begins at fs/2
// for full-band input, is 100 dB down before it reaches the nonlinear
// stage, where intermodulation would otherwise move image energy into the
// audio band. The price is a narrow transition band at 44.1 kHz
// (20 → 22.05 kHz), hence about 144·N taps there; from 88.2 kHz up the
// filters are short.
//
// The window parameter β and the length come from Kaiser's empirical
// formulas, with A a few dB above the 100 dB target to cover the error of
// those fits; the length is then rounded up to 2·K·N+1 taps, so each
// filter delays by exactly K base-rate samples and Up followed by Down by
// exactly 2K. Factor 1 is a pass-through with zero delay.
//
// # Cost
//
// Up computes N outputs per input sample, each from one polyphase branch
// of about 2K taps (len(Taps)/N multiply-adds per output sample). Down
// computes only the kept outputs, one per N inputs, with len(Taps)
// multiply-adds each. At factor 4 and 48 kHz (321 taps) that is about 640
// multiply-adds per base-rate sample for the pair. Process methods do
// not allocate; all buffers are sized by the constructors, and memory does
// not grow with the length of the stream.
//
// # References
//
//   - J. F. Kaiser, "Nonrecursive digital filter design using the I0-sinh
//     window function," Proc. IEEE Int. Symp. Circuits and Systems, 1974,
//     pp. 20–23.
//   - J. F. Kaiser and R. W. Schafer, "On the use of the I0-sinh window for
//     spectrum analysis," IEEE Trans. Acoustics, Speech, and Signal
//     Processing, vol. 28, no. 1, pp. 105–107, 1980.
//   - A. V. Oppenheim and R. W. Schafer, Discrete-Time Signal Processing,
//     3rd ed., Pearson, 2010: Sec. 7.5.3 (Kaiser window design formulas),
//     Sec. 7.6 (worked Kaiser designs used by the tests), Sec. 4.6
//     (sampling-rate change by integer factors) and Sec. 4.7 (polyphase
//     implementation); section numbers from memory.
//   - M. Abramowitz and I. A. Stegun, Handbook of Mathematical Functions,
//     1964, 9.6.10 (power series of I0).
//
// # Non-goals
//
// Rational or arbitrary-ratio conversion between base rates, minimum-phase
// or low-latency filters, multichannel interleaving (run one instance per
// channel) and concurrent use of one instance.
package resample
