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
// # Stability and warnings
//
// Prepare also finds the poles of the circuit linearised at its operating
// point (mna.Poles). A pole with a positive real part is a warning on the
// prepared chain (Prepared.Warnings, StabilityWarning): a complex pair
// "self-oscillates near F Hz" (motorboating below Motorboating), a real
// pole "latches". The chain's lint warnings (chains.Findings) come
// first, so every report made from a prepared chain can carry both. The slowest
// stable pole's time constant (SlowestTimeConstant) is what a warm-up is
// sized from.
//
// The pole analysis is backed by a rendered check (Idle, and IdleWarning
// for a report): from the operating point the circuit takes a kick (a
// 1 mV, 1 ms raised-cosine pulse at the source), then silence; after a
// wait of 15 slowest time constants (or 20 e-folds of the fastest-growing
// pole; 0.5–8 s) a window is analysed: the node's RMS about its mean, the
// shift of its mean from the operating point, and the frequency of its
// rising crossings. At or above IdleFloor (100 µV) the node oscillates or
// has latched. The pole gives the frequency an oscillation starts at (the
// render's early growth follows it to 1e-5); the render gives the one it
// settles at once the stages limit, which can differ by a factor of two.
// IdleWarning renders only for an unstable circuit, watching the output
// and, when that stays quiet, the node the growing mode moves most
// (mna.Mode).
//
// # The oversampling factor of a render
//
// The analyses run at DefaultOversample (4×) unless told otherwise. A
// render with no factor given chooses one for the chain and rate
// (ChooseOversample): the lowest factor whose bilinear frequency warping
// keeps the small-signal response within WarpTolerance (0.1 dB of its
// peak) up to 20 kHz, and, for a circuit with devices, at which four probe
// tones near 1.3 kHz at AliasProbeLevel (0.3 of full scale) keep their
// aliases AliasTarget (50 dB) under the harmonics. A chain whose
// small-signal gain at idle is under WarpMinGain (a rectifier whose
// devices rest) gives the warping nothing to measure; its search starts
// at DefaultOversample. AliasTone and AliasRatio measure the aliasing of
// any test sine.
//
// # One channel on several cores
//
// StreamWith cuts a long mono stream into segments (PlanSegments) rendered
// at once, each but the first by a channel fresh at the operating point
// started a warm-up before its start: WarmupMargin (4) times the samples
// after which the slowest mode of the circuit linearised at its operating
// point has decayed to WarmupRatio (1e-7; wdf.Solver.WarmupSamples), plus
// the filters' delay twice over, whose output is dropped. Beyond MaxWarmup
// (60 s), for a mode the input reaches that does not decay, or for a stream under
// MinSegmentWarmups warm-ups a segment, the render is serial. Where two
// segments meet, the later one's warm-up and the earlier one's output are
// compared (StreamInfo.JoinError): how far the later one was from the
// serial render when its output began.
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
//   - G. H. Golub, C. F. Van Loan, Matrix Computations, 4th ed., 2013,
//     sec. 7.6.1 (inverse iteration, for a pole's mode) and 7.7 (the
//     generalised eigenproblem of the poles, package dsp/mna).
//
// # Non-goals
//
// Analysis of what comes out (packages measure, bias, parts, analyze do
// that), real-time playback, knobs that move during a run.
package engine
