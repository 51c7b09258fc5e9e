package wdf

import "renderchain/models"

// Charges of nonlinear devices (models.Charged: junction depletion and
// diffusion charge) enter the root's Newton solve with the trapezoidal
// rule, the bilinear discretisation every linear reactive leaf uses. Per
// port, with T the sample period, the capacitive current at sample n is
//
//	i_q[n] = (2/T)·(q(v[n]) − q[n−1]) − i_q[n−1],
//
// the trapezoidal rule q[n] − q[n−1] = (T/2)·(i_q[n] + i_q[n−1]) solved for
// i_q[n] (Chua & Lin, "Computer-Aided Analysis of Electronic Circuits",
// 1975, ch. 4, the trapezoidal companion model of a nonlinear capacitor,
// from memory). It joins the device's current in the residual and (2/T)·C(v)
// joins its Jacobian, C = ∂q/∂v the device's capacitance matrix. The state
// carried from sample to sample is one number per port, the history
//
//	h[n] = (2/T)·q[n−1] + i_q[n−1],   so   i_q[n] = (2/T)·q(v[n]) − h[n],
//
// and h[n+1] = (2/T)·q[n] + i_q[n] = 2·(2/T)·q[n] − h[n] once sample n is
// accepted. At Reset the state is the DC operating point's (q = q(v0), no
// current: h = (2/T)·q(v0)), so a render starts at rest. A device without
// charges (not models.Charged, or reporting HasCharges() false) costs
// nothing here.

// chargedModel returns m's charge interface, or nil when m stores no
// charge.
func chargedModel(m models.Nonlinear) models.Charged {
	c, ok := m.(models.Charged)
	if !ok {
		return nil
	}
	if h, ok := m.(interface{ HasCharges() bool }); ok && !h.HasCharges() {
		return nil
	}
	return c
}

// charges evaluates device d's port charges and capacitance matrix at v
// (its port voltages) into the solver's scratch buffers.
func (s *Solver) charges(d models.Charged, v []float64) (q, c []float64) {
	n := len(v)
	q, c = s.chq[:n], s.chc[:n*n]
	copy(s.chv[:n], v) // the callee sees the solver's buffer, never a stack array
	d.Charges(s.chv[:n], q, c)
	return q, c
}

// addCharges adds device d's capacitive currents to i (its ports) and
// (2/T)·C to its Jacobian block jd (row-major n×n), at port voltages v,
// and keeps the charges and the capacitance block (s.qEval, s.cEval at
// the device's offsets o) for the commit. It serves devices other than
// diodes and transistors (evalChargedDirect evaluates those).
func (s *Solver) addCharges(d *devSlot, o int, v, i, jd []float64) {
	q, c := s.charges(d.chg, v)
	g := s.twoOverT
	h := s.hist[d.off : d.off+d.n]
	copy(s.qEval[d.off:d.off+d.n], q)
	copy(s.cEval[o:o+d.n*d.n], c)
	for r := range q {
		i[r] += g*q[r] - h[r]
	}
	for x, cx := range c {
		jd[x] += g * cx
	}
}

// evalChargedDirect is the general kernel's evaluation of a transistor
// or diode d that stores charge, with its Jacobian block at offset o of
// s.jd: the fused device call (BJT.EvalCharges, Diode.EvalCharge) and
// the capacitive terms as addCharges adds them.
func (s *Solver) evalChargedDirect(d *devSlot, o int) {
	g := s.twoOverT
	c0 := d.off
	if d.dio != nil {
		var q, c float64
		s.i[c0], s.jd[o], q, c = d.dio.EvalCharge(s.v[c0])
		s.i[c0] += g*q - s.hist[c0]
		s.jd[o] += g * c
		s.qEval[c0], s.cEval[o] = q, c
		return
	}
	st := &s.bst
	d.bjt.EvalCharges(s.v[c0], s.v[c0+1], st)
	h := s.hist[c0 : c0+2 : c0+2]
	i := s.i[c0 : c0+2 : c0+2]
	i[0] = st.Ib + (g*st.Qb - h[0])
	i[1] = st.Ic + (g*st.Qc - h[1])
	jd, ce := s.jd[o:o+4:o+4], s.cEval[o:o+4:o+4]
	j, c := &st.J, &st.C
	jd[0], jd[1], jd[2], jd[3] = j[0]+g*c[0], j[1]+g*c[1], j[2]+g*c[2], j[3]+g*c[3]
	ce[0], ce[1], ce[2], ce[3] = c[0], c[1], c[2], c[3]
	s.qEval[c0], s.qEval[c0+1] = st.Qb, st.Qc
}

// evalChargedPorts is the array kernels' evaluation of a device that
// stores charge: its currents and Jacobian (by columns, as evalPorts)
// with the capacitive terms added as addCharges adds them (the same
// arithmetic, so the kernels agree bit for bit), the charges kept in
// s.qEval16 and the capacitance matrix by columns in s.cd16, s.co16.
// Transistors and diodes are evaluated with their charges in one call
// (BJT.EvalCharges, Diode.EvalCharge: the same numbers as the separate
// calls, one exponential fewer).
func (s *Solver) evalChargedPorts(d *smallDev, v, i, jd, jo *portVec) {
	c0 := d.c & portMask
	g := s.twoOverT
	h, qe, cd, co := &s.hist16, &s.qEval16, &s.cd16, &s.co16
	if d.n == 1 {
		var q, c float64
		if d.dio != nil {
			i[c0], jd[c0], q, c = d.dio.EvalCharge(v[c0])
		} else {
			s.evalOther(d, v, i, jd, jo)
			var vv [1]float64
			vv[0] = v[c0]
			qs, cs := s.charges(d.chg, vv[:])
			q, c = qs[0], cs[0]
		}
		i[c0] += g*q - h[c0]
		jd[c0] += g * c
		qe[c0], cd[c0] = q, c
		return
	}
	c1 := (c0 + 1) & portMask
	if d.bjt != nil {
		st := &s.bst
		d.bjt.EvalCharges(v[c0], v[c1], st)
		i[c0] = st.Ib + (g*st.Qb - h[c0])
		i[c1] = st.Ic + (g*st.Qc - h[c1])
		j, c := &st.J, &st.C
		jd[c0], jo[c0], jd[c1], jo[c1] = j[0]+g*c[0], j[2]+g*c[2], j[3]+g*c[3], j[1]+g*c[1]
		qe[c0], qe[c1] = st.Qb, st.Qc
		cd[c0], co[c0], cd[c1], co[c1] = c[0], c[2], c[3], c[1]
		return
	}
	s.evalOther(d, v, i, jd, jo)
	var vv [2]float64
	vv[0], vv[1] = v[c0], v[c1]
	q, c := s.charges(d.chg, vv[:])
	i[c0] += g*q[0] - h[c0]
	i[c1] += g*q[1] - h[c1]
	jd[c0] += g * c[0]
	jo[c0] += g * c[2]
	jd[c1] += g * c[3]
	jo[c1] += g * c[1]
	qe[c0], qe[c1] = q[0], q[1]
	cd[c0], co[c0], cd[c1], co[c1] = c[0], c[2], c[3], c[1]
}

// commitCharges makes the accepted solution the charge state. The charges
// are those of the last device evaluation moved to the accepted voltages
// to first order (s.qEval, updated by the kernels with the capacitance
// matrix and the last step, as the currents are): the capacitive currents
// that went into the accepted root waves and the state are then the same
// numbers, and the devices are not evaluated again. The second-order term
// left out, ½·(dC/dv)·Δv² with the last step Δv within the Newton
// tolerance, is below 1e-20 C for junction charges of picofarads (and the
// diffusion charge's relative error, (Δv/Vt)²/2, below 1e-8 of a
// capacitive current that is itself far below the device current). It
// also records in s.dh the change of the history, which the predictor
// uses. Ports of devices without charges hold zeros throughout.
func (s *Solver) commitCharges() {
	g2 := 2 * s.twoOverT
	k := s.k
	qe, h, dh := s.qEval[:k], s.hist[:k], s.dh[:k]
	for r, q := range qe {
		hn := g2*q - h[r]
		dh[r] = hn - h[r]
		h[r] = hn
	}
}

// resetCharges sets the charge state at the operating point v0: q = q(v0)
// and no capacitive current.
func (s *Solver) resetCharges() {
	clear(s.hist)
	clear(s.dh)
	clear(s.qEval)
	for n := range s.devs {
		d := &s.devs[n]
		if d.chg == nil {
			continue
		}
		q, _ := s.charges(d.chg, s.v0[d.off:d.off+d.n])
		for r, x := range q {
			s.hist[d.off+r] = s.twoOverT * x
			s.qEval[d.off+r] = x
		}
	}
}
