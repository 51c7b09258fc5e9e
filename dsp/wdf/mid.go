package wdf

import "math"

// The Newton kernel for mid-size roots: more than smallK and at most midK
// nonlinear ports, every device one with one or two ports. Its vectors
// and matrices are arrays of midK entries held by the solver, indexed
// with masked indices (no bounds checks) over loops bounded by the port
// count k; K is kept with its columns paired as in buildJacobianPairs,
// and the Newton matrix is factored in place as solveInPlace does it.
// Every sum has the operands and the order of the general kernel
// (residual rows in the order of dot, the elimination of solveInPlace,
// the substitutions of applyLU), so both give the same numbers bit for
// bit (a test checks this on the twelve-port cascade and others).

// portVec is a vector of root port values in the array kernels: the
// fixed-size kernel uses its first smallK entries, the mid-size kernel its
// first k ≤ midK. Indices are masked with portMask, so they need no
// bounds check.
type portVec = [midK]float64

// midK is the largest root the mid-size kernel takes.
const midK = 16

const portMask = midK - 1

// midRoot is the read-only part of the mid-size kernel.
type midRoot struct {
	k int
	// kk is K, kp K with its columns permuted to each port's device
	// partner: kp[r][c] = K[r][partner[c]].
	kk, kp  [midK]portVec
	partner [midK]int
	devs    []smallDev
	// kl is the Newton matrix's lower bandwidth: every entry more than kl
	// below the diagonal is an exact zero (K and kp zero there, see
	// pruneK). With partial pivoting no row further below the column in
	// elimination can then hold a nonzero in it, nor can have been
	// exchanged or updated (the band elimination of LAPACK's dgbtrf), so
	// the pivot search and the elimination stop kl rows below the
	// diagonal: the rows they pass over have zero multipliers, which the
	// general kernel passes over too.
	kl int
}

// newMidRoot returns the mid-size kernel's data, or nil when the root
// does not fit it.
func newMidRoot(sh *shared) *midRoot {
	if sh.k <= smallK || sh.k > midK {
		return nil
	}
	m := &midRoot{k: sh.k}
	devs, ok := pairDevices(sh, &m.partner)
	if !ok {
		return nil
	}
	m.devs = devs
	k := sh.k
	for r := 0; r < k; r++ {
		for c := 0; c < k; c++ {
			m.kk[r][c] = sh.kk[r*k+c]
			m.kp[r][c] = sh.kk[r*k+m.partner[c]]
			if c < r && (m.kk[r][c] != 0 || m.kp[r][c] != 0) {
				m.kl = max(m.kl, r-c)
			}
		}
	}
	return m
}

// newtonMid is newton for a root that fits the mid-size kernel: the same
// iteration, limiting, convergence test and first-order updates, on the
// solver's arrays.
func (s *Solver) newtonMid(pIn []float64, maxIter int) (int, bool) {
	s.haveLU = false
	m := s.mid
	k := m.k
	v, i, vOld, jd, jo := &s.kv, &s.kcur, &s.kvOld, &s.kjd, &s.kjo
	f, dv, a := &s.kf, &s.kdv, &s.lu16
	sv, p := s.v[:k], pIn[:k]
	for r, x := range sv {
		v[r&portMask] = x
	}
	best := inf
	for it := 1; it <= maxIter; it++ {
		s.evalPorts(m.devs, v, i, jd, jo)
		// Residual F = v − p − K·i (negated into f).
		res := 0.0
		ik := i[:k]
		for r, pr := range p {
			rr := r & portMask
			// K's row times i in the order of dot.
			kr := m.kk[rr][:len(ik)]
			var s0, s1, s2, s3 float64
			j := 0
			for ; j+4 <= len(kr); j += 4 {
				s0 += kr[j] * ik[j]
				s1 += kr[j+1] * ik[j+1]
				s2 += kr[j+2] * ik[j+2]
				s3 += kr[j+3] * ik[j+3]
			}
			for ; j < len(kr); j++ {
				s0 += kr[j] * ik[j]
			}
			acc := v[rr] - pr - ((s0 + s1) + (s2 + s3))
			f[rr] = -acc
			if acc < 0 {
				acc = -acc
			}
			if acc > res {
				res = acc
			}
		}
		if res < best {
			best = res
			copy(s.vBest[:k], v[:k])
		}
		// Newton matrix J = I − K·Jf, as buildJacobianPairs.
		jdk, jok := jd[:k], jo[:k]
		for r := 0; r < k; r++ {
			rr := r & portMask
			ar := a[rr][:k]
			kr, pr := m.kk[rr][:len(ar)], m.kp[rr][:len(ar)]
			jdk, jok := jdk[:len(ar)], jok[:len(ar)]
			c := 0
			for ; c+4 <= len(ar); c += 4 {
				w, x, y, u, z := ar[c:c+4:c+4], kr[c:c+4:c+4], jdk[c:c+4:c+4], pr[c:c+4:c+4], jok[c:c+4:c+4]
				w[0] = -(x[0]*y[0] + u[0]*z[0])
				w[1] = -(x[1]*y[1] + u[1]*z[1])
				w[2] = -(x[2]*y[2] + u[2]*z[2])
				w[3] = -(x[3]*y[3] + u[3]*z[3])
			}
			for ; c < len(ar); c++ {
				ar[c] = -(kr[c]*jdk[c] + pr[c]*jok[c])
			}
			a[rr][rr]++
		}
		if !solvePorts(a, f, &s.piv16, &s.perm16, k, m.kl) {
			copy(sv, v[:k])
			return it, false
		}
		// Limited step.
		big := false
		for r := 0; r < k; r++ {
			rr := r & portMask
			vOld[rr] = v[rr]
			v[rr] += f[rr]
			d := v[rr] - vOld[rr]
			big = big || d > s.freeStep || d < -s.freeStep
		}
		if big || s.freeStep == 0 {
			s.limitPorts(m.devs, v, vOld)
		}
		step := 0.0
		for r := 0; r < k; r++ {
			rr := r & portMask
			d := v[rr] - vOld[rr]
			dv[rr] = d
			if d < 0 {
				d = -d
			}
			if d > step {
				step = d
			}
		}
		if !(step < inf) { // NaN or Inf
			copy(sv, v[:k])
			return it, false
		}
		if (step < s.tol || step*step*s.curv < s.tol*0.1) && physicalPorts(m.devs, v) {
			// First-order update of the currents (and the charges) to
			// the accepted v: row c of Jf holds jd[c] and jo[partner(c)].
			for c := 0; c < k; c++ {
				cc := c & portMask
				q := m.partner[cc] & portMask
				i[cc] += jd[cc]*dv[cc] + jo[q]*dv[q]
			}
			if s.charged {
				qe := &s.qEval16
				for c := 0; c < k; c++ {
					cc := c & portMask
					q := m.partner[cc] & portMask
					qe[cc] += s.cd16[cc]*dv[cc] + s.co16[q]*dv[q]
				}
			}
			copy(sv, v[:k])
			copy(s.i[:k], i[:k])
			s.haveLU = true
			return it, true
		}
	}
	copy(sv, v[:k])
	return maxIter, false
}

// solvePorts is solveInPlace on the first k rows and columns of a and b,
// whose lower bandwidth is at most kl (see midRoot.kl): the same pivots,
// multipliers and sums, passing over the same zero multipliers. Rows are
// exchanged through the permutation perm (logical row r is stored in
// a[perm[r]]) rather than moved; piv receives the exchanges as
// solveInPlace records them.
func solvePorts(a *[midK]portVec, b *portVec, piv, perm *[midK]int, k, kl int) bool {
	for r := range perm {
		perm[r] = r
	}
	for c := 0; c < k; c++ {
		cc := c & portMask
		end := min(k, c+kl+1) // rows below end are zero in column c
		p, pv := c, math.Abs(a[perm[cc]&portMask][cc])
		for r := c + 1; r < end; r++ {
			if v := math.Abs(a[perm[r&portMask]&portMask][cc]); v > pv {
				p, pv = r, v
			}
		}
		if !(pv > 1e-300) || pv == inf {
			return false
		}
		piv[cc] = p
		if p != c {
			pp := p & portMask
			perm[cc], perm[pp] = perm[pp], perm[cc]
			b[cc], b[pp] = b[pp], b[cc]
		}
		rc := &a[perm[cc]&portMask]
		inv := 1 / rc[cc]
		rc[cc] = inv
		bc := b[cc]
		tail := rc[c+1 : k : k]
		for r := c + 1; r < end; r++ {
			rr := &a[perm[r&portMask]&portMask]
			l := rr[cc] * inv
			if l == 0 {
				continue
			}
			row := rr[c+1 : k : k]
			row = row[:len(tail)]
			j := 0
			for ; j+4 <= len(tail); j += 4 {
				t, w := tail[j:j+4:j+4], row[j:j+4:j+4]
				w[0] -= l * t[0]
				w[1] -= l * t[1]
				w[2] -= l * t[2]
				w[3] -= l * t[3]
			}
			for ; j < len(tail); j++ {
				row[j] -= l * tail[j]
			}
			b[r&portMask] -= l * bc
		}
	}
	backSubstitute(a, perm, b, k)
	return true
}

// backSubstitute overwrites x with U⁻¹·x, U the upper factor solvePorts
// left in a and perm (the pivots' reciprocals on its diagonal), in the
// order of solveInPlace's and applyLU's back substitution.
func backSubstitute(a *[midK]portVec, perm *[midK]int, x *portVec, k int) {
	for r := k - 1; r >= 0; r-- {
		rr := r & portMask
		ra := a[perm[rr]&portMask][r+1 : k : k]
		xt := x[r+1 : k : k]
		xt = xt[:len(ra)]
		acc := x[rr]
		for j, y := range xt {
			acc -= ra[j] * y
		}
		x[rr] = acc * a[perm[rr]&portMask][rr]
	}
}

// applyLUPorts is applyLU for the factors solvePorts left in a, piv and
// perm, on d (len k ≤ midK). (Its forward substitution runs over every
// row: after the later exchanges a row holding a multiplier of column c
// may sit more than kl rows below it.)
func applyLUPorts(a *[midK]portVec, piv, perm *[midK]int, d []float64) {
	k := len(d)
	var x portVec
	copy(x[:k], d)
	for c := 0; c < k; c++ {
		cc := c & portMask
		p := piv[cc] & portMask
		x[cc], x[p] = x[p], x[cc]
	}
	for c := 0; c < k; c++ {
		cc := c & portMask
		inv, xc := a[perm[cc]&portMask][cc], x[cc]
		for r := c + 1; r < k; r++ {
			rr := r & portMask
			x[rr] -= a[perm[rr]&portMask][cc] * inv * xc
		}
	}
	backSubstitute(a, perm, &x, k)
	copy(d, x[:k])
}
