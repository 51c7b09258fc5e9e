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
