package measure_test

import (
	"context"
	"fmt"

	"renderchain/chains"
	"renderchain/measure"
)

const lowpass = `
name = "RC low-pass"
supply = "9V"
[input]
peak = "1V"
[output]
load = "none"
full_scale = "1V"
[[stage]]
id = "rc"
parts = [
  { ref = "R1", kind = "resistor",  value = "10k", pins = ["in", "out"] },
  { ref = "C1", kind = "capacitor", value = "10n", pins = ["out", "gnd"] },
]
`

// A level sweep in logarithmic steps, its bounds written the way a bench
// generator is set.
func ExampleParseLevelSweep() {
	s, err := measure.ParseLevelSweep("20mVpp..-20dBV", 3)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, v := range s.StepList {
		fmt.Printf("%.4f V peak\n", v)
	}
	// Output:
	// 0.0100 V peak
	// 0.0376 V peak
	// 0.1414 V peak
}

// The small-signal response of an RC low-pass at its corner,
// 1/(2π·10 kΩ·10 nF) ≈ 1591.5 Hz: −3.01 dB and −45°.
func ExampleSmallSignal() {
	ch, err := chains.Parse("lowpass.toml", lowpass)
	if err != nil {
		fmt.Println(err)
		return
	}
	pts, err := measure.SmallSignal(ch, []float64{1591.549}, measure.ResponseOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%.2f dB %.1f°\n", float64(pts[0].DB), float64(pts[0].Deg))
	// Output: -3.01 dB -45.0°
}

// A sine through the circuit: a linear low-pass adds no harmonics.
func ExampleSine() {
	ch, _ := chains.Parse("lowpass.toml", lowpass)
	r, err := measure.Sine(context.Background(), ch, 1000, 0.5, measure.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("gain %.2f dB, THD_F below 0.001 %%: %v, settled: %v\n", float64(r.GainDB), float64(r.THDPercent) < 0.001, r.Settle.Settled)
	// Output: gain -1.45 dB, THD_F below 0.001 %: true, settled: true
}

// The scope view of a sine measurement: the first three settled cycles
// at the source and at the probed node, at the internal rate (1 kHz at
// 48 kHz × 4: 576 samples and one to close the last cycle), with the rail
// named where it lies off the scale.
func ExampleReport_ScopeFigures() {
	ch, _ := chains.Parse("lowpass.toml", lowpass)
	rep, err := measure.Run(context.Background(), ch, measure.Plan{Freq: 1000, Amplitude: 0.5,
		Options: measure.Options{Scope: true}})
	if err != nil {
		fmt.Println(err)
		return
	}
	figs, err := rep.ScopeFigures()
	if err != nil {
		fmt.Println(err)
		return
	}
	sc := rep.Measurements[0].Scope
	fmt.Println(len(figs), len(sc.In), len(sc.Out))
	fmt.Println(figs[0].Panels[1].Title)
	// Output:
	// 1 577 577
	// Output: out (v+ 9 V above the scale)
}
