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
	bjt   *models.BJT    // set for a transistor: called directly in the hot loop
	dio   *models.Diode  // set for a diode
	chg   models.Charged // set for a device that stores charge (charge.go)
	off   int            // first port in the root's nonlinear port vector
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
	pz, nz []float64
	devs   []devSlot
	small  *smallRoot // the fixed-size kernel's data; nil: another kernel
	mid    *midRoot   // the mid-size kernel's data; nil: another kernel
	// kp is K with its columns permuted to each port's device partner,
	// kp[r·k+c] = K[r][q(c)] (q(c) = c for a diode), when every device has
	// one or two ports; nil otherwise (see buildJacobianPairs).
	kp      []float64
	x0, v0  []float64 // states and device voltages at the operating point
	maxIter int
	curv    float64 // 1/(2·nVt) of the stiffest junction, for the error estimate
	// freeStep is the largest Newton step on which no junction limiting
	// acts, so the kernels skip the limiting call: the smallest emission
	// voltage nVt when every device is a diode or a transistor (classical
	// limiting leaves a junction step of up to 2·nVt alone, and a
	// transistor's base–collector step is at most the sum of its two port
	// steps); 0, never skip, when another device is present.
	freeStep float64
	twoOverT float64 // 2/T, the trapezoidal rule's factor for device charges
	charged  bool    // some device stores charge
	maxPorts int     // the most ports of one device
	tol      float64
	adaptor  *Adaptor
	probe    int
	circuit  *models.Circuit
	rate     float64
}

// Solver runs one channel of a compiled circuit. It is not safe for
// concurrent use; Clone gives an independent channel.
type Solver struct {
	*shared
	// InputGain scales src samples to source volts; OutputGain scales the
	// probe voltage to dst samples. Both default to 1.
	InputGain, OutputGain float64

	z        []float64 // [x…, 1, vin, bI…]: states, constant, input, root waves
	zn       []float64 // the next sample's z, while the states are updated
	v, i     []float64 // device port voltages and currents
	p, pPrev []float64
	pSub     []float64 // continuation target of a sub-step
	vPrev    []float64 // the last solution
	vBest    []float64
	// Predictor (see predict): the factors of the Newton matrix of the last
	// converged solve (jac and piv for the general kernel, lu4 and piv4 for
	// the fixed-size one), whether they are valid, the change in p mapped
	// through them, this sample's linear prediction and the last one's
	// error.
	piv         []int
	lu4         [smallK][smallK]float64
	piv4        [smallK - 1]int
	haveLU      bool
	predicted   bool
	dp          []float64
	lin, linErr []float64
	f, dv       []float64
	jd          []float64 // per-device Jacobian blocks, packed
	jac         []float64 // k×k Newton matrix
	ki          []float64 // K·i
	pd, po      []float64 // Jf by columns, for buildJacobianPairs
	// Device charges (charge.go): per port the history h and its last
	// change (for the predictor), the charges of the last device
	// evaluation (moved to the accepted voltages to first order on
	// convergence: the next state) and per device the capacitance matrix,
	// packed as jd. The array kernels keep them in arrays (hist16,
	// qEval16, the capacitances by columns in cd16, co16), which the
	// slices hist and qEval then alias.
	hist, dh, qEval, cEval []float64
	hist16, qEval16        portVec
	cd16, co16             portVec
	bst                    models.BJTState // scratch for BJT.EvalCharges
	// The array kernels' Newton vectors (voltages, currents, the last
	// iterate, Jf by columns).
	kv, kcur, kvOld, kjd, kjo portVec
	kf, kdv                   portVec // the mid-size kernel's residual and step
	lu16                      [midK]portVec
	piv16, perm16             [midK]int
	// Scratch for one device's charges.
	chv, chq, chc []float64
	gv, gi, gj    []float64 // scratch for devices called through models.Nonlinear
	lastOut       float64
	stats         Stats
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
	sh := &shared{ns: len(lv.ports), k: len(ad.ports) - nE, maxIter: opt.MaxIter, tol: opt.Tol, adaptor: ad, probe: opt.Probe, circuit: c, rate: opt.SampleRate,
		twoOverT: 2 * opt.SampleRate}
	sh.rootRelation(ad, nE, lv, w, src)
	sh.stateUpdate(ad, nE, lv, src, opt.Probe)
	sh.startAt(op, ad, lv)
	sh.small = newSmallRoot(sh)
	sh.mid = newMidRoot(sh)
	sh.kp = pairedK(sh)
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
	pruneK(sh.kk, k)
}

// pruneK sets to zero the entries of K (k×k) below kNoise times the
// largest magnitude in their row or column. Ports that an ideal source
// (the supply, ground) decouples have K = 0 in exact arithmetic; the
// inversion leaves rounding residue there, a few units of the unit
// roundoff relative to the row's entries (at most 2.4e-16 on the
// benchmark circuits, whose smallest real couplings are 2.5e-5 of their
// rows). As exact zeros they make the Newton matrix sparse, and the
// elimination passes over them. The change in v = p + K·i is at most
// kNoise relative to the largest term of its row.
func pruneK(kk []float64, k int) {
	rowMax, colMax := make([]float64, k), make([]float64, k)
	for r := 0; r < k; r++ {
		for c := 0; c < k; c++ {
			a := abs(kk[r*k+c])
			rowMax[r] = max(rowMax[r], a)
			colMax[c] = max(colMax[c], a)
		}
	}
	for r := 0; r < k; r++ {
		for c := 0; c < k; c++ {
			if abs(kk[r*k+c]) < kNoise*max(rowMax[r], colMax[c]) {
				kk[r*k+c] = 0
			}
		}
	}
}

// kNoise is the relative size below which an entry of K is rounding
// residue (pruneK): a thousand times the residue seen, far below any
// coupling a resistor can make.
const kNoise = 1e-13

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

// pairedK returns K with its columns permuted to each port's device
// partner (see shared.kp), or nil when a device has more than two ports.
func pairedK(sh *shared) []float64 {
	k := sh.k
	partner := make([]int, k)
	for _, d := range sh.devs {
		switch d.n {
		case 1:
			partner[d.off] = d.off
		case 2:
			partner[d.off], partner[d.off+1] = d.off+1, d.off
		default:
			return nil
		}
	}
	kp := make([]float64, k*k)
	for r := 0; r < k; r++ {
		for c, q := range partner {
			kp[r*k+c] = sh.kk[r*k+q]
		}
	}
	return kp
}

// startAt records the devices and the states and device voltages at the
// DC operating point op (capacitor waves from their voltages, inductor
// waves from their currents).
func (sh *shared) startAt(op *mna.OperatingPoint, ad *Adaptor, lv leaves) {
	off := 0
	sh.v0 = make([]float64, sh.k)
	sh.freeStep = inf
	for _, d := range op.Devices {
		if e, ok := d.Model.(interface{ EmissionVoltage() float64 }); ok {
			sh.curv = math.Max(sh.curv, 1/(2*e.EmissionVoltage()))
		}
		n := len(d.Ports)
		slot := devSlot{model: d.Model, off: off, n: n}
		slot.bjt, _ = d.Model.(*models.BJT)
		slot.dio, _ = d.Model.(*models.Diode)
		slot.chg = chargedModel(d.Model)
		sh.charged = sh.charged || slot.chg != nil
		sh.maxPorts = max(sh.maxPorts, n)
		switch {
		case slot.bjt != nil:
			sh.freeStep = min(sh.freeStep, slot.bjt.EmissionVoltage())
		case slot.dio != nil:
			sh.freeStep = min(sh.freeStep, slot.dio.EmissionVoltage())
		default:
			sh.freeStep = 0
		}
		sh.devs = append(sh.devs, slot)
		copy(sh.v0[off:], d.V)
		off += n
	}
	if sh.freeStep == inf {
		sh.freeStep = 0
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

func (sh *shared) newChannel() *Solver {
	k, ns := sh.k, sh.ns
	jdLen := 0
	for _, d := range sh.devs {
		jdLen += d.n * d.n
	}
	// Root vectors have room for the fixed-size kernel's smallK entries;
	// those beyond k stay zero.
	vec := func() []float64 { return make([]float64, k, max(k, smallK)) }
	s := &Solver{shared: sh, InputGain: 1, OutputGain: 1,
		z: make([]float64, ns+2+k), zn: make([]float64, ns+2+k),
		v: vec(), i: vec(), p: vec(), pPrev: vec(), pSub: vec(),
		vPrev: vec(), vBest: vec(), f: vec(), dv: vec(), dp: vec(), lin: vec(), linErr: vec(),
		jd: make([]float64, jdLen), jac: make([]float64, k*k), piv: make([]int, k),
		ki: vec(), pd: vec(), po: vec(), dh: vec(), cEval: make([]float64, jdLen),
		chv: make([]float64, sh.maxPorts), chq: make([]float64, sh.maxPorts), chc: make([]float64, sh.maxPorts*sh.maxPorts),
		gv: make([]float64, sh.maxPorts), gi: make([]float64, sh.maxPorts), gj: make([]float64, sh.maxPorts*sh.maxPorts)}
	if k <= midK {
		s.hist, s.qEval = s.hist16[:k:midK], s.qEval16[:k:midK]
	} else {
		s.hist, s.qEval = vec(), vec()
	}
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
	s.zn[s.ns] = 1
	copy(s.v, s.v0)
	copy(s.vPrev, s.v0)
	s.haveLU = false
	clear(s.linErr)
	s.resetCharges()
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
	matVec(s.p, s.pz, s.z[:ns+2])
}

// Tick advances one sample with the signal source at vin volts above its
// DC value and returns the probe voltage.
func (s *Solver) Tick(vin float64) float64 {
	ns, k := s.ns, s.k
	z := s.z
	z[ns+1] = vin
	if k > 0 {
		matVec(s.p, s.pz, z[:ns+2])
		s.solve()
		bI := z[ns+2 : ns+2+k]
		v, i, rI := s.v[:len(bI)], s.i[:len(bI)], s.rI[:len(bI)]
		for r := range bI {
			bI[r] = v[r] - rI[r]*i[r]
		}
	}
	s.stats.Samples++
	// The next states and the output in one product, into the other
	// buffer: its slot ns (the constant 1 of z) takes the output for a
	// moment.
	zn := s.zn
	matVec(zn[:ns+1], s.nz, z)
	out := zn[ns]
	zn[ns] = 1
	if math.IsNaN(out) || math.IsInf(out, 0) {
		// Cannot happen with finite device voltages; guard the file anyway.
		s.stats.NonConverged++
		return s.lastOut
	}
	s.z, s.zn = zn, z
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
