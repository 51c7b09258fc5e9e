package mna_test

import (
	"fmt"
	"math"
	"math/cmplx"

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

// Linearize gives the small-signal system (G + jωC)·x = B of a circuit at
// its operating point; here an RC low-pass, whose output row shows the
// conductance 1/R and the capacitance C. AC solves the same system.
func ExampleLinearize() {
	c := models.NewCircuit("RC low-pass", models.NominalTemperature)
	in, out := c.Node("in"), c.Node("out")
	c.Add(models.Element{Ref: "V1", Kind: models.VoltageSourceKind, Nodes: []int{in, models.Ground}, Signal: true})
	c.Add(models.Element{Ref: "R1", Kind: models.ResistorKind, Nodes: []int{in, out}, Value: 10e3})
	c.Add(models.Element{Ref: "C1", Kind: models.CapacitorKind, Nodes: []int{out, models.Ground}, Value: 10e-9})
	op, err := mna.SolveDC(c, mna.DCOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	ss := mna.Linearize(c, op)
	r, d := ss.Layout.Row(out), ss.Layout.Dim
	fmt.Printf("unknowns: %d\n", d)
	fmt.Printf("G[out][out] = %s\n", models.FormatValue(ss.G[r*d+r], "S"))
	fmt.Printf("C[out][out] = %s\n", models.FormatValue(ss.C[r*d+r], "F"))
	h, _ := mna.AC(c, op, []float64{1 / (2 * math.Pi * 10e3 * 10e-9)}, []int{out})
	fmt.Printf("|H| at the corner = %.4f\n", cmplx.Abs(h[0][0]))
	// Output:
	// unknowns: 3
	// G[out][out] = 100 µS
	// C[out][out] = 10 nF
	// |H| at the corner = 0.7071
}
