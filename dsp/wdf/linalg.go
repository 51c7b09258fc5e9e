package wdf

import (
	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/gonum"
)

// dot returns Σ a[i]·b[i] over len(a) (len(b) ≥ len(a)), four lanes at a
// time; written so that the compiler proves every index in range.
func dot(a, b []float64) float64 {
	var s0, s1, s2, s3 float64
	for len(a) >= 4 && len(b) >= 4 {
		s0 += a[0] * b[0]
		s1 += a[1] * b[1]
		s2 += a[2] * b[2]
		s3 += a[3] * b[3]
		a, b = a[4:], b[4:]
	}
	b = b[:len(a)]
	for i, x := range a {
		s0 += x * b[i]
	}
	return (s0 + s1) + (s2 + s3)
}

// matVec writes dst = m·x for the row-major len(dst)×len(x) matrix m.
// From gemvMin entries on it calls gonum's matrix-vector product (assembly
// kernels on amd64; β = 0 clears dst first, so its old contents never
// matter); below, where that call's checks cost more than they save, a
// loop over four rows at a time. Both sum each row in column order, but
// not with the same grouping, so they differ in rounding.
func matVec(dst, m, x []float64) {
	if len(dst)*len(x) < gemvMin {
		matVecLoop(dst, m, x)
		return
	}
	gonum.Implementation{}.Dgemv(blas.NoTrans, len(dst), len(x), 1, m, len(x), x, 1, 0, dst, 1)
}

// gemvMin is the matrix size (entries) from which matVec calls gonum:
// measured in instruction counts, the call costs about 70 instructions
// more and each entry about 2 less than the loop, a crossover near 35.
const gemvMin = 36

// matVecLoop is matVec in Go: four rows at a time share each load of x.
func matVecLoop(dst, m, x []float64) {
	n := len(x)
	m = m[:len(dst)*n]
	r := 0
	for ; r+4 <= len(dst); r += 4 {
		m0 := m[r*n : r*n+n]
		m1 := m[(r+1)*n : (r+1)*n+n]
		m2 := m[(r+2)*n : (r+2)*n+n]
		m3 := m[(r+3)*n : (r+3)*n+n]
		m0, m1, m2, m3 = m0[:len(x)], m1[:len(x)], m2[:len(x)], m3[:len(x)]
		var s0, s1, s2, s3 float64
		for j, xj := range x {
			s0 += m0[j] * xj
			s1 += m1[j] * xj
			s2 += m2[j] * xj
			s3 += m3[j] * xj
		}
		d := dst[r : r+4 : r+4]
		d[0], d[1], d[2], d[3] = s0, s1, s2, s3
	}
	for ; r < len(dst); r++ {
		mr := m[r*n : r*n+n]
		mr = mr[:len(x)]
		s := 0.0
		for j, xj := range x {
			s += mr[j] * xj
		}
		dst[r] = s
	}
}

// copyVec is copy for the solver's short vectors: a plain loop, cheaper
// than the runtime's memmove for a handful of elements.
func copyVec(dst, src []float64) {
	src = src[:len(dst)]
	for i, x := range src {
		dst[i] = x
	}
}
