package wdf

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// ErrNoDecay is returned by SlowestDecay and WarmupSamples when the
// linearised circuit has a mode that does not decay (an eigenvalue of
// magnitude 1 or more): no warm-up makes such a circuit forget its start.
var ErrNoDecay = errors.New("wdf: the linearised circuit has a mode that does not decay")

// SlowestDecay returns ρ, the largest magnitude among the eigenvalues z of
// the state update linearised at the DC operating point with Re z ≥ 0: a
// small disturbance of the states dies away like ρⁿ over n internal
// samples once the faster modes are gone (for a first-order section it is
// the bilinear transform's pole, (1 − T/2τ)/(1 + T/2τ) for time constant
// τ). Segmented rendering can size its warm-up from it (see
// WarmupSamples).
//
// Only the modes the input reaches count (see reachable): a state it
// cannot reach keeps its operating-point value in every render. Modes
// with Re z < 0 are left out too: the bilinear transform sends every
// continuous-time mode faster than T/2 there, towards z = −1, where it
// alternates sign each sample and dies slowly in discrete time. Such modes
// come from stiff corners (a pot turned to an end, a few ohms against a
// capacitor) and from capacitors in parallel, whose loop gives z = −1
// exactly for a charge pattern the circuit's voltages never show; they are
// excited only by content at the Nyquist frequency. A caller that needs
// them bounded checks its warm-up against the render it shortens.
//
// The linearisation keeps every device at its operating-point conductance
// (Jf at v0): with the root relation v = p + K·i and i ≈ i0 + Jf·(v − v0),
// a change δx of the states moves the device voltages by (I − K·Jf)⁻¹·Pₓ·δx
// and the root's waves by (I − R·Jf) times that, so the next states change
// by A·δx with A = Nₓ + N_b·(I − R·Jf)·(I − K·Jf)⁻¹·Pₓ. Device charges
// (junction capacitances) are left out: their modes are faster than any
// coupling capacitor's by orders of magnitude. A large signal changes the
// devices' conductances, and with them the decay; ρ describes small
// signals around the bias point only. Measured on the two-transistor test
// stage driven into clipping, the start is forgotten about half as fast as
// ρ says (TestWarmupForgetsTheStart): size a warm-up with a margin (four
// times WarmupSamples was enough there) and check it against the serial
// render.
//
// It allocates and costs an eigenvalue decomposition of the ns×ns matrix A;
// call it once per compiled circuit, not per sample.
func (s *Solver) SlowestDecay() (float64, error) {
	ns, k := s.ns, s.k
	if ns == 0 {
		return 0, nil
	}
	a := mat.NewDense(ns, ns, nil)
	w := ns + 2 + k
	in := make([]float64, ns) // how the input moves the next states
	for r := 0; r < ns; r++ {
		for c := 0; c < ns; c++ {
			a.Set(r, c, s.nz[r*w+c])
		}
		in[r] = s.nz[r*w+ns+1]
	}
	if k > 0 {
		// Jf at the operating point, from a fresh channel (Reset evaluates
		// the devices at v0).
		c := s.shared.newChannel()
		jf := mat.NewDense(k, k, nil)
		o := 0
		for _, d := range c.devs {
			for r := 0; r < d.n; r++ {
				for q := 0; q < d.n; q++ {
					jf.Set(d.off+r, d.off+q, c.jd[o+r*d.n+q])
				}
			}
			o += d.n * d.n
		}
		kk := mat.NewDense(k, k, append([]float64(nil), s.kk...))
		j := mat.NewDense(k, k, nil)
		j.Mul(kk, jf)
		j.Scale(-1, j)
		for r := 0; r < k; r++ {
			j.Set(r, r, j.At(r, r)+1)
		}
		px := mat.NewDense(k, ns+1, nil) // Pₓ, and the input's column last
		for r := 0; r < k; r++ {
			for c := 0; c < ns; c++ {
				px.Set(r, c, s.pz[r*(ns+2)+c])
			}
			px.Set(r, ns, s.pz[r*(ns+2)+ns+1])
		}
		var dv mat.Dense // (I − K·Jf)⁻¹·Pₓ
		if err := dv.Solve(j, px); err != nil {
			return 0, fmt.Errorf("wdf: the linearised root is singular: %w", err)
		}
		rj := mat.NewDense(k, k, nil) // I − R·Jf
		for r := 0; r < k; r++ {
			for c := 0; c < k; c++ {
				v := -s.rI[r] * jf.At(r, c)
				if r == c {
					v++
				}
				rj.Set(r, c, v)
			}
		}
		var db mat.Dense
		db.Mul(rj, &dv)
		nb := mat.NewDense(ns, k, nil)
		for r := 0; r < ns; r++ {
			for c := 0; c < k; c++ {
				nb.Set(r, c, s.nz[r*w+ns+2+c])
			}
		}
		var add mat.Dense
		add.Mul(nb, &db)
		for r := 0; r < ns; r++ {
			for c := 0; c < ns; c++ {
				a.Set(r, c, a.At(r, c)+add.At(r, c))
			}
			in[r] += add.At(r, ns)
		}
	}
	a = reachable(a, in)
	if a == nil {
		return 0, nil
	}
	var eig mat.Eigen
	if !eig.Factorize(a, mat.EigenNone) {
		return 0, errors.New("wdf: the eigenvalue decomposition of the linearised state update failed")
	}
	rho := 0.0
	for _, l := range eig.Values(nil) {
		if real(l) >= 0 {
			rho = math.Max(rho, cmplx.Abs(l))
		}
	}
	if !(rho < 1) {
		return rho, ErrNoDecay
	}
	return rho, nil
}

// WarmupSamples returns the number of internal samples after which the
// slowest mode of the linearised circuit (SlowestDecay) has fallen to ratio
// of its start, ⌈ln ratio / ln ρ⌉, for 0 < ratio < 1. It is not bounded
// here: a circuit with a very slow pole (a large coupling capacitor into a
// megohm) asks for seconds, and the caller decides what it can afford.
func (s *Solver) WarmupSamples(ratio float64) (int, error) {
	if !(ratio > 0 && ratio < 1) {
		return 0, fmt.Errorf("wdf: warm-up ratio %g must be in (0, 1)", ratio)
	}
	rho, err := s.SlowestDecay()
	if err != nil {
		return 0, err
	}
	if rho == 0 {
		return 0, nil
	}
	n := math.Ceil(math.Log(ratio) / math.Log(rho))
	if n > math.MaxInt32 {
		return 0, ErrNoDecay
	}
	return int(n), nil
}

// couplingFloor is the size under which an entry of the linearised state
// update counts as no coupling: the matrices are sums of products of
// adaptor entries of order one, so two states with no electrical path
// between them are coupled by rounding alone, far below this.
const couplingFloor = 1e-12

// reachable returns the block of the state update a (ns×ns) between the
// states the input reaches, through in (its column) and a's couplings, or
// nil when it reaches none. A state it cannot reach (a capacitor that
// only the open contact of a switch would join to the circuit, held by
// its leak resistor) keeps its operating-point value in every render, so
// its mode, however slow, is nothing a segment has to forget.
func reachable(a *mat.Dense, in []float64) *mat.Dense {
	ns := len(in)
	scale := 0.0
	for r := 0; r < ns; r++ {
		for c := 0; c < ns; c++ {
			scale = math.Max(scale, math.Abs(a.At(r, c)))
		}
		scale = math.Max(scale, math.Abs(in[r]))
	}
	floor := couplingFloor * scale
	seen := make([]bool, ns)
	var queue []int
	for r, x := range in {
		if math.Abs(x) > floor {
			seen[r] = true
			queue = append(queue, r)
		}
	}
	for len(queue) > 0 {
		c := queue[0]
		queue = queue[1:]
		for r := 0; r < ns; r++ {
			if !seen[r] && math.Abs(a.At(r, c)) > floor {
				seen[r] = true
				queue = append(queue, r)
			}
		}
	}
	var keep []int
	for r, ok := range seen {
		if ok {
			keep = append(keep, r)
		}
	}
	if len(keep) == 0 {
		return nil
	}
	if len(keep) == ns {
		return a
	}
	sub := mat.NewDense(len(keep), len(keep), nil)
	for i, r := range keep {
		for j, c := range keep {
			sub.Set(i, j, a.At(r, c))
		}
	}
	return sub
}
