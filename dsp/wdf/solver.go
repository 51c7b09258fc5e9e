package wdf

import (
	"math"

	"renderchain/dsp/mna"
	"renderchain/models"
)

// Stats count the Newton work of a Solver.
type Stats struct {
	Samples       int64
	Iterations    int64 // Newton iterations, all samples (fallbacks included)
	MaxIterations int   // most iterations spent on one sample
	Fallbacks     int64 // samples that needed the sub-stepped retry
	NonConverged  int64 // samples that no retry brought within tolerance
}

// MeanIterations is Iterations per sample.
func (s Stats) MeanIterations() float64 {
	if s.Samples == 0 {
		return 0
	}
	return float64(s.Iterations) / float64(s.Samples)
}

// Add accumulates another solver's counts (e.g. another channel).
func (s *Stats) Add(o Stats) {
	s.Samples += o.Samples
	s.Iterations += o.Iterations
	s.Fallbacks += o.Fallbacks
	s.NonConverged += o.NonConverged
	if o.MaxIterations > s.MaxIterations {
		s.MaxIterations = o.MaxIterations
	}
}

type devSlot struct {
	model models.Nonlinear
	bjt   *models.BJT   // set for a transistor: called directly in the hot loop
	dio   *models.Diode // set for a diode
	off   int           // first port in the root's nonlinear port vector
	n     int
}

// shared holds the compiled matrices, read-only after Compile, so that
// channels (clones) share them.
type shared struct {
	ns, k int
	kk    []float64 // K (k×k): v = p + K·i
	rI    []float64 // root port resistances
	// Over z = [x…, 1, vin, bI…]: p = pz·z[:ns+2] (k rows) and
	// [x_next; out] = nz·z (ns+1 rows).
	pz, nz  []float64
	devs    []devSlot
	x0, v0  []float64 // states and device voltages at the operating point
	maxIter int
	curv    float64 // 1/(2·nVt) of the stiffest junction, for the error estimate
	tol     float64
	adaptor *Adaptor
	probe   int
	circuit *models.Circuit
	rate    float64
}

// Solver runs one channel of a compiled circuit. It is not safe for
// concurrent use; Clone gives an independent channel.
type Solver struct {
	*shared
	// InputGain scales src samples to source volts; OutputGain scales the
	// probe voltage to dst samples. Both default to 1.
	InputGain, OutputGain float64

	z           []float64 // [x…, 1, vin, bI…]: states, constant, input, root waves
	xn          []float64 // next states
	v, i        []float64 // device port voltages and currents
	p, pPrev    []float64
	pSub        []float64 // continuation target of a sub-step
	vPrev, vOld []float64 // the last two solutions
	vOld2       []float64 // and the one before
	vBest       []float64
	f, dv       []float64
	jd          []float64 // per-device Jacobian blocks, packed
	jac         []float64 // k×k Newton matrix
	lastOut     float64
	stats       Stats
}

// newSolver derives the solver's matrices from the adaptor, in the steps
// below, and starts it at the operating point.
func newSolver(c *models.Circuit, op *mna.OperatingPoint, ad *Adaptor, nE int, opt Options) (*Solver, error) {
	lv := reactiveLeaves(ad, nE)
	w, err := rootInverse(ad, nE)
	if err != nil {
		return nil, err
	}
	src := sourceColumns(c, ad)
	sh := &shared{ns: len(lv.ports), k: len(ad.ports) - nE, maxIter: opt.MaxIter, tol: opt.Tol, adaptor: ad, probe: opt.Probe, circuit: c, rate: opt.SampleRate}
	sh.rootRelation(ad, nE, lv, w, src)
	sh.stateUpdate(ad, nE, lv, src, opt.Probe)
	sh.startAt(op, ad, lv)
	return sh.newChannel(), nil
}

// leaves lists the reactive leaf ports (the states) in port order, with
// the sign that turns a port's incident wave into its state: +1 for a
// capacitor (b[n] = a[n−1]), −1 for an inductor (b[n] = −a[n−1]).
type leaves struct {
	ports []int
	sign  []float64
}

// reactiveLeaves picks the states among the nE adapted ports.
func reactiveLeaves(ad *Adaptor, nE int) leaves {
	var lv leaves
	for j := 0; j < nE; j++ {
		switch ad.ports[j].leaf {
		case leafCapacitor:
			lv.ports = append(lv.ports, j)
			lv.sign = append(lv.sign, 1)
		case leafInductor:
			lv.ports = append(lv.ports, j)
			lv.sign = append(lv.sign, -1)
		}
	}
	return lv
}

// rootInverse returns W = (I − M_II)⁻¹ (k×k, row-major), M_II the block of
// M between the root's nonlinear ports, solved column by column.
func rootInverse(ad *Adaptor, nE int) ([]float64, error) {
	P := len(ad.ports)
	k := P - nE
	w := make([]float64, k*k)
	a := make([]float64, k*k)
	for r := 0; r < k; r++ {
		for c := 0; c < k; c++ {
			a[r*k+c] = -ad.M[(nE+r)*P+nE+c]
		}
		a[r*k+r]++
	}
	lu := mna.NewLU(k)
	if err := lu.Factor(a); err != nil {
		return nil, &models.CircuitError{What: "circuit", Reason: "a node is reached only by nonlinear device terminals (call Circuit.AddLeaks, as chains do)"}
	}
	col := make([]float64, k)
	for c := 0; c < k; c++ {
		clear(col)
		col[c] = 1
		lu.Solve(col)
		for r := 0; r < k; r++ {
			w[r*k+c] = col[r]
		}
	}
	return w, nil
}

// sources holds the absorbed sources' values at DC (udc) and the column of
// the signal source (sig, −1 for none).
type sources struct {
	udc []float64
	sig int
}

func sourceColumns(c *models.Circuit, ad *Adaptor) sources {
	src := sources{udc: make([]float64, len(ad.sources)), sig: -1}
	for j, e := range ad.sources {
		src.udc[j] = c.Elements[e].Value
		if c.Elements[e].Signal {
			src.sig = j
		}
	}
	return src
}

// rootRelation writes the Kirchhoff-domain relation at the root (the
// K-method form of the joint solve of Werner et al. 2015; derived here
// directly): with a_I = v + R_I·i and b_I = v − R_I·i substituted in
// a_I = S_IE·b_E + S_II·b_I + T_I·u,
//
//	v = W·(M_IE·b_E + Mu_I·u) − W·M_II·R_I·i,   W = (I − M_II)⁻¹,
//
// that is v = p + K·i with p = pz·[x…, 1, vin] (k rows over the states, a
// constant 1 carrying the DC sources, and the signal) and K = −W·M_II·R_I.
func (sh *shared) rootRelation(ad *Adaptor, nE int, lv leaves, w []float64, src sources) {
	P, k, ns := len(ad.ports), sh.k, sh.ns
	nsrc := len(ad.sources)
	m := func(r, c int) float64 { return ad.M[r*P+c] }
	mu := func(r, c int) float64 { return ad.Mu[r*nsrc+c] }
	sh.rI = make([]float64, k)
	for r := 0; r < k; r++ {
		sh.rI[r] = ad.ports[nE+r].r
	}
	zp := ns + 2
	sh.pz = make([]float64, k*zp)
	sh.kk = make([]float64, k*k)
	for r := 0; r < k; r++ {
		row := sh.pz[r*zp : (r+1)*zp]
		for a, j := range lv.ports {
			s := 0.0
			for q := 0; q < k; q++ {
				s += w[r*k+q] * m(nE+q, j)
			}
			row[a] = s * lv.sign[a]
		}
		for j := 0; j < nsrc; j++ {
			s := 0.0
			for q := 0; q < k; q++ {
				s += w[r*k+q] * mu(nE+q, j)
			}
			row[ns] += s * src.udc[j]
			if j == src.sig {
				row[ns+1] = s
			}
		}
		for c := 0; c < k; c++ {
			s := 0.0
			for q := 0; q < k; q++ {
				s += w[r*k+q] * m(nE+q, nE+c)
			}
			sh.kk[r*k+c] = -s * sh.rI[c]
		}
	}
}

// stateUpdate writes the reflected waves into the reactive leaves, which
// are the next states, a = 2·v_port − b, i.e.
//
//	a_X = (2M_XX − I)·b_X + 2M_XI·b_I + 2Mu_X·u,
//
// and, as the last row, the probe node's voltage, both over z = [x…, 1,
// vin, b_I…]: [x_next; out] = nz·z (ns+1 rows).
func (sh *shared) stateUpdate(ad *Adaptor, nE int, lv leaves, src sources, probe int) {
	P, k, ns := len(ad.ports), sh.k, sh.ns
	nsrc := len(ad.sources)
	m := func(r, c int) float64 { return ad.M[r*P+c] }
	mu := func(r, c int) float64 { return ad.Mu[r*nsrc+c] }
	w2 := ns + 2 + k
	sh.nz = make([]float64, (ns+1)*w2)
	for r, jr := range lv.ports {
		row := sh.nz[r*w2 : (r+1)*w2]
		for a, j := range lv.ports {
			v := 2 * m(jr, j)
			if a == r {
				v--
			}
			row[a] = v * lv.sign[a]
		}
		for j := 0; j < nsrc; j++ {
			row[ns] += 2 * mu(jr, j) * src.udc[j]
			if j == src.sig {
				row[ns+1] = 2 * mu(jr, j)
			}
		}
		for c := 0; c < k; c++ {
			row[ns+2+c] = 2 * m(jr, nE+c)
		}
	}
	out := sh.nz[ns*w2:]
	for a, j := range lv.ports {
		out[a] = ad.N[probe*P+j] * lv.sign[a]
	}
	for j := 0; j < nsrc; j++ {
		u := ad.Nu[probe*nsrc+j]
		out[ns] += u * src.udc[j]
		if j == src.sig {
			out[ns+1] = u
		}
	}
	for c := 0; c < k; c++ {
		out[ns+2+c] = ad.N[probe*P+nE+c]
	}
}

// startAt records the devices and the states and device voltages at the
// DC operating point op (capacitor waves from their voltages, inductor
// waves from their currents).
func (sh *shared) startAt(op *mna.OperatingPoint, ad *Adaptor, lv leaves) {
	off := 0
	sh.v0 = make([]float64, sh.k)
	for _, d := range op.Devices {
		if e, ok := d.Model.(interface{ EmissionVoltage() float64 }); ok {
			sh.curv = math.Max(sh.curv, 1/(2*e.EmissionVoltage()))
		}
		n := len(d.Ports)
		slot := devSlot{model: d.Model, off: off, n: n}
		slot.bjt, _ = d.Model.(*models.BJT)
		slot.dio, _ = d.Model.(*models.Diode)
		sh.devs = append(sh.devs, slot)
		copy(sh.v0[off:], d.V)
		off += n
	}
	sh.x0 = make([]float64, sh.ns)
	for a, j := range lv.ports {
		pt := ad.ports[j]
		switch pt.leaf {
		case leafCapacitor:
			sh.x0[a] = op.ElementVoltage(pt.elem) // b = a = v at rest
		case leafInductor:
			sh.x0[a] = pt.r * op.Branch[pt.elem] // a = v + R·i with v = 0
		}
	}
}

// dot returns Σ a[i]·b[i] over len(a), four lanes at a time.
func dot(a, b []float64) float64 {
	b = b[:len(a)]
	var s0, s1, s2, s3 float64
	i := 0
	for ; i+4 <= len(a); i += 4 {
		s0 += a[i] * b[i]
		s1 += a[i+1] * b[i+1]
		s2 += a[i+2] * b[i+2]
		s3 += a[i+3] * b[i+3]
	}
	for ; i < len(a); i++ {
		s0 += a[i] * b[i]
	}
	return (s0 + s1) + (s2 + s3)
}

func (sh *shared) newChannel() *Solver {
	k, ns := sh.k, sh.ns
	jdLen := 0
	for _, d := range sh.devs {
		jdLen += d.n * d.n
	}
	s := &Solver{shared: sh, InputGain: 1, OutputGain: 1,
		z: make([]float64, ns+2+k), xn: make([]float64, ns),
		v: make([]float64, k), i: make([]float64, k), p: make([]float64, k), pPrev: make([]float64, k), pSub: make([]float64, k),
		vPrev: make([]float64, k), vOld: make([]float64, k), vOld2: make([]float64, k), vBest: make([]float64, k), f: make([]float64, k), dv: make([]float64, k),
		jd: make([]float64, jdLen), jac: make([]float64, k*k)}
	s.Reset()
	return s
}

// Clone returns an independent channel of the same compiled circuit, at the
// operating point, with its own statistics.
func (s *Solver) Clone() *Solver {
	c := s.shared.newChannel()
	c.InputGain, c.OutputGain = s.InputGain, s.OutputGain
	return c
}

// Reset returns the solver to the DC operating point and clears its
// statistics.
func (s *Solver) Reset() {
	copy(s.z, s.x0)
	s.z[s.ns] = 1
	copy(s.v, s.v0)
	copy(s.vPrev, s.v0)
	copy(s.vOld, s.v0)
	copy(s.vOld2, s.v0)
	s.evalDevices()
	s.computeP(0)
	copy(s.pPrev, s.p)
	s.stats = Stats{}
	s.lastOut = 0
}

// Stats returns the Newton statistics since the last Reset.
func (s *Solver) Stats() Stats { return s.stats }

// States returns the number of reactive states and nonlinear root ports.
func (s *Solver) States() (reactive, nonlinear int) { return s.ns, s.k }

// Adaptor returns the root adaptor (for inspection and tests).
func (s *Solver) Adaptor() *Adaptor { return s.adaptor }

// SampleRate returns the rate the solver was compiled for.
func (s *Solver) SampleRate() float64 { return s.rate }

func (s *Solver) computeP(vin float64) {
	ns := s.ns
	s.z[ns+1] = vin
	for r := range s.p {
		s.p[r] = dot(s.pz[r*(ns+2):(r+1)*(ns+2)], s.z[:ns+2])
	}
}

// evalDevices evaluates every device at s.v into s.i and s.jd.
func (s *Solver) evalDevices() {
	o := 0
	v, i, jd := s.v, s.i, s.jd
	for _, d := range s.devs {
		switch {
		case d.bjt != nil:
			var j [4]float64
			i[d.off], i[d.off+1], j = d.bjt.Eval2(v[d.off], v[d.off+1])
			copy(jd[o:o+4], j[:])
		case d.dio != nil:
			i[d.off], jd[o] = d.dio.Current(v[d.off])
		default:
			d.model.Eval(v[d.off:d.off+d.n], i[d.off:d.off+d.n], jd[o:o+d.n*d.n])
		}
		o += d.n * d.n
	}
}

// newton solves v = p + K·f(v) from the current s.v, for at most maxIter
// iterations; it returns the iterations used and whether it converged.
// On success s.i holds f(v) (updated to first order in the last step).
//
// Convergence: the step is below Tol, or the Newton error estimate for the
// next step, Δ²/(2·nVt) (the quadratic term of an exponential junction of
// emission voltage nVt, the stiffest in the circuit), is below Tol/10.
func (s *Solver) newton(p []float64, maxIter int) (int, bool) {
	k := s.k
	if k == 0 {
		return 0, true // a linear circuit: nothing to solve
	}
	v, i, f, dv, kk := s.v[:k], s.i[:k], s.f[:k], s.dv[:k], s.kk[:k*k]
	p = p[:k]
	best := inf
	for it := 1; it <= maxIter; it++ {
		s.evalDevices()
		// Residual F = v − p − K·i and Newton matrix J = I − K·Jf.
		res := 0.0
		for r := 0; r < k; r++ {
			acc := v[r] - p[r] - dot(kk[r*k:r*k+k], i)
			f[r] = -acc
			if acc < 0 {
				acc = -acc
			}
			if acc > res {
				res = acc
			}
		}
		if res < best {
			best = res
			copy(s.vBest, v)
		}
		s.buildJacobian()
		if !solveInPlace(s.jac, f, k) {
			return it, false
		}
		// Limited step.
		copy(dv, v)
		for r := 0; r < k; r++ {
			v[r] += f[r]
		}
		s.limit(v, dv)
		step := 0.0
		for r := 0; r < k; r++ {
			d := v[r] - dv[r]
			dv[r] = d
			if d < 0 {
				d = -d
			}
			if d > step {
				step = d
			}
		}
		if !(step < inf) { // NaN or Inf
			return it, false
		}
		if (step < s.tol || step*step*s.curv < s.tol*0.1) && s.physical() {
			// First-order update of the currents to the accepted v (the
			// error is O(step²), below the tolerance by the test above).
			o := 0
			jd := s.jd
			for _, d := range s.devs {
				switch d.n {
				case 1:
					i[d.off] += jd[o] * dv[d.off]
				case 2:
					a, b := dv[d.off], dv[d.off+1]
					i[d.off] += jd[o]*a + jd[o+1]*b
					i[d.off+1] += jd[o+2]*a + jd[o+3]*b
				default:
					n := d.n
					for r := 0; r < n; r++ {
						acc := 0.0
						for c := 0; c < n; c++ {
							acc += jd[o+r*n+c] * dv[d.off+c]
						}
						i[d.off+r] += acc
					}
				}
				o += d.n * d.n
			}
			return it, true
		}
	}
	return maxIter, false
}

// limit applies each device's junction limiting to the step vold → v.
func (s *Solver) limit(v, vold []float64) {
	for _, d := range s.devs {
		switch {
		case d.bjt != nil:
			v[d.off], v[d.off+1] = d.bjt.Limit2(v[d.off], v[d.off+1], vold[d.off], vold[d.off+1])
		case d.dio != nil:
			v[d.off] = d.dio.Limit1(v[d.off], vold[d.off])
		default:
			d.model.Limit(v[d.off:d.off+d.n], vold[d.off:d.off+d.n])
		}
	}
}

var inf = math.Inf(1)

// physical reports whether every device's port voltages are physically
// reachable (models' Physical): a root outside that range (a junction
// forward-biased past the exponential's range, or kilovolts of reverse
// bias) is a spurious solution of the linearly continued device
// equations, and is not accepted.
func (s *Solver) physical() bool {
	for _, d := range s.devs {
		switch {
		case d.bjt != nil:
			if !d.bjt.Physical(s.v[d.off], s.v[d.off+1]) {
				return false
			}
		case d.dio != nil:
			if !d.dio.Physical(s.v[d.off]) {
				return false
			}
		}
	}
	return true
}

// substepIter is the Newton budget of each continuation sub-step.
const substepIter = 100

// predictorTrust bounds the curvature correction of the predictor, and
// predictorMaxMove the last move of a port beyond which it is not
// extrapolated at all, volts.
const (
	predictorTrust   = 1e-2
	predictorMaxMove = 0.1
)

// buildJacobian writes J = I − K·Jf, Jf block-diagonal by device.
func (s *Solver) buildJacobian() {
	k, kk, jac, jd := s.k, s.kk, s.jac, s.jd
	o := 0
	for _, d := range s.devs {
		c0 := d.off
		switch d.n {
		case 1:
			g := jd[o]
			for r := 0; r < k; r++ {
				jac[r*k+c0] = -kk[r*k+c0] * g
			}
		case 2:
			j00, j01, j10, j11 := jd[o], jd[o+1], jd[o+2], jd[o+3]
			for r := 0; r < k; r++ {
				k0, k1 := kk[r*k+c0], kk[r*k+c0+1]
				jac[r*k+c0] = -(k0*j00 + k1*j10)
				jac[r*k+c0+1] = -(k0*j01 + k1*j11)
			}
		default:
			n := d.n
			blk := jd[o : o+n*n]
			for r := 0; r < k; r++ {
				for c := 0; c < n; c++ {
					acc := 0.0
					for q := 0; q < n; q++ {
						acc += kk[r*k+c0+q] * blk[q*n+c]
					}
					jac[r*k+c0+c] = -acc
				}
			}
		}
		o += d.n * d.n
	}
	for r := 0; r < k; r++ {
		jac[r*k+r]++
	}
}

// solveInPlace solves a·x = b for the row-major k×k matrix a by Gaussian
// elimination with partial pivoting, overwriting a and leaving x in b. It
// reports false for a singular or non-finite matrix. The pivots'
// reciprocals are kept on a's diagonal, so back substitution multiplies
// instead of dividing (k divisions in all).
func solveInPlace(a, b []float64, k int) bool {
	a = a[:k*k]
	b = b[:k]
	for c := 0; c < k; c++ {
		p, pv := c, abs(a[c*k+c])
		for r := c + 1; r < k; r++ {
			if v := abs(a[r*k+c]); v > pv {
				p, pv = r, v
			}
		}
		if !(pv > 1e-300) || pv == inf {
			return false
		}
		if p != c {
			for j := c; j < k; j++ {
				a[c*k+j], a[p*k+j] = a[p*k+j], a[c*k+j]
			}
			b[c], b[p] = b[p], b[c]
		}
		inv := 1 / a[c*k+c]
		a[c*k+c] = inv
		bc := b[c]
		for r := c + 1; r < k; r++ {
			l := a[r*k+c] * inv
			if l == 0 {
				continue
			}
			for j := c + 1; j < k; j++ {
				a[r*k+j] -= l * a[c*k+j]
			}
			b[r] -= l * bc
		}
	}
	for r := k - 1; r >= 0; r-- {
		acc := b[r]
		for j := r + 1; j < k; j++ {
			acc -= a[r*k+j] * b[j]
		}
		b[r] = acc * a[r*k+r]
	}
	return true
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

// solve finds the root's device voltages for s.p, falling back to a
// sub-stepped continuation from the previous sample's p when plain Newton
// fails: p(λ) = pPrev + λ·(p − pPrev) over 4, then 16 sub-steps, each with
// a larger iteration budget. What still fails keeps the iterate with the
// smallest residual (finite by construction) and is counted.
func (s *Solver) solve() {
	// Predictor: quadratic extrapolation of the last three solutions,
	// trusted only while it stays within predictorTrust of the linear one
	// (near a clipping corner the curvature term overshoots). A device
	// whose port moved more than predictorMaxMove in the last sample (a
	// switching edge) starts from its last solution instead, and the
	// prediction is junction-limited against that solution, so that no
	// start puts a junction far into forward bias.
	for r := range s.v {
		lin := 2*s.vPrev[r] - s.vOld[r]
		quad := 3*(s.vPrev[r]-s.vOld[r]) + s.vOld2[r]
		if d := quad - lin; d < predictorTrust && d > -predictorTrust {
			s.v[r] = quad
		} else {
			s.v[r] = lin
		}
	}
	for _, d := range s.devs {
		for r := d.off; r < d.off+d.n; r++ {
			if m := s.vPrev[r] - s.vOld[r]; m > predictorMaxMove || m < -predictorMaxMove {
				copy(s.v[d.off:d.off+d.n], s.vPrev[d.off:d.off+d.n])
				break
			}
		}
	}
	s.limit(s.v, s.vPrev)
	it, ok := s.newton(s.p, s.maxIter)
	total := it
	if !ok {
		// Restart from the last solution, without extrapolation.
		copy(s.v, s.vPrev)
		it, ok = s.newton(s.p, s.maxIter)
		total += it
	}
	if !ok {
		s.stats.Fallbacks++
		ok = s.substep(&total)
	}
	if !ok {
		s.stats.NonConverged++
		copy(s.v, s.vBest)
		for r := range s.v {
			if math.IsNaN(s.v[r]) || math.IsInf(s.v[r], 0) {
				copy(s.v, s.vPrev)
				break
			}
		}
		s.evalDevices()
	}
	s.stats.Iterations += int64(total)
	if total > s.stats.MaxIterations {
		s.stats.MaxIterations = total
	}
	copy(s.vOld2, s.vOld)
	copy(s.vOld, s.vPrev)
	copy(s.vPrev, s.v)
	copy(s.pPrev, s.p)
}

// substep runs the continuation from the last sample's p to s.p.
func (s *Solver) substep(total *int) bool {
	k, pl := s.k, s.pSub
	for _, n := range [...]int{4, 16} {
		copy(s.v, s.vPrev)
		ok := true
		for step := 1; step <= n && ok; step++ {
			lam := float64(step) / float64(n)
			for r := 0; r < k; r++ {
				pl[r] = s.pPrev[r] + lam*(s.p[r]-s.pPrev[r])
			}
			it, conv := s.newton(pl, substepIter)
			*total += it
			ok = conv
		}
		if ok {
			return true
		}
	}
	return false
}

// Tick advances one sample with the signal source at vin volts above its
// DC value and returns the probe voltage.
func (s *Solver) Tick(vin float64) float64 {
	ns, k := s.ns, s.k
	z := s.z
	z[ns+1] = vin
	zp := z[:ns+2]
	for r := range s.p {
		s.p[r] = dot(s.pz[r*(ns+2):(r+1)*(ns+2)], zp)
	}
	s.solve()
	s.stats.Samples++
	bI := z[ns+2:]
	for r := 0; r < k; r++ {
		bI[r] = s.v[r] - s.rI[r]*s.i[r]
	}
	w := len(z)
	out := dot(s.nz[ns*w:(ns+1)*w], z)
	xn := s.xn
	for r := 0; r < ns; r++ {
		xn[r] = dot(s.nz[r*w:(r+1)*w], z)
	}
	if math.IsNaN(out) || math.IsInf(out, 0) {
		// Cannot happen with finite device voltages; guard the file anyway.
		s.stats.NonConverged++
		return s.lastOut
	}
	copy(z[:ns], xn)
	s.lastOut = out
	return out
}

// Process renders src (signal samples, scaled by InputGain to volts) into
// dst (probe volts scaled by OutputGain). len(dst) must equal len(src). It
// does not allocate.
func (s *Solver) Process(dst, src []float64) {
	for n, x := range src {
		dst[n] = s.Tick(x*s.InputGain) * s.OutputGain
	}
}

// DeviceVoltages returns the present root port voltages (for tests).
func (s *Solver) DeviceVoltages() []float64 { return append([]float64(nil), s.v...) }
