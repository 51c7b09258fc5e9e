package mna

import (
	"cmp"
	"math"
	"math/cmplx"
	"slices"

	"gonum.org/v1/gonum/mat"

	"renderchain/models"
)

// Stability is the outcome of a pole analysis of a circuit linearised at
// its operating point.
type Stability struct {
	// Poles are the finite natural frequencies s (rad/s) of the linearised
	// circuit below MaxPoleHz, sorted by decreasing real part (the least
	// damped first); of a complex pair only the one with Im s ≥ 0 is kept.
	Poles []complex128
	// Unstable are the poles with a positive real part (see Unstable).
	Unstable []complex128
}

// MaxPoleHz bounds the poles a stability analysis reports, Hz. Natural
// frequencies far above the audio band (junction capacitances against
// small resistances, stray nodes) belong to the parasitics the models
// leave out; above this bound they are not reported, and the numerical
// zero eigenvalues of the algebraic (capacitor-free) unknowns, which would
// map to |s| near the reciprocal of rounding, are kept out with them.
const MaxPoleHz = 100e6

// PoleHz returns the frequency |Im s|/2π of a pole, Hz.
func PoleHz(s complex128) float64 { return math.Abs(imag(s)) / (2 * math.Pi) }

// PoleTimeConstant returns −1/Re s, seconds: the time for a stable pole's
// transient to decay by 1/e (negative for a growing one).
func PoleTimeConstant(s complex128) float64 { return -1 / real(s) }

// unstableMargin is how far right of the imaginary axis a pole must lie to
// count as unstable, relative to its magnitude, or absolutely (rad/s):
// rounding in the eigenvalue solve moves a pole by about 1e-12·|s|, and a
// growth slower than 1e-3 s⁻¹ (a time constant beyond a quarter of an hour)
// is no oscillation anyone hears.
const (
	unstableMarginRel = 1e-7
	unstableMarginAbs = 1e-3
)

// Unstable reports whether pole s grows: Re s beyond the rounding margin.
func Unstable(s complex128) bool {
	return real(s) > unstableMarginAbs && real(s) > unstableMarginRel*cmplx.Abs(s)
}

// Poles finds the natural frequencies of circuit c linearised at its
// operating point op: the finite generalised eigenvalues of the pencil
// (G, C) of Linearize, G·x = −s·C·x. G is the DC system and is regular
// wherever a DC operating point exists, so they are s = −1/μ for the
// nonzero eigenvalues μ of G⁻¹·C (a shift-and-invert form of the pencil;
// Golub & Van Loan, "Matrix Computations", 4th ed., 2013, sec. 7.7), found
// with gonum's dense nonsymmetric eigensolver (LAPACK's Hessenberg QR).
func Poles(c *models.Circuit, op *OperatingPoint) (*Stability, error) {
	ss := Linearize(c, op)
	n, g, cm := ss.Layout.Dim, append([]float64(nil), ss.G...), ss.C
	lu := NewLU(n)
	if err := lu.Factor(g); err != nil {
		return nil, &models.CircuitError{What: "circuit", Reason: "small-signal equations are singular at the operating point"}
	}
	// M = G⁻¹·C, column by column.
	m := mat.NewDense(n, n, nil)
	col := make([]float64, n)
	for j := 0; j < n; j++ {
		for i := 0; i < n; i++ {
			col[i] = cm[i*n+j]
		}
		lu.Solve(col)
		for i := 0; i < n; i++ {
			m.Set(i, j, col[i])
		}
	}
	var eig mat.Eigen
	if !eig.Factorize(m, mat.EigenNone) {
		return nil, &models.CircuitError{What: "circuit", Reason: "the pole analysis did not converge"}
	}
	mus := eig.Values(nil)
	// μ below this is a pole beyond MaxPoleHz or a numerical zero.
	floor := 1 / (2 * math.Pi * MaxPoleHz)
	st := &Stability{}
	for _, mu := range mus {
		if cmplx.Abs(mu) < floor {
			continue
		}
		s := -1 / mu
		if imag(s) < 0 {
			continue // keep one of each conjugate pair
		}
		st.Poles = append(st.Poles, s)
	}
	slices.SortFunc(st.Poles, func(a, b complex128) int { return cmp.Compare(real(b), real(a)) })
	for _, s := range st.Poles {
		if Unstable(s) {
			st.Unstable = append(st.Unstable, s)
		}
	}
	return st, nil
}
