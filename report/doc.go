// Package report is the vocabulary every report of renderchain is written
// in: a level in decibels and a plain number that both marshal what does
// not exist (silence's −∞ dB, an undefined ratio's NaN) as JSON null, the
// decibel conversions, the solver statistics of a run, the description of
// a WAV file, one peak/RMS accumulator, a list of warnings, the pole
// analysis as reports write it, and the display floors of tables.
//
// # Rules
//
// A Level is a ratio in decibels (dBFS, dBV, dBc, dB gain, LUFS, LU,
// dBTP), a Number a plain value (volts, amperes, ratios, seconds). The one
// rounding rule of both: none. Each is written in the shortest decimal
// that reads back to the same float64, so a report read by another
// program gives exactly the figures this one computed; NaN and ±∞ are
// written as null, since JSON has neither (RFC 8259, section 6), and null
// reads back as NaN. Tables for people round; reports do not.
//
// DB(r) = 20·log10(r) for an amplitude ratio and PowerDB(r) = 10·log10(r)
// for a power ratio (IEC 60027-3 level definitions); a ratio of 0 is −∞
// dB, a negative or NaN ratio is NaN.
//
// PeakRMS keeps the largest magnitude, the mean and the mean square of a
// stream in constant memory; its crest factor 20·log10(peak/RMS) is 3.01
// dB for a sine (√2) and 0 dB for a square wave, and NaN for silence.
//
// # Display rules
//
// Tables for people round, and some figures mean nothing below a floor.
// Quantity prints a current under CurrentFloor (1 nA), a power under
// PowerFloor (1 µW) or a voltage under VoltageFloor (1 µV) as 0, with the
// reasons at each constant; AtLeast prints a figure under its analysis
// floor as "< floor" (THD under the measurement's floor, package measure);
// Fixed never prints a negative zero; all three print "—" for a figure
// that does not exist. Reports (JSON, CSV) keep every figure exactly.
//
// Warnings are one line each, said once (Warnings.Add); Combine joins the
// lists of several results, naming the result a warning belongs to when
// not all of them have it.
//
// # References
//
//   - IETF RFC 8259, The JavaScript Object Notation (JSON) Data
//     Interchange Format, 2017, section 6 (no infinities or NaN).
//   - IEC 60027-3:2002, letter symbols: logarithmic quantities (the
//     decibel of an amplitude and of a power ratio).
//
// # Non-goals
//
// Tables themselves (they live with the commands and benches) and any
// measurement: this package only holds and writes what others measured.
package report
