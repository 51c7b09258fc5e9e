package engine

import (
	"context"
)

// Render runs a finite signal x (source volts) followed by tail samples of
// silence through a channel watching node at base rate fs, and returns the
// node's voltage over the same len(x)+tail samples, the filters' delay
// removed, with the solver's statistics.
func (p *Prepared) Render(ctx context.Context, fs float64, node int, x []float64, tail int) ([]float64, *Channel, error) {
	ch, err := p.Channel(fs, node)
	if err != nil {
		return nil, nil, err
	}
	n := len(x) + tail
	y := make([]float64, n)
	src := make([]float64, MaxBlock)
	got := 0
	for pos := 0; pos < n; pos += len(src) {
		if err := ctx.Err(); err != nil {
			return nil, nil, err
		}
		k := min(len(src), n-pos)
		for i := 0; i < k; i++ {
			src[i] = 0
			if pos+i < len(x) {
				src[i] = x[pos+i] / p.Chain.InputPeak
			}
		}
		got += ch.Process(y[got:], src[:k])
	}
	for got < n {
		k := ch.Flush(y[got:])
		if k == 0 {
			break
		}
		got += k
	}
	for i := range y {
		y[i] *= ch.VoltsPerUnit()
	}
	return y, ch, nil
}
