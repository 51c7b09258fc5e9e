package bench

import (
	"context"
	"testing"
)

func BenchmarkSolve(b *testing.B) {
	ch := siPair().parse(b)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Solve(ch); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkSolveTarget(b *testing.B) {
	ch := siPair().parse(b)
	t, _ := ParseTarget(ch, "fz.Q2.vc=4.5V")
	adj, _ := AdjusterFor(ch, t, "")
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := SolveTarget(ch, t, adj); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkSpreadTrial is one Monte Carlo trial with the THD render.
func BenchmarkSpreadTrial(b *testing.B) {
	ch := siPair().parse(b)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Spread(context.Background(), ch, SpreadOptions{Trials: 1, Seed: uint64(i), Workers: 1}); err != nil {
			b.Fatal(err)
		}
	}
}
