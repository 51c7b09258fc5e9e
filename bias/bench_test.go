package bias

import (
	"testing"

	"renderchain/internal/testchains"
)

func BenchmarkSolve(b *testing.B) {
	ch := testchains.SiPair().Parse(b)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Solve(ch); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkSolveTarget(b *testing.B) {
	ch := testchains.SiPair().Parse(b)
	t, _ := ParseTarget(ch, "fz.Q2.vc=4.5V")
	adj, _ := AdjusterFor(ch, t, "")
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := SolveTarget(ch, t, adj); err != nil {
			b.Fatal(err)
		}
	}
}
