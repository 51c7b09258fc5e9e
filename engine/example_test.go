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
