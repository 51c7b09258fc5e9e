// Package mna analyses a flat circuit (models.Circuit) by modified nodal
// analysis: the DC operating point, the small-signal AC response around
// it, and a brute-force transient run that serves as the reference for the
// wave digital solver.
//
// # Formulation
//
// The unknowns are the voltages of every node but ground, then one current
// per branch whose voltage is fixed: ideal voltage sources, ideal
// buffers, the windings after the first of an ideal transformer and,
// where the analysis needs it, inductors (Layout). Real holds a real
// system A·x = z being stamped; LU factors it densely with partial
// pivoting in preallocated storage, so repeated Newton steps do not
// allocate. A pivot below 1e-15 of the largest entry is ErrSingular.
//
// Real.Ideal is the one stamp of the ideal linear elements (voltage
// sources, buffers, voltage-controlled current sources, ideal
// transformers of N windings) that DC, AC, the transient reference and
// the wave digital adaptor all use, so a new linear kind is added in one
// place.
//
// # DC
//
// SolveDC opens capacitors, shorts inductors and sets every source to its
// DC value. It runs Newton's method with the devices' junction limiting
// from all-zero voltages; if that fails, gmin stepping (a conductance from
// every node to ground, 1 mS lowered a decade at a time, then removed);
// if that fails too, source stepping (all sources ramped from zero with an
// adaptive step). OperatingPoint reports the node voltages, the branch
// currents, each device's port voltages, currents and Jacobian, the
// iteration count and the Method that finished ("newton", "gmin",
// "source"). Unsolvable circuits give a *models.CircuitError (from
// Circuit.Check, or for singular equations) or a *NonConvergenceError.
//
// # AC
//
// Linearize returns the small-signal system at an operating point as real
// matrices, (G + jωC)·x = B: G the conductances (with each device's
// Jacobian), C the capacitances (capacitors, −L in each inductor's branch
// row, each charge-storing device's capacitance matrix), B the unit
// signal source. AC solves it per frequency and returns the complex
// voltage of each probe node: a transfer function in V/V.
//
// # Poles
//
// Poles returns the natural frequencies of the linearised circuit, the
// finite generalised eigenvalues of the pencil (G, C): s = −1/μ for the
// nonzero eigenvalues μ of G⁻¹·C (G is the DC system, regular wherever a
// DC operating point exists), up to MaxPoleHz. A pole with a positive
// real part (Unstable) means the built circuit does not rest at its
// operating point: it oscillates near |Im s|/2π, or latches when the
// pole is real. The slowest stable pole tells how long the circuit takes
// to forget its start.
//
// # Transient
//
// Transient steps the circuit at a fixed sample rate with trapezoidal
// companion models for capacitors, inductors and the port charges of
// charge-storing devices (models.Charged: i = (2/h)·(q − q_prev) − i_prev,
// which conserves charge exactly), the same bilinear discretisation as
// the wave digital solver, and a full Newton solve per sample. It is slow
// and exists to check the fast solver against. DC ignores device charges.
//
// # References
//
//   - C.-W. Ho, A. E. Ruehli and P. A. Brennan, "The modified nodal
//     approach to network analysis", IEEE Trans. Circuits Syst. 22(6),
//     1975.
//   - L. W. Nagel, UC Berkeley memorandum ERL-M520, 1975 (junction
//     limiting, sec. 4.3; gmin and source stepping, sec. 4.4).
//   - L. O. Chua and P.-M. Lin, "Computer-Aided Analysis of Electronic
//     Circuits", Prentice-Hall, 1975, ch. 13 (companion models).
//   - J. Vlach and K. Singhal, "Computer Methods for Circuit Analysis and
//     Design", 2nd ed., 1994, sec. 11.3.
//   - G. H. Golub and C. F. Van Loan, "Matrix Computations", 4th ed.,
//     2013, alg. 3.4.1 (LU with partial pivoting), sec. 7.7 (the
//     generalised eigenvalue problem).
//
// # Non-goals
//
// Dense matrices only: the package is sized for effect circuits of tens of
// nodes, not integrated circuits. No adaptive time step, no noise,
// distortion or sensitivity analysis, no parameter or temperature sweeps
// (run the analyses again). SolveDC returns one operating point: for a
// bistable circuit it may be either stable state or the metastable one.
// The transient solver is not meant for real-time rendering.
package mna
