package engine_test

import (
	"fmt"
	"math"

	"renderchain/chains"
	"renderchain/engine"
)

// One channel of the stripped fuzz chain, fed a 1 kHz sine at a quarter of
// full scale: the fuzz clips it, so the crest factor falls below a sine's
// 3.0 dB toward a square's 0 dB (the band-limited edges keep some overshoot).
func ExamplePrepared_NewChannel() {
	ch, err := chains.Example("fuzz-only")
	if err != nil {
		fmt.Println(err)
		return
	}
	eng, err := engine.Prepare(ch, 4)
	if err != nil {
		fmt.Println(err)
		return
	}
	c, err := eng.NewChannel(48000)
	if err != nil {
		fmt.Println(err)
		return
	}
	src := make([]float64, 4800)
	dst := make([]float64, 4800)
	for i := range src {
		src[i] = 0.25 * math.Sin(2*math.Pi*1000*float64(i)/48000)
	}
	n := c.Process(dst, src)
	peak, sum := 0.0, 0.0
	for _, v := range dst[2400:n] { // the second half: settled
		peak = math.Max(peak, math.Abs(v))
		sum += v * v
	}
	rms := math.Sqrt(sum / float64(n-2400))
	fmt.Printf("crest factor %.1f dB\n", 20*math.Log10(peak/rms))
	// Output: crest factor 2.3 dB
}

// The pole analysis of a prepared chain: a 10 kΩ, 22 nF low-pass has one
// pole, its time constant RC = 220 µs, and nothing grows, so the chain
// carries no stability warning.
func ExamplePrepared_SlowestTimeConstant() {
	ch, err := chains.Parse("rc.toml", `name = "rc"
[input]
peak = "1V"
[output]
load = "none"
[[stage]]
id = "rc"
parts = [
  { ref = "R1", kind = "resistor", value = "10k", pins = ["in", "out"] },
  { ref = "C1", kind = "capacitor", value = "22n", pins = ["out", "gnd"] },
]
`)
	if err != nil {
		fmt.Println(err)
		return
	}
	p, err := engine.Prepare(ch, 1)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%.0f µs, unstable %v, %d warnings\n", p.SlowestTimeConstant()*1e6, p.Unstable(), len(p.Warnings))
	// Output: 220 µs, unstable false, 0 warnings
}
