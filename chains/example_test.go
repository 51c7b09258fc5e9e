package chains_test

import (
	"fmt"

	"renderchain/chains"
)

func ExampleParse() {
	src := `name = "divider into a diode"
supply = "9V"
[output]
load = "100k"
[[stage]]
id = "clip"
parts = [
  { ref = "R1", kind = "resistor", value = "4k7", pins = ["in", "out"] },
  { ref = "D1", kind = "diode", model = "si-signal", pins = { anode = "out", cathode = "gnd" } },
]
`
	ch, err := chains.Parse("clip.toml", src)
	if err != nil {
		fmt.Println(err)
		return
	}
	if err := ch.Set("clip.R1=2k2"); err != nil {
		fmt.Println(err)
		return
	}
	c, err := ch.Build()
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, e := range c.Elements {
		fmt.Printf("%-14s %s\n", e.Ref, e.Kind)
	}
	// Output:
	// input.source   voltage source
	// supply         voltage source
	// clip.R1        resistor
	// clip.D1#rs     resistor
	// clip.D1        diode
	// output.load    resistor
}

// A tone-cap toggle and an op-amp buffer: the switch is set like a part's
// value, by name or by place; Build puts in the closed contact and the
// op-amp's macromodel, whose elements are named REF#role.
func ExampleChain_Set_switch() {
	src := `name = "toggle into a buffer"
[[stage]]
id = "t"
parts = [
  { ref = "R1", kind = "resistor", value = "10k", pins = ["in", "a"] },
  { ref = "C1", kind = "capacitor", value = "10n", pins = ["c", "gnd"] },
  { ref = "SW1", kind = "switch", positions = [{ name = "flat", connect = [] }, { name = "dark", connect = [["a", "c"]] }] },
  { ref = "U1", kind = "opamp", model = "opamp-jfet-dual", output_resistance = 0, pins = { noninv = "a", inv = "out", out = "out" } },
]
`
	ch, err := chains.Parse("toggle.toml", src)
	if err != nil {
		fmt.Println(err)
		return
	}
	if err := ch.Set("t.SW1=dark"); err != nil {
		fmt.Println(err)
		return
	}
	c, err := ch.Build()
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, e := range c.Elements[2:] {
		fmt.Printf("%-12s %s\n", e.Ref, e.Kind)
	}
	// Output:
	// t.R1         resistor
	// t.C1         capacitor
	// t.SW1#contact1 resistor
	// t.U1#rin     resistor
	// t.U1#gm      controlled current source
	// t.U1#rg      resistor
	// t.U1#cg      capacitor
	// t.U1#high    limiter
	// t.U1#low     limiter
	// t.U1#buf     buffer
	// output.load  resistor
}
