package mna_test

import (
	"testing"

	"renderchain/dsp/mna"
)

// BenchmarkSolveDC times a full DC solve of the common-emitter stage.
func BenchmarkSolveDC(b *testing.B) {
	c := ceStage(true).c
	for b.Loop() {
		if _, err := mna.SolveDC(c, mna.DCOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkAC times a 100-point small-signal sweep of the same stage.
func BenchmarkAC(b *testing.B) {
	c := ceStage(true).c
	op, err := mna.SolveDC(c, mna.DCOptions{})
	if err != nil {
		b.Fatal(err)
	}
	freqs := logspace(10, 1e5, 100)
	probe := []int{c.Output}
	for b.Loop() {
		if _, err := mna.AC(c, op, freqs, probe); err != nil {
			b.Fatal(err)
		}
	}
}
