package chains_test

import (
	"fmt"
	"log"

	"renderchain/chains"
)

// The wiring of the demo chain: stage k's out is stage k+1's in, and the
// amplifier input, a shunt stage behind the volume pot, hangs on the
// chain's output. A user's names for nodes resolve through it.
func ExampleWiring() {
	ch, err := chains.Example("demo")
	if err != nil {
		log.Fatal(err)
	}
	w := ch.Wiring()
	for _, e := range w.Stages {
		fmt.Printf("%-7s in %-8s out %-8s shunt %v\n", e.Stage, e.In, e.Out, e.Shunt)
	}
	c, err := ch.Build()
	if err != nil {
		log.Fatal(err)
	}
	for _, name := range []string{"volume.out", "amp.in", "tone.in", "fuzz.c2"} {
		n, err := w.Resolve(c, name)
		fmt.Println(name, "→", chains.NodeName(c, n), err)
	}
	// Output:
	// pickup  in in       out pickup.out shunt false
	// fuzz    in pickup.out out fuzz.out shunt false
	// tone    in fuzz.out out tone.out shunt false
	// volume  in tone.out out out      shunt false
	// amp     in out      out out      shunt true
	// volume.out → out <nil>
	// amp.in → out <nil>
	// tone.in → fuzz.out <nil>
	// fuzz.c2 → fuzz.c2 <nil>
}
