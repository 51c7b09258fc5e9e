package wdf

import "renderchain/models"

// The Newton kernel for small roots: at most smallK nonlinear ports, every
// device one with one or two ports (diodes and transistors are called
// directly, others through models.Nonlinear). Its vectors and matrices are fixed-size
// arrays on the stack, so every index is a constant or masked and needs no
// bounds check, and the loops have constant trip counts. A root with fewer
// ports is padded: a padded port has p = v = i = 0 and a zero row and
// column in K, so its row of the Newton matrix is the identity row and its
// step is zero; every sum of the general kernel gains only exact zeros, so
// both kernels give the same numbers (a test checks this bit for bit).
// This includes the predictor, which reuses each kernel's factors.

// smallK is the port count of the fixed-size kernel.
const smallK = 4

// smallRoot is the read-only part of the fixed-size kernel.
type smallRoot struct {
	kk [smallK][smallK]float64 // K, zero-padded
	// partner[c] is the other port of port c's device (c itself for a
	// diode): column c of Jf has its nonzeros in rows c and partner[c].
	partner [smallK]int
	kp      [smallK][smallK]float64 // K with its columns permuted: kp[r][c] = K[r][partner[c]]
	devs    []smallDev
}

// smallDev is one device of the fixed-size kernel on port c (and c+1 for
// two ports): a transistor (bjt), a diode (dio), or another device (model,
// n ports).
type smallDev struct {
	bjt   *models.BJT
	dio   *models.Diode
	model models.Nonlinear
	chg   models.Charged // nil: no charges
	c, n  int
}

// newSmallRoot returns the fixed-size kernel's data, or nil when the root
// does not fit it.
func newSmallRoot(sh *shared) *smallRoot {
	if sh.k == 0 || sh.k > smallK {
		return nil
	}
	var partner [midK]int
	devs, ok := pairDevices(sh, &partner)
	if !ok {
		return nil
	}
	sr := &smallRoot{devs: devs}
	for r := 0; r < sh.k; r++ {
		sr.partner[r] = partner[r]
		for c := 0; c < sh.k; c++ {
			sr.kk[r][c] = sh.kk[r*sh.k+c]
			sr.kp[r][c] = sh.kk[r*sh.k+partner[c]]
		}
	}
	for c := sh.k; c < smallK; c++ {
		sr.partner[c] = c
	}
	return sr
}

// pairDevices lists the root's devices for the array kernels and writes
// each port's device partner (the port itself for a one-port device); it
// reports false when a device has more than two ports.
func pairDevices(sh *shared, partner *[midK]int) ([]smallDev, bool) {
	var devs []smallDev
	for c := range partner {
		partner[c] = c
	}
	for _, d := range sh.devs {
		switch d.n {
		case 1:
		case 2:
			partner[d.off&portMask], partner[(d.off+1)&portMask] = d.off+1, d.off
		default:
			return nil, false
		}
		devs = append(devs, smallDev{d.bjt, d.dio, d.model, d.chg, d.off, d.n})
	}
	return devs, true
}

// evalPorts evaluates the devices devs (of the fixed-size or the
// mid-size kernel) at v: the port currents into i, and Jf by columns:
// jd[c] = ∂i_c/∂v_c, jo[c] = ∂i_partner(c)/∂v_c.
func (s *Solver) evalPorts(devs []smallDev, v, i, jd, jo *portVec) {
	for n := range devs {
		d := &devs[n]
		c := d.c & portMask
		if d.chg != nil {
			s.evalChargedPorts(d, v, i, jd, jo)
		} else if d.bjt != nil {
			c1 := (c + 1) & portMask
			var j [4]float64
			i[c], i[c1], j = d.bjt.Eval2(v[c], v[c1])
			jd[c], jo[c], jd[c1], jo[c1] = j[0], j[2], j[3], j[1]
		} else if d.dio != nil {
			i[c], jd[c] = d.dio.Current(v[c])
		} else {
			s.evalOther(d, v, i, jd, jo)
		}
	}
}

// evalOther evaluates a device other than a diode or transistor through
// models.Nonlinear, with the solver's scratch buffers (a slice of a stack
// array handed to an interface method would escape and allocate).
func (s *Solver) evalOther(d *smallDev, v, i, jd, jo *portVec) {
	c := d.c & portMask
	gv, gi, gj := s.gv[:d.n], s.gi[:d.n], s.gj[:d.n*d.n]
	if d.n == 1 {
		gv[0] = v[c]
		d.model.Eval(gv, gi, gj)
		i[c], jd[c] = gi[0], gj[0]
		return
	}
	c1 := (c + 1) & portMask
	gv[0], gv[1] = v[c], v[c1]
	d.model.Eval(gv, gi, gj)
	i[c], i[c1] = gi[0], gi[1]
	jd[c], jo[c], jd[c1], jo[c1] = gj[0], gj[2], gj[3], gj[1]
}

// limitOther is Limit for a device evaluated by evalOther.
func (s *Solver) limitOther(d *smallDev, v, vold *portVec) {
	c := d.c & portMask
	c1 := (c + d.n - 1) & portMask
	gv, go0 := s.gv[:d.n], s.gi[:d.n]
	gv[0], go0[0] = v[c], vold[c]
	gv[d.n-1], go0[d.n-1] = v[c1], vold[c1]
	d.model.Limit(gv, go0)
	v[c], v[c1] = gv[0], gv[d.n-1]
}

// limitPorts is limit on the fixed-size vectors.
func (s *Solver) limitPorts(devs []smallDev, v, vold *portVec) {
	for n := range devs {
		d := &devs[n]
		c := d.c & portMask
		switch {
		case d.bjt != nil:
			c1 := (c + 1) & portMask
			v[c], v[c1] = d.bjt.Limit2(v[c], v[c1], vold[c], vold[c1])
		case d.dio != nil:
			v[c] = d.dio.Limit1(v[c], vold[c])
		default:
			s.limitOther(d, v, vold)
		}
	}
}

// physicalPorts is physical on the fixed-size vector.
func physicalPorts(devs []smallDev, v *portVec) bool {
	for n := range devs {
		d := &devs[n]
		c := d.c & portMask
		switch {
		case d.bjt != nil:
			if !d.bjt.Physical(v[c], v[(c+1)&portMask]) {
				return false
			}
		case d.dio != nil:
			if !d.dio.Physical(v[c]) {
				return false
			}
		}
	}
	return true
}

// newtonSmall is newton for a root that fits the fixed-size kernel: the
// same iteration, limiting, convergence test and first-order current
// update, on arrays.
func (s *Solver) newtonSmall(pIn []float64, maxIter int) (int, bool) {
	s.haveLU = false
	sr := s.small
	K := &sr.kk
	var f [smallK]float64
	// The first smallK entries in use; in the solver, so that they need
	// not be cleared at each call (entries beyond k are never written).
	v, i, vOld, jd, jo := &s.kv, &s.kcur, &s.kvOld, &s.kjd, &s.kjo
	// The solver's vectors have room for smallK entries, zero beyond k.
	sv := (*[smallK]float64)(s.v[:smallK])
	v[0], v[1], v[2], v[3] = sv[0], sv[1], sv[2], sv[3]
	p := [smallK]float64(pIn[:smallK])
	best := inf
	for it := 1; it <= maxIter; it++ {
		s.evalPorts(sr.devs, v, i, jd, jo)
		// Residual F = v − p − K·i (negated into f), summed in the order of
		// dot, and the Newton matrix J = I − K·Jf.
		f[0] = -(v[0] - p[0] - ((K[0][0]*i[0] + K[0][1]*i[1]) + (K[0][2]*i[2] + K[0][3]*i[3])))
		f[1] = -(v[1] - p[1] - ((K[1][0]*i[0] + K[1][1]*i[1]) + (K[1][2]*i[2] + K[1][3]*i[3])))
		f[2] = -(v[2] - p[2] - ((K[2][0]*i[0] + K[2][1]*i[1]) + (K[2][2]*i[2] + K[2][3]*i[3])))
		f[3] = -(v[3] - p[3] - ((K[3][0]*i[0] + K[3][1]*i[1]) + (K[3][2]*i[2] + K[3][3]*i[3])))
		res := 0.0 // max |F| (NaN entries compare false and are passed over)
		for _, x := range f {
			if x = abs(x); x > res {
				res = x
			}
		}
		if res < best {
			best = res
			setSmall(s.vBest, v)
		}
		// J is built and factored in the solver's lu4, so that after
		// convergence its factors remain for the next sample's predictor.
		a := &s.lu4
		for r := 0; r < smallK; r++ {
			kr, pr := &K[r], &sr.kp[r]
			a[r] = [smallK]float64{
				-(kr[0]*jd[0] + pr[0]*jo[0]),
				-(kr[1]*jd[1] + pr[1]*jo[1]),
				-(kr[2]*jd[2] + pr[2]*jo[2]),
				-(kr[3]*jd[3] + pr[3]*jo[3]),
			}
			a[r][r]++
		}
		if !solve4(a, &f, &s.piv4) {
			setSmall(s.v, v)
			return it, false
		}
		vOld[0], vOld[1], vOld[2], vOld[3] = v[0], v[1], v[2], v[3]
		big := false
		for r := 0; r < smallK; r++ {
			v[r] += f[r]
			big = big || f[r] > s.freeStep || f[r] < -s.freeStep
		}
		if big {
			s.limitPorts(sr.devs, v, vOld)
		}
		step := 0.0
		var dv [smallK]float64
		for r := 0; r < smallK; r++ {
			d := v[r] - vOld[r]
			dv[r] = d
			if d < 0 {
				d = -d
			}
			if d > step {
				step = d
			}
		}
		if !(step < inf) { // NaN or Inf
			setSmall(s.v, v)
			return it, false
		}
		if (step < s.tol || step*step*s.curv < s.tol*0.1) && physicalPorts(sr.devs, v) {
			// First-order update of the currents to the accepted v: row c
			// of Jf holds jd[c] and jo[partner(c)].
			for c := 0; c < smallK; c++ {
				q := sr.partner[c] & (smallK - 1)
				i[c] += jd[c]*dv[c] + jo[q]*dv[q]
			}
			if s.charged {
				// The charges likewise (see commitCharges).
				qe := &s.qEval16
				for c := 0; c < smallK; c++ {
					q := sr.partner[c] & (smallK - 1)
					qe[c] += s.cd16[c]*dv[c] + s.co16[q]*dv[q]
				}
			}
			setSmall(s.v, v)
			setSmall(s.i, i)
			s.haveLU = true
			return it, true
		}
	}
	setSmall(s.v, v)
	return maxIter, false
}

// predictSmall is predict (with factors) on the fixed-size vectors: the
// same sums in the same order (K·dh in the order of dot).
func (s *Solver) predictSmall() {
	vp := (*[smallK]float64)(s.vPrev[:smallK])
	p := (*[smallK]float64)(s.p[:smallK])
	pp := (*[smallK]float64)(s.pPrev[:smallK])
	var d [smallK]float64
	for r := range d {
		d[r] = p[r] - pp[r]
	}
	if s.charged {
		K, dh := &s.small.kk, (*[smallK]float64)(s.dh[:smallK])
		for r := range d {
			kr := &K[r]
			d[r] -= (kr[0]*dh[0] + kr[1]*dh[1]) + (kr[2]*dh[2] + kr[3]*dh[3])
		}
	}
	applyLU4(&s.lu4, &s.piv4, &d)
	lin := (*[smallK]float64)(s.lin[:smallK])
	le := (*[smallK]float64)(s.linErr[:smallK])
	v, vold := &s.kv, &s.kvOld
	big := false
	for r := range d {
		lin[r] = vp[r] + d[r]
		v[r] = lin[r] + le[r]
		vold[r] = vp[r]
		x := v[r] - vp[r]
		big = big || x > s.freeStep || x < -s.freeStep
	}
	if big {
		s.limitPorts(s.small.devs, v, vold)
	}
	setSmall(s.v, v)
}

// setSmall copies the first smallK entries of x into dst (which has room
// for them), element by element: cheaper than copy's memmove.
func setSmall(dst []float64, x *portVec) {
	d := (*[smallK]float64)(dst[:smallK])
	d[0], d[1], d[2], d[3] = x[0], x[1], x[2], x[3]
}

// solve4 is solveInPlace written out for four ports; piv receives the
// pivot row of the first three columns, for applyLU4.
func solve4(a *[4][4]float64, b *[4]float64, piv *[3]int) bool {
	// Column 0.
	p, pv := 0, abs(a[0][0])
	if v := abs(a[1][0]); v > pv {
		p, pv = 1, v
	}
	if v := abs(a[2][0]); v > pv {
		p, pv = 2, v
	}
	if v := abs(a[3][0]); v > pv {
		p, pv = 3, v
	}
	if !(pv > 1e-300) || pv == inf {
		return false
	}
	piv[0] = p
	if p != 0 {
		p &= 3
		a[0], a[p] = a[p], a[0]
		b[0], b[p] = b[p], b[0]
	}
	inv := 1 / a[0][0]
	a[0][0] = inv
	x1, x2, x3, bx := a[0][1], a[0][2], a[0][3], b[0]
	if l := a[1][0] * inv; l != 0 {
		a[1][1] -= l * x1
		a[1][2] -= l * x2
		a[1][3] -= l * x3
		b[1] -= l * bx
	}
	if l := a[2][0] * inv; l != 0 {
		a[2][1] -= l * x1
		a[2][2] -= l * x2
		a[2][3] -= l * x3
		b[2] -= l * bx
	}
	if l := a[3][0] * inv; l != 0 {
		a[3][1] -= l * x1
		a[3][2] -= l * x2
		a[3][3] -= l * x3
		b[3] -= l * bx
	}
	// Column 1.
	p, pv = 1, abs(a[1][1])
	if v := abs(a[2][1]); v > pv {
		p, pv = 2, v
	}
	if v := abs(a[3][1]); v > pv {
		p, pv = 3, v
	}
	if !(pv > 1e-300) || pv == inf {
		return false
	}
	piv[1] = p
	if p != 1 {
		p &= 3
		a[1], a[p] = a[p], a[1]
		b[1], b[p] = b[p], b[1]
	}
	inv = 1 / a[1][1]
	a[1][1] = inv
	x2, x3, bx = a[1][2], a[1][3], b[1]
	if l := a[2][1] * inv; l != 0 {
		a[2][2] -= l * x2
		a[2][3] -= l * x3
		b[2] -= l * bx
	}
	if l := a[3][1] * inv; l != 0 {
		a[3][2] -= l * x2
		a[3][3] -= l * x3
		b[3] -= l * bx
	}
	// Column 2.
	p, pv = 2, abs(a[2][2])
	if v := abs(a[3][2]); v > pv {
		p, pv = 3, v
	}
	if !(pv > 1e-300) || pv == inf {
		return false
	}
	piv[2] = p
	if p != 2 {
		a[2], a[3] = a[3], a[2]
		b[2], b[3] = b[3], b[2]
	}
	inv = 1 / a[2][2]
	a[2][2] = inv
	if l := a[3][2] * inv; l != 0 {
		a[3][3] -= l * a[2][3]
		b[3] -= l * b[2]
	}
	// Column 3.
	if pv = abs(a[3][3]); !(pv > 1e-300) || pv == inf {
		return false
	}
	a[3][3] = 1 / a[3][3]
	// Back substitution.
	b[3] = b[3] * a[3][3]
	b[2] = (b[2] - a[2][3]*b[3]) * a[2][2]
	b[1] = ((b[1] - a[1][2]*b[2]) - a[1][3]*b[3]) * a[1][1]
	b[0] = (((b[0] - a[0][1]*b[1]) - a[0][2]*b[2]) - a[0][3]*b[3]) * a[0][0]
	return true
}

// applyLU4 overwrites d with J⁻¹·d, J factored by solve4 into a and piv:
// the row exchanges, then forward and back substitution with the same
// multipliers, in the order applyLU uses.
func applyLU4(a *[4][4]float64, piv *[3]int, d *[4]float64) {
	for c := 0; c < 3; c++ {
		p := piv[c] & 3
		d[c], d[p] = d[p], d[c]
	}
	d[1] -= a[1][0] * a[0][0] * d[0]
	d[2] -= a[2][0] * a[0][0] * d[0]
	d[3] -= a[3][0] * a[0][0] * d[0]
	d[2] -= a[2][1] * a[1][1] * d[1]
	d[3] -= a[3][1] * a[1][1] * d[1]
	d[3] -= a[3][2] * a[2][2] * d[2]
	d[3] = d[3] * a[3][3]
	d[2] = (d[2] - a[2][3]*d[3]) * a[2][2]
	d[1] = ((d[1] - a[1][2]*d[2]) - a[1][3]*d[3]) * a[1][1]
	d[0] = (((d[0] - a[0][1]*d[1]) - a[0][2]*d[2]) - a[0][3]*d[3]) * a[0][0]
}
