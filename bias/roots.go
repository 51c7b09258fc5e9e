package bias

import "math"

// brentRoot finds a zero of f in [a, b], where fa = f(a) and fb = f(b)
// have opposite signs, to within tol in x, by Brent's method: inverse
// quadratic interpolation and secant steps safeguarded by bisection
// (R. P. Brent, "Algorithms for Minimization without Derivatives",
// Prentice-Hall 1973, ch. 4; the loop follows the zeroin formulation of
// Forsythe, Malcolm & Moler, "Computer Methods for Mathematical
// Computations", 1977, sec. 7.2). It returns the point, f there and the
// number of evaluations. A NaN from f stops the search.
func brentRoot(f func(float64) float64, a, b, fa, fb, tol float64, maxEval int) (x, fx float64, evals int) {
	const eps = 0x1p-52
	c, fc := b, fb
	var d, e float64
	for evals < maxEval {
		if (fb > 0 && fc > 0) || (fb < 0 && fc < 0) {
			c, fc = a, fa
			d = b - a
			e = d
		}
		if math.Abs(fc) < math.Abs(fb) {
			a, b, c = b, c, b
			fa, fb, fc = fb, fc, fb
		}
		tol1 := 2*eps*math.Abs(b) + 0.5*tol
		xm := 0.5 * (c - b)
		if math.Abs(xm) <= tol1 || fb == 0 {
			return b, fb, evals
		}
		if math.Abs(e) >= tol1 && math.Abs(fa) > math.Abs(fb) {
			s := fb / fa
			var p, q float64
			if a == c {
				p = 2 * xm * s
				q = 1 - s
			} else {
				q = fa / fc
				r := fb / fc
				p = s * (2*xm*q*(q-r) - (b-a)*(r-1))
				q = (q - 1) * (r - 1) * (s - 1)
			}
			if p > 0 {
				q = -q
			}
			p = math.Abs(p)
			if 2*p < math.Min(3*xm*q-math.Abs(tol1*q), math.Abs(e*q)) {
				e = d
				d = p / q
			} else {
				d = xm
				e = d
			}
		} else {
			d = xm
			e = d
		}
		a, fa = b, fb
		if math.Abs(d) > tol1 {
			b += d
		} else {
			b += math.Copysign(tol1, xm)
		}
		fb = f(b)
		evals++
		if math.IsNaN(fb) {
			return b, fb, evals
		}
	}
	return b, fb, evals
}

// goldenMin finds a minimum of g on [a, b] by golden-section search
// (Kiefer 1953; Brent 1973, ch. 5), n evaluations.
func goldenMin(g func(float64) float64, a, b float64, n int) (x, gx float64) {
	const r = 0.6180339887498949 // (√5 − 1)/2
	x1, x2 := b-r*(b-a), a+r*(b-a)
	g1, g2 := g(x1), g(x2)
	for i := 0; i < n; i++ {
		if g1 <= g2 || math.IsNaN(g2) {
			b, x2, g2 = x2, x1, g1
			x1 = b - r*(b-a)
			g1 = g(x1)
		} else {
			a, x1, g1 = x1, x2, g2
			x2 = a + r*(b-a)
			g2 = g(x2)
		}
	}
	if g1 <= g2 {
		return x1, g1
	}
	return x2, g2
}
