package spectrum

import "math"

// CrestMeter accumulates the peak magnitude and RMS of a stream in
// constant memory. The zero value is ready to use.
type CrestMeter struct {
	peak      float64
	sum, comp float64 // Neumaier-compensated Σx²
	n         int64
}

// Write adds the samples of x. A chunk holding a NaN or infinite sample
// is rejected whole with an *Error. Write does not allocate.
func (c *CrestMeter) Write(x []float64) error {
	if i := checkFinite(x); i >= 0 {
		return sampleError("CrestMeter.Write", x, i)
	}
	c.add(x)
	return nil
}

func (c *CrestMeter) add(x []float64) {
	peak, sum, comp := c.peak, c.sum, c.comp
	for _, v := range x {
		if a := math.Abs(v); a > peak {
			peak = a
		}
		p := v * v
		t := sum + p
		if sum >= p {
			comp += (sum - t) + p
		} else {
			comp += (p - t) + sum
		}
		sum = t
	}
	c.peak, c.sum, c.comp = peak, sum, comp
	c.n += int64(len(x))
}

// Peak returns the largest sample magnitude written so far.
func (c *CrestMeter) Peak() float64 { return c.peak }

// RMS returns the RMS of all samples written so far (0 before any).
func (c *CrestMeter) RMS() float64 {
	if c.n == 0 {
		return 0
	}
	return math.Sqrt((c.sum + c.comp) / float64(c.n))
}

// CrestFactor returns 20·log10(peak/RMS) in dB: 3.01 dB for a sine,
// 0 dB for a square wave. It is NaN while the RMS is zero.
func (c *CrestMeter) CrestFactor() float64 {
	r := c.RMS()
	if r == 0 {
		return math.NaN()
	}
	return DB(c.peak / r)
}

// Reset discards everything written.
func (c *CrestMeter) Reset() { *c = CrestMeter{} }
