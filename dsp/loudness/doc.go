// Package loudness measures programme loudness and peak levels of sampled
// audio as specified by ITU-R BS.1770-4, with the loudness range of EBU Tech
// 3342. It is used to loudness-match clips before comparing them and to
// report levels.
//
// A Meter takes an interleaved stream of float64 samples (full scale ±1) in
// any number of Write calls and reports, for everything written so far:
//
//   - Integrated: gated loudness in LUFS (400 ms blocks, 75 % overlap,
//     absolute gate −70 LUFS, relative gate −10 LU);
//   - MomentaryMax and ShortTermMax: the largest 400 ms and 3 s loudness,
//     evaluated every 100 ms;
//   - LoudnessRange: EBU Tech 3342 loudness range in LU;
//   - TruePeak (dBTP) and SamplePeak (dBFS).
//
// # K-weighting
//
// The K-weighting is the cascade of the two biquads of BS.1770-4 Annex 1: a
// high-frequency shelf (the "pre-filter", Table 1) and the RLB high-pass
// (Table 2). At 48 kHz the tabulated coefficients are used verbatim. At any
// other rate fs each stage is re-derived from its analog prototype
//
//	H(u) = (n2·u² + n1·u + n0) / (u² + u/Q + 1),  u = s/(2π·f0),
//
// discretised by the bilinear transform prewarped at f0, that is
// u = (1/K)(1 − z⁻¹)/(1 + z⁻¹) with K = tan(π·f0/fs). The prototypes are not
// typed in: they are recovered exactly from the 48 kHz table by inverting
// the same transform (K² = (1+a1+a2)/(1−a1+a2), K/Q = 2(1−a2)/(1−a1+a2),
// and n0, n1, n2 from the sums and differences of the unnormalised
// numerator). The recovered values are
//
//	pre-filter: f0 = 1681.97445 Hz, Q = 0.70717524, n0 = 1,
//	            n2 = 10^(3.99984385/20) (the +4 dB shelf), n1 = n2^0.49966677/Q
//	RLB:        f0 = 38.1354709 Hz, Q = 0.50032704, n0 = n1 = 0,
//	            n2 = 1.0049949 (the +0.043 dB high-frequency gain of Table 2)
//
// and agree with the values published with the commonly used re-derivation
// (quoted from memory in the tests) to 1e-11 or better. Keeping the RLB's
// +0.043 dB keeps the −0.691 dB calibration constant valid at every rate.
// Against the 48 kHz response the derived filters differ at 1 kHz by
// −0.001 dB at 44.1 kHz and +0.004 dB at 96 kHz; frequency warping of the
// 1.68 kHz shelf grows at low rates: −0.007 dB at 32 kHz, −0.022 dB at
// 22.05 kHz, −0.046 dB at 16 kHz, −0.10 dB at 11.025 kHz and −0.20 dB at
// 8 kHz, the lowest rate accepted.
//
// Channel weights follow BS.1770-4 Table 3: NewMeter weights its 1 to 3
// channels (left, right, centre) by 1.0; NewMeterWeights takes any weights,
// e.g. 1.41 for surround channels and 0 to exclude a low-frequency-effects
// channel.
//
// # True peak
//
// True peak follows BS.1770-4 Annex 2: the input (not K-weighted) is
// oversampled four times and the largest absolute value is kept. The
// factor is 4 at every rate, including 176.4 kHz and above where the
// Recommendation would accept less. The interpolator is this package's own
// Kaiser-windowed sinc (24 input samples per phase, β = 6, cut-off at the
// input Nyquist frequency), not the example filter of Annex 2; its error
// is at most 1.8e-3 of the amplitude (0.016 dB) for frequencies up to
// 0.4167·fs. A 4x grid can still miss a crest by up to
// 20·log10(cos(π·f/(4·fs))) dB, −0.47 dB for 20 kHz at 48 kHz. The
// 12.04 dB attenuation that Annex 2 suggests for integer arithmetic is not
// needed in float64 and is not applied.
//
// # Memory and cost
//
// Integrated loudness and loudness range need the whole history, so a
// Meter keeps the weighted sum of squares of every 100 ms sub-block: 8 bytes
// per 100 ms, 288 KB per hour. The constructors reserve ten minutes;
// beyond that append grows the list, so Write allocates about log2(T/10 min)
// times over a stream of duration T and never otherwise. LoudnessRange
// needs 8 bytes per 100 ms of scratch, kept between calls. Write costs two
// biquads and three 24-tap dot products per sample; see BenchmarkWrite.
//
// Non-finite input samples are measured as 0; Err reports the first one as
// a *SampleError. Constructors report bad arguments as *ParamError.
//
// # References
//
//   - ITU-R Recommendation BS.1770-4 (10/2015), Algorithms to measure audio
//     programme loudness and true-peak audio level.
//   - EBU Tech 3341 (2016), Loudness metering: "EBU Mode" metering to
//     supplement EBU R 128 loudness normalization.
//   - EBU Tech 3342 (2016), Loudness range: a measure to supplement
//     EBU R 128 loudness normalization.
//   - A. V. Oppenheim, R. W. Schafer, Discrete-Time Signal Processing, 3rd
//     ed., Pearson, 2010, ch. 7 (bilinear transformation, Kaiser window).
//   - J. F. Kaiser, "Nonrecursive digital filter design using the I0-sinh
//     window function," Proc. IEEE ISCAS, 1974.
//
// # Non-goals
//
// No live meter display or readings of the current (rather than maximum)
// momentary and short-term loudness; no constant-memory (histogram)
// integration; no channel-layout detection (weights are the caller's);
// no sample-rate conversion; no rates outside 8 kHz to 768 kHz; no
// oversampling factor other than 4; no per-channel peak reports.
package loudness
