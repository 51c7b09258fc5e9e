// Package measure is the measurement bench of renderchain: it answers "how
// much second harmonic at this setting", "how does THD grow with picking
// strength" and "where is the tone control's scoop" from the simulated
// circuit itself, the way a builder would with a signal generator, a
// distortion analyser and a scope.
//
// # Sine measurements
//
// Sine renders a sine of known frequency and amplitude (volts peak at the
// chain's source EMF, before any source impedance) through the chain's
// circuit on exactly the path a render takes (package engine: the chain is
// prepared once, the signal runs through the oversampler, the wave digital
// solver at the internal rate and the downsampler, with their delay
// removed), for the output or any node a user can name (chains.Wiring).
// The test sine, its fade-in, the coherent record and the settle rule are
// the engine's (engine.Prepared.Sine): the output counts as settled once
// two consecutive record-length windows change by less than
// Options.SettleTolerance (default 1e-5) relative to their RMS, bounded by
// Options.MaxSettle (default 3 s); past it the last window is analysed
// anyway, Settle.Settled is false and the result carries a warning. A
// frequency with no coherent record (1000.3 Hz at 48 kHz, say) is analysed
// over the nearest whole number of cycles by the least-squares harmonic fit
// of dsp/spectrum, whose THD+N residual is Blackman–Harris weighted.
//
// Figures (dsp/spectrum.Analyze): the fundamental (V peak, V RMS, dBV,
// phase against the source), harmonics 2…MaxOrder below Nyquist (dBV, dBc,
// %), THD_F = √(ΣA_h²)/A_1 (IEC 61000-2-2, IEC 60050-551), THD_R =
// √(ΣA_h²)/√(A_1²+ΣA_h²), THD+N = RMS of everything but DC and the
// fundamental within 20 Hz–20 kHz over the fundamental's RMS (AES17 style;
// the notch is ideal: the fitted fundamental is removed exactly, then the
// residual is band-limited by whole DFT bins), the even/odd harmonic
// energy ratio, DC, peaks and their asymmetry, and clipping. Clipping is
// judged on one cycle rebuilt from the measured lines with Lanczos' sigma
// factors (so that the rate converter's band limit does not hide a flat
// top): the time spent within 5 % of the swing of each peak, over a sine's
// (ratio 1), flags a flat top from ClipDwellRatio on; a sample beyond the
// chain's full scale is reported separately.
//
// Harmonics above the rate converter's passband (20 kHz from 44.1 kHz up)
// are attenuated by its filter and marked; orders at or above Nyquist are
// not counted. Both are warned about; a higher Options.SampleRate counts
// them.
//
// # Sweeps and conditions
//
// A Plan runs many measurements: variants of the chain (Expand turns
// override families such as "tone.tone=a,b,c", and SupplyFamily and
// TemperatureFamily write supply and temperature lists as such families,
// into every combination) times the steps of a Sweep (source level in
// logarithmic steps, or a knob in linear steps). Supplies keep the chain
// file's polarity (models.ParseSupply). Run executes them on the bounded
// pool of package parallel, one goroutine per core by default; every
// measurement builds its own circuit and solver, so the results are the
// same whatever the scheduling, and come back in plan order.
//
// Options that are out of range are *models.FieldError naming the option's
// field ("amplitude", "harmonics", "sweep_level", "probe", …), never a
// command-line flag.
//
// # Frequency response
//
// SmallSignal linearises the circuit at its DC operating point (dsp/mna.AC:
// complex modified nodal analysis with each device replaced by its
// small-signal conductance matrix) and returns the transfer from the source
// EMF, or from a reference node, to the probed node.
//
// Swept measures the large-signal response through the nonlinear circuit
// (engine.Prepared.Render)
// with an exponential sine sweep x(t) = A·sin(2π·f1·L·e^(t/L)), from f1 =
// half the lowest frequency asked to f2 = 2·orders times the highest (at
// most 98 % of Nyquist, so that the highest harmonic asked for stays in
// band), in its synchronized form: f1·L is a whole number, so that the
// h-th harmonic of the sweep is the sweep itself advanced by L·ln(h),
// phase included. Raised-cosine fades cover the lower three quarters of
// the bottom margin and the top half octave; harmonic points whose h·f
// falls in the top fade or above the rate converter's passband are left
// out. The output is deconvolved by linear convolution (one FFT) with
// the inverse filter, the time-reversed sweep weighted by e^(−t/L)
// (6 dB per octave). The linear impulse response then sits at lag 0 and
// harmonic h's at −L·ln(h). Windows: each gap between neighbouring orders
// is split evenly, the later order's half being its window's lead-in and
// the earlier order's half its decay; the linear response's window decays
// over the whole tail after the sweep (default 0.5 s). Windows rise over the
// first half of their lead-in and fall over the last quarter of their decay
// (raised cosines). Each windowed response is transformed at the asked
// frequencies and divided by the same window cut from the deconvolved sweep
// itself, so the sweep's band edges and the inverse filter's scale cancel.
// Frequency resolution is the reciprocal of the window length, reported
// per curve (about 2 Hz for the linear response and 5–10 Hz for H2 and H3
// with a 2 s sweep over 10 Hz–20 kHz); time resolution of the harmonic
// separation is L·ln((h+1)/h). The h-th harmonic curve is reported against
// the excitation frequency f: |H_h(h·f)| is the h-th harmonic's output
// amplitude over the input amplitude, and its dBc the same over the linear
// response at f.
//
// The wave digital solver discretises reactances with the bilinear rule,
// so its response at f equals the continuous circuit's at the warped
// frequency (fs/π)·tan(π·f/fs), fs the internal rate: a swept response
// differs from SmallSignal by that warp (0.08 dB at 10 kHz for a first-
// order low-pass at 1.6 kHz with 192 kHz inside).
//
// # Aliasing
//
// Options.Alias (command: measure --alias, --alias-factors) adds the
// signal-to-alias ratio of the test sine (Result.Alias): the sine is
// rendered again at each factor asked, as its own job on the plan's pool,
// and the settled coherent record's power on the harmonic lines is set
// against the power in every other bin but DC (spectrum.SignalToAlias).
// A nonlinear circuit driven by a sine makes only harmonics; those above
// the internal Nyquist frequency fold back, between the harmonics, where
// the ratio counts them. A linear circuit has no alias: its ratio stays
// above the analysis floor. A tone whose folded lines would land on its
// own harmonics (a simple fraction of the rate, such as 1 kHz at 48 kHz)
// is moved to a neighbour that shows them (engine.AliasTone), and the
// result says so. The ratio counts anything off the lines, so an unsettled
// record or a circuit that oscillates reads low.
//
// # Plots
//
// Report.Figure, Report.ScopeFigures and ResponseReport.Figure build
// renderchain/plotting figures whose titles carry the chain's name, the
// test signal and the knob positions (Knobs) that no condition changes:
//
//   - a sine test: the spectrum at the probe, its harmonics marked, over
//     a bar chart of the harmonics in dBc, the conditions side by side,
//     one key naming each with its THD_F;
//   - a sweep: output level, and THD_F, H2 and H3 against the swept
//     level or knob;
//   - the scope view of each measurement kept with Options.Scope: the
//     first ScopeCycles settled cycles of the analysed record at the
//     source (the generated sine) and at the probed node, sample for
//     sample, with the supply rail and ground, and the transfer curve
//     over the last cycle;
//   - a response: gain over unwrapped phase (and the group delay when
//     asked), one style per variant, a swept measurement's harmonic
//     responses dashed in their variant's colour. DefaultGrid, 48
//     points a decade, keeps the curves smooth and the phase unwrappable.
//
// Levels relative to the fundamental under the analysis floor
// (FigureFloorDB: −100 dB by default, where the tables print "< floor")
// are drawn on that floor (sweep curves) or left out (bars), and the
// panel says so: a simulation in double precision puts the harmonics a
// circuit does not make near −300 dBc.
//
// # References
//
//   - IEC 61000-2-2 and IEC 60050-551 (THD relative to the fundamental);
//     AES17 (THD+N with a notch and a 20 Hz–20 kHz band), as implemented in
//     renderchain/dsp/spectrum.
//   - A. Farina, "Simultaneous measurement of impulse response and
//     distortion with a swept-sine technique", AES 108th Convention, Paris,
//     2000, preprint 5093.
//   - A. Novák, L. Simon, F. Kadlec, P. Lotton, "Nonlinear system
//     identification using exponential swept-sine signal", IEEE Trans.
//     Instrum. Meas. 59(8), 2010; A. Novák, P. Lotton, L. Simon,
//     "Synchronized swept-sine: theory, application, and implementation",
//     J. Audio Eng. Soc. 63(10), 2015.
//   - C. Lanczos, Applied Analysis, Prentice Hall, 1956, ch. IV (sigma
//     factors; chapter from memory).
//   - A. V. Oppenheim, R. W. Schafer, Discrete-Time Signal Processing, 3rd
//     ed., 2010, sec. 7.2 (bilinear transformation and its frequency warp;
//     section from memory).
//   - C.-W. Ho, A. E. Ruehli, P. A. Brennan, "The modified nodal approach to
//     network analysis", IEEE Trans. Circuits Syst. 22(6), 1975.
//
// # Non-goals
//
// Noise-floor simulation (the circuit has no noise sources), intermodulation
// tests with two tones, weighting filters, and estimating an unknown
// frequency: the bench always knows what it generated.
package measure
