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
