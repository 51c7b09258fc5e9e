// Package parts is about the parts of a build: the tolerance each part
// carries, how far tolerances, unsorted transistors and germanium leakage
// spread a build (a Monte Carlo), and the parts list to order from.
//
// # Tolerance spread
//
// Spread runs a Monte Carlo over clones of the chain (chains.Chain.Clone,
// values set on the parts, then engine.Prepare). Each resistor, capacitor
// and pot of the build's stages (not the stages declared environment = true,
// such as the pickup and amplifier-input templates, which model what the
// build plugs into) takes a relative deviation drawn from
// the chosen distribution within its tolerance. The tolerance is the part's
// tolerance key, or by Tolerance's rule its E-series class: a value on E12
// (and so on E6 and E3) is a ±10 % part, one on E24 only ±5 %, one on
// neither ±5 % for a resistor and ±10 % for a capacitor; pot tracks ±20 %
// (common practice). The default distribution is normal with the tolerance
// at 3σ, truncated at ±tolerance; uniform within ±tolerance is the other
// choice. Transistor gains come from a bin of measured values (distinct
// devices per trial), a uniform range, or stay as written; germanium
// leakage spreads log-uniformly within ×/÷ 2 (DefaultLeakSpread, a choice),
// and a JFET's pinch-off within ×/÷ 1.5 (DefaultFETSpread) with Idss
// following as β·Vp² (Shichman & Hodges 1968). The supply network's parts
// are listed and varied like a stage's; the cell's own resistance is not.
//
// Each trial is measured like the nominal build: its operating point
// (package bias), the small-signal gain at the spread's frequency (mna.AC)
// and, unless turned off, the THD_F of the engine's test sine through the
// chain (package engine; settle tolerance 1e-4, 1 s limit, 0.05 s record).
// Trial k draws from a PCG generator seeded with SplitMix64 hashes of the
// seed and k, in a fixed order of parts, so results are the same whatever
// the number of workers (package parallel) and their scheduling. Percentiles are Hyndman and
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
// No spread of diode parameters, silicon Is, inductors, MOSFETs or op-amps. No worst-case
// (stack-up) analysis, only Monte Carlo. Rating hints are rules of thumb
// for small-signal builds, not a safety analysis of mains-powered
// equipment: soldering and power-supply safety are the builder's own, and
// local electrical codes and licensed practice come first.
package parts
