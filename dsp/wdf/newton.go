package wdf

import "math"

// evalDevices evaluates every device at s.v into s.i and s.jd.
func (s *Solver) evalDevices() {
	o := 0
	v, i, jd := s.v, s.i, s.jd
	for n := range s.devs {
		d := &s.devs[n]
		switch {
		case d.chg != nil && (d.bjt != nil || d.dio != nil):
			s.evalChargedDirect(d, o)
		case d.bjt != nil:
			var j [4]float64
			i[d.off], i[d.off+1], j = d.bjt.Eval2(v[d.off], v[d.off+1])
			b := jd[o : o+4 : o+4]
			b[0], b[1], b[2], b[3] = j[0], j[1], j[2], j[3]
		case d.dio != nil:
			i[d.off], jd[o] = d.dio.Current(v[d.off])
		default:
			d.model.Eval(v[d.off:d.off+d.n], i[d.off:d.off+d.n], jd[o:o+d.n*d.n])
			if d.chg != nil {
				s.addCharges(d, o, v[d.off:d.off+d.n], i[d.off:d.off+d.n], jd[o:o+d.n*d.n])
			}
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
	if s.small != nil {
		return s.newtonSmall(p, maxIter)
	}
	if s.mid != nil {
		return s.newtonMid(p, maxIter)
	}
	s.haveLU = false
	k := s.k
	if k == 0 {
		return 0, true // a linear circuit: nothing to solve
	}
	v, i, f, dv, kk := s.v[:k], s.i[:k], s.f[:k], s.dv[:k], s.kk[:k*k]
	vBest := s.vBest[:k]
	p = p[:k]
	best := inf
	for it := 1; it <= maxIter; it++ {
		s.evalDevices()
		// Residual F = v − p − K·i and Newton matrix J = I − K·Jf.
		res := 0.0
		// Row by row in the order of dot (as the array kernels sum).
		ki := s.ki[:k]
		for r := range ki {
			ki[r] = dot(kk[r*k:r*k+k], i)
		}
		for r := range f {
			acc := v[r] - p[r] - ki[r]
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
			copyVec(vBest, v)
		}
		s.buildJacobian()
		if !solveInPlace(s.jac, f, s.piv, k) {
			return it, false
		}
		// Limited step.
		for r := range dv {
			dv[r] = v[r]
			v[r] += f[r]
		}
		s.limit(v, dv)
		step := 0.0
		for r := range dv {
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
			firstOrder(s.devs, i, s.jd, dv)
			if s.charged {
				// The charges likewise (see commitCharges).
				firstOrder(s.devs, s.qEval, s.cEval, dv)
			}
			s.haveLU = true
			return it, true
		}
	}
	return maxIter, false
}

// firstOrder adds jb·dv to x device by device, jb the devices' row-major
// blocks packed as s.jd: the first-order update of the currents (or
// charges) x to the accepted voltages.
func firstOrder(devs []devSlot, x, jb, dv []float64) {
	o := 0
	for _, d := range devs {
		switch d.n {
		case 1:
			x[d.off] += jb[o] * dv[d.off]
		case 2:
			a, b := dv[d.off], dv[d.off+1]
			x[d.off] += jb[o]*a + jb[o+1]*b
			x[d.off+1] += jb[o+2]*a + jb[o+3]*b
		default:
			n := d.n
			for r := 0; r < n; r++ {
				acc := 0.0
				for c := 0; c < n; c++ {
					acc += jb[o+r*n+c] * dv[d.off+c]
				}
				x[d.off+r] += acc
			}
		}
		o += d.n * d.n
	}
}

// limit applies each device's junction limiting to the step vold → v.
// A step of at most freeStep on every port is left alone: no junction
// limiting acts on it (see shared.freeStep).
func (s *Solver) limit(v, vold []float64) {
	if s.freeStep > 0 {
		vold = vold[:len(v)]
		big := false
		for r, x := range v {
			if d := x - vold[r]; d > s.freeStep || d < -s.freeStep {
				big = true
				break
			}
		}
		if !big {
			return
		}
	}
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

// buildJacobian writes J = I − K·Jf, Jf block-diagonal by device.
func (s *Solver) buildJacobian() {
	if s.kp != nil {
		s.buildJacobianPairs()
		return
	}
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

// buildJacobianPairs is buildJacobian when every device has one or two
// ports: column c of Jf then holds ∂i_c/∂v_c (jd) and ∂i_q/∂v_c (jo) for
// the other port q of its device (none for a diode), so that
// J[r][c] = δ_rc − (K[r][c]·jd[c] + K[r][q]·jo[c]), the second product
// from K with its columns permuted (kp). The same products and sums as
// buildJacobian, in a loop over whole rows.
func (s *Solver) buildJacobianPairs() {
	k, jd := s.k, s.jd
	pd, po := s.pd[:k], s.po[:k]
	o := 0
	for _, d := range s.devs {
		c := d.off
		if d.n == 2 {
			b := jd[o : o+4 : o+4]
			pd[c], po[c], pd[c+1], po[c+1] = b[0], b[2], b[3], b[1]
			o += 4
		} else {
			pd[c], po[c] = jd[o], 0
			o++
		}
	}
	kk, kp, jac := s.kk[:k*k], s.kp[:k*k], s.jac[:k*k]
	for r := 0; r < k; r++ {
		jr, kr, pr := jac[r*k:r*k+k], kk[r*k:r*k+k], kp[r*k:r*k+k]
		kr, pr, pd, po := kr[:len(jr)], pr[:len(jr)], pd[:len(jr)], po[:len(jr)]
		for c := range jr {
			jr[c] = -(kr[c]*pd[c] + pr[c]*po[c])
		}
		jr[r]++
	}
}

// solveInPlace solves a·x = b for the row-major k×k matrix a by Gaussian
// elimination with partial pivoting, overwriting a and leaving x in b. It
// reports false for a singular or non-finite matrix. The pivots'
// reciprocals are kept on a's diagonal, so back substitution multiplies
// instead of dividing (k divisions in all); piv[c] receives the row
// exchanged with row c. The factors stay in a for applyLU.
func solveInPlace(a, b []float64, piv []int, k int) bool {
	a = a[:k*k]
	b = b[:k]
	piv = piv[:k]
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
		piv[c] = p
		rc := a[c*k : c*k+k]
		if p != c {
			// Whole rows, the multipliers left of the diagonal included,
			// so that applyLU can apply every exchange first.
			rp := a[p*k : p*k+k]
			rp = rp[:len(rc)]
			for j, x := range rc {
				rc[j], rp[j] = rp[j], x
			}
			b[c], b[p] = b[p], b[c]
		}
		inv := 1 / rc[c]
		rc[c] = inv
		tail := rc[c+1:]
		bc := b[c]
		// Rows with a zero multiplier (structural zeros of a sparse
		// Newton matrix: see pruneK) are passed over.
		for r := c + 1; r < k; r++ {
			rr := a[r*k+c : r*k+k]
			l := rr[0] * inv
			if l == 0 {
				continue
			}
			rr = rr[1:]
			rr = rr[:len(tail)]
			for j, x := range tail {
				rr[j] -= l * x
			}
			b[r] -= l * bc
		}
	}
	for r := k - 1; r >= 0; r-- {
		ra := a[r*k+r : r*k+k]
		bt := b[r+1:]
		bt = bt[:len(ra)-1]
		acc := b[r]
		for j, x := range bt {
			acc -= ra[j+1] * x
		}
		b[r] = acc * ra[0]
	}
	return true
}

// applyLU overwrites d with J⁻¹·d for the k×k matrix J that solveInPlace
// factored into a and piv: its row exchanges, then forward substitution
// with its multipliers (below the diagonal a holds each row's entry before
// its elimination, the diagonal the pivot's reciprocal), then back
// substitution.
func applyLU(a []float64, piv []int, d []float64, k int) {
	a = a[:k*k]
	d = d[:k]
	piv = piv[:k]
	for c, p := range piv {
		d[c], d[p] = d[p], d[c]
	}
	for c := 0; c < k; c++ {
		for r := c + 1; r < k; r++ {
			d[r] -= a[r*k+c] * a[c*k+c] * d[c]
		}
	}
	for r := k - 1; r >= 0; r-- {
		acc := d[r]
		for j := r + 1; j < k; j++ {
			acc -= a[r*k+j] * d[j]
		}
		d[r] = acc * a[r*k+r]
	}
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

// predict writes the Newton start for s.p into s.v: the last solution
// moved along the linearised solution map, v ≈ v_prev + J⁻¹·(p − p_prev),
// J the Newton matrix of the last sample's solve (whose factors are kept:
// the step costs one forward and back substitution, no device
// evaluation), plus the error this linear prediction made at the last
// sample, which varies slowly with the signal (its leading term is the
// curvature of the solution map times the square of the change in p).
// Without factors (after Reset or a sample that did not converge) the
// start is the last solution. The start is junction-limited against the
// last solution, so that no start puts a junction far into forward bias.
// With device charges p is taken as p − K·h, h the charge history that
// the trapezoidal rule carries from sample to sample (charge.go): the
// history moves the solution just as the leaves' waves do.
//
// On the uncharged demo chain at 4× this predictor needs 2.24 iterations
// per sample, against 2.64 for the quadratic extrapolation of the last
// three solutions used before it; on the charged demo, 2.33 with the
// history term against 3.01 without it.
func (s *Solver) predict() {
	v := s.v
	vp := s.vPrev[:len(v)]
	s.predicted = s.haveLU
	if !s.predicted {
		copyVec(v, vp)
		s.limit(v, vp)
		return
	}
	if s.small != nil {
		s.predictSmall()
		return
	}
	d := s.dp[:len(v)]
	p, pp := s.p[:len(d)], s.pPrev[:len(d)]
	for r := range d {
		d[r] = p[r] - pp[r]
	}
	if s.charged {
		// With device charges the residual is v − p − K·(f(v) + (2/T)·q(v)
		// − h), h the charge history (2/T)·q[n−1] + i_q[n−1]: the history
		// moves the solution as p − K·h does.
		k := len(d)
		kk, dh := s.kk[:k*k], s.dh[:k]
		for r := range d {
			d[r] -= dot(kk[r*k:r*k+k], dh)
		}
	}
	if s.mid != nil {
		applyLUPorts(&s.lu16, &s.piv16, &s.perm16, d)
	} else {
		applyLU(s.jac, s.piv, d, s.k)
	}
	lin, le := s.lin[:len(d)], s.linErr[:len(d)]
	for r := range d {
		lin[r] = vp[r] + d[r]
		v[r] = lin[r] + le[r]
	}
	s.limit(v, vp)
}

// solve finds the root's device voltages for s.p, falling back to a
// sub-stepped continuation from the previous sample's p when plain Newton
// fails: p(λ) = pPrev + λ·(p − pPrev) over 4, then 16 sub-steps, each with
// a larger iteration budget. What still fails keeps the iterate with the
// smallest residual (finite by construction) and is counted.
func (s *Solver) solve() {
	s.predict()
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
	// The error of this sample's linear prediction, for the next one.
	linErr := s.linErr[:len(s.v)]
	if ok && s.predicted {
		lin := s.lin[:len(linErr)]
		for r, x := range s.v {
			linErr[r] = x - lin[r]
		}
	} else {
		clear(linErr)
	}
	if s.charged {
		s.commitCharges()
	}
	copyVec(s.vPrev, s.v)
	s.p, s.pPrev = s.pPrev, s.p
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
