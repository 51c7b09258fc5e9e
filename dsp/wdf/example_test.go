package wdf_test

import (
	"fmt"

	"renderchain/dsp/mna"
	"renderchain/dsp/wdf"
	"renderchain/models"
)

// A diode clipper driven by a 2 V step: the output settles at the diode's
// forward voltage.
func ExampleCompile() {
	c := models.NewCircuit("clipper", models.NominalTemperature)
	in, out := c.Node("in"), c.Node("out")
	c.Input, c.Output = in, out
	c.Add(models.Element{Ref: "V1", Kind: models.VoltageSourceKind, Nodes: []int{in, models.Ground}, Signal: true})
	c.Add(models.Element{Ref: "R1", Kind: models.ResistorKind, Nodes: []int{in, out}, Value: 1e3})
	c.Add(models.Element{Ref: "C1", Kind: models.CapacitorKind, Nodes: []int{out, models.Ground}, Value: 10e-9})
	c.Add(models.Element{Ref: "D1", Kind: models.DiodeKind, Nodes: []int{out, models.Ground},
		Diode: models.DiodeParams{Is: 2.52e-9, N: 1.752}})
	op, err := mna.SolveDC(c, mna.DCOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	s, err := wdf.Compile(c, op, wdf.Options{SampleRate: 96000})
	if err != nil {
		fmt.Println(err)
		return
	}
	var y float64
	for n := 0; n < 960; n++ {
		y = s.Tick(2)
	}
	fmt.Printf("output after 10 ms: %.3f V\n", y)
	// Output: output after 10 ms: 0.596 V
}

// How long a render must run before it has forgotten its start: an RC
// low-pass (τ = 1 ms) at 48 kHz decays by 1e-7 in 16.1 time constants.
func ExampleSolver_WarmupSamples() {
	c := models.NewCircuit("rc", models.NominalTemperature)
	in, out := c.Node("in"), c.Node("out")
	c.Input, c.Output = in, out
	c.Add(models.Element{Ref: "V1", Kind: models.VoltageSourceKind, Nodes: []int{in, models.Ground}, Signal: true})
	c.Add(models.Element{Ref: "R1", Kind: models.ResistorKind, Nodes: []int{in, out}, Value: 10e3})
	c.Add(models.Element{Ref: "C1", Kind: models.CapacitorKind, Nodes: []int{out, models.Ground}, Value: 100e-9})
	op, err := mna.SolveDC(c, mna.DCOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	s, err := wdf.Compile(c, op, wdf.Options{SampleRate: 48000})
	if err != nil {
		fmt.Println(err)
		return
	}
	rho, _ := s.SlowestDecay()
	n, _ := s.WarmupSamples(1e-7)
	fmt.Printf("decay per sample %.6f, warm-up %d samples (%.1f ms)\n", rho, n, 1e3*float64(n)/48000)
	// Output: decay per sample 0.979381, warm-up 774 samples (16.1 ms)
}
