package mna_test

import (
	"fmt"

	"renderchain/dsp/mna"
	"renderchain/models"
)

// A 9 V supply across a 10 kΩ resistor and a silicon diode: SolveDC
// returns the node voltages, the supply's branch current and the diode's
// port state.
func ExampleSolveDC() {
	c := models.NewCircuit("diode and resistor", models.NominalTemperature)
	vp, k := c.Node("v+"), c.Node("k")
	c.Add(models.Element{Ref: "V1", Kind: models.VoltageSourceKind, Nodes: []int{vp, models.Ground}, Value: 9})
	c.Add(models.Element{Ref: "R1", Kind: models.ResistorKind, Nodes: []int{vp, k}, Value: 10e3})
	c.Add(models.Element{Ref: "D1", Kind: models.DiodeKind, Nodes: []int{k, models.Ground},
		Diode: models.DiodeParams{Is: 2.52e-9, N: 1.752}})
	op, err := mna.SolveDC(c, mna.DCOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("V(k) =", models.FormatValue(op.Node[k], "V"))
	fmt.Println("I(V1) =", models.FormatValue(op.Branch[0], "A"))
	fmt.Println("I(D1) =", models.FormatValue(op.Devices[0].I[0], "A"))
	fmt.Println("method:", op.Method)
	// Output:
	// V(k) = 572.6 mV
	// I(V1) = -842.7 µA
	// I(D1) = 842.7 µA
	// method: newton
}
