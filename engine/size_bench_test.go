package engine

import (
	"context"
	"fmt"
	"math"
	"strings"
	"testing"
	"time"

	"renderchain/chains"
	"renderchain/dsp/mna"
)

// ladderChain is a chain of parts parts at most, the largest kind of
// circuit the size bound lets through: eight stages of an RC ladder (a
// series resistor and a capacitor to ground per rung), every rung a node of
// its own and a reactive state, so nodes and states grow with the parts.
func ladderChain(tb testing.TB, parts int) *chains.Chain {
	tb.Helper()
	const stages = 8
	var b strings.Builder
	b.WriteString("name = \"RC ladder\"\nsupply = \"9V\"\n[output]\nload = \"1M\"\n")
	for s := 0; s < stages; s++ {
		fmt.Fprintf(&b, "[[stage]]\nid = \"s%d\"\nparts = [\n", s)
		prev, k := "in", 0
		for n := 0; n+2 <= parts/stages-1; n += 2 {
			node := fmt.Sprintf("n%d", k)
			fmt.Fprintf(&b, "  { ref = \"R%d\", kind = \"resistor\", value = \"1k\", pins = [\"%s\", \"%s\"] },\n", k, prev, node)
			fmt.Fprintf(&b, "  { ref = \"C%d\", kind = \"capacitor\", value = \"1n\", pins = [\"%s\", \"gnd\"] },\n", k, node)
			prev, k = node, k+1
		}
		fmt.Fprintf(&b, "  { ref = \"R%d\", kind = \"resistor\", value = \"1k\", pins = [\"%s\", \"out\"] },\n]\n", k, prev)
	}
	ch, err := chains.Parse("ladder.toml", b.String())
	if err != nil {
		tb.Fatal(err)
	}
	return ch
}

// BenchmarkChainSize measures, at a quarter, half and all of chains.MaxParts,
// what a command does with the largest chains the size bound lets through:
// flatten the chain (Build), solve its DC operating point, and render one
// second of a 1 kHz sine at 48 kHz with the default oversampling. It is the
// evidence for the bound (README, "Limits"): run it with
//
//	go test -run XXX -bench ChainSize -benchtime 1x ./engine/
//
// and read s/op of each step (the render reports its realtime factor).
func BenchmarkChainSize(b *testing.B) {
	for _, parts := range []int{chains.MaxParts / 4, chains.MaxParts / 2, chains.MaxParts} {
		ch := ladderChain(b, parts)
		b.Run(fmt.Sprintf("parts=%d/build", parts), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				if _, err := ch.Build(); err != nil {
					b.Fatal(err)
				}
			}
		})
		c, err := ch.Build()
		if err != nil {
			b.Fatal(err)
		}
		b.Run(fmt.Sprintf("parts=%d/dc", parts), func(b *testing.B) {
			b.ReportMetric(float64(len(c.Nodes)), "nodes")
			for i := 0; i < b.N; i++ {
				if _, err := mna.SolveDC(c, mna.DCOptions{}); err != nil {
					b.Fatal(err)
				}
			}
		})
		b.Run(fmt.Sprintf("parts=%d/render-1s", parts), func(b *testing.B) {
			p, err := Prepare(ch, 0)
			if err != nil {
				b.Fatal(err)
			}
			x := make([]float64, 48000)
			for i := range x {
				x[i] = 0.1 * math.Sin(2*math.Pi*1000*float64(i)/48000)
			}
			b.ResetTimer()
			start := time.Now()
			for i := 0; i < b.N; i++ {
				if _, _, err := p.Render(context.Background(), 48000, p.Circuit.Output, x, 0); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(b.N)/time.Since(start).Seconds(), "x-realtime")
		})
	}
}
