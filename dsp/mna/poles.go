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

// Linearised returns the small-signal system of circuit c at operating
// point op in modified nodal form, (G + s·C)·x = 0 with every source off:
// G holds the conductances, the device Jacobians and the branch equations
// of sources, buffers and inductors; C the capacitances and each inductor
// as −L in its branch row. Both are row-major lay.Dim × lay.Dim.
func Linearised(c *models.Circuit, op *OperatingPoint) (lay *Layout, g, cm []float64) {
	lay = NewLayout(c, true)
	sys := NewReal(lay)
	n := lay.Dim
	cm = make([]float64, n*n)
	addC := func(r, col int, v float64) {
		if r >= 0 && col >= 0 {
			cm[r*n+col] += v
		}
	}
	for i, e := range c.Elements {
		switch e.Kind {
		case models.ResistorKind:
			sys.Conductance(e.Nodes[0], e.Nodes[1], 1/e.Value)
		case models.CapacitorKind:
			ra, rb := lay.Row(e.Nodes[0]), lay.Row(e.Nodes[1])
			addC(ra, ra, e.Value)
			addC(rb, rb, e.Value)
			addC(ra, rb, -e.Value)
			addC(rb, ra, -e.Value)
		case models.InductorKind:
			sys.Branch(i, e.Nodes[0], e.Nodes[1], 0, 0)
			k := lay.BranchRow(i)
			addC(k, k, -e.Value)
		case models.VoltageSourceKind:
			sys.Branch(i, e.Nodes[0], e.Nodes[1], 0, 0)
		case models.BufferKind:
			sys.Buffer(i, e.Nodes[0], e.Nodes[1])
		}
	}
	for _, d := range op.Devices {
		sys.Device(d.Ports, d.V, d.I, d.Jac)
	}
	return lay, sys.A, cm
}

// Poles finds the natural frequencies of circuit c linearised at its
// operating point op: the finite generalised eigenvalues of the pencil
// (G, C) of Linearised, G·x = −s·C·x. G is the DC system and is regular
// wherever a DC operating point exists, so they are s = −1/μ for the
// nonzero eigenvalues μ of G⁻¹·C (a shift-and-invert form of the pencil;
// Golub & Van Loan, "Matrix Computations", 4th ed., 2013, sec. 7.7), found
// with gonum's dense nonsymmetric eigensolver (LAPACK's Hessenberg QR).
func Poles(c *models.Circuit, op *OperatingPoint) (*Stability, error) {
	lay, g, cm := Linearised(c, op)
	n := lay.Dim
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
