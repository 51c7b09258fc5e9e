package mna

import (
	"math"

	"renderchain/models"
)

// AC computes the small-signal response of the circuit linearised at op:
// each nonlinear device is replaced by its port conductance matrix (the
// Jacobian at the operating point), capacitors by jωC, inductors by jωL,
// every DC source by a short and the signal source by a 1 V phasor. It
// returns, for each frequency in Hz, the complex voltage at each probe node
// (a transfer function from the signal source in V/V).
func AC(op *models.Circuit, dc *OperatingPoint, freqs []float64, probes []int) ([][]complex128, error) {
	c := op
	lay := NewLayout(c, true)
	n := lay.Dim
	out := make([][]complex128, len(freqs))
	a := make([]complex128, n*n)
	z := make([]complex128, n)
	add := func(r, col int, v complex128) {
		if r >= 0 && col >= 0 {
			a[r*n+col] += v
		}
	}
	adm := func(p, m int, y complex128) {
		rp, rm := lay.Row(p), lay.Row(m)
		add(rp, rp, y)
		add(rm, rm, y)
		add(rp, rm, -y)
		add(rm, rp, -y)
	}
	for fi, f := range freqs {
		clear(a)
		clear(z)
		w := 2 * math.Pi * f
		for i, e := range c.Elements {
			switch e.Kind {
			case models.ResistorKind:
				adm(e.Nodes[0], e.Nodes[1], complex(1/e.Value, 0))
			case models.CapacitorKind:
				adm(e.Nodes[0], e.Nodes[1], complex(0, w*e.Value))
			case models.InductorKind, models.VoltageSourceKind:
				k := lay.BranchRow(i)
				rp, rm := lay.Row(e.Nodes[0]), lay.Row(e.Nodes[1])
				add(rp, k, 1)
				add(rm, k, -1)
				add(k, rp, 1)
				add(k, rm, -1)
				if e.Kind == models.InductorKind {
					add(k, k, complex(0, -w*e.Value))
				} else if e.Signal {
					z[k] = 1
				}
			case models.BufferKind:
				k := lay.BranchRow(i)
				ro, ri := lay.Row(e.Nodes[0]), lay.Row(e.Nodes[1])
				add(ro, k, 1)
				add(k, ro, 1)
				add(k, ri, -1)
			}
		}
		for _, d := range dc.Devices {
			p := len(d.Ports)
			for x := 0; x < p; x++ {
				for y := 0; y < p; y++ {
					g := complex(d.Jac[x*p+y], 0)
					op, om := lay.Row(d.Ports[x].Plus), lay.Row(d.Ports[x].Minus)
					cp, cm := lay.Row(d.Ports[y].Plus), lay.Row(d.Ports[y].Minus)
					add(op, cp, g)
					add(op, cm, -g)
					add(om, cp, -g)
					add(om, cm, g)
				}
			}
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
