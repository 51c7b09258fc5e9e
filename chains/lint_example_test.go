package chains_test

import (
	"fmt"

	"renderchain/chains"
	"renderchain/dsp/mna"
)

// A misspelt pin is refused with the file, the line, the part and the fix.
func ExampleChain_Flatten() {
	src := `name = "a slip of the hand"
[[stage]]
id = "amp"
parts = [
  { ref = "R1", kind = "resistor", value = "10k", pins = ["in", "out"] },
  { ref = "R2", kind = "resistor", value = "10k", pins = ["out", "gdn"] },
]
`
	ch, err := chains.Parse("slip.toml", src)
	if err != nil {
		fmt.Println(err)
		return
	}
	_, err = ch.Flatten()
	fmt.Println(err)
	// Output:
	// slip.toml:6: stage amp: part R2: pin 2 is on node "gdn": a new node local to stage amp; did you mean "gnd"?
}

// A filtered rail declared once as a net, a battery with its internal
// resistance in the [power] table, and the operating-point lint.
func ExampleFlat_CheckOperatingPoint() {
	src := `name = "two loads on a filtered rail"
supply = "9V"
nets = ["vf"]
[power]
template = "supply-battery"
[[stage]]
id = "rail"
parts = [
  { ref = "RF", kind = "resistor",  value = "100",  pins = ["v+", "vf"] },
  { ref = "CF", kind = "capacitor", value = "100u", pins = ["vf", "gnd"] },
]
[[stage]]
id = "load"
parts = [
  { ref = "R1", kind = "resistor", value = "1k", pins = ["in", "out"] },
  { ref = "R2", kind = "resistor", value = "220", pins = ["vf", "gnd"] },
]
`
	ch, err := chains.Parse("rail.toml", src)
	if err != nil {
		fmt.Println(err)
		return
	}
	if err := ch.Set("power.RBAT=50"); err != nil { // a worn cell
		fmt.Println(err)
		return
	}
	flat, err := ch.Flatten()
	if err != nil {
		fmt.Println(err)
		return
	}
	op, err := mna.SolveDC(flat.Circuit, mna.DCOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	flat.CheckOperatingPoint(op)
	// Ohm's law: 9 V across 50 + 100 + 220 Ω drives 24.3 mA, 5.351 V on the 220 Ω.
	fmt.Printf("vf %.3f V\n", op.Node[flat.Circuit.Lookup("vf")])
	for _, w := range flat.Findings.Warnings() {
		fmt.Println(w)
	}
	// Output:
	// vf 5.351 V
}
