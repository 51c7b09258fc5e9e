package spectrum

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/dsp/fourier"
)

// naiveDFT is the O(N²) definition X_k = Σ x_n·exp(−2πi·k·n/N), with the
// angle reduced exactly through k·n mod N.
func naiveDFT(x []float64) []complex128 {
	n := len(x)
	out := make([]complex128, n/2+1)
	for k := range out {
		var s complex128
		for t, v := range x {
			q := (k * t) % n
			s += complex(v, 0) * cmplx.Rect(1, -2*math.Pi*float64(q)/float64(n))
		}
		out[k] = s
	}
	return out
}

// realDFT (direct or Bluestein) against the DFT definition and against
// gonum's FFT of the same length.
func TestRealDFT(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for _, n := range []int{1, 2, 3, 16, 262, 1009, 1024, 4099} {
		x := make([]float64, n)
		var l1 float64
		for i := range x {
			x[i] = rng.NormFloat64()
			l1 += math.Abs(x[i])
		}
		d := newRealDFT(n)
		got := d.transform(make([]complex128, n/2+1), x)
		ref := naiveDFT(x)
		gon := fourier.NewFFT(n).Coefficients(nil, x)
		// |X_k| ≤ Σ|x|. Against the exactly reduced definition, the
		// power-of-two or small-radix passes round at O(ε·log N) of that
		// bound: 1e-13·Σ|x|. gonum's own generic pass for a large prime
		// factor rounds at O(ε·N) (measured 5e-12·Σ|x| at N = 4099):
		// 1e-11·Σ|x| against it.
		var devRef, devGonum float64
		for k := range got {
			devRef = max(devRef, cmplx.Abs(got[k]-ref[k]))
			devGonum = max(devGonum, cmplx.Abs(got[k]-gon[k]))
		}
		if devRef > 1e-13*l1 || devGonum > 1e-11*l1 {
			t.Errorf("N=%d (Bluestein %v): deviation %.3g from definition, %.3g from gonum (Σ|x| = %.3g)",
				n, d.direct == nil, devRef, devGonum, l1)
		}
		t.Logf("N=%d Bluestein=%v deviation/Σ|x|: definition %.2g, gonum %.2g", n, d.direct == nil, devRef/l1, devGonum/l1)
	}
}
