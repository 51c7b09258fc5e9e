package spectrum

import (
	"errors"
	"math"
	"testing"
)

// Analyze must return a result or an *Error for any parameters and
// record, never panic. Fuzz with: go test -fuzz FuzzAnalyze.
func FuzzAnalyze(f *testing.F) {
	f.Add(uint16(4800), 48000.0, 1000.0, 10, 0, 0.3)
	f.Add(uint16(3), 48000.0, 23999.0, 0, 2, 0.0)
	f.Add(uint16(2049), 8000.0, 3.9, 200, 2, 1e300)
	f.Add(uint16(1000), 44100.0, 44.1, 1, 1, -2.5)
	f.Add(uint16(257), 1.0, 0.49, 5, 0, 1.0)
	f.Fuzz(func(t *testing.T, n uint16, fs, f0 float64, maxOrder, method int, mix float64) {
		x := make([]float64, n)
		for i := range x {
			x[i] = math.Sin(float64(i)*0.37) + mix*math.Cos(float64(i*i%97))
		}
		a, err := Analyze(x, fs, f0, &Options{MaxOrder: maxOrder, Method: Method(method)})
		if err != nil {
			var e *Error
			if !errors.As(err, &e) {
				t.Fatalf("error %v is not *Error", err)
			}
			return
		}
		if a.Fundamental.Amplitude < 0 || len(a.Harmonics) > max(maxOrder, DefaultMaxOrder) {
			t.Fatalf("bad result %+v", a)
		}
	})
}
