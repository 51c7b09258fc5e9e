// Package bias reads a chain's DC operating point the way a builder reads
// a board with a meter before the first note: where the transistors sit
// and in which region, which trimmer setting reaches a target, where both
// half-waves clip alike, and what the battery and the room temperature do.
//
// # Operating point
//
// Solve prepares a chain (engine.Prepare: build, DC operating point) and
// reads it as a Bias: every node's voltage by name (nodes Build adds inside a part, such
// as a diode's "stage.D1#junction" behind its series resistance or a transistor's "stage.Q1#base" behind its base resistance, are marked
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
// Warnings flag a transistor saturated, cut off or reversed at idle (left
// to the chain's operating-point check when its polarity disagrees with
// the supply, chains.PolarityFault), a leaky transistor whose base current
// runs backwards (Ic/Ib then says nothing of hFE), and a collector within
// RailMargin (1 V) of either rail (ground or v+) unless it is wired to
// that rail, drives another transistor's base directly, or, for the
// supply rail, is loaded by an inductor or a transformer winding (near
// the rail by design in each case). Targets and probes name a
// transistor's or a FET's terminal quantities or a node.
//
// JFETs and MOSFETs are read as FET: Vgs, Vds, Id, the overdrive past
// pinch-off or threshold, and a region by FETRegionRule (cut-off, ohmic,
// active, reverse), with warnings for a FET cut off, ohmic or reversed at
// idle, a JFET gate junction forward biased, and a MOSFET gate that only
// board leakage holds. Op-amps are read as OpAmp from the elements of
// their macromodel (which stay out of the device lists): the pins'
// voltages, the output's swing limits at these rails and the room left
// each way, with warnings for an output at a limit at idle, a lopsided idle
// point, rails the wrong way round and inputs outside the rails.
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
// symmetric swing. Each rotation tried runs the engine's test sine through
// the chain on the render's own path (package engine: 48 kHz base rate,
// the chain's oversampling, the one settle rule with tolerance 1e-4 and a
// 1 s limit, a record of at least 20 cycles); excursions are read on the
// settled record at the base rate, as a render would write them. A run
// whose probe leaves the rails by far more than the test sine is discarded
// as a solver that ran away.
//
// # Conditions
//
// Sweep solves the operating point over lists of supply voltages (fresh to
// failing battery; read with models.ParseSupplies, which keeps the chain
// file's polarity) and temperatures. Germanium leakage follows the device
// model (about doubling per 10 °C: common practice) and so does Is(T).
//
// Keys a user writes (targets, adjusters, the watched node) that name
// nothing are *models.FieldError on the option's field ("target",
// "adjust", "probe", "level", …).
//
// # References
//
//   - J. J. Ebers and J. L. Moll, "Large-signal behavior of junction
//     transistors", Proc. IRE 42(12), 1954 (the device model read here).
//   - R. P. Brent, "Algorithms for Minimization without Derivatives",
//     Prentice-Hall, 1973, ch. 4 (root finding) and ch. 5 (golden section).
//
// # Non-goals
//
// No self-heating: the junction temperature is the chain's. No
// tolerance-stack-up or Monte Carlo (package parts does the spread), no
// safety analysis of mains-powered equipment: this package knows nothing of
// mains wiring, and soldering and power-supply safety are the builder's own.
package bias
