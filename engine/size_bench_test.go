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

// pedalChain is blocks copies of a pedal (a buffered two-transistor
// silicon fuzz, a blend tone and a volume stage: 20 parts, 2 transistors,
// 4 nonlinear ports each), the kind of chain whose cost the nonlinear
// ports set.
func pedalChain(tb testing.TB, blocks int) *chains.Chain {
	tb.Helper()
	var b strings.Builder
	b.WriteString("name = \"pedals\"\nsupply = \"9V\"\n[output]\nload = \"1M\"\n")
	for i := 0; i < blocks; i++ {
		fmt.Fprintf(&b, "[[stage]]\nid = \"f%d\"\ntemplate = \"fuzz-si\"\nknobs = { fuzz = 0.5 }\nbuffer = true\n", i)
		fmt.Fprintf(&b, "[[stage]]\nid = \"t%d\"\ntemplate = \"tone-blend\"\n", i)
		fmt.Fprintf(&b, "[[stage]]\nid = \"v%d\"\ntemplate = \"volume\"\nknobs = { level = 0.1 }\n", i)
	}
	ch, err := chains.Parse("pedals.toml", b.String())
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
// The pedals sub-benchmarks do the same for 4 and 16 pedals in a row (80
// and 320 parts), whose cost the transistors set.
func BenchmarkChainSize(b *testing.B) {
	type size struct {
		name string
		ch   *chains.Chain
	}
	var sizes []size
	for _, parts := range []int{chains.MaxParts / 4, chains.MaxParts / 2, chains.MaxParts} {
		sizes = append(sizes, size{fmt.Sprintf("ladder/parts=%d", parts), ladderChain(b, parts)})
	}
	for _, blocks := range []int{4, 16} {
		sizes = append(sizes, size{fmt.Sprintf("pedals/blocks=%d", blocks), pedalChain(b, blocks)})
	}
	for _, sz := range sizes {
		ch := sz.ch
		b.Run(sz.name+"/build", func(b *testing.B) {
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
		b.Run(sz.name+"/dc", func(b *testing.B) {
			b.ReportMetric(float64(len(c.Nodes)), "nodes")
			for i := 0; i < b.N; i++ {
				if _, err := mna.SolveDC(c, mna.DCOptions{}); err != nil {
					b.Fatal(err)
				}
			}
		})
		b.Run(sz.name+"/render-1s", func(b *testing.B) {
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
