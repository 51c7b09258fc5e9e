package models_test

import (
	"fmt"

	"renderchain/models"
)

// ParseValue reads the notations found on schematics and parts lists and
// returns SI units; FormatValue writes engineering notation back.
func ExampleParseValue() {
	for _, c := range []struct {
		text string
		q    models.Quantity
	}{
		{"4k7", models.Resistance},   // IEC 60062 code
		{"2n2", models.Capacitance},  // IEC 60062 code
		{"100R", models.Resistance},  // R as the unit
		{"22 kΩ", models.Resistance}, // prefix and unit
		{"300mV", models.Voltage},    // milli
		{"25C", models.Temperature},  // kelvin out
		{"22nF", models.Resistance},  // wrong quantity
	} {
		v, err := models.ParseValue(c.text, c.q)
		if err != nil {
			fmt.Println(err)
			continue
		}
		fmt.Printf("%-6s = %.6g\n", c.text, v)
	}
	fmt.Println(models.FormatValue(4700, "Ω"), models.FormatValue(2.2e-9, "F"))
	// Output:
	// 4k7    = 4700
	// 2n2    = 2.2e-09
	// 100R   = 100
	// 22 kΩ  = 22000
	// 300mV  = 0.3
	// 25C    = 298.15
	// value "22nF" is not a resistance (unit "F")
	// 4.7 kΩ 2.2 nF
}

// An audio-taper pot puts 10 % of its track below the wiper at
// mid-rotation; PotSections splits the track for the circuit.
func ExampleTaper_Fraction() {
	for _, x := range []float64{0, 0.25, 0.5, 0.75, 1} {
		fmt.Printf("x=%.2f linear %.4f audio %.4f reverse %.4f\n", x,
			models.Linear.Fraction(x), models.Audio.Fraction(x), models.ReverseAudio.Fraction(x))
	}
	lo, hi := models.PotSections(100e3, models.Audio, 0.5)
	fmt.Println(models.FormatValue(lo, "Ω"), "+", models.FormatValue(hi, "Ω"))
	// Output:
	// x=0.00 linear 0.0000 audio 0.0000 reverse 0.0000
	// x=0.25 linear 0.2500 audio 0.0250 reverse 0.6750
	// x=0.50 linear 0.5000 audio 0.1000 reverse 0.9000
	// x=0.75 linear 0.7500 audio 0.3250 reverse 0.9750
	// x=1.00 linear 1.0000 audio 1.0000 reverse 1.0000
	// 10 kΩ + 90 kΩ
}

// AddPart puts an op-amp in as the elements of its macromodel, each named
// after the part with the internal mark, on internal nodes of its own.
func ExampleCircuit_AddPart() {
	c := models.NewCircuit("buffer", models.NominalTemperature)
	in, out, vp := c.Node("in"), c.Node("out"), c.Node("v+")
	idx, err := c.AddPart(models.Element{Ref: "U1", Kind: models.OpAmpKind,
		Nodes: []int{in, out, out, vp, models.Ground}, OpAmp: models.OpAmpPresets["opamp-general-dual"].Params})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, i := range idx {
		e := c.Elements[i]
		fmt.Printf("%-8s %s\n", e.Ref, e.Kind)
	}
	// Output:
	// U1#rin   resistor
	// U1#gm    controlled current source
	// U1#rg    resistor
	// U1#cg    capacitor
	// U1#high  limiter
	// U1#low   limiter
	// U1#buf   buffer
	// U1#rout  resistor
}

// A zener preset: the reverse current reaches the knee current at the
// rated voltage and grows by e per n·Vt past it.
func ExampleDiode_Current() {
	d := models.NewDiode(*models.Presets["zener-9v1"].Diode, models.NominalTemperature)
	for _, v := range []float64{-8.9, -9.1, -9.3} {
		i, _ := d.Current(v)
		fmt.Printf("%s: %s\n", models.FormatValue(v, "V"), models.FormatValue(i, "A"))
	}
	// Output:
	// -8.9 V: -102 µA
	// -9.1 V: -5 mA
	// -9.3 V: -245.1 mA
}
