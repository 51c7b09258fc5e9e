package models

import "sort"

// DevicePreset is a named set of default device parameters. A part that
// names a preset takes its values; parameters written on the part win.
type DevicePreset struct {
	Name, About string
	Diode       *DiodeParams
	BJT         *BJTParams
}

// Presets are typical values for common device families, not any one part
// number; every figure is from memory of typical datasheet and published device-model
// ranges and is meant as a starting point for a measured value.
var Presets = map[string]DevicePreset{
	"si-npn": {Name: "si-npn", About: "silicon small-signal NPN (Is 10 fA, hFE 250, βR 4)",
		BJT: &BJTParams{Is: 10e-15, BetaF: 250, BetaR: 4, Eg: 1.11, XTI: 3}},
	"si-pnp": {Name: "si-pnp", About: "silicon small-signal PNP (Is 10 fA, hFE 200, βR 4)",
		BJT: &BJTParams{PNP: true, Is: 10e-15, BetaF: 200, BetaR: 4, Eg: 1.11, XTI: 3}},
	"ge-pnp": {Name: "ge-pnp", About: "germanium small-signal PNP (Is 0.2 µA, hFE 85, βR 3, Icbo 2 µA at 25 °C doubling per 10 K)",
		BJT: &BJTParams{PNP: true, Is: 200e-9, BetaF: 85, BetaR: 3, Icbo: 2e-6, LeakDoubling: 10, Eg: 0.67, XTI: 3}},
	"ge-npn": {Name: "ge-npn", About: "germanium small-signal NPN (as ge-pnp, NPN polarity)",
		BJT: &BJTParams{Is: 200e-9, BetaF: 85, BetaR: 3, Icbo: 2e-6, LeakDoubling: 10, Eg: 0.67, XTI: 3}},
	"si-signal": {Name: "si-signal", About: "silicon small-signal switching diode (Is 2.52 nA, n 1.752, Rs 0.57 Ω)",
		Diode: &DiodeParams{Is: 2.52e-9, N: 1.752, Rs: 0.568, Eg: 1.11, XTI: 3}},
	"ge-signal": {Name: "ge-signal", About: "germanium point-contact diode (Is 0.2 µA, n 1.3, Rs 20 Ω)",
		Diode: &DiodeParams{Is: 200e-9, N: 1.3, Rs: 20, Eg: 0.67, XTI: 3}},
	"led-red": {Name: "led-red", About: "red LED used as a clipper (Is 0.5 aA, n 1.8, Rs 4 Ω; about 1.75 V at 10 mA)",
		Diode: &DiodeParams{Is: 5e-19, N: 1.8, Rs: 4, Eg: 1.9, XTI: 3}},
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
