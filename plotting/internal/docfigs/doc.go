// Package docfigs makes the example figures of the documentation from
// real renders of the project's demo chain: its test, run with
// -out DIR, writes them as PNG files (see the test's comment). It has no
// other code and no exported names.
//
// # Scope
//
// Small-signal response of the tone knob, a scope view of the fuzz's
// second collector, the harmonics and third-octave spectra of three
// variants, and a spectrogram of the dry demo phrase against the wet one.
//
// # References
//
// None beyond those of the packages it calls (measure, render, spectrum,
// synth, plotting).
//
// # Non-goals
//
// It checks nothing about the circuit; the figures' own tests live with
// package plotting. It is not part of the command-line tool.
package docfigs
