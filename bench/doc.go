// Package bench answers a builder's questions before a board is populated:
// where the transistors sit (the DC operating point, read off mna.SolveDC),
// which trimmer setting reaches a target, what the battery and the room
// temperature do, how far tolerances and unsorted transistors spread a
// build, and what to order.
//
// # Operating point
//
// Solve builds a chain, solves its DC operating point and reads it as a
// Bias: every node's voltage by name (nodes Build adds inside a part, such
// as a diode's "stage.D1.junction" behind its series resistance, are marked
// Internal), and for each transistor its terminal voltages Vc, Vb, Ve, Vbe,
// Vce, Vbc, currents Ib, Ic (into the base and collector) and Ie = Ib + Ic
// (out of the emitter), dissipation Vbe·Ib + Vce·Ic and region. All values
// are signed as measured: a PNP transistor in normal operation has negative
// Vbe, Vce and Ic, the mirror image of an NPN one, so a positive-ground
// germanium build reads like its NPN twin with the signs flipped.
//
// The region rule works on the Ebers–Moll transport currents of the two
// junctions, in NPN polarity, If = Is·(exp(Vbe/Vt) − 1) and
// Ir = Is·(exp(Vbc/Vt) − 1), with Is at the circuit's temperature:
//
//	reverse    Ir > If and Ir ≥ 1 µA (the collector junction injects)
//	cut-off    If < 1 µA and Ir < 1 µA (ConductionCurrent)
//	saturated  Ir/If > r, the ratio at which Ic/Ib without leakage falls to
//	           0.9·βF (SaturationGainFraction): r = 0.1/(1 + 1/βR + 0.9·βF/βR),
//	           about Vce < Vt·ln(1/r) ≈ 0.16 V for βF = 250, βR = 4
//	active     otherwise
//
// The thresholds are this package's choices, stated so that a reading can
// be checked: 1 µA is far below any audio stage's bias and far above the
// model's reverse saturation currents, and "current gain down to 90 % of
// βF" is the usual textbook sense of the edge of saturation. Germanium
// leakage, which flows whatever the region, is left out of the rule.
//
// Warnings flag a transistor saturated, cut off or reversed at idle, and a
// collector within RailMargin (1 V) of either rail (ground or v+) unless
// it is wired to that rail.
//
// # Targets
//
// SolveTarget turns one knob (a trimmer, named as STAGE.KNOB or STAGE.POT,
// or by default the pot a template marks with adjusts = "Q2" for that
// transistor) to bring one DC quantity (STAGE.REF.vc, vce, ic, … or a node
// voltage) to a value: it scans TargetScan rotations over the whole travel,
// refines each sign change by Brent's method and keeps the crossing
// nearest the present rotation. It reports the rotation and the resistance
// to measure between the trimmer's ccw pin and wiper, R·t(x), with the
// trimmer out of circuit (in circuit the reading is shunted by the rest of
// the board; measure with the battery out). A value out of reach is a
// result, not an error: the closest reachable value and where it is.
//
// SolveSymmetric finds by simulation, not by a rule of thumb, the setting
// at which a test sine (by default at the chain's input peak, 1 kHz) swings
// the adjusted transistor's collector equally far above and below its idle
// voltage: both half-waves clip at the same excursion, which is the largest
// symmetric swing. Each rotation tried is a wave digital simulation at
// 192 kHz (the render's 48 kHz × 4): 0.1 s to settle (10 ms fade-in) and 20
// cycles recorded; a run whose probe leaves the rails by far more than the
// test sine is discarded as a solver that ran away.
//
// # Conditions
//
// Sweep solves the operating point over lists of supply voltages (fresh to
// failing battery) and temperatures. Germanium leakage follows the device
// model (about doubling per 10 °C: common practice) and so does Is(T).
//
// # Tolerance spread
//
// Spread runs a Monte Carlo over clones of the chain (chains.Chain.Clone,
// values set on the parts, then Build). Each resistor, capacitor and pot of
// the build's stages (not the pickup and amplifier-input stages, which
// model what the build plugs into) takes a relative deviation drawn from
// the chosen distribution within its tolerance. The tolerance is the part's
// tolerance key, or by Tolerance's rule its E-series class: a value on E12
// (and so on E6 and E3) is a ±10 % part, one on E24 only ±5 %, one on
// neither ±5 % for a resistor and ±10 % for a capacitor; pot tracks ±20 %
// (common practice). The default distribution is normal with the tolerance
// at 3σ, truncated at ±tolerance; uniform within ±tolerance is the other
// choice. Transistor gains come from a bin of measured values (distinct
// devices per trial), a uniform range, or stay as written; germanium
// leakage spreads log-uniformly within ×/÷ 2 (DefaultLeakSpread, a choice).
//
// Trial k draws from a PCG generator seeded with SplitMix64 hashes of the
// seed and k, in a fixed order of parts, so results are the same whatever
// the number of workers and their scheduling. Percentiles are Hyndman and
// Fan's definition 7; the yield's interval is Wilson's 95 % score interval.
//
// # Parts list
//
// PartsList gives each part's value, nearest E12 and E24 values (package
// eseries), tolerance, idle voltage and dissipation, and rating hints, all
// common practice: capacitors rated at least 1.5 × the supply (16 V on a
// 9 V rail), resistors, pots and transistors at least twice their idle
// dissipation, transistors' Vceo and diodes' reverse rating at least 1.5 ×
// the supply, and each electrolytic's polarity from its idle voltage.
//
// # References
//
//   - J. J. Ebers and J. L. Moll, "Large-signal behavior of junction
//     transistors", Proc. IRE 42(12), 1954 (the device model read here).
//   - R. P. Brent, "Algorithms for Minimization without Derivatives",
//     Prentice-Hall, 1973, ch. 4 (root finding) and ch. 5 (golden section).
//   - R. J. Hyndman and Y. Fan, "Sample quantiles in statistical packages",
//     The American Statistician 50(4), 1996.
//   - E. B. Wilson, "Probable inference, the law of succession, and
//     statistical inference", J. Am. Stat. Assoc. 22, 1927.
//   - G. L. Steele, D. Lea, C. H. Flood, "Fast splittable pseudorandom number
//     generators", OOPSLA 2014 (SplitMix64).
//   - IEC 60063:2015, preferred number series (via package eseries).
//
// # Non-goals
//
// No self-heating: the junction temperature is the chain's. No spread of
// diode parameters, silicon Is or inductors. No tolerance-stack-up
// (worst-case) analysis, only Monte Carlo. Rating hints are rules of thumb
// for small-signal builds, not a safety analysis of mains-powered
// equipment: this package knows nothing of mains wiring, and soldering and
// power-supply safety are the builder's own.
package bench
