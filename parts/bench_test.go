package parts

import (
	"context"
	"testing"

	"renderchain/internal/testchains"
)

// BenchmarkSpreadTrial is one Monte Carlo trial with the THD render.
func BenchmarkSpreadTrial(b *testing.B) {
	ch := testchains.SiPair().Parse(b)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Spread(context.Background(), ch, SpreadOptions{Trials: 1, Seed: uint64(i), Workers: 1}); err != nil {
			b.Fatal(err)
		}
	}
}
