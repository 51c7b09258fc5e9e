// Package models holds what every analysis of a circuit shares: values
// written in engineering notation, pot tapers, the thermal voltage and the
// temperature laws of junctions, the nonlinear device models, named
// device presets, and the flat circuit the chain builder produces and the
// solvers read.
//
// # Values
//
// ParseValue reads a value for a given Quantity and returns SI units
// (temperatures in kelvin): plain numbers and exponents, the SI prefixes
// f p n µ/u m k M G ("M" mega, "m" milli), the letter-as-decimal-point
// codes of IEC 60062 (4k7, 2n2, 4R7, 100R) and the unit symbols of the
// quantity (Ω/ohm/R, F, H, V, A, °C/C/K, Hz, m). A unit of another
// quantity, a doubled prefix or trailing text is a *ValueError. FormatValue
// writes engineering notation with four significant digits.
//
// # Quantities
//
// One parser per quantity, used wherever a value enters (chain files,
// --set keys, command-line options), each checking that the value is
// finite and in its Range: ParseAmplitude (volts peak of a test sine;
// V, mV, Vp, Vpp, Vrms, dBV), ParseFrequency(ies), ParseSupply(ies),
// ParseTemperature(s) (a plain number is °C), ParseRotation (a knob, 0…1),
// ParseTolerance (0.05 or 5 %), ParseDecibels, ParsePercent, ParseSeconds,
// ParseGain(s) (hFE), ParseWhole and ParseSpan ("FROM..TO"). The supply
// rule: the chain file's supply sign is the build's polarity; a supply
// given elsewhere sets the magnitude and keeps that sign, and a written
// sign that contradicts it is a *PolarityError saying how to write it.
// Every error wraps ErrInvalid: *ValueError (does not parse), *RangeError
// (outside its range or not finite), *PolarityError, and *FieldError, by
// which libraries name the option field they refuse (never a command-line
// flag; commands map fields to their flags).
//
// # Pots
//
// A Taper maps rotation to the fraction of the track below the wiper:
// Linear, Audio (10 % at mid-rotation, the exponential (81^x − 1)/80) and
// ReverseAudio, its mirror. PotSections splits a track into its two
// resistors, neither below PotEndResistance.
//
// # Devices
//
// Devices implement Nonlinear: P ports with currents and a Jacobian,
// allocation-free, plus junction limiting for Newton's method.
//
//   - Diode: Shockley's law I = Is·(e^(V/(n·Vt)) − 1) with the emission
//     coefficient n; the series resistance is a separate resistor.
//   - BJT: the Ebers–Moll transport model as a common-emitter two-port
//     (ports (b, e) and (c, e)), NPN or PNP, with an optional
//     collector–base leakage Icbo for germanium devices that doubles every
//     LeakDoubling kelvin.
//
// Exponentials are continued linearly beyond 80·n·Vt so that intermediate
// Newton iterates stay finite, and floored to zero below −50·n·Vt.
// Limit applies the junction-limiting rule of Nagel (1975) with the
// critical voltage n·Vt·ln(n·Vt/(√2·Is)). Saturation currents scale with
// temperature by the law of Nagel (1975) and Massobrio & Antognetti; the
// thermal voltage is k·T/q with the exact SI constants. Presets are
// typical family values (from memory), not any one part number.
//
// # Circuits
//
// Circuit is plain data: named nodes (0 is ground, "gnd"), elements with
// SI values, the temperature, the input and output nodes. Devices
// instantiates its diodes and transistors at the circuit's temperature;
// Check rejects what no analysis can solve (non-positive or non-finite
// passive values, a part with both pins on one node, a node with no DC
// path to ground, a loop of ideal sources and inductors) with a
// *CircuitError naming the part or node.
//
// # References
//
//   - BIPM, The International System of Units (SI Brochure), 9th ed.,
//     2019: exact k and e (table 1), SI prefixes (table 7).
//   - IEC 60062, Marking codes for resistors and capacitors.
//   - W. Shockley, "The theory of p-n junctions in semiconductors and p-n
//     junction transistors", Bell Syst. Tech. J. 28, 1949.
//   - J. J. Ebers and J. L. Moll, "Large-signal behavior of junction
//     transistors", Proc. IRE 42(12), 1954.
//   - I. Getreu, "Modeling the Bipolar Transistor", Tektronix, 1976
//     (transport form, eqs. 2.10–2.11).
//   - L. W. Nagel, UC Berkeley memorandum ERL-M520, 1975 (junction
//     limiting, sec. 4.3; saturation-current temperature law).
//   - G. Massobrio and P. Antognetti, semiconductor device modeling,
//     McGraw-Hill, 2nd ed., 1993, eq. 1.33.
//
// # Non-goals
//
// No charge storage in the devices (junction and diffusion capacitances
// are left to explicit capacitors), no Early effect, high-injection
// roll-off, base resistance or breakdown, no self-heating, no noise. The
// presets are starting points for measured values, not datasheet models.
// Circuit does no layout, no hierarchy and no connectivity beyond Check's;
// the chains package builds it and the dsp solvers analyse it.
package models
