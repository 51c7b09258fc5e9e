package bias_test

import (
	"fmt"
	"log"

	"renderchain/bias"
	"renderchain/chains"
)

const stage = `
name = "common-emitter stage"
supply = "9V"
[[stage]]
id = "ce"
knobs = { trim = 0.5 }
parts = [
  { ref = "C1", kind = "capacitor", value = "1u",  pins = ["in", "b"] },
  { ref = "R1", kind = "resistor",  value = "39k", pins = ["v+", "b"] },
  { ref = "R2", kind = "resistor",  value = "10k", pins = ["b", "gnd"] },
  { ref = "RC", kind = "resistor",  value = "1k",  pins = ["t", "c"] },
  { ref = "TR", kind = "pot", value = "10k", knob = "trim", adjusts = "Q1", pins = { ccw = "v+", wiper = "t" } },
  { ref = "RE", kind = "resistor",  value = "2k2", pins = ["e", "gnd"] },
  { ref = "Q1", kind = "npn", hfe = 200, pins = { c = "c", b = "b", e = "e" } },
  { ref = "C2", kind = "capacitor", value = "100n", pins = ["c", "out"] },
]
`

func ExampleSolve() {
	ch, err := chains.Parse("stage.toml", stage)
	if err != nil {
		log.Fatal(err)
	}
	b, err := bias.Solve(ch)
	if err != nil {
		log.Fatal(err)
	}
	q := b.Transistor("ce.Q1")
	fmt.Printf("%s: Vc %.2f V, Ic %.2f mA, %s\n", q.Ref, q.Vc, q.Ic*1e3, q.Region)
	// Output:
	// ce.Q1: Vc 5.80 V, Ic 0.53 mA, active
}

func ExampleSolveTarget() {
	ch, err := chains.Parse("stage.toml", stage)
	if err != nil {
		log.Fatal(err)
	}
	t, err := bias.ParseTarget(ch, "ce.Q1.vc=4.5V")
	if err != nil {
		log.Fatal(err)
	}
	adj, err := bias.AdjusterFor(ch, t, "") // the trimmer marked adjusts = "Q1"
	if err != nil {
		log.Fatal(err)
	}
	r, err := bias.SolveTarget(ch, t, adj)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("reached %v at %s = %.3f: %.0f Ω ccw–wiper\n", r.Reached, adj.Key(), r.Rotation, r.Lower)
	// Output:
	// reached true at ce.trim = 0.743: 7426 Ω ccw–wiper
}
