package chains

import (
	"renderchain/models"
)

// PartKind is the kind of a part of a chain file. Its text form is the
// name written in the file ("resistor", "npn", …); the zero value is no
// kind.
type PartKind int

// The part kinds a chain file can hold.
const (
	Resistor PartKind = iota + 1
	Capacitor
	Inductor
	Cable // value = length; capacitance per_metre
	Pot
	Diode
	NPN
	PNP
	NJFET       // n-channel junction FET (square law)
	PJFET       // p-channel junction FET
	NMOSFET     // n-channel enhancement MOSFET (square law, body diode)
	PMOSFET     // p-channel enhancement MOSFET
	OpAmp       // op-amp macromodel (models.OpAmpParams)
	Transformer // coupled windings (models.TransformerParams); pins per winding
	Switch      // named positions, each closing its own pin pairs
	lastKind    = Switch
)

type kindInfo struct {
	name string
	pins []string        // named pins; nil for a two-terminal list
	q    models.Quantity // quantity of the value; Dimensionless for devices
	unit string          // unit of the value ("" for devices)
	max  float64         // largest plausible value (0: none)
}

var kinds = [...]kindInfo{
	Resistor:    {name: "resistor", q: models.Resistance, unit: "Ω", max: 1e12},
	Capacitor:   {name: "capacitor", q: models.Capacitance, unit: "F", max: 10},
	Inductor:    {name: "inductor", q: models.Inductance, unit: "H", max: 1e4},
	Cable:       {name: "cable", q: models.Length, unit: "m", max: 1e3},
	Pot:         {name: "pot", pins: []string{"ccw", "wiper", "cw"}, q: models.Resistance, unit: "Ω"},
	Diode:       {name: "diode", pins: []string{"anode", "cathode"}},
	NPN:         {name: "npn", pins: []string{"c", "b", "e"}},
	PNP:         {name: "pnp", pins: []string{"c", "b", "e"}},
	NJFET:       {name: "n-jfet", pins: []string{"d", "g", "s"}},
	PJFET:       {name: "p-jfet", pins: []string{"d", "g", "s"}},
	NMOSFET:     {name: "n-mosfet", pins: []string{"d", "g", "s"}},
	PMOSFET:     {name: "p-mosfet", pins: []string{"d", "g", "s"}},
	OpAmp:       {name: "opamp", pins: []string{"noninv", "inv", "out", "rail_pos", "rail_neg"}},
	Transformer: {name: "transformer"},
	Switch:      {name: "switch"},
}

// ParsePartKind reads a kind's name.
func ParsePartKind(s string) (PartKind, bool) {
	for k := Resistor; k <= lastKind; k++ {
		if kinds[k].name == s {
			return k, true
		}
	}
	return 0, false
}

// PartKindNames lists the kinds' names in order.
func PartKindNames() []string {
	var s []string
	for k := Resistor; k <= lastKind; k++ {
		s = append(s, kinds[k].name)
	}
	return s
}

func (k PartKind) valid() bool { return k >= Resistor && k <= lastKind }

// String is the kind's name as written in a chain file.
func (k PartKind) String() string {
	if !k.valid() {
		return "part"
	}
	return kinds[k].name
}

// MarshalText writes the kind's name (so JSON shows "resistor").
func (k PartKind) MarshalText() ([]byte, error) { return []byte(k.String()), nil }

// Pins lists a kind's named pins; nil for a two-terminal part, whose pins
// are a two-name list, and for a transformer and a switch, whose pins sit
// in their windings and positions.
func (k PartKind) Pins() []string {
	if !k.valid() {
		return nil
	}
	return kinds[k].pins
}

// Transistor reports an npn or pnp part.
func (k PartKind) Transistor() bool { return k == NPN || k == PNP }

// FET reports a JFET or MOSFET part.
func (k PartKind) FET() bool { return k >= NJFET && k <= PMOSFET }

// Device reports a part with a device model (diode, transistor, FET or
// op-amp): its value, if any, names the model.
func (k PartKind) Device() bool { return k == Diode || k.Transistor() || k.FET() || k == OpAmp }

// Valued reports a part whose value is a resistance, capacitance,
// inductance or length.
func (k PartKind) Valued() bool { return k >= Resistor && k <= Pot }

// Unit is the unit symbol of a valued part's value ("Ω", "F", "H", "m").
func (k PartKind) Unit() string {
	if !k.valid() {
		return ""
	}
	return kinds[k].unit
}

// Quantity is the quantity of a valued part's value.
func (k PartKind) Quantity() models.Quantity {
	if !k.valid() {
		return models.Dimensionless
	}
	return kinds[k].q
}
