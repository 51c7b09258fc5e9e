package mna

import (
	"context"
	"fmt"
	"math"

	"renderchain/models"
)

// OperatingPoint is a solved DC state of a circuit.
type OperatingPoint struct {
	Circuit *models.Circuit
	// Node holds every node's voltage, indexed like Circuit.Nodes.
	Node []float64
	// Branch holds the DC current of each voltage source, buffer and
	// inductor, by element index (current from the first pin through the
	// element to the second); for an ideal transformer, the current into
	// the start of its second winding.
	Branch map[int]float64
	// Devices are the nonlinear devices with their port voltages, currents
	// and Jacobians at the operating point.
	Devices []DeviceState
	// Iterations is the total number of Newton iterations spent, and
	// Method the continuation that succeeded: "newton", "gmin",
	// "gmin-junction" (gmin stepping finished with 1e-12 S across every
	// device port) or "source".
	Iterations int
	Method     string
}

// DeviceState is a nonlinear device at an operating point.
type DeviceState struct {
	models.DeviceInstance
	V, I, Jac []float64
}

// NonConvergenceError reports a DC solve that no continuation could finish.
type NonConvergenceError struct {
	Iterations int
	Residual   float64
}

func (e *NonConvergenceError) Error() string {
	return fmt.Sprintf("DC operating point did not converge after %d Newton iterations (last step %.3g V); check for a device biased far outside its range", e.Iterations, e.Residual)
}

// DCOptions tune the DC solve; the zero value picks the defaults.
type DCOptions struct {
	MaxIter int     // per Newton run (default 200)
	VTol    float64 // step tolerance in volts (default 1e-10)
}

// SolveDC finds the DC operating point: capacitors open, inductors
// shorted, sources at their DC values (the signal source at its DC value).
// It tries plain damped Newton first, then gmin stepping (a conductance from
// every node to ground, lowered a decade at a time from 1 mS to zero), then
// source stepping (all sources ramped from 0 to full value), the two
// continuations of classical circuit simulation (Nagel, UCB ERL-M520,
// 1975, sec. 4.4).
func SolveDC(c *models.Circuit, opt DCOptions) (*OperatingPoint, error) {
	return SolveDCContext(context.Background(), c, opt)
}

// SolveDCContext is SolveDC that stops when ctx is done: every Newton
// iteration of every continuation (plain Newton, gmin stepping, source
// stepping) checks ctx first, so a cancelled solve returns within one
// iteration (one factorisation of the DC system) with an error wrapping
// ctx's error (errors.Is context.Canceled, or the context's cause).
func SolveDCContext(ctx context.Context, c *models.Circuit, opt DCOptions) (*OperatingPoint, error) {
	if opt.MaxIter == 0 {
		opt.MaxIter = 200
	}
	if opt.VTol == 0 {
		opt.VTol = 1e-10
	}
	if err := c.Check(); err != nil {
		return nil, err
	}
	s := newDCSolver(c, opt)
	s.ctx = ctx
	total := 0
	x := make([]float64, s.lay.Dim)
	// 1. Plain Newton from zero.
	it, err := s.newton(x, 0, 1)
	total += it
	method := "newton"
	if stopped(err) {
		return nil, err
	}
	if err != nil {
		// 2. gmin stepping.
		method = "gmin"
		clear(x)
		s.resetDevices()
		err = nil
		for g := 1e-3; g >= 1e-13; g /= 10 {
			it, err = s.newton(x, g, 1)
			total += it
			if stopped(err) {
				return nil, err
			}
			if err != nil {
				break
			}
		}
		if err == nil {
			saved := append([]float64(nil), x...)
			it, err = s.newton(x, 0, 1)
			total += it
			if stopped(err) {
				return nil, err
			}
			if err != nil {
				// A node held only by junctions that are off has no defined
				// voltage without some conductance: finish with the classical
				// minimum conductance (1e-12 S) across every device port.
				copy(x, saved)
				s.portGmin = junctionGmin
				it, err = s.newton(x, 0, 1)
				total += it
				method = "gmin-junction"
				if stopped(err) {
					return nil, err
				}
			}
		}
	}
	if err != nil {
		// 3. Source stepping with an adaptive step.
		method = "source"
		clear(x)
		s.resetDevices()
		err = nil
		lambda, step := 0.0, 0.1
		good := append([]float64(nil), x...)
		for lambda < 1 && step > 1e-6 {
			next := math.Min(1, lambda+step)
			it, e := s.newton(x, 0, next)
			total += it
			if stopped(e) {
				return nil, e
			}
			if e != nil {
				copy(x, good)
				step /= 4
				err = e
				continue
			}
			err = nil
			lambda = next
			copy(good, x)
			step = math.Min(step*2, 0.25)
		}
		if lambda < 1 && err == nil {
			err = &NonConvergenceError{Iterations: total}
		}
	}
	if err != nil {
		if nc, ok := err.(*NonConvergenceError); ok {
			nc.Iterations = total
		}
		return nil, err
	}
	return s.result(x, total, method), nil
}

// junctionGmin is the conductance put across device ports as a last resort
// (the classical GMIN of circuit simulation, L. W. Nagel, 1975).
const junctionGmin = 1e-12

type dcSolver struct {
	ctx      context.Context
	portGmin float64 // conductance across every device port (last resort)
	c        *models.Circuit
	opt      DCOptions
	lay      *Layout
	sys      *Real
	lu       *LU
	devs     []DeviceState
	vold     [][]float64
}

func newDCSolver(c *models.Circuit, opt DCOptions) *dcSolver {
	lay := NewLayout(c, true)
	s := &dcSolver{c: c, opt: opt, lay: lay, sys: NewReal(lay), lu: NewLU(lay.Dim)}
	for _, d := range c.Devices() {
		p := d.Model.Ports()
		s.devs = append(s.devs, DeviceState{DeviceInstance: d, V: make([]float64, p), I: make([]float64, p), Jac: make([]float64, p*p)})
		s.vold = append(s.vold, make([]float64, p))
	}
	return s
}

// cancelled returns the error of a done context, else nil.
func (s *dcSolver) cancelled() error {
	if s.ctx == nil {
		return nil
	}
	select {
	case <-s.ctx.Done():
		return &CancelError{Cause: context.Cause(s.ctx)}
	default:
		return nil
	}
}

// stopped reports whether err is the solve's own cancellation.
func stopped(err error) bool {
	_, ok := err.(*CancelError)
	return ok
}

// CancelError reports a DC solve stopped by its context; it unwraps to
// the context's cause (context.Canceled, or what the canceller gave).
type CancelError struct{ Cause error }

func (e *CancelError) Error() string { return "DC operating point: stopped (" + e.Cause.Error() + ")" }

// Unwrap returns the context's cause.
func (e *CancelError) Unwrap() error { return e.Cause }

func (s *dcSolver) resetDevices() {
	for k := range s.vold {
		clear(s.vold[k])
	}
}

// stampLinear writes the DC linear part with every source scaled by lambda.
func (s *dcSolver) stampLinear(gmin, lambda float64) {
	sys := s.sys
	sys.Reset()
	for i := range s.c.Elements {
		e := &s.c.Elements[i]
		switch e.Kind {
		case models.ResistorKind:
			sys.Conductance(e.Nodes[0], e.Nodes[1], 1/e.Value)
		case models.InductorKind:
			sys.Branch(i, e.Nodes[0], e.Nodes[1], 0, 0)
		default:
			sys.Ideal(i, e, lambda*e.Value)
		}
	}
	if gmin > 0 {
		for n := 1; n < s.lay.Nodes; n++ {
			sys.Conductance(n, models.Ground, gmin)
		}
	}
}

func portVoltages(x []float64, ports []models.Port, v []float64) {
	for k, p := range ports {
		v[k] = NodeVoltage(x, p.Plus) - NodeVoltage(x, p.Minus)
	}
}

// newton iterates from x (updated in place) until the step is below VTol.
func (s *dcSolver) newton(x []float64, gmin, lambda float64) (int, error) {
	step := math.Inf(1)
	for it := 1; it <= s.opt.MaxIter; it++ {
		if err := s.cancelled(); err != nil {
			return it - 1, err
		}
		s.stampLinear(gmin, lambda)
		for k := range s.devs {
			d := &s.devs[k]
			portVoltages(x, d.Ports, d.V)
			if it > 1 {
				d.Model.Limit(d.V, s.vold[k])
			}
			copy(s.vold[k], d.V)
			d.Model.Eval(d.V, d.I, d.Jac)
			s.sys.Device(d.Ports, d.V, d.I, d.Jac)
			if s.portGmin > 0 {
				for _, p := range d.Ports {
					s.sys.Conductance(p.Plus, p.Minus, s.portGmin)
				}
			}
		}
		if err := s.lu.Factor(s.sys.A); err != nil {
			return it, Singular(s.c, s.lay, err, "DC equations are singular")
		}
		xn := s.sys.Z
		s.lu.Solve(xn)
		step = 0
		for i := range x {
			if math.IsNaN(xn[i]) || math.IsInf(xn[i], 0) {
				return it, &NonConvergenceError{Residual: math.Inf(1)}
			}
			step = math.Max(step, math.Abs(xn[i]-x[i]))
		}
		copy(x, xn)
		// Converged when the Newton step is tiny and the devices were
		// evaluated at (not limited away from) the new point.
		if step < s.opt.VTol*(1+maxAbs(x)) && it > 1 && s.unlimited(x) {
			return it, nil
		}
	}
	return s.opt.MaxIter, &NonConvergenceError{Residual: step}
}

// unlimited reports whether the port voltages at x equal those the devices
// were last evaluated at, within the tolerance.
func (s *dcSolver) unlimited(x []float64) bool {
	var buf [8]float64
	for k := range s.devs {
		d := &s.devs[k]
		v := buf[:len(d.Ports)]
		portVoltages(x, d.Ports, v)
		for j := range v {
			if math.Abs(v[j]-s.vold[k][j]) > 1e-6 {
				return false
			}
		}
	}
	return true
}

func maxAbs(x []float64) float64 {
	m := 0.0
	for _, v := range x {
		m = math.Max(m, math.Abs(v))
	}
	return m
}

func (s *dcSolver) result(x []float64, iters int, method string) *OperatingPoint {
	op := &OperatingPoint{Circuit: s.c, Node: make([]float64, s.lay.Nodes), Branch: map[int]float64{}, Iterations: iters, Method: method}
	for n := 1; n < s.lay.Nodes; n++ {
		op.Node[n] = x[n-1]
	}
	for e, k := range s.lay.Branches {
		op.Branch[e] = x[s.lay.Nodes-1+k]
	}
	for _, d := range s.devs {
		ds := DeviceState{DeviceInstance: d.DeviceInstance, V: make([]float64, len(d.V)), I: make([]float64, len(d.I)), Jac: make([]float64, len(d.Jac))}
		portVoltages(x, d.Ports, ds.V)
		d.Model.Eval(ds.V, ds.I, ds.Jac)
		op.Devices = append(op.Devices, ds)
	}
	return op
}

// ElementVoltage returns the DC voltage across element e (first pin minus
// second).
func (op *OperatingPoint) ElementVoltage(e int) float64 {
	el := op.Circuit.Elements[e]
	return op.Node[el.Nodes[0]] - op.Node[el.Nodes[1]]
}
