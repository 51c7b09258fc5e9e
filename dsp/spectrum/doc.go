// Package spectrum measures what a circuit did to a test signal: the
// harmonic analysis of a settled sine response (THD in its IEC forms,
// THD+N, harmonic lines, DC, peaks and their asymmetry), one-third-octave
// band levels of a long-term-average spectrum, the spectral centroid, the
// crest factor, and the signal-to-alias ratio of a sine's response; and
// what a figure of it needs: a short-time spectrum (spectrogram), a dense
// logarithmic frequency grid, phase unwrapping and group delay.
//
// # Harmonic analysis
//
// Analyze takes a record, its sample rate and the known fundamental
// frequency. The preferred record is coherent: it holds a whole number
// of cycles, so every harmonic falls exactly on a DFT bin and the bins
// are the exact least-squares amplitudes (MethodBins). A record that is
// not coherent is handled by a joint linear least-squares fit of DC, the
// fundamental and each counted harmonic at their known frequencies
// (MethodFit, the known-frequency sine fit of IEEE Std 1057 extended to
// harmonics); its THD+N residual is weighted by a periodic 4-term
// Blackman–Harris window before band-limiting. MethodAuto picks between
// them.
//
// Definitions used (A_1 the fundamental's peak amplitude, A_h the h-th
// harmonic's, h = 2..MaxOrder below Nyquist):
//
//	THD_F = √(Σ A_h²) / A_1                  IEC 60050-551-20-13, IEC 61000-2-2
//	THD_R = √(Σ A_h²) / √(A_1² + Σ A_h²)     = THD_F / √(1 + THD_F²)
//	THD+N = RMS(x − DC − fundamental, band-limited) / (A_1/√2)
//
// THD+N removes the fitted fundamental exactly (an ideal form of the
// AES17 notch), then keeps the residual's DFT bins inside the band
// (default 20 Hz – 20 kHz), so it counts harmonics, noise and anything
// else in the band.
//
// # Aliasing
//
// SignalToAlias takes the coherent record of a sine's response and
// returns the power in the harmonic bins (every order below Nyquist, the
// fundamental included) over the power in all other bins except DC: the
// signal-to-alias ratio of a system that makes harmonics at a finite
// internal rate, whose folded lines fall between the harmonic bins.
//
// # Band analysis
//
// LTAS accumulates a Welch average (Hann window, 50 % overlap) of a
// stream with zero allocations per Write, and integrates it into the
// one-third-octave bands of IEC 61260-1: exact base-10 midband
// frequencies 1000·10^(x/10) Hz with edges at 10^(±1/20) of them, bins
// shared fractionally between bands. Levels are in dB relative to the
// mean square of a full-scale sine (FullScaleMeanSquare, 1.0 peak), so a
// full-scale sine reads 0 dB in its band. CrestMeter (also inside LTAS)
// streams peak/RMS.
//
// # Short-time spectrum
//
// STFT (and NewSpectrogram for a whole signal) cuts a stream into frames
// of a power-of-two length weighted by a periodic Hann window, one every
// hop samples, and keeps each frame's one-sided bin levels in dB re a
// full-scale sine, with the window's coherent gain divided out so an
// on-bin sine reads its peak amplitude (a sine between bins reads up to
// the Hann window's 1.42 dB scalloping loss low, Harris 1978). Frame f is
// centred at (f·hop + N/2)/fs seconds. Memory grows with the frame count;
// HopFor picks a hop that bounds it for a long file.
//
// # Frequency grids, phase and group delay
//
// DecadeGrid spaces frequencies evenly in log frequency on the exact
// points 10^(k/n); PointsPerDecade (48) is the density response figures
// use, chosen so that straight segments between points stay within
// 0.0013 dB of any first-order section and 0.010·Q² dB of a second-order
// one, wherever its corner lies (the reasoning is at the constant).
// UnwrapDegrees removes ±360° jumps from a sampled phase; GroupDelay
// differentiates an unwrapped phase against ln f with second-order
// three-point formulas for uneven spacing.
//
// # References
//
//   - IEC 60050-551, International Electrotechnical Vocabulary — Power
//     electronics, entry 551-20-13 "total harmonic distortion" (entry
//     number cited from memory); IEC 61000-2-2 (THD relative to the
//     fundamental).
//   - IEC 61260-1:2014, Electroacoustics — Octave-band and
//     fractional-octave-band filters — Part 1: Specifications.
//   - AES17 (2015 and later editions), AES standard method for digital
//     audio engineering — Measurement of digital audio equipment (THD+N,
//     full-scale sine).
//   - IEEE Std 1057-2017, Standard for Digitizing Waveform Recorders
//     (sine-wave fitting at known frequency).
//   - F. J. Harris, "On the use of windows for harmonic analysis with the
//     discrete Fourier transform", Proc. IEEE 66(1), 1978, pp. 51–83.
//   - P. D. Welch, "The use of fast Fourier transform for the estimation
//     of power spectra", IEEE Trans. Audio Electroacoust. 15(2), 1967.
//   - L. I. Bluestein, "A linear filtering approach to the computation of
//     discrete Fourier transform", IEEE Trans. Audio Electroacoust.
//     18(4), 1970 (used for record lengths with a large prime factor).
//
// FFTs come from gonum.org/v1/gonum/dsp/fourier and window shapes from
// gonum.org/v1/gonum/dsp/window.
//
// # Non-goals
//
// The package does not estimate the fundamental's frequency (the caller
// knows what it generated), does not apply frequency weightings, and its
// FFT-integrated bands are not a filter bank meeting the IEC 61260-1
// class 1 or 2 attenuation masks: they are ideal rectangular bands, exact
// to the resolution of the frame. Units are those of the input (volts
// for Analyze, full-scale units for LTAS); frequencies are in hertz.
package spectrum
