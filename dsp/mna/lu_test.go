package mna_test

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"

	"renderchain/dsp/mna"
)

// TestLUAgainstGonum: LU.Factor/Solve against gonum's dense solver
// (mat.Dense.Solve, LAPACK-style LU with partial pivoting) on seeded
// random systems, some nearly as badly scaled as an MNA matrix (entries
// from 1e-9 to 1e3). Tolerance 1e-10 relative in the max norm, scaled by
// the 1-norm condition estimate ×1e-15 where larger: both solvers are
// backward stable, so their solutions differ by about cond·eps.
func TestLUAgainstGonum(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for trial := 0; trial < 40; trial++ {
		n := 1 + trial%12
		a := make([]float64, n*n)
		b := make([]float64, n)
		for i := range a {
			a[i] = rng.NormFloat64() * math.Pow(10, float64(rng.IntN(12))-9)
		}
		for i := 0; i < n; i++ {
			a[i*n+i] += float64(n) * math.Pow(10, float64(rng.IntN(6))-3)
			b[i] = rng.NormFloat64()
		}
		lu := mna.NewLU(n)
		if err := lu.Factor(a); err != nil {
			t.Fatalf("trial %d: Factor: %v", trial, err)
		}
		x := append([]float64(nil), b...)
		lu.Solve(x)

		A := mat.NewDense(n, n, append([]float64(nil), a...))
		var X mat.VecDense
		if err := X.SolveVec(A, mat.NewVecDense(n, append([]float64(nil), b...))); err != nil {
			t.Fatalf("trial %d: gonum: %v", trial, err)
		}
		var glu mat.LU
		glu.Factorize(A)
		tol := math.Max(1e-10, glu.Cond()*1e-15)
		scale, diff := 0.0, 0.0
		for i := 0; i < n; i++ {
			scale = math.Max(scale, math.Abs(X.AtVec(i)))
			diff = math.Max(diff, math.Abs(x[i]-X.AtVec(i)))
		}
		if diff > tol*scale {
			t.Errorf("trial %d (n=%d, cond %.3g): max |x − x_gonum| = %.3g of %.3g", trial, n, glu.Cond(), diff, scale)
		}
	}
}

// TestLUSingular: a matrix with a zero row, a rank-deficient one, the zero
// matrix and one holding NaN all give ErrSingular.
func TestLUSingular(t *testing.T) {
	cases := []struct {
		name string
		a    []float64
	}{
		{"zero row", []float64{1, 2, 0, 0}},
		{"rank one", []float64{1, 2, 2, 4}},
		{"zero", []float64{0, 0, 0, 0}},
		{"NaN", []float64{1, math.NaN(), 0, 1}},
	}
	for _, c := range cases {
		if err := mna.NewLU(2).Factor(c.a); !errors.Is(err, mna.ErrSingular) {
			t.Errorf("%s: Factor = %v, want ErrSingular", c.name, err)
		}
	}
}

// TestLUAllocs: Factor and Solve work in preallocated storage
// (documented), so a Newton loop does not allocate.
func TestLUAllocs(t *testing.T) {
	const n = 8
	a := make([]float64, n*n)
	b := make([]float64, n)
	for i := 0; i < n; i++ {
		a[i*n+i] = 2
		if i > 0 {
			a[i*n+i-1] = -1
		}
		b[i] = 1
	}
	lu := mna.NewLU(n)
	if allocs := testing.AllocsPerRun(100, func() {
		if err := lu.Factor(a); err != nil {
			t.Fatal(err)
		}
		lu.Solve(b)
	}); allocs != 0 {
		t.Errorf("%v allocations per Factor+Solve", allocs)
	}
}
