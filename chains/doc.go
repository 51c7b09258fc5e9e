// Package chains reads chain files: TOML descriptions of a signal chain
// (what drives it, the stages in order, what loads the output), with values
// in engineering notation, built-in stage templates (embedded TOML under
// templates/), overrides by --set keys, and the flattening of a chain into
// one models.Circuit in which stage k's out is stage k+1's in, so every
// stage loads the one before it.
//
// Part kinds (kind.go) are the passive parts, pots, diodes, bipolar
// transistors, JFETs and MOSFETs of both polarities, op-amps, transformers
// and switches. Device parameters (devices.go) are read through the
// quantity parsers of package models and checked against ranges; a named
// preset fills in its complete value set (models.DevicePreset.Complete),
// a part without one keeps the core model of the chain-file interface.
// Build flattens every device through models.Circuit.AddPart, so the nodes
// and elements inside parts are named STAGE.REF#role; a chain file may not
// write the mark. A switch (switch.go) is flattened in its selected
// position: each closed contact a small resistor, open contacts absent, a
// node left without a DC path given a 1 TΩ leak.
//
// Errors name the file, the line where there is one, the stage and part,
// and what is wrong: "tone.toml:14: stage tone: part R3: value "22kk" is
// not a resistance". TOML decoding keeps no positions for semantic errors,
// so lines are found by searching the source text within the stage's block.
//
// References: TOML v1.0.0 (toml.io); IEC 60062 (letter-as-decimal-point
// value codes); the SI Brochure, 9th ed. (prefixes); the device models'
// own references are in package models.
//
// Non-goals: netlist formats of other programs, hierarchical sub-circuits
// beyond one level of templates, and schematic capture.
package chains
