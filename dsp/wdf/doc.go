// Package wdf is the wave digital solver: it turns a flat circuit into one
// root R-type adaptor whose scattering matrix comes from modified nodal
// analysis, with every nonlinear device port gathered at the root and
// solved jointly by damped Newton–Raphson each sample.
//
// Structure. Every linear one-port (resistor, pot section, capacitor,
// inductor) is an adapted leaf of the root adaptor, with the port
// resistance of Fettweis's wave digital elements under the bilinear
// transform (capacitor T/2C, inductor 2L/T). Ideal voltage sources (the
// supply, the signal source) and ideal buffers are absorbed inside the
// adaptor and enter as inputs. The nonlinear ports (one per diode, two per
// transistor) are unadapted ports at the root. The scattering matrix is
// S = 2M − I, with M the port voltages per unit incident wave from one MNA
// solve per port (Werner, Nangia, Smith & Abel, DAFx-15, 2015; Werner,
// Bernardini, Smith & Sarti, IEEE TCAS-I 65(12), 2018). Because the
// adaptor is derived from nodal analysis, any topology a chain file can
// describe is accepted, not only series/parallel trees.
//
// Nonlinear root. With a = v + R·i and b = v − R·i at the root's ports the
// scattering relation becomes the Kirchhoff-domain relation v = p + K·i (the
// K-method form of the joint solve), p linear in the leaves' waves and the
// inputs, K constant. K's entries below 1e-13 of their row or column, the
// rounding residue where an ideal source decouples two ports, are set to
// zero, and the elimination passes over the zeros. Newton solves
// v = p + K·f(v) from a predictor (the last solution moved along the
// linearised solution map by the change in p and in the device charges'
// history, with the last Newton matrix's factors, plus the last sample's
// error of that linear step), with classical junction limiting and a step /
// error-estimate convergence test; a failed sample is retried from the
// last solution, then by continuation in p over 4 and 16 sub-steps; what
// still fails keeps the best finite iterate and is counted
// (Stats.NonConverged), so nothing non-finite reaches the output. The
// device Jacobians are analytic (models package) and are checked against
// central differences in that package's tests.
//
// Start. Compile takes the DC operating point and sets every state from it
// (capacitor waves from their voltages, inductor waves from their currents,
// the Newton start from the junction voltages), so a render starts at rest,
// without a thump. SlowestDecay and WarmupSamples give the slowest decay of
// the circuit linearised there, for sizing how long a clone must run
// before it has forgotten its start (segmented rendering).
//
// Hot path. Solver.Process(dst, src) does no allocation: per sample, one
// matrix-vector product for p, the Newton solve, and one for the next
// states and the output, over [states, 1, input, root waves]. The
// benchmarks (chain_bench_test.go) report ns per input sample, the
// realtime factor and Newton iterations per internal sample for the demo
// chain, a twelve-port cascade (testdata/cascade12.toml), a purely linear
// chain and roots of 2 to 12 ports.
//
// Device charges. A device that stores charge (models.Charged: junction
// depletion and diffusion charge) adds its capacitive currents to the
// Newton residual with the trapezoidal rule, the bilinear discretisation of
// every linear reactive leaf, and (2/T)·C(v) to the Jacobian; one history
// term per port, (2/T)·q + i_q of the accepted solution, is the state of
// the next sample, starting from the operating point's charge at Reset.
// The accepted charges are those of the last device evaluation moved to
// the accepted voltages to first order, as the currents are. Devices
// without charges cost nothing for it (charge.go).
//
// Kernels. Roots of up to four ports whose devices have one or two ports
// each run in a fixed-size kernel (arrays, written-out elimination), roots
// of five to sixteen such ports in a mid-size kernel (arrays with masked
// indices, rows exchanged by permutation); others in the general one. All
// do the same arithmetic in the same order (tests check them bit for bit
// on the same circuits). At 1× a circuit whose linearisation has a pole
// far above the sample rate rings at the Nyquist frequency after each
// abrupt change of its devices, the bilinear transform's image of that
// pole near z = −1 (ringing_test.go): the decimation filter of any
// oversampling removes it, nothing does at 1×.
//
// Non-goals: time-varying knobs within a render (recompile per setting),
// noise analysis. Device physics (which charges, the Early effect) belongs
// to the models package.
package wdf
