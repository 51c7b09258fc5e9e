package render

import (
	"math"
	"testing"

	"renderchain/chains"
)

// BenchmarkDemoChain renders a 220 Hz tone burst through chains/demo.toml
// (pickup, two-transistor fuzz, blend tone, volume, amplifier input) at 4x
// oversampling of 48 kHz and reports ns per input sample, the realtime
// factor on one core and the mean Newton iterations.
func BenchmarkDemoChain(b *testing.B) {
	ch, err := chains.Load("../chains/demo.toml")
	if err != nil {
		b.Fatal(err)
	}
	e, err := Prepare(ch, 4)
	if err != nil {
		b.Fatal(err)
	}
	c, err := e.NewChannel(48000)
	if err != nil {
		b.Fatal(err)
	}
	const n = 1024
	src := make([]float64, n)
	dst := make([]float64, n)
	ph := 0.0
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		for k := range src {
			src[k] = 0.5 * math.Sin(ph)
			ph += 2 * math.Pi * 220 / 48000
		}
		c.Process(dst, src)
	}
	nsPerSample := float64(b.Elapsed().Nanoseconds()) / float64(b.N*n)
	b.ReportMetric(nsPerSample, "ns/sample")
	b.ReportMetric(1e9/nsPerSample/48000, "x-realtime")
	b.ReportMetric(c.Stats().MeanIterations(), "newton/sample")
}
