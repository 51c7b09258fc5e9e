// Package render renders WAV files through a chain: it streams a dry file
// through a prepared chain (package engine: one circuit per audio channel,
// oversampled, delay-compensated), writes the wet file in blocks, and
// reports levels, clipping, solver statistics, realtime factor and a
// third-octave comparison of dry and wet; and it makes the demo set.
// Outputs are files of an outputs.Set (Render writes into one the caller
// declared with its other outputs; RenderFile and Demo make their own):
// checked before any work, written beside the target and put in place on
// success; on any error or cancellation nothing is left under the output
// name and the input is never written over. A character device or FIFO
// target is written in place as a WAV stream.
//
// Unless the caller or the chain names a factor, a render oversamples by
// the lowest factor that keeps the chain's aliases 50 dB down at the
// file's rate (engine.ChooseOversample), and the report says which factor
// and why. A mono file long enough is cut into segments rendered on
// several cores (engine.StreamWith); the report gives the segments, their
// warm-up and how well they joined. A serial render's memory is constant,
// a segmented one's bounded.
//
// Levels: a dry sample of 1.0 (digital full scale) is Chain.InputPeak volts
// at the chain's source; an output of Chain.FullScale volts is written as
// 1.0. Output beyond full scale is clamped by the PCM writer, counted and
// warned about, never wrapped. Levels that do not exist (silence) are null
// in the report (package report).
//
// References: IEC 61260-1:2014 (one-third-octave bands of the report's
// spectrum, via package dsp/spectrum).
//
// Non-goals: real-time playback, plug-in hosting, resampling between
// different input and output rates.
package render
