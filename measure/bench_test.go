package measure

import (
	"context"
	"testing"
)

// One 1 kHz measurement through the RC low-pass at 48 kHz × 4.
func BenchmarkSineRC(b *testing.B) {
	ch := loadChain(b, "rc-lowpass")
	for i := 0; i < b.N; i++ {
		if _, err := Sine(context.Background(), ch, 1000, 0.5, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}

// One 20 mVpp measurement through the silicon fuzz template at full fuzz.
func BenchmarkSineFuzz(b *testing.B) {
	ch := loadChain(b, "fuzz-si")
	if err := ch.Set("fuzz.fuzz=1"); err != nil {
		b.Fatal(err)
	}
	for i := 0; i < b.N; i++ {
		if _, err := Sine(context.Background(), ch, 1000, 0.01, Options{}); err != nil {
			b.Fatal(err)
		}
	}
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

// A 2 s swept-sine measurement of the RC low-pass, H1–H3.
func BenchmarkSwept(b *testing.B) {
	ch := loadChain(b, "rc-lowpass")
	freqs := LogGrid(20, 20000, 61)
	for i := 0; i < b.N; i++ {
		if _, _, err := Swept(context.Background(), ch, freqs, SweptOptions{Amplitude: 0.1}); err != nil {
			b.Fatal(err)
		}
	}
}
