// Package engine is the one path every signal takes through a chain's
// circuit: a prepared chain (flattened by chains.Chain.Build, its DC
// operating point solved by dsp/mna, the oversampling factor resolved and
// range-checked here and nowhere else) and channels compiled from it at a
// base rate (polyphase upsampling, the wave digital solver at the internal
// rate, downsampling, with the filters' delay removed so output sample n
// lines up with input sample n). Files (Stream), test sines (Sine),
// finite signals such as sweeps (Render), Monte Carlo trials and the
// symmetric-clip search all run through it.
//
// # Levels
//
// A channel's input sample of 1.0 is Chain.InputPeak volts at the chain's
// source; a channel watching the output writes the output voltage over
// Chain.FullScale (digital full scale), one watching another node writes
// that node's voltage in volts. VoltsPerUnit converts either to volts.
//
// # The test sine and the settle rule
//
// There is one test sine (Sine): A·sin(2π·f·n/fs) in source volts,
// starting with a raised-cosine fade-in over max(4 cycles, 10 ms), at most
// a quarter of the settle limit, which keeps the linear part of the
// start-up transient small. When the record is coherent the sine is
// generated exactly periodic over the coherent unit (unitM cycles in unitN
// samples), so every harmonic falls on a DFT bin.
//
// Record: the shortest whole number of cycles that spans a whole number
// of samples to within 1e-7 cycle (searched up to one second's worth per
// unit) and at least the minimum record length; failing that, the nearest
// whole number of cycles (RecordGeometry).
//
// There is one settle rule: the output is cut into consecutive windows of
// the record length, and each window's DC and its RMS about the DC are
// compared with the previous window's. The output counts as settled once
// two consecutive comparisons both change by less than the tolerance
// relative to the RMS (below 1 pV of RMS a node counts as silent); the
// last window is then the record. The wait is bounded: past MaxSettle the
// last window is the record anyway and Settled is false.
//
// # Cancellation
//
// Every loop checks its context between blocks of MaxBlock samples.
//
// # References
//
//   - A. V. Oppenheim, R. W. Schafer, Discrete-Time Signal Processing, 3rd
//     ed., 2010, sec. 4.6–4.7 (rate change by integer factors; the
//     oversampler is package dsp/resample) and sec. 8.6 (a coherent record
//     puts each harmonic on a DFT bin; sections from memory).
//   - K. Werner, V. Nangia, J. O. Smith III, J. S. Abel, "Resolving wave
//     digital filters with multiple/multiport nonlinearities", DAFx-15,
//     2015 (the solver, package dsp/wdf).
//
// # Non-goals
//
// Analysis of what comes out (packages measure, bias, parts, analyze do
// that), real-time playback, knobs that move during a run.
package engine
