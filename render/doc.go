// Package render runs a chain over audio: it prepares a chain (flattens it
// to one circuit and solves its DC operating point), builds one channel per
// audio channel (polyphase upsampling, the wave digital solver at the
// internal rate, downsampling, with the filters' delay removed so output
// sample n lines up with input sample n), streams a WAV file through it in
// blocks with constant memory, and reports levels, clipping, solver
// statistics, realtime factor and a third-octave comparison of dry and wet.
// Output is written to a temporary file and renamed on success; on any
// error or cancellation nothing is left under the output name and the input
// is never written over.
//
// Levels: a dry sample of 1.0 (digital full scale) is Chain.InputPeak volts
// at the chain's source; an output of Chain.FullScale volts is written as
// 1.0. Output beyond full scale is clamped by the PCM writer, counted and
// warned about, never wrapped.
//
// Non-goals: real-time playback, plug-in hosting, resampling between
// different input and output rates.
package render
