package wdf

import (
	"math"
	"testing"
)

// BenchmarkTwoTransistorTick measures one internal sample of the
// two-transistor test stage at 192 kHz (a 441 Hz sine, 0.3 V peak).
func BenchmarkTwoTransistorTick(b *testing.B) {
	s, _ := twoTransistor().compile(b, 192000)
	src := make([]float64, 4096)
	for i := range src {
		src[i] = 0.3 * math.Sin(2*math.Pi*441*float64(i)/192000)
	}
	dst := make([]float64, len(src))
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		s.Process(dst, src)
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*len(src)), "ns/tick")
	b.ReportMetric(s.Stats().MeanIterations(), "newton/tick")
}
