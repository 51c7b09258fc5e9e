package mna

import (
	"math/cmplx"

	"renderchain/models"
)

// Mode returns the shape of the natural mode of pole s of circuit c
// linearised at op: a vector x ≠ 0 with (G + s·C)·x = 0 (the pencil of
// Linearize, unknowns in its Layout: node voltages, then branch currents),
// scaled so its largest entry is 1. It tells which nodes an oscillation
// or a latch moves, and by how much relative to each other.
//
// It is found by inverse iteration with the shift σ = s·(1 + 1e-9):
// x ← (G + σ·C)⁻¹·C·x multiplies the component along the mode of s by
// 1/(σ − s) and every other mode's by 1/(σ − s_k), so four steps from a
// vector of ones leave the others ~1e-9⁴ times smaller (Golub & Van Loan,
// "Matrix Computations", 4th ed., 2013, sec. 7.6.1). s should come from
// Poles.
func Mode(c *models.Circuit, op *OperatingPoint, s complex128) ([]complex128, error) {
	ss := Linearize(c, op)
	n := ss.Layout.Dim
	sigma := s * complex(1+1e-9, 0)
	x := make([]complex128, n)
	for i := range x {
		x[i] = 1
	}
	a := make([]complex128, n*n)
	b := make([]complex128, n)
	for step := 0; step < 4; step++ {
		for i := range a {
			a[i] = complex(ss.G[i], 0) + sigma*complex(ss.C[i], 0)
		}
		for i := 0; i < n; i++ {
			var v complex128
			for j := 0; j < n; j++ {
				v += complex(ss.C[i*n+j], 0) * x[j]
			}
			b[i] = v
		}
		if err := solveComplex(n, a, b); err != nil {
			return nil, &models.CircuitError{What: "circuit", Reason: "the mode of a pole could not be found: " + err.Error()}
		}
		copy(x, b)
		normalise(x)
	}
	return x, nil
}

// normalise scales x so that its entry of largest magnitude is 1.
func normalise(x []complex128) {
	var big complex128
	for _, v := range x {
		if cmplx.Abs(v) > cmplx.Abs(big) {
			big = v
		}
	}
	if big == 0 {
		return
	}
	for i := range x {
		x[i] /= big
	}
}
