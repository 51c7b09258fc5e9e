package mna

import (
	"math"

	"renderchain/models"
)

// AC computes the small-signal response of the circuit linearised at op
// (Linearize): each nonlinear device is replaced by its port conductance
// matrix (the Jacobian at the operating point) and, if it stores charge,
// its capacitance matrix there; capacitors by jωC, inductors by jωL,
// every DC source by a short and the signal source by a 1 V phasor. It
// returns, for each frequency in Hz, the complex voltage at each probe
// node (a transfer function from the signal source in V/V).
func AC(c *models.Circuit, dc *OperatingPoint, freqs []float64, probes []int) ([][]complex128, error) {
	ss := Linearize(c, dc)
	n := ss.Layout.Dim
	out := make([][]complex128, len(freqs))
	var a []complex128
	z := make([]complex128, n)
	for fi, f := range freqs {
		a = ss.At(2*math.Pi*f, a)
		for i, b := range ss.B {
			z[i] = complex(b, 0)
		}
		if err := solveComplex(n, a, z); err != nil {
			return nil, &models.CircuitError{What: "circuit", Reason: "small-signal equations are singular"}
		}
		row := make([]complex128, len(probes))
		for k, p := range probes {
			if p != models.Ground {
				row[k] = z[p-1]
			}
		}
		out[fi] = row
	}
	return out, nil
}
