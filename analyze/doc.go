// Package analyze measures a WAV file the way a mastering meter would:
// peak and RMS level (dBFS), crest factor, DC offset, samples at full
// scale, integrated loudness (ITU-R BS.1770-4), true peak, loudness range
// (EBU Tech 3342), the largest momentary (400 ms) and short-term (3 s)
// loudness, the spectral centroid and the one-third-octave long-term
// spectrum (IEC 61260-1 bands). It reads the file once, in constant
// memory. It also gives the loudness meter and the loudness figures the
// A/B sets match with (Meter, Levels, Loudness).
//
// Spectrogram reads a file's channel mean into a short-time spectrum
// (85 ms Hann frames, a quarter-frame hop, at most MaxSpectrogramFrames
// frames whatever the file's length); SpectrogramFigure draws it, or a
// dry take above its wet render on one colour scale, so a builder sees
// where a circuit's fizz sits.
//
// Levels are relative to digital full scale (±1): a full-scale sine has
// peak 0 dBFS and RMS −3.01 dBFS. A level that does not exist (silence, or
// a file shorter than a window) is −∞ or NaN inside and null in JSON
// (package report); Notes says why. Loudness weights every channel 1.0
// (BS.1770-4's weight for mono and stereo); surround layouts are not
// recognised.
//
// # References
//
//   - ITU-R Recommendation BS.1770-4 (10/2015), Algorithms to measure audio
//     programme loudness and true-peak audio level.
//   - EBU Tech 3341 (2016), Loudness metering (test cases used in tests);
//     EBU Tech 3342 (2016), Loudness range.
//   - IEC 61260-1:2014, one-third-octave bands.
//   - F. J. Harris, "On the use of windows for harmonic analysis with the
//     discrete Fourier transform", Proc. IEEE 66(1), 1978 (the Hann
//     window of the spectrogram, as in package spectrum).
//
// # Non-goals
//
// No editing of the file, no weighting curves but K-weighting, no
// surround channel weights, no perceptual models beyond loudness.
package analyze
