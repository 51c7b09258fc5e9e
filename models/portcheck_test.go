package models_test

import (
	"math"
	"testing"
)

// portFunc evaluates a P-port function at v into out (len P) and its
// matrix of derivatives d (row-major P×P): Eval (currents, Jacobian) or
// Charges (charges, capacitance matrix).
type portFunc func(v, out, d []float64)

// checkDerivatives compares d of f at v with central differences of step
// h on each port voltage and returns the worst error, scaled per row by
//
//	Σ_j |d_ij| + (|out_i| + floor)/vscale,
//
// the size of the terms the row is made of: an exponential term of scale
// vscale contributes its value/vscale to the derivative, constant terms
// (floor: a saturation current, a charge offset) to the value only. With
// h = 1e-5·vscale the truncation error of the central difference is
// ≈ (h/vscale)²/6 ≈ 2e-11 of the row scale, and rounding ≈ eps·|x/vscale|·
// vscale/h ≤ 3e-9 for exponents up to 120; callers use 1e-7 of the scale.
func checkDerivatives(t *testing.T, name string, p int, f portFunc, v []float64, vscale, floor float64) float64 {
	t.Helper()
	h := 1e-5 * vscale
	out := make([]float64, p)
	d := make([]float64, p*p)
	f(v, out, d)
	o1, o2, dd := make([]float64, p), make([]float64, p), make([]float64, p*p)
	worst := 0.0
	for c := 0; c < p; c++ {
		vp := append([]float64(nil), v...)
		vm := append([]float64(nil), v...)
		xp := v[c] + h
		hh := xp - v[c]
		vp[c], vm[c] = v[c]+hh, v[c]-hh
		f(vp, o1, dd)
		f(vm, o2, dd)
		for r := 0; r < p; r++ {
			fd := (o1[r] - o2[r]) / (2 * hh)
			scale := (math.Abs(out[r]) + floor) / vscale
			for k := 0; k < p; k++ {
				scale += math.Abs(d[r*p+k])
			}
			if scale == 0 {
				scale = 1e-30
			}
			e := math.Abs(fd-d[r*p+c]) / scale
			if e > 1e-7 {
				t.Errorf("%s at %v: d[%d][%d] = %.10g, central difference %.10g (scaled err %.2g > 1e-7)", name, v, r, c, d[r*p+c], fd, e)
			}
			worst = math.Max(worst, e)
		}
	}
	return worst
}
