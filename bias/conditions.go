package bias

import (
	"context"

	"renderchain/chains"
)

// Sweep solves the chain's operating point at every combination of the
// given supplies and temperatures (kelvin; read them with
// models.ParseSupplies, which keeps the chain file's polarity, and
// models.ParseTemperatures); an empty list stands for the chain's own
// value. Rows come supply-major in the order given.
func Sweep(ch *chains.Chain, supplies, temps []float64) ([]*Bias, error) {
	return SweepContext(context.Background(), ch, supplies, temps)
}

// SweepContext is Sweep that stops when ctx is done, between rows and
// inside each row's DC solve.
func SweepContext(ctx context.Context, ch *chains.Chain, supplies, temps []float64) ([]*Bias, error) {
	if len(supplies) == 0 {
		supplies = []float64{ch.Supply}
	}
	if len(temps) == 0 {
		temps = []float64{ch.Temperature}
	}
	var rows []*Bias
	work := ch.Clone()
	for _, v := range supplies {
		for _, t := range temps {
			work.Supply, work.Temperature = v, t
			b, err := SolveContext(ctx, work)
			if err != nil {
				return nil, err
			}
			rows = append(rows, b)
		}
	}
	return rows, nil
}
