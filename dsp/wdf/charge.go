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
// joins its Jacobian, C = ∂q/∂v the device's capacitance matrix. After each
// sample the accepted solution's charge and capacitive current become the
// state; at Reset the state is the DC operating point's (q = q(v0), no
// current), so a render starts at rest. A device without charges (not
// models.Charged, or reporting HasCharges() false) costs nothing here.

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
// (2/T)·C to its Jacobian block jd (row-major n×n), at port voltages v.
// Diodes and transistors are called directly (Charge, Charges2: the same
// numbers Charges gives).
func (s *Solver) addCharges(d *devSlot, v, i, jd []float64) {
	var q, c []float64
	switch {
	case d.bjt != nil:
		var m [4]float64
		q, c = s.chq[:2], s.chc[:4]
		q[0], q[1], m = d.bjt.Charges2(v[0], v[1])
		c[0], c[1], c[2], c[3] = m[0], m[1], m[2], m[3]
	case d.dio != nil:
		q, c = s.chq[:1], s.chc[:1]
		q[0], c[0] = d.dio.Charge(v[0])
	default:
		q, c = s.charges(d.chg, v)
	}
	g := s.twoOverT
	qp, ip := s.qPrev[d.off:d.off+d.n], s.iqPrev[d.off:d.off+d.n]
	for r := range q {
		i[r] += g*(q[r]-qp[r]) - ip[r]
	}
	for x, cx := range c {
		jd[x] += g * cx
	}
}

// addChargesSmall is addCharges for the fixed-size kernel, whose Jacobian
// is held by columns (jd: ∂i_c/∂v_c, jo: ∂i_partner/∂v_c).
func (s *Solver) addChargesSmall(d *smallDev, v, i, jd, jo *[smallK]float64) {
	c0 := d.c & (smallK - 1)
	g := s.twoOverT
	if d.n == 1 {
		var q, c float64
		if d.dio != nil {
			q, c = d.dio.Charge(v[c0])
		} else {
			var vv [1]float64
			vv[0] = v[c0]
			qs, cs := s.charges(d.chg, vv[:])
			q, c = qs[0], cs[0]
		}
		i[c0] += g*(q-s.qPrev[c0]) - s.iqPrev[c0]
		jd[c0] += g * c
		return
	}
	c1 := (c0 + 1) & (smallK - 1)
	var q [2]float64
	var c [4]float64
	if d.bjt != nil {
		q[0], q[1], c = d.bjt.Charges2(v[c0], v[c1])
	} else {
		var vv [2]float64
		vv[0], vv[1] = v[c0], v[c1]
		qs, cs := s.charges(d.chg, vv[:])
		q[0], q[1] = qs[0], qs[1]
		c[0], c[1], c[2], c[3] = cs[0], cs[1], cs[2], cs[3]
	}
	i[c0] += g*(q[0]-s.qPrev[c0]) - s.iqPrev[c0]
	i[c1] += g*(q[1]-s.qPrev[c1]) - s.iqPrev[c1]
	jd[c0] += g * c[0]
	jo[c0] += g * c[2]
	jd[c1] += g * c[3]
	jo[c1] += g * c[1]
}

// commitCharges makes the accepted solution s.v the charge state: q[n]
// and i_q[n] for the next sample.
func (s *Solver) commitCharges() {
	g := s.twoOverT
	for n := range s.devs {
		d := &s.devs[n]
		if d.chg == nil {
			continue
		}
		q, _ := s.charges(d.chg, s.v[d.off:d.off+d.n])
		qp, ip := s.qPrev[d.off:d.off+d.n], s.iqPrev[d.off:d.off+d.n]
		for r := range q {
			ip[r] = g*(q[r]-qp[r]) - ip[r]
			qp[r] = q[r]
		}
	}
}

// resetCharges sets the charge state at the operating point v0: q = q(v0)
// and no capacitive current.
func (s *Solver) resetCharges() {
	for n := range s.devs {
		d := &s.devs[n]
		if d.chg == nil {
			continue
		}
		q, _ := s.charges(d.chg, s.v0[d.off:d.off+d.n])
		copy(s.qPrev[d.off:d.off+d.n], q)
		clear(s.iqPrev[d.off : d.off+d.n])
	}
}
