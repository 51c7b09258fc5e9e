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
// allocation-free, plus junction limiting for Newton's method. Devices
// that store charge also implement Charged: port charges and the
// capacitance matrix, as pure functions of the port voltages (the solvers
// own the time discretisation and its state). Diodes and transistors also
// give both in one call (Diode.EvalCharge, BJT.EvalCharges: the same
// numbers, the junction exponential computed once), for the solvers' hot
// loops. The exponentials are a table-driven exp with a derived error
// bound of 3.4 ulps, and the depletion law's power x^(−m) a table-driven
// log into it, within 13 ulps where |m·ln x| ≤ 3 (Tang's argument
// reductions; both checked against 250-bit references and the math
// package).
//
//   - Diode: Shockley's law I = Is·(e^(V/(n·Vt)) − 1) with the emission
//     coefficient n; optional reverse breakdown (an exponential anchored at
//     the knee current Ibv at −BV), depletion capacitance and transit time.
//     The series resistance is a separate resistor.
//   - BJT: the Ebers–Moll transport model as a common-emitter two-port
//     (ports (b, e) and (c, e)), NPN or PNP, with an optional
//     collector–base leakage Icbo for germanium devices that doubles every
//     LeakDoubling kelvin; optional Early voltage (the Gummel–Poon base
//     charge factor 1 − Vbc/VA), base resistance (an internal node, by
//     AddPart), base–emitter and base–collector depletion capacitances and
//     forward transit time.
//   - JFET: the square-law (Shichman–Hodges) channel with β = Idss/Vp²,
//     channel-length modulation, two gate junctions and their depletion
//     capacitances; n or p channel; ports (g, s) and (d, s).
//   - MOSFET: the square-law enhancement channel, Id = (k/2)·(Vgs − Vth)²
//     in saturation, channel-length modulation, a body diode, constant gate
//     capacitances; n or p channel; ports (g, s) and (d, s).
//   - Limiter: a soft one-port stop (softplus), the output swing of the
//     op-amp macromodel.
//
// Depletion charges follow the depletion-approximation law
// C = C0·(1 − V/Vj)^−m, continued by its tangent past FC·Vj so the charge
// stays finite in forward bias. Exponentials are continued linearly beyond
// 80·n·Vt so that intermediate Newton iterates stay finite, and floored to
// zero below −50·n·Vt. Limit applies the junction-limiting rule of Nagel
// (1975) with the critical voltage n·Vt·ln(n·Vt/(√2·Is)), also to a
// breakdown junction's reflected voltage; the MOSFET's gate step is
// limited by a rule of this project's own. Saturation currents scale with
// temperature by the law of Nagel (1975) and Massobrio & Antognetti; the
// thermal voltage is k·T/q with the exact SI constants. Presets are
// typical family values (from memory), not any one part number: Presets
// for diodes and transistors (with their second-order values apart, in
// DevicePreset.Complete), JFETPresets, MOSFETPresets and OpAmpPresets by
// class.
//
// # Parts
//
// Circuit.AddPart puts a part in the way every solver needs it: series
// resistances with internal nodes (named InternalNode(ref, role), with
// InternalMark "#", which chain files must not use), and the op-amp and
// transformer macromodels as the elements they are made of. The op-amp is
// a transconductance into a gain node with a resistor and capacitor (DC
// gain and dominant pole), two limiters to the supply pins less the
// headrooms, a buffer and an output resistance. The transformer is each
// winding's resistance and leakage inductance (1 − k)·Li in series with an
// ideal transformer of ratios √(Li/L1), and the magnetising inductance
// k·L1 across its first winding, which reproduces every mutual inductance
// k·√(Li·Lj) exactly.
//
// # Circuits
//
// Circuit is plain data: named nodes (0 is ground, "gnd"), elements with
// SI values, the temperature, the input and output nodes. Besides the
// passive parts, sources, buffers and devices it holds two linear kinds
// the macromodels need: a voltage-controlled current source and an ideal
// transformer of any number of windings. Devices instantiates its
// nonlinear devices at the circuit's temperature; Check rejects what no
// analysis can solve (non-positive or non-finite values, device parameters
// out of range, a part with both pins on one node, a node with no DC path
// to ground, a loop of ideal sources, inductors and ideal windings, a part
// that needed AddPart put in without it) with a *CircuitError naming the
// part or node.
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
//     McGraw-Hill, 2nd ed., 1993, eq. 1.33 (temperature law); ch. 1
//     (junction charge, breakdown).
//   - H. K. Gummel and H. C. Poon, "An integral charge control model of
//     bipolar transistors", Bell Syst. Tech. J. 49(5), 1970 (base charge,
//     Early effect, diffusion charge).
//   - H. Shichman and D. A. Hodges, "Modeling and simulation of
//     insulated-gate field-effect transistor switching circuits", IEEE J.
//     Solid-State Circuits 3(3), 1968 (square-law channel).
//   - S. M. Sze and K. K. Ng, "Physics of Semiconductor Devices", 3rd ed.,
//     Wiley, 2007, sec. 2.3 (depletion capacitance).
//   - A. S. Sedra and K. C. Smith, "Microelectronic Circuits" (the device
//     models and their small-signal forms; cited from memory).
//   - P. T. P. Tang, "Table-driven implementation of the exponential
//     function in IEEE floating-point arithmetic", ACM TOMS 15(2), 1989,
//     and "… of the logarithm function …", ACM TOMS 16(4), 1990.
//
// # Non-goals
//
// No high-injection roll-off, reverse Early effect, reverse transit time,
// collector or emitter resistance, substrate or temperature dependence of
// the capacitances; no subthreshold conduction or body effect in the
// MOSFET; no self-heating, no noise. The op-amp macromodel has no slew-rate
// limit, input offset, bias current, common-mode limits or phase reversal,
// and its output current comes from ground rather than its supply pins.
// The transformer has no core loss or saturation. The presets are starting
// points for measured values, not datasheet models. Circuit does no layout
// and no hierarchy beyond AddPart's internal nodes, and no connectivity
// beyond Check's; the chains package builds it and the dsp solvers analyse
// it.
package models
