package wdf

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

// matVec writes dst[r] = Σ_c m[r·n+c]·x[c], n = len(x), for every row r of
// dst (m row-major, at least len(dst)·n long).
func matVec(dst, m, x []float64) {
	n := len(x)
	m = m[:len(dst)*n]
	for r := range dst {
		dst[r] = dot(m[r*n:r*n+n], x)
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
