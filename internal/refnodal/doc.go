// Package refnodal is an independent DC nodal solver for tests: Kirchhoff's
// current law at every free node of a netlist written out by hand, with
// the device equations written here again from their sources (not taken
// from package models), solved by damped Newton with a central-difference
// Jacobian and gonum's dense LU. Tests compare the project's operating
// points (dsp/mna through the chain flattening) against it.
//
// Device equations:
//   - transistor: the Ebers–Moll transport form (J. J. Ebers & J. L. Moll,
//     Proc. IRE 42(12), 1954; transport version as in I. Getreu, "Modeling
//     the Bipolar Transistor", 1976, eqs. 2.10–2.11), the transport current
//     scaled by 1 − Vbc/VA for the forward Early effect (H. K. Gummel & H.
//     C. Poon, Bell Syst. Tech. J. 49(5), 1970, with only the forward Early
//     voltage), and the collector–base leakage Icbo·(1 − exp(Vbc/Vt))
//     that the chain-file core documents for germanium;
//   - diode: Shockley's law I = Is·(exp(V/(n·Vt)) − 1) (Bell Syst. Tech.
//     J. 28, 1949) and the exponential reverse breakdown anchored at the
//     knee current Ibv at −BV (the breakdown law of circuit-simulation
//     diode models, from memory);
//   - JFET: Shockley's square law Id = Idss·(1 − Vgs/VP)²·(1 + λ·Vds) in
//     saturation and Idss·(2·(1 − Vgs/VP)·(Vds/|VP|) − (Vds/VP)²)·(1 + λ·Vds)
//     in the ohmic region (Sedra & Smith, "Microelectronic Circuits", the
//     JFET; from memory), gate junctions by Shockley's law;
//   - MOSFET: the square law Id = (k/2)·(Vgs − Vth)²·(1 + λ·Vds) in
//     saturation, k·((Vgs − Vth)·Vds − Vds²/2)·(1 + λ·Vds) in triode (Sedra
//     & Smith, the MOSFET; from memory), body diode by Shockley's law;
//   - op-amp at DC: a voltage source A0·(V+ − V−) from ground behind its
//     output resistance, the input resistance between the inputs (the
//     single-pole macromodel at DC, away from its output limits).
//
// Non-goals: speed, AC or transient analysis, and any use outside tests.
package refnodal
