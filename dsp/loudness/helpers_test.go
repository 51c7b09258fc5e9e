package loudness

import (
	"math"
	"testing"
)

// segment is a stretch of steady sine at a peak level in dBFS.
type segment struct {
	dBFS    float64
	seconds float64
}

// sineTable returns one exact period of sin(2π·f·n/fs), n = 0..P-1, where P
// is the smallest number of samples holding a whole number of cycles
// (P ≤ 10 s). Reading the table modulo P keeps the phase exact over any
// duration and costs a load per sample instead of a math.Sin call.
func sineTable(t testing.TB, fs, f float64) []float64 {
	t.Helper()
	for p := 1; p <= int(10*fs); p++ {
		cycles := float64(p) * f / fs
		if math.Abs(cycles-math.Round(cycles)) < 1e-9 {
			tab := make([]float64, p)
			for n := range tab {
				tab[n] = math.Sin(2 * math.Pi * math.Mod(float64(n)*f, fs) / fs)
			}
			return tab
		}
	}
	t.Fatalf("no whole-cycle period for %g Hz at %g Hz", f, fs)
	return nil
}

// writeSegments writes a phase-continuous sine of frequency f to every one
// of m's channels, the level changing at segment boundaries, in chunks of
// 100 ms.
func writeSegments(t testing.TB, m *Meter, f float64, segs []segment) {
	t.Helper()
	fs, nch := m.fs, len(m.ch)
	tab := sineTable(t, fs, f)
	chunk := int(fs / 10)
	buf := make([]float64, chunk*nch)
	n := 0 // global sample index, keeps the phase continuous
	for _, s := range segs {
		a := math.Pow(10, s.dBFS/20)
		left := int(math.Round(s.seconds * fs))
		for left > 0 {
			k := min(left, chunk)
			for i := range k {
				v := a * tab[n%len(tab)]
				n++
				for c := range nch {
					buf[i*nch+c] = v
				}
			}
			m.Write(buf[:k*nch])
			left -= k
		}
	}
}

// response returns the magnitude of a biquad at frequency f, in dB.
func response(c biquad, f, fs float64) float64 {
	w := 2 * math.Pi * f / fs
	c1, s1 := math.Cos(w), math.Sin(w)
	c2, s2 := math.Cos(2*w), math.Sin(2*w)
	nr, ni := c.b0+c.b1*c1+c.b2*c2, -c.b1*s1-c.b2*s2
	dr, di := 1+c.a1*c1+c.a2*c2, -c.a1*s1-c.a2*s2
	return 10 * math.Log10((nr*nr+ni*ni)/(dr*dr+di*di))
}

// kResponse is the K-weighting magnitude (both stages) at f, in dB.
func kResponse(fs, f float64) float64 {
	pre, rlb := kWeighting(fs)
	return response(pre, f, fs) + response(rlb, f, fs)
}

func newTestMeter(t testing.TB, fs float64, channels int) *Meter {
	t.Helper()
	m, err := NewMeter(fs, channels)
	if err != nil {
		t.Fatal(err)
	}
	return m
}
