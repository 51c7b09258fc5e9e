package resample

import (
	"errors"
	"fmt"
	"math"
	"testing"
)

// delayLine is an exact integer delay of d samples, the model of a
// processor with known latency.
type delayLine struct {
	buf []float64 // ring of d samples
	pos int
}

func newDelayLine(d int) *delayLine { return &delayLine{buf: make([]float64, d)} }

func (l *delayLine) Process(dst, src []float64) {
	if len(l.buf) == 0 {
		copy(dst, src)
		return
	}
	for i, v := range src {
		dst[i] = l.buf[l.pos]
		l.buf[l.pos] = v
		l.pos = (l.pos + 1) % len(l.buf)
	}
}

func (l *delayLine) Reset() { clear(l.buf); l.pos = 0 }

// runAligned streams x through a in blocks of size block and flushes into
// pieces of size flushBlock, returning everything it wrote.
func runAligned(a *Aligner, x []float64, block, flushBlock int) []float64 {
	var out []float64
	buf := make([]float64, max(block, flushBlock))
	for lo := 0; lo < len(x); lo += block {
		hi := min(len(x), lo+block)
		n := a.Process(buf, x[lo:hi])
		out = append(out, buf[:n]...)
	}
	for {
		n := a.Flush(buf[:flushBlock])
		if n == 0 {
			break
		}
		out = append(out, buf[:n]...)
	}
	return out
}

func TestAlignerExactDelay(t *testing.T) {
	// Around a pure delay of d samples, the Aligner must return the input
	// itself: same length and bit-equal, for any lengths, block sizes and
	// flush sizes, including streams shorter than the delay.
	for _, d := range []int{0, 1, 5, 144} {
		for _, n := range []int{0, 1, 3, 7, 143, 145, 1001} {
			for _, block := range []int{1, 3, 7, 64, 129} {
				for _, fb := range []int{1, 5, 200} {
					name := fmt.Sprintf("d=%d/n=%d/block=%d/flush=%d", d, n, block, fb)
					a, err := NewAligner(newDelayLine(d), d, 64)
					if err != nil {
						t.Fatal(err)
					}
					x := noise(n, uint64(n+d))
					for pass := 0; pass < 2; pass++ { // second pass after Reset
						if p := a.Pending(); p != 0 {
							t.Fatalf("%s: Pending() = %d before input, want 0", name, p)
						}
						y := runAligned(a, x, block, fb)
						if len(y) != len(x) {
							t.Fatalf("%s pass %d: %d samples out, want %d", name, pass, len(y), len(x))
						}
						for i := range x {
							if y[i] != x[i] {
								t.Fatalf("%s pass %d: sample %d = %g, want %g", name, pass, i, y[i], x[i])
							}
						}
						a.Reset()
					}
				}
			}
		}
	}
}

func TestAlignerOversampler(t *testing.T) {
	// The renderer's use: Oversampler (identity inner) inside an Aligner.
	// Output length must equal input length for odd lengths and blocks, and
	// sample n must match input n to the cascade tolerance from the 0.01 dB
	// ripple bound (see tolCascade), once start-up and tail transients are
	// excluded (2·latency samples at each end).
	const fs, amp, f0 = 44100.0, 0.5, 1000.0
	for _, c := range []struct{ factor, n, block int }{
		{4, 4801, 333}, {2, 999, 17}, {8, 1237, 1000}, {3, 1301, 1},
	} {
		o, err := NewOversampler(c.factor, fs, identity{}, 128)
		if err != nil {
			t.Fatal(err)
		}
		a, err := NewAligner(o, o.Latency(), 128)
		if err != nil {
			t.Fatal(err)
		}
		x := make([]float64, c.n)
		for i := range x {
			x[i] = amp * math.Sin(2*math.Pi*f0*float64(i)/fs)
		}
		y := runAligned(a, x, c.block, 97)
		if len(y) != len(x) {
			t.Fatalf("N=%d n=%d block=%d: %d samples out, want %d", c.factor, c.n, c.block, len(y), len(x))
		}
		lat := o.Latency()
		if len(x) <= 4*lat {
			t.Fatalf("n=%d leaves no steady-state samples to compare", c.n)
		}
		var worst float64
		for i := 2 * lat; i < len(x)-2*lat; i++ {
			worst = math.Max(worst, math.Abs(y[i]-x[i]))
		}
		if worst > tolCascade*amp {
			t.Errorf("N=%d n=%d block=%d: max |y[n] − x[n]| = %.3g > %.3g", c.factor, c.n, c.block, worst, tolCascade*amp)
		}
		t.Logf("N=%d n=%d block=%d: length ok, max aligned error %.2g", c.factor, c.n, c.block, worst)
	}
}

func TestAlignerMisuse(t *testing.T) {
	if _, err := NewAligner(nil, 3, 8); !errors.Is(err, ErrNilInner) {
		t.Errorf("nil processor: %v, want ErrNilInner", err)
	}
	var pe *ParamError
	if _, err := NewAligner(identity{}, -1, 8); !errors.As(err, &pe) || pe.Param != "latency" {
		t.Errorf("negative latency: %v, want *ParamError for latency", err)
	}
	if _, err := NewAligner(identity{}, 1, 0); !errors.As(err, &pe) || pe.Param != "maxBlock" {
		t.Errorf("zero maxBlock: %v, want *ParamError for maxBlock", err)
	}
	if _, err := NewOversampler(4, 48000, nil, 8); !errors.Is(err, ErrNilInner) {
		t.Errorf("NewOversampler nil inner: %v, want ErrNilInner", err)
	}
	if _, err := NewOversampler(4, 48000, identity{}, -2); !errors.As(err, &pe) || pe.Param != "maxBlock" {
		t.Errorf("NewOversampler negative maxBlock: %v, want *ParamError for maxBlock", err)
	}
	a, _ := NewAligner(identity{}, 2, 8)
	a.Flush(make([]float64, 2))
	defer func() {
		if r := recover(); r != "resample: Aligner.Process: called after Flush without Reset" {
			t.Errorf("Process after Flush: panic %v", r)
		}
	}()
	a.Process(make([]float64, 4), make([]float64, 4))
}
