// Package chains reads chain files: TOML descriptions of a signal chain
// (what drives it, the stages in order, what loads the output), with values
// in engineering notation, built-in stage templates (embedded TOML under
// templates/), overrides by --set keys, and the flattening of a chain into
// one models.Circuit in which stage k's out is stage k+1's in, so every
// stage loads the one before it.
//
// Errors name the file, the line where there is one, the stage and part,
// and what is wrong: "tone.toml:14: stage tone: part R3: value "22kk" is
// not a resistance". TOML decoding keeps no positions for semantic errors,
// so lines are found by searching the source text within the stage's block.
//
// References: TOML v1.0.0 (toml.io); IEC 60062 (letter-as-decimal-point
// value codes); the SI Brochure, 9th ed. (prefixes).
//
// Non-goals: netlist formats of other programs, hierarchical sub-circuits
// beyond one level of templates, and schematic capture.
package chains
