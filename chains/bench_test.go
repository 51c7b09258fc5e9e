package chains_test

import (
	"testing"

	"renderchain/dsp/synth"
	"renderchain/engine"
)

// BenchmarkTemplates renders the first 2 s of the demo's synthesized
// phrase (chords and single notes) through each new template alone, at
// its default settings behind an ideal source with the default 300 mV
// input peak, at 4 × 48 kHz: ns per input sample, the realtime factor on
// one core, the mean Newton iterations per internal sample and the
// nonlinear root ports. Run it with
//
//	go test -run XXX -bench Templates ./chains
func BenchmarkTemplates(b *testing.B) {
	x, err := synth.DemoPhrase(48000, 1)
	if err != nil {
		b.Fatal(err)
	}
	x = x[:2*48000]
	for _, tc := range templateCases {
		b.Run(tc.name, func(b *testing.B) {
			p, err := engine.Prepare(templateChain(b, tc.name, tc.supply), 4)
			if err != nil {
				b.Fatal(err)
			}
			dst := make([]float64, engine.MaxBlock)
			var c *engine.Channel
			b.ReportAllocs()
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				if c, err = p.NewChannel(48000); err != nil {
					b.Fatal(err)
				}
				for k := 0; k+engine.MaxBlock <= len(x); k += engine.MaxBlock {
					c.Process(dst, x[k:k+engine.MaxBlock])
				}
			}
			ns := float64(b.Elapsed().Nanoseconds()) / float64(b.N*(len(x)/engine.MaxBlock*engine.MaxBlock))
			_, ports := c.States()
			b.ReportMetric(ns, "ns/sample")
			b.ReportMetric(1e9/ns/48000, "x-realtime")
			b.ReportMetric(c.Stats().MeanIterations(), "newton/sample")
			b.ReportMetric(float64(ports), "root-ports")
			if st := c.Stats(); st.NonConverged > 0 {
				b.Errorf("%d samples did not converge", st.NonConverged)
			}
		})
	}
}
