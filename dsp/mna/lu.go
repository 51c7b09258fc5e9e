package mna

import (
	"errors"
	"fmt"
	"math"
)

// ErrSingular reports a matrix that cannot be factored: the circuit has a
// node or loop whose voltage or current is not determined.
var ErrSingular = errors.New("singular system")

// SingularError is the ErrSingular of a factorisation that stopped at a
// column: Column is the unknown (in Layout order) that the equations
// before it leave undetermined, so that a caller can name the node or
// branch concerned (Layout.Unknown). It unwraps to ErrSingular.
type SingularError struct{ Column int }

func (e *SingularError) Error() string { return fmt.Sprintf("singular system at unknown %d", e.Column) }

// Unwrap returns ErrSingular.
func (e *SingularError) Unwrap() error { return ErrSingular }

// LU is a dense LU factorisation with partial pivoting (Golub & Van Loan,
// "Matrix Computations", 4th ed., alg. 3.4.1) over preallocated storage, so
// that repeated Factor/Solve calls in a Newton loop do not allocate.
type LU struct {
	n   int
	a   []float64 // row-major n×n, overwritten by L and U
	piv []int
}

// NewLU returns storage for n×n factorisations.
func NewLU(n int) *LU { return &LU{n: n, a: make([]float64, n*n), piv: make([]int, n)} }

// Factor copies the row-major n×n matrix m and factors it. A matrix it
// cannot factor gives a *SingularError (errors.Is ErrSingular) naming the
// column where elimination stopped.
func (f *LU) Factor(m []float64) error {
	n := f.n
	a := f.a
	copy(a, m[:n*n])
	scale := 0.0
	for _, v := range a {
		scale = math.Max(scale, math.Abs(v))
	}
	if scale == 0 || math.IsNaN(scale) || math.IsInf(scale, 0) {
		if n == 0 {
			return nil
		}
		return &SingularError{Column: 0}
	}
	tiny := scale * 1e-15
	for k := 0; k < n; k++ {
		p, pv := k, math.Abs(a[k*n+k])
		for i := k + 1; i < n; i++ {
			if v := math.Abs(a[i*n+k]); v > pv {
				p, pv = i, v
			}
		}
		if pv <= tiny {
			return &SingularError{Column: k}
		}
		f.piv[k] = p
		if p != k {
			rk, rp := a[k*n:k*n+n], a[p*n:p*n+n]
			for j := range rk {
				rk[j], rp[j] = rp[j], rk[j]
			}
		}
		d := 1 / a[k*n+k]
		for i := k + 1; i < n; i++ {
			l := a[i*n+k] * d
			if l == 0 {
				continue
			}
			a[i*n+k] = l
			ri, rk := a[i*n:i*n+n], a[k*n:k*n+n]
			for j := k + 1; j < n; j++ {
				ri[j] -= l * rk[j]
			}
		}
	}
	return nil
}

// Solve overwrites b with the solution of A·x = b for the factored A.
func (f *LU) Solve(b []float64) {
	n, a := f.n, f.a
	for k := 0; k < n; k++ {
		if p := f.piv[k]; p != k {
			b[k], b[p] = b[p], b[k]
		}
	}
	for i := 1; i < n; i++ {
		s := b[i]
		for j := 0; j < i; j++ {
			s -= a[i*n+j] * b[j]
		}
		b[i] = s
	}
	for i := n - 1; i >= 0; i-- {
		s := b[i]
		for j := i + 1; j < n; j++ {
			s -= a[i*n+j] * b[j]
		}
		b[i] = s / a[i*n+i]
	}
}

// solveComplex solves the dense complex system A·x = b (row-major) in place
// by Gaussian elimination with partial pivoting; A is destroyed.
func solveComplex(n int, a, b []complex128) error {
	for k := 0; k < n; k++ {
		p, pv := k, cabs(a[k*n+k])
		for i := k + 1; i < n; i++ {
			if v := cabs(a[i*n+k]); v > pv {
				p, pv = i, v
			}
		}
		if pv == 0 {
			return &SingularError{Column: k}
		}
		if p != k {
			for j := 0; j < n; j++ {
				a[k*n+j], a[p*n+j] = a[p*n+j], a[k*n+j]
			}
			b[k], b[p] = b[p], b[k]
		}
		d := 1 / a[k*n+k]
		for i := k + 1; i < n; i++ {
			l := a[i*n+k] * d
			if l == 0 {
				continue
			}
			for j := k + 1; j < n; j++ {
				a[i*n+j] -= l * a[k*n+j]
			}
			b[i] -= l * b[k]
		}
	}
	for i := n - 1; i >= 0; i-- {
		s := b[i]
		for j := i + 1; j < n; j++ {
			s -= a[i*n+j] * b[j]
		}
		b[i] = s / a[i*n+i]
	}
	return nil
}

func cabs(z complex128) float64 { return math.Hypot(real(z), imag(z)) }
