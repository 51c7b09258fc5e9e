package models

import "sort"

// DevicePreset is a named set of default device parameters. A part that
// names a preset takes its values; parameters written on the part win.
//
// Diode and BJT hold the static core (the Shockley and Ebers–Moll
// parameters and their temperature laws), the values chain files take
// from a preset today. DiodeSecond and BJTSecond hold the family's typical
// second-order values (charge storage, Early voltage, base resistance,
// breakdown); Complete merges them in.
type DevicePreset struct {
	Name, About string
	Diode       *DiodeParams
	BJT         *BJTParams
	DiodeSecond *DiodeSecondOrder
	BJTSecond   *BJTSecondOrder
}

// Complete returns the preset with its second-order values merged into
// copies of Diode and BJT (a preset without them is returned as it is).
func (p DevicePreset) Complete() DevicePreset {
	if p.Diode != nil && p.DiodeSecond != nil {
		d := *p.Diode
		d.DiodeSecondOrder = *p.DiodeSecond
		p.Diode = &d
	}
	if p.BJT != nil && p.BJTSecond != nil {
		b := *p.BJT
		b.BJTSecondOrder = *p.BJTSecond
		p.BJT = &b
	}
	return p
}

// Presets are typical values for common device families, not any one part
// number; every figure is from memory of typical datasheet and published
// device-model ranges and is meant as a starting point for a measured
// value.
var Presets = map[string]DevicePreset{
	"si-npn": {Name: "si-npn", About: "silicon small-signal NPN (Is 10 fA, hFE 250, βR 4)",
		BJT: &BJTParams{Is: 10e-15, BetaF: 250, BetaR: 4, Eg: 1.11, XTI: 3},
		BJTSecond: &BJTSecondOrder{EarlyVoltage: 90, BaseResistance: 50,
			BE: Depletion{20e-12, 0.75, 0.33}, BC: Depletion{5e-12, 0.75, 0.33}, TransitTime: 0.4e-9}},
	"si-pnp": {Name: "si-pnp", About: "silicon small-signal PNP (Is 10 fA, hFE 200, βR 4)",
		BJT: &BJTParams{PNP: true, Is: 10e-15, BetaF: 200, BetaR: 4, Eg: 1.11, XTI: 3},
		BJTSecond: &BJTSecondOrder{EarlyVoltage: 60, BaseResistance: 50,
			BE: Depletion{25e-12, 0.75, 0.33}, BC: Depletion{8e-12, 0.75, 0.33}, TransitTime: 0.5e-9}},
	"ge-pnp": {Name: "ge-pnp", About: "germanium small-signal PNP (Is 0.2 µA, hFE 85, βR 3, Icbo 2 µA at 25 °C doubling per 10 K)",
		BJT: &BJTParams{PNP: true, Is: 200e-9, BetaF: 85, BetaR: 3, Icbo: 2e-6, LeakDoubling: 10, Eg: 0.67, XTI: 3},
		BJTSecond: &BJTSecondOrder{EarlyVoltage: 40, BaseResistance: 200,
			BE: Depletion{50e-12, 0.4, 0.5}, BC: Depletion{15e-12, 0.4, 0.5}, TransitTime: 40e-9}},
	"ge-npn": {Name: "ge-npn", About: "germanium small-signal NPN (as ge-pnp, NPN polarity)",
		BJT: &BJTParams{Is: 200e-9, BetaF: 85, BetaR: 3, Icbo: 2e-6, LeakDoubling: 10, Eg: 0.67, XTI: 3},
		BJTSecond: &BJTSecondOrder{EarlyVoltage: 40, BaseResistance: 200,
			BE: Depletion{50e-12, 0.4, 0.5}, BC: Depletion{15e-12, 0.4, 0.5}, TransitTime: 40e-9}},
	"si-signal": {Name: "si-signal", About: "silicon small-signal switching diode (Is 2.52 nA, n 1.752, Rs 0.57 Ω)",
		Diode: &DiodeParams{Is: 2.52e-9, N: 1.752, Rs: 0.568, Eg: 1.11, XTI: 3},
		DiodeSecond: &DiodeSecondOrder{BreakdownVoltage: 100, BreakdownCurrent: 100e-6,
			Junction: Depletion{4e-12, 0.75, 0.33}, TransitTime: 5e-9}},
	"ge-signal": {Name: "ge-signal", About: "germanium point-contact diode (Is 0.2 µA, n 1.3, Rs 20 Ω)",
		Diode: &DiodeParams{Is: 200e-9, N: 1.3, Rs: 20, Eg: 0.67, XTI: 3},
		DiodeSecond: &DiodeSecondOrder{BreakdownVoltage: 30, BreakdownCurrent: 100e-6,
			Junction: Depletion{1e-12, 0.3, 0.5}, TransitTime: 100e-9}},
	"led-red": {Name: "led-red", About: "red LED used as a clipper (Is 0.5 aA, n 1.8, Rs 4 Ω; about 1.75 V at 10 mA)",
		Diode: &DiodeParams{Is: 5e-19, N: 1.8, Rs: 4, Eg: 1.9, XTI: 3},
		// No breakdown value: the 5 V reverse figure of LED datasheets is a
		// rating, not where the junction breaks down.
		DiodeSecond: &DiodeSecondOrder{Junction: Depletion{30e-12, 1.8, 0.33}, TransitTime: 100e-9}},
	"zener-4v7": {Name: "zener-4v7", About: "silicon zener, 4.7 V at 5 mA, soft knee (about 40 Ω there); forward about 0.8 V at 10 mA",
		Diode: &DiodeParams{Is: 1e-12, N: 1.4, Rs: 1, Eg: 1.11, XTI: 3, DiodeSecondOrder: DiodeSecondOrder{
			BreakdownVoltage: 4.7, BreakdownCurrent: 5e-3, BreakdownN: 8,
			Junction: Depletion{250e-12, 0.75, 0.33}, TransitTime: 50e-9}}},
	"zener-9v1": {Name: "zener-9v1", About: "silicon zener, 9.1 V at 5 mA, sharp knee (about 10 Ω there); forward about 0.8 V at 10 mA",
		Diode: &DiodeParams{Is: 1e-12, N: 1.4, Rs: 1, Eg: 1.11, XTI: 3, DiodeSecondOrder: DiodeSecondOrder{
			BreakdownVoltage: 9.1, BreakdownCurrent: 5e-3, BreakdownN: 2,
			Junction: Depletion{100e-12, 0.75, 0.33}, TransitTime: 50e-9}}},
}

// PresetNames lists the presets in order.
func PresetNames() []string {
	var s []string
	for k := range Presets {
		s = append(s, k)
	}
	sort.Strings(s)
	return s
}

// Preset is a named parameter set for a device class beyond diodes and
// bipolar transistors.
type Preset[P any] struct {
	Name, About string
	Params      P
}

// Names lists the presets of a table in order.
func Names[P any](m map[string]Preset[P]) []string {
	var s []string
	for k := range m {
		s = append(s, k)
	}
	sort.Strings(s)
	return s
}

// JFETPresets are typical small-signal JFETs by class (from memory of
// datasheet ranges: Idss 1–20 mA, pinch-off 0.5–6 V, gate leakage in the
// picoamperes, a few picofarads per junction).
var JFETPresets = map[string]Preset[JFETParams]{
	"n-jfet": {Name: "n-jfet", About: "n-channel small-signal JFET (Idss 5 mA, pinch-off 2 V, λ 0.01 /V)",
		Params: JFETParams{Idss: 5e-3, Pinchoff: 2, ChannelModulation: 0.01, GateIs: 1e-14, GateN: 1,
			GS: Depletion{4e-12, 0.8, 0.5}, GD: Depletion{2e-12, 0.8, 0.5}}},
	"p-jfet": {Name: "p-jfet", About: "p-channel small-signal JFET (Idss 5 mA, pinch-off 2 V, λ 0.01 /V)",
		Params: JFETParams{PChannel: true, Idss: 5e-3, Pinchoff: 2, ChannelModulation: 0.01, GateIs: 1e-14, GateN: 1,
			GS: Depletion{6e-12, 0.8, 0.5}, GD: Depletion{3e-12, 0.8, 0.5}}},
}

// MOSFETPresets are typical small-signal enhancement MOSFETs by class
// (from memory of datasheet ranges: threshold about 2 V, on-resistance of
// an ohm or a few at 10 V of drive, input capacitance some tens of
// picofarads, a body diode of about 0.85 V at 100 mA).
var MOSFETPresets = map[string]Preset[MOSFETParams]{
	"n-mosfet": {Name: "n-mosfet", About: "n-channel small-signal enhancement MOSFET (threshold 2.1 V, k 0.1 A/V², λ 0.01 /V)",
		Params: MOSFETParams{Threshold: 2.1, K: 0.1, ChannelModulation: 0.01, BodyIs: 3e-11, BodyN: 1.5,
			GateSource: 50e-12, GateDrain: 5e-12}},
	"p-mosfet": {Name: "p-mosfet", About: "p-channel small-signal enhancement MOSFET (threshold 2 V, k 0.05 A/V², λ 0.01 /V)",
		Params: MOSFETParams{PChannel: true, Threshold: 2, K: 0.05, ChannelModulation: 0.01, BodyIs: 3e-11, BodyN: 1.5,
			GateSource: 60e-12, GateDrain: 8e-12}},
}

// OpAmpPresets are op-amp classes (from memory of typical datasheet
// figures of each class, not any one part).
var OpAmpPresets = map[string]Preset[OpAmpParams]{
	"opamp-general-dual": {Name: "opamp-general-dual", About: "general-purpose bipolar dual for ±15 V or 9–18 V single supplies (106 dB, 1 MHz, 2 MΩ in, swing to 1.5 V of each rail)",
		Params: OpAmpParams{Gain: 2e5, GBW: 1e6, InputResistance: 2e6, OutputResistance: 75, HeadroomHigh: 1.5, HeadroomLow: 1.5}},
	"opamp-jfet-dual": {Name: "opamp-jfet-dual", About: "JFET-input dual (106 dB, 3 MHz, 1 TΩ in, swing to 1.5 V of each rail)",
		Params: OpAmpParams{Gain: 2e5, GBW: 3e6, InputResistance: 1e12, OutputResistance: 100, HeadroomHigh: 1.5, HeadroomLow: 1.5}},
	"opamp-low-power-single": {Name: "opamp-low-power-single", About: "low-power single-supply part (100 dB, 1 MHz, swing from 20 mV above the negative rail to 1.5 V below the positive)",
		Params: OpAmpParams{Gain: 1e5, GBW: 1e6, InputResistance: 1e9, OutputResistance: 300, HeadroomHigh: 1.5, HeadroomLow: 0.02}},
}
