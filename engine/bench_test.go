package engine

import (
	"context"
	"fmt"
	"math"
	"testing"

	"renderchain/chains"
	"renderchain/dsp/synth"
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
	b.ReportAllocs()
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

// BenchmarkDemoPhrase is the same chain on music: the first 2 s of the
// demo's synthesized phrase (chords and single notes, hard clipping, many
// switching edges), the harder case for the Newton solve.
func BenchmarkDemoPhrase(b *testing.B) {
	ch, err := chains.Load("../chains/demo.toml")
	if err != nil {
		b.Fatal(err)
	}
	e, err := Prepare(ch, 4)
	if err != nil {
		b.Fatal(err)
	}
	x, err := synth.DemoPhrase(48000, 1)
	if err != nil {
		b.Fatal(err)
	}
	x = x[:2*48000]
	dst := make([]float64, MaxBlock)
	var c *Channel
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if c, err = e.NewChannel(48000); err != nil {
			b.Fatal(err)
		}
		for k := 0; k+MaxBlock <= len(x); k += MaxBlock {
			c.Process(dst, x[k:k+MaxBlock])
		}
	}
	ns := float64(b.Elapsed().Nanoseconds()) / float64(b.N*(len(x)/MaxBlock*MaxBlock))
	b.ReportMetric(ns, "ns/sample")
	b.ReportMetric(1e9/ns/48000, "x-realtime")
	b.ReportMetric(c.Stats().MeanIterations(), "newton/sample")
}

// The settle detector on one 0.1 s window: it runs once per window of the
// stream and must not allocate.
func BenchmarkSettleDetector(b *testing.B) {
	d := settleDetector{tol: 1e-5}
	w := make([]float64, 4800)
	for i := range w {
		w[i] = float64(i%48) / 48
	}
	b.ReportAllocs()
	b.SetBytes(int64(8 * len(w)))
	for i := 0; i < b.N; i++ {
		d.next(w)
	}
}

// BenchmarkLongMono renders 60 s of the demo's synthesized phrase (six
// takes, new seeds) through chains/demo.toml at its automatic factor
// (ChooseOversample at 48 kHz), serially and cut into segments on every
// core (StreamWith, PlanSegments), and reports ns per input sample, the
// realtime factor of the whole stream, the segments and the warm-up. The
// speed-up on n cores is the serial ns/sample over the segmented one. Run
// it with
//
//	go test -run XXX -bench LongMono -benchtime 1x ./engine/
func BenchmarkLongMono(b *testing.B) {
	p := preparedFile(b, "../chains/demo.toml", 0)
	c, err := p.ChooseOversample(context.Background(), 48000, 60)
	if err != nil {
		b.Fatal(err)
	}
	x := phraseSeconds(b, 60)
	for _, mode := range []struct {
		name    string
		workers int
	}{{"serial", 1}, {"segments", 0}} {
		b.Run(fmt.Sprintf("x%d/%s", c.Factor, mode.name), func(b *testing.B) {
			var st StreamInfo
			for i := 0; i < b.N; i++ {
				_, st = renderStream(b, p, x, c.Factor, mode.workers, nil)
			}
			ns := float64(b.Elapsed().Nanoseconds()) / float64(b.N*len(x))
			b.ReportMetric(ns, "ns/sample")
			b.ReportMetric(1e9/ns/48000, "x-realtime")
			b.ReportMetric(float64(st.Plan.Segments), "segments")
			b.ReportMetric(st.Plan.WarmupSeconds, "warmup-s")
		})
	}
}

// BenchmarkAliasTradeoff is the README's table of aliasing against speed:
// for the demo chain at full fuzz, as written (fuzz 0.7) and the
// germanium build as written, at factors 1–16, it reports the
// signal-to-alias ratio of issue 12's case (1319 Hz at 0.3 of full scale,
// a coherent 1 s record after a 1 s warm-up; untimed) and the speed of one
// core on the first 2 s of the demo's phrase (timed). Run it with
//
//	go test -run XXX -bench AliasTradeoff -benchtime 1x ./engine/
func BenchmarkAliasTradeoff(b *testing.B) {
	x := phraseSeconds(b, 2)
	for _, c := range []struct{ name, file, set string }{
		{"demo-fuzz1", "../chains/demo.toml", "fuzz.fuzz=1"},
		{"demo", "../chains/demo.toml", ""},
		{"germanium", "../chains/germanium.toml", ""},
	} {
		var sets []string
		if c.set != "" {
			sets = append(sets, c.set)
		}
		p := preparedFile(b, c.file, 0, sets...)
		for _, f := range []int{1, 2, 3, 4, 5, 6, 8, 10, 12, 16} {
			b.Run(fmt.Sprintf("%s/x%d", c.name, f), func(b *testing.B) {
				b.StopTimer()
				sar := issueAlias(b, p, f)
				dst := make([]float64, MaxBlock)
				var st float64
				for i := 0; i < b.N; i++ {
					ch, err := p.channelAt(48000, p.Circuit.Output, f)
					if err != nil {
						b.Fatal(err)
					}
					b.StartTimer()
					for k := 0; k+MaxBlock <= len(x); k += MaxBlock {
						ch.Process(dst, x[k:k+MaxBlock])
					}
					b.StopTimer()
					st = ch.Stats().MeanIterations()
				}
				ns := float64(b.Elapsed().Nanoseconds()) / float64(b.N*(len(x)/MaxBlock*MaxBlock))
				b.ReportMetric(sar, "dB-SAR")
				b.ReportMetric(ns, "ns/sample")
				b.ReportMetric(1e9/ns/48000, "x-realtime")
				b.ReportMetric(st, "newton/tick")
			})
		}
	}
}
