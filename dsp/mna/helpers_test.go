package mna_test

import (
	"math"
	"strings"
	"testing"

	"renderchain/dsp/mna"
	"renderchain/models"
)

// Exact SI defining constants (BIPM SI Brochure, 9th ed., table 1), written
// out here rather than taken from the package under test.
const (
	siBoltzmann = 1.380649e-23
	siCharge    = 1.602176634e-19
	tnom        = 298.15 // K
)

func vtRef(t float64) float64 { return siBoltzmann * t / siCharge }

func relErr(got, want float64) float64 {
	if want == 0 {
		return math.Abs(got)
	}
	return math.Abs(got-want) / math.Abs(want)
}

// netlist is a small circuit builder: parts name their nodes.
type netlist struct{ c *models.Circuit }

func newNet() *netlist { return &netlist{models.NewCircuit("test", tnom)} }

func (n *netlist) node(name string) int { return n.c.Node(name) }

func (n *netlist) add(kind models.Kind, ref string, v float64, nodes ...string) *models.Element {
	e := models.Element{Ref: ref, Kind: kind, Value: v}
	for _, s := range nodes {
		e.Nodes = append(e.Nodes, n.c.Node(s))
	}
	k := n.c.Add(e)
	return &n.c.Elements[k]
}

func (n *netlist) R(ref, a, b string, v float64) { n.add(models.ResistorKind, ref, v, a, b) }
func (n *netlist) C(ref, a, b string, v float64) { n.add(models.CapacitorKind, ref, v, a, b) }
func (n *netlist) L(ref, a, b string, v float64) { n.add(models.InductorKind, ref, v, a, b) }
func (n *netlist) V(ref, p, m string, v float64) { n.add(models.VoltageSourceKind, ref, v, p, m) }

// Sig adds the signal source (DC value v) from node p to ground.
func (n *netlist) Sig(ref, p string, v float64) {
	n.add(models.VoltageSourceKind, ref, v, p, "gnd").Signal = true
	n.c.Input = n.c.Node(p)
}

func (n *netlist) D(ref, a, k string, p models.DiodeParams) {
	n.add(models.DiodeKind, ref, 0, a, k).Diode = p
}

func (n *netlist) Q(ref, c, b, e string, p models.BJTParams) {
	n.add(models.BJTKind, ref, 0, c, b, e).BJT = p
}

func (n *netlist) Buf(ref, out, in string) { n.add(models.BufferKind, ref, 0, out, in) }

// kclResidual recomputes every element's current from the solved node
// voltages with the device models and the source/inductor branch currents,
// and returns the largest net current leaving any non-ground node.
func kclResidual(op *mna.OperatingPoint) float64 {
	c := op.Circuit
	leave := make([]float64, len(c.Nodes))
	v := op.Node
	for i, e := range c.Elements {
		switch e.Kind {
		case models.ResistorKind:
			ia := (v[e.Nodes[0]] - v[e.Nodes[1]]) / e.Value
			leave[e.Nodes[0]] += ia
			leave[e.Nodes[1]] -= ia
		case models.InductorKind, models.VoltageSourceKind:
			ia := op.Branch[i]
			leave[e.Nodes[0]] += ia
			leave[e.Nodes[1]] -= ia
		case models.BufferKind:
			leave[e.Nodes[0]] += op.Branch[i]
		case models.DiodeKind:
			ia, _ := models.NewDiode(e.Diode, c.Temperature).Current(v[e.Nodes[0]] - v[e.Nodes[1]])
			leave[e.Nodes[0]] += ia
			leave[e.Nodes[1]] -= ia
		case models.BJTKind:
			col, base, em := e.Nodes[0], e.Nodes[1], e.Nodes[2]
			ib, ic := models.NewBJT(e.BJT, c.Temperature).Currents(v[base]-v[em], v[col]-v[em])
			leave[base] += ib
			leave[col] += ic
			leave[em] -= ib + ic
		}
	}
	worst := 0.0
	for k := 1; k < len(leave); k++ {
		worst = math.Max(worst, math.Abs(leave[k]))
	}
	return worst
}

// lambertW returns the principal branch W0(x) for x = e^lnx > 0, given ln x
// so that arguments far beyond float64 range (e^200 and more) can be
// passed. W is the inverse of w·e^w (Corless, Gonnet, Hare, Jeffrey &
// Knuth, "On the Lambert W function", Adv. Comput. Math. 5, 1996).
//
// For ln x < 1 it runs Halley's iteration on f(w) = w·e^w − x from
// log1p(x); otherwise Newton's on g(w) = w + ln w − ln x from
// ln x − ln ln x, where g is increasing and concave and the start lies
// left of the root, so the iterates rise monotonically to it.
func lambertW(lnx float64) float64 {
	if lnx < 1 {
		x := math.Exp(lnx)
		w := math.Log1p(x)
		for k := 0; k < 100; k++ {
			ew := math.Exp(w)
			f := w*ew - x
			d := ew*(w+1) - (w+2)*f/(2*w+2)
			dw := f / d
			w -= dw
			if math.Abs(dw) <= 1e-16*(1+math.Abs(w)) {
				break
			}
		}
		return w
	}
	w := lnx - math.Log(lnx)
	if w <= 0 {
		w = 1e-3
	}
	for k := 0; k < 100; k++ {
		g := w + math.Log(w) - lnx
		dw := g / (1 + 1/w)
		w -= dw
		if math.Abs(dw) <= 1e-16*w {
			break
		}
	}
	return w
}

// diodeSeriesCurrent is the exact current through a diode (Is, n·Vt) in
// series with a resistor R across a voltage V (Banwell & Jayakumar,
// "Exact analytical solution for current flow through diode with series
// resistance", Electronics Letters 36(4), 2000):
//
//	I = (nVt/R)·W((Is·R/nVt)·exp((V + Is·R)/nVt)) − Is
func diodeSeriesCurrent(v, r, is, nvt float64) float64 {
	lnArg := math.Log(is*r/nvt) + (v+is*r)/nvt
	return nvt/r*lambertW(lnArg) - is
}

func oneLine(t *testing.T, err error) {
	t.Helper()
	if err != nil && strings.ContainsAny(err.Error(), "\n\r") {
		t.Errorf("error message spans lines: %q", err.Error())
	}
}

func siDiode() models.DiodeParams {
	p := *models.Presets["si-signal"].Diode
	p.Rs = 0
	return p
}
