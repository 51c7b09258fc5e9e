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
	off   int // first port in the root's nonlinear port vector
	n     int
}

// shared holds the compiled matrices, read-only after Compile, so that
// channels (clones) share them.
type shared struct {
	ns, k int
	// p = Pp·x + pc + pin·vin   (k)
	pp, pc, pin []float64
	kk          []float64 // K (k×k): v = p + K·i
	rI          []float64 // root port resistances
	// a = Ax·x + Ab·bI + ac + ain·vin   (ns), the next states
	ax, ab, ac, ain []float64
	// out = ox·x + ob·bI + oc + oin·vin
	ox, ob  []float64
	oc, oin float64
	devs    []devSlot
	x0, v0  []float64 // states and device voltages at the operating point
	maxIter int
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

	x, xn     []float64 // states
	v, i      []float64 // device port voltages and currents
	p, pPrev  []float64
	vPrev     []float64
	vBest     []float64
	f, dv, bI []float64
	jd        []float64 // per-device Jacobian blocks, packed
	jac       []float64 // k×k Newton matrix
	lu        *mna.LU
	lastOut   float64
	stats     Stats
}

func newSolver(c *models.Circuit, op *mna.OperatingPoint, ad *Adaptor, nE int, opt Options) (*Solver, error) {
	P := len(ad.ports)
	k := P - nE
	var xs []int // reactive leaf ports
	for j := 0; j < nE; j++ {
		if ad.ports[j].leaf != leafResistor {
			xs = append(xs, j)
		}
	}
	ns := len(xs)
	sign := make([]float64, ns)
	for a, j := range xs {
		sign[a] = 1
		if ad.ports[j].leaf == leafInductor {
			sign[a] = -1
		}
	}
	m := func(r, c int) float64 { return ad.M[r*P+c] }
	nsrc := len(ad.sources)
	mu := func(r, c int) float64 { return ad.Mu[r*nsrc+c] }
	// W = (I − M_II)⁻¹, by solving column by column.
	w := make([]float64, k*k)
	{
		a := make([]float64, k*k)
		for r := 0; r < k; r++ {
			for c := 0; c < k; c++ {
				a[r*k+c] = -m(nE+r, nE+c)
			}
			a[r*k+r]++
		}
		lu := mna.NewLU(k)
		if err := lu.Factor(a); err != nil {
			return nil, &models.CircuitError{What: "circuit", Reason: "a nonlinear device sees an open circuit (its current is fixed by the wiring alone)"}
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
	}
	sh := &shared{ns: ns, k: k, maxIter: opt.MaxIter, tol: opt.Tol, adaptor: ad, probe: opt.Probe, circuit: c, rate: opt.SampleRate}
	sh.rI = make([]float64, k)
	for r := 0; r < k; r++ {
		sh.rI[r] = ad.ports[nE+r].r
	}
	// Source values at DC, and the column of the signal source.
	sig := -1
	udc := make([]float64, nsrc)
	for j, e := range ad.sources {
		udc[j] = c.Elements[e].Value
		if c.Elements[e].Signal {
			sig = j
		}
	}
	// Kirchhoff-domain relation at the root (the K-method form of the
	// joint solve: Werner et al. 2015, sec. 4, eqs. 17–22): with
	// a_I = v + R_I·i and b_I = v − R_I·i substituted in
	// a_I = S_IE·b_E + S_II·b_I + T_I·u,
	//   v = W·(M_IE·b_E + Mu_I·u) − W·M_II·R_I·i,   W = (I − M_II)⁻¹.
	sh.pp = make([]float64, k*ns)
	sh.pc = make([]float64, k)
	sh.pin = make([]float64, k)
	sh.kk = make([]float64, k*k)
	for r := 0; r < k; r++ {
		for a, j := range xs {
			s := 0.0
			for q := 0; q < k; q++ {
				s += w[r*k+q] * m(nE+q, j)
			}
			sh.pp[r*ns+a] = s * sign[a]
		}
		for src := 0; src < nsrc; src++ {
			s := 0.0
			for q := 0; q < k; q++ {
				s += w[r*k+q] * mu(nE+q, src)
			}
			sh.pc[r] += s * udc[src]
			if src == sig {
				sh.pin[r] = s
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
	// Reflected waves into the reactive leaves: a = 2·v_port − b, i.e.
	// a_X = (2M_XX − I)·b_X + 2M_XI·b_I + 2Mu_X·u.
	sh.ax = make([]float64, ns*ns)
	sh.ab = make([]float64, ns*k)
	sh.ac = make([]float64, ns)
	sh.ain = make([]float64, ns)
	for r, jr := range xs {
		for a, j := range xs {
			v := 2 * m(jr, j)
			if a == r {
				v--
			}
			sh.ax[r*ns+a] = v * sign[a]
		}
		for c := 0; c < k; c++ {
			sh.ab[r*k+c] = 2 * m(jr, nE+c)
		}
		for src := 0; src < nsrc; src++ {
			sh.ac[r] += 2 * mu(jr, src) * udc[src]
			if src == sig {
				sh.ain[r] = 2 * mu(jr, src)
			}
		}
	}
	// The probe node's voltage.
	nn := func(c int) float64 { return ad.N[opt.Probe*P+c] }
	sh.ox = make([]float64, ns)
	sh.ob = make([]float64, k)
	for a, j := range xs {
		sh.ox[a] = nn(j) * sign[a]
	}
	for c := 0; c < k; c++ {
		sh.ob[c] = nn(nE + c)
	}
	for src := 0; src < nsrc; src++ {
		u := ad.Nu[opt.Probe*nsrc+src]
		sh.oc += u * udc[src]
		if src == sig {
			sh.oin = u
		}
	}
	// Devices and initial state from the operating point.
	off := 0
	sh.v0 = make([]float64, k)
	for _, d := range op.Devices {
		n := len(d.Ports)
		sh.devs = append(sh.devs, devSlot{model: d.Model, off: off, n: n})
		copy(sh.v0[off:], d.V)
		off += n
	}
	sh.x0 = make([]float64, ns)
	for a, j := range xs {
		pt := ad.ports[j]
		switch pt.leaf {
		case leafCapacitor:
			sh.x0[a] = op.ElementVoltage(pt.elem) // b = a = v at rest
		case leafInductor:
			sh.x0[a] = pt.r * op.Branch[pt.elem] // a = v + R·i with v = 0
		}
	}
	return sh.newChannel(), nil
}

func (sh *shared) newChannel() *Solver {
	k, ns := sh.k, sh.ns
	jdLen := 0
	for _, d := range sh.devs {
		jdLen += d.n * d.n
	}
	s := &Solver{shared: sh, InputGain: 1, OutputGain: 1,
		x: make([]float64, ns), xn: make([]float64, ns),
		v: make([]float64, k), i: make([]float64, k), p: make([]float64, k), pPrev: make([]float64, k),
		vPrev: make([]float64, k), vBest: make([]float64, k), f: make([]float64, k), dv: make([]float64, k),
		bI: make([]float64, k), jd: make([]float64, jdLen), jac: make([]float64, k*k), lu: mna.NewLU(k)}
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
	copy(s.x, s.x0)
	copy(s.v, s.v0)
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
	for r := range s.p {
		acc := s.pc[r] + s.pin[r]*vin
		row := s.pp[r*ns : r*ns+ns]
		for a, x := range s.x {
			acc += row[a] * x
		}
		s.p[r] = acc
	}
}

// evalDevices evaluates every device at s.v into s.i and s.jd.
func (s *Solver) evalDevices() {
	o := 0
	for _, d := range s.devs {
		d.model.Eval(s.v[d.off:d.off+d.n], s.i[d.off:d.off+d.n], s.jd[o:o+d.n*d.n])
		o += d.n * d.n
	}
}

// newton solves v = p + K·f(v) from the current s.v, for at most maxIter
// iterations; it returns the iterations used and whether it converged.
// On success s.i holds f(v) (updated to first order in the last step).
func (s *Solver) newton(p []float64, maxIter int) (int, bool, float64) {
	k := s.k
	best := math.Inf(1)
	for it := 1; it <= maxIter; it++ {
		s.evalDevices()
		// Residual F = v − p − K·i and Newton matrix J = I − K·Jf.
		res := 0.0
		for r := 0; r < k; r++ {
			acc := s.v[r] - p[r]
			krow := s.kk[r*k : r*k+k]
			for c, ic := range s.i {
				acc -= krow[c] * ic
			}
			s.f[r] = -acc
			res = math.Max(res, math.Abs(acc))
		}
		if res < best {
			best = res
			copy(s.vBest, s.v)
		}
		clear(s.jac)
		o := 0
		for _, d := range s.devs {
			n := d.n
			blk := s.jd[o : o+n*n]
			for r := 0; r < k; r++ {
				krow := s.kk[r*k+d.off : r*k+d.off+n]
				jrow := s.jac[r*k+d.off : r*k+d.off+n]
				for c := 0; c < n; c++ {
					acc := 0.0
					for q := 0; q < n; q++ {
						acc += krow[q] * blk[q*n+c]
					}
					jrow[c] = -acc
				}
			}
			o += n * n
		}
		for r := 0; r < k; r++ {
			s.jac[r*k+r]++
		}
		if err := s.lu.Factor(s.jac); err != nil {
			return it, false, best
		}
		s.lu.Solve(s.f)
		// Limited step.
		copy(s.dv, s.v)
		for r := 0; r < k; r++ {
			s.v[r] += s.f[r]
		}
		for _, d := range s.devs {
			d.model.Limit(s.v[d.off:d.off+d.n], s.dv[d.off:d.off+d.n])
		}
		step := 0.0
		for r := 0; r < k; r++ {
			s.dv[r] = s.v[r] - s.dv[r]
			step = math.Max(step, math.Abs(s.dv[r]))
		}
		if !(step < math.Inf(1)) { // NaN or Inf
			return it, false, best
		}
		if step < s.tol {
			// First-order update of the currents to the accepted v (the
			// error is O(step²), far below the tolerance).
			o := 0
			for _, d := range s.devs {
				n := d.n
				blk := s.jd[o : o+n*n]
				for r := 0; r < n; r++ {
					acc := 0.0
					for c := 0; c < n; c++ {
						acc += blk[r*n+c] * s.dv[d.off+c]
					}
					s.i[d.off+r] += acc
				}
				o += n * n
			}
			return it, true, 0
		}
	}
	return maxIter, false, best
}

// solve finds the root's device voltages for s.p, falling back to a
// sub-stepped continuation from the previous sample's p when plain Newton
// fails: p(λ) = pPrev + λ·(p − pPrev) over 4, then 16 sub-steps, each with
// a larger iteration budget. What still fails keeps the iterate with the
// smallest residual (finite by construction) and is counted.
func (s *Solver) solve() {
	it, ok, _ := s.newton(s.p, s.maxIter)
	total := it
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
	copy(s.vPrev, s.v)
	copy(s.pPrev, s.p)
}

// substep runs the continuation; s.p is the target and is restored.
func (s *Solver) substep(total *int) bool {
	k := s.k
	var target, pl [16]float64
	tgt := target[:k:k]
	if k > len(target) {
		tgt = make([]float64, k) // only for very large circuits
	}
	copy(tgt, s.p)
	plv := pl[:k:k]
	if k > len(pl) {
		plv = make([]float64, k)
	}
	for _, n := range [...]int{4, 16} {
		copy(s.v, s.vPrev)
		ok := true
		for step := 1; step <= n && ok; step++ {
			lam := float64(step) / float64(n)
			for r := 0; r < k; r++ {
				plv[r] = s.pPrev[r] + lam*(tgt[r]-s.pPrev[r])
			}
			it, conv, _ := s.newton(plv, 4*s.maxIter)
			*total += it
			ok = conv
		}
		if ok {
			copy(s.p, tgt)
			return true
		}
	}
	copy(s.p, tgt)
	return false
}

// Tick advances one sample with the signal source at vin volts above its
// DC value and returns the probe voltage.
func (s *Solver) Tick(vin float64) float64 {
	s.computeP(vin)
	s.solve()
	s.stats.Samples++
	k, ns := s.k, s.ns
	for r := 0; r < k; r++ {
		s.bI[r] = s.v[r] - s.rI[r]*s.i[r]
	}
	out := s.oc + s.oin*vin
	for a, x := range s.x {
		out += s.ox[a] * x
	}
	for c, b := range s.bI {
		out += s.ob[c] * b
	}
	for r := 0; r < ns; r++ {
		acc := s.ac[r] + s.ain[r]*vin
		row := s.ax[r*ns : r*ns+ns]
		for a, x := range s.x {
			acc += row[a] * x
		}
		brow := s.ab[r*k : r*k+k]
		for c, b := range s.bI {
			acc += brow[c] * b
		}
		s.xn[r] = acc
	}
	if math.IsNaN(out) || math.IsInf(out, 0) {
		// Cannot happen with finite device voltages; guard the file anyway.
		s.stats.NonConverged++
		return s.lastOut
	}
	s.x, s.xn = s.xn, s.x
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
