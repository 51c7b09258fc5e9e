// Package chains reads chain files: TOML descriptions of a signal chain
// (what drives it, the stages in order, what loads the output), with values
// in engineering notation, built-in stage templates (embedded TOML under
// templates/), overrides by --set keys, and the flattening of a chain into
// one models.Circuit in which stage k's out is stage k+1's in, so every
// stage loads the one before it.
//
// Besides gnd, v+, in and out, a chain may declare nets (node names shared
// by every stage: a filtered rail, a bias reference) and a [power] table,
// a supply network written like a stage between the ideal supply (node
// emf) and v+, so a battery has an internal resistance and a rail a filter.
// The supply-* templates are such networks.
//
// Flatten lints the wiring on the way (dangling nodes, slips for shared
// names, dotted names that reach nothing, stages that take the signal but
// never name out, shorts across the supply) and refuses what cannot be
// meant, and warns about values past any pedal's parts (a capacitor of
// 0.1 F, an input peak above 5 V: most often a unit left off);
// Flat.CheckOperatingPoint lints the DC operating point (idle supply
// current, dissipation against typical ratings, transistor polarity
// against the supply's sign, a polarized capacitor in backwards or over
// its rating, a supply network that passes too little to v+). Findings
// carry the file, the line and the part; warnings and notes stay on the
// Flat for every report.
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
// value codes); the SI Brochure, 9th ed. (prefixes); F. J. Damerau, "A
// technique for computer detection and correction of spelling errors",
// Comm. ACM 7(3), 1964 (the edit distance behind "did you mean"); L. W.
// Nagel, UCB ERL-M520, 1975 (the minimum conductance given to nodes only
// capacitors or junctions reach); P. Horowitz and W. Hill, The Art of
// Electronics, 2nd ed., 1989, p. 9 (a fresh 9 V alkaline cell's internal
// resistance); the device models'
// own references are in package models.
//
// Non-goals: netlist formats of other programs, hierarchical sub-circuits
// beyond one level of templates, schematic capture, and electrical rule
// checks that need a part's datasheet (the ratings used are typical
// figures of each family).
package chains
