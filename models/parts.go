package models

import (
	"fmt"
	"math"
	"strings"
)

// InternalMark separates a part's ref from the role of a node or element
// the part adds inside itself (AddPart): "fuzz.Q1#base". Chain files must
// not use it in node names or refs, so an internal name can never meet a
// name a user wrote.
const InternalMark = "#"

// InternalNode is the name of the internal node role of part ref.
func InternalNode(ref, role string) string { return ref + InternalMark + role }

// IsInternal reports whether a node name or ref is one AddPart made.
func IsInternal(name string) bool { return strings.Contains(name, InternalMark) }

// OpAmpParams are the parameters of the op-amp macromodel.
type OpAmpParams struct {
	Gain             float64 // open-loop DC gain A0, V/V (> 1)
	GBW              float64 // gain–bandwidth product, Hz: A0·fp, fp the dominant pole
	InputResistance  float64 // Ω, between the inputs (> 0)
	OutputResistance float64 // Ω, open loop (0: none)
	// HeadroomHigh and HeadroomLow are how far, volts, the output
	// saturates inside the positive and the negative supply pin.
	HeadroomHigh, HeadroomLow float64
	// Knee is the width of the rounding into saturation, V; 0 selects
	// DefaultOpAmpKnee.
	Knee float64
}

// DefaultOpAmpKnee is the op-amp's default saturation knee, 10 mV (the
// project's choice: round enough for Newton's method, sharp enough that
// the swing sits within a few tens of millivolts of the stated headroom).
const DefaultOpAmpKnee = 10e-3

// opAmpGm is the transconductance of the macromodel's input stage, S. It
// only scales the internal gain node (whose resistance is then A0/gm and
// capacitance gm/(2π·GBW)); 1 mS keeps both at sizes that condition well.
const opAmpGm = 1e-3

// opAmpOverdrive is the differential input, V, at which the output
// reaches the stated swing (to within the knee): it sets the limiter
// conductance gm·overdrive/knee.
const opAmpOverdrive = 1.0

// Winding is one winding of a transformer.
type Winding struct {
	Inductance float64 // self-inductance, H (> 0)
	Resistance float64 // winding (copper) resistance, Ω (≥ 0)
}

// TransformerParams are the parameters of a transformer: coupled
// inductors with one coupling coefficient between every pair of windings.
// The mutual inductance of windings i and j is k·√(Li·Lj).
type TransformerParams struct {
	Coupling float64 // k, 0 < k ≤ 1
	Windings []Winding
}

func (p OpAmpParams) check() string {
	switch {
	case !finite(p.Gain, p.GBW, p.InputResistance, p.OutputResistance, p.HeadroomHigh, p.HeadroomLow, p.Knee):
		return "op-amp parameters must be finite"
	case !(p.Gain > 1) || p.Gain > 1e9:
		return "op-amp open-loop gain must be above 1 and at most 1e9"
	case !(p.GBW > 0) || p.GBW > 10e9:
		return "op-amp gain–bandwidth must be above 0 and at most 10 GHz"
	case !(p.InputResistance > 0) || p.InputResistance > 1e15:
		return "op-amp input resistance must be above 0 and at most 1 PΩ"
	case p.OutputResistance < 0 || p.OutputResistance > 1e6:
		return "op-amp output resistance must be between 0 and 1 MΩ"
	case p.HeadroomHigh < 0 || p.HeadroomLow < 0 || p.HeadroomHigh > 100 || p.HeadroomLow > 100:
		return "op-amp headroom must be between 0 and 100 V"
	case p.Knee < 0 || p.Knee > 1:
		return "op-amp saturation knee must be between 0 (default) and 1 V"
	}
	return ""
}

func (p TransformerParams) check() string {
	if !(p.Coupling > 0 && p.Coupling <= 1) {
		return fmt.Sprintf("coupling %g must be above 0 and at most 1", p.Coupling)
	}
	if len(p.Windings) < 2 {
		return "a transformer needs at least two windings"
	}
	for i, w := range p.Windings {
		if !(w.Inductance > 0) || w.Inductance > 1e4 || !(w.Resistance >= 0) || w.Resistance > 1e9 {
			return fmt.Sprintf("winding %d needs an inductance above 0 (at most 10 kH) and a finite resistance ≥ 0", i+1)
		}
	}
	return ""
}

// AddPart adds a part to the circuit the way every solver needs it and
// returns the indices of the elements it added:
//
//   - a diode with series resistance Rs: a resistor from the anode to the
//     internal node "junction", the diode from there;
//   - a transistor with base resistance: a resistor from the base pin to
//     the internal node "base", the transistor's base on it;
//   - an op-amp (OpAmpKind) and a transformer (TransformerKind): the
//     elements of their models (OpAmpParams, TransformerParams below);
//   - anything else: the element as it is.
//
// Internal nodes are named InternalNode(e.Ref, role) and internal
// elements e.Ref + InternalMark + role. Parameters are checked first; a
// bad one is a *CircuitError naming e.Ref, and nothing is added.
//
// The op-amp macromodel (pins: in+, in−, out, v+, v−) is linear but for
// its two limiters, so every analysis handles it with the elements it
// already has:
//
//	rin   InputResistance between in+ and in−
//	gm    controlled current gm·(V(in+) − V(in−)) into the gain node
//	rg    A0/gm from the gain node to ground   → DC gain gm·rg = A0
//	cg    gm/(2π·GBW) across rg                → pole fp = GBW/A0
//	high  limiter from the gain node to v+, onset −HeadroomHigh
//	low   limiter from v− to the gain node, onset −HeadroomLow
//	buf   unity buffer from the gain node to the drive node
//	rout  OutputResistance from the drive node to out
//
// The open-loop response is A0/(1 + j·f/fp), the single-pole op-amp of
// the textbooks (Sedra & Smith, "Microelectronic Circuits", the op-amp's
// frequency response; from memory). The limiters' conductance is
// gm·1 V/knee, so the gain node, and the output with no load, saturates
// at V(v+) − HeadroomHigh and V(v−) + HeadroomLow: to within 2.3 knee
// widths for a differential overdrive of 0.1 V to 1 V and within
// overdrive/1 V knee widths beyond. The output current comes from the
// buffer (that is, from ground), not from the supply pins; the supply pins
// only take the limiters' currents. The gain acts on the output voltage
// from ground, so at balance the inputs differ by Vout/A0 (22 µV for an
// output at 4.5 V and 106 dB), far below a real part's input offset.
//
// The transformer (pins: start and end of each winding, dotted end
// first) is built by one exact route: winding i's resistance Ri and
// leakage inductance (1 − k)·Li in series with winding i of an ideal
// transformer of ratios ni = √(Li/L1), and the magnetising inductance
// k·L1 across the ideal transformer's first winding. The ideal windings'
// voltages are ni·v and its currents balance, I1' + Σ ni·Ii = 0, so the
// magnetising current is Σ ni·Ii and winding i's voltage is
//
//	Ri·Ii + (1 − k)·Li·dIi/dt + ni·k·L1·Σj nj·dIj/dt,
//
// whose coefficients are Li on the diagonal ((1 − k)·Li + k·L1·Li/L1) and
// k·L1·√(Li·Lj)/L1 = k·√(Li·Lj) off it: exactly the coupled inductors.
// With k = 1 the leakage inductances are left out.
func (c *Circuit) AddPart(e Element) ([]int, error) {
	fail := func(r string) ([]int, error) { return nil, &CircuitError{e.Ref, r} }
	if want := pinCount(e); len(e.Nodes) != want {
		return fail(fmt.Sprintf("a %s has %d pins, got %d", e.Kind, want, len(e.Nodes)))
	}
	for _, nd := range e.Nodes {
		if nd < 0 || nd >= len(c.Nodes) {
			return fail("pin on an unknown node")
		}
	}
	var r string
	switch e.Kind {
	case OpAmpKind:
		r = e.OpAmp.check()
	case TransformerKind:
		r = e.Transformer.check()
	default:
		r = c.checkElement(e)
		if e.Kind == BJTKind && e.BJT.BaseResistance > 0 && strings.HasPrefix(r, "base resistance needs") {
			r = "" // AddPart is about to provide the internal node
		}
	}
	if r != "" {
		return fail(r)
	}
	var added []int
	add := func(x Element) { added = append(added, c.Add(x)) }
	sub := func(role string) string { return e.Ref + InternalMark + role }
	switch e.Kind {
	case DiodeKind:
		if e.Diode.Rs > 0 {
			j := c.Node(InternalNode(e.Ref, "junction"))
			add(Element{Ref: sub("rs"), Kind: ResistorKind, Nodes: []int{e.Nodes[0], j}, Value: e.Diode.Rs})
			e.Nodes = []int{j, e.Nodes[1]}
		}
		add(e)
	case BJTKind:
		if rb := e.BJT.BaseResistance; rb > 0 {
			b := c.Node(InternalNode(e.Ref, "base"))
			add(Element{Ref: sub("rb"), Kind: ResistorKind, Nodes: []int{e.Nodes[1], b}, Value: rb})
			e.Nodes = []int{e.Nodes[0], b, e.Nodes[2]}
		}
		add(e)
	case OpAmpKind:
		p := e.OpAmp
		inP, inN, out, vp, vn := e.Nodes[0], e.Nodes[1], e.Nodes[2], e.Nodes[3], e.Nodes[4]
		knee := p.Knee
		if knee == 0 {
			knee = DefaultOpAmpKnee
		}
		g := c.Node(InternalNode(e.Ref, "gain"))
		add(Element{Ref: sub("rin"), Kind: ResistorKind, Nodes: []int{inP, inN}, Value: p.InputResistance})
		add(Element{Ref: sub("gm"), Kind: ControlledCurrentKind, Nodes: []int{Ground, g, inP, inN}, Value: opAmpGm})
		add(Element{Ref: sub("rg"), Kind: ResistorKind, Nodes: []int{g, Ground}, Value: p.Gain / opAmpGm})
		add(Element{Ref: sub("cg"), Kind: CapacitorKind, Nodes: []int{g, Ground}, Value: opAmpGm / (2 * math.Pi * p.GBW)})
		gl := opAmpGm * opAmpOverdrive / knee
		add(Element{Ref: sub("high"), Kind: LimiterKind, Nodes: []int{g, vp},
			Limiter: LimiterParams{Onset: -p.HeadroomHigh, Conductance: gl, Knee: knee}})
		add(Element{Ref: sub("low"), Kind: LimiterKind, Nodes: []int{vn, g},
			Limiter: LimiterParams{Onset: -p.HeadroomLow, Conductance: gl, Knee: knee}})
		drive := out
		if p.OutputResistance > 0 {
			drive = c.Node(InternalNode(e.Ref, "drive"))
		}
		add(Element{Ref: sub("buf"), Kind: BufferKind, Nodes: []int{drive, g}})
		if p.OutputResistance > 0 {
			add(Element{Ref: sub("rout"), Kind: ResistorKind, Nodes: []int{drive, out}, Value: p.OutputResistance})
		}
	case TransformerKind:
		p := e.Transformer
		k := p.Coupling
		l1 := p.Windings[0].Inductance
		ideal := make([]int, 0, len(e.Nodes))
		var ratios []float64
		for i, w := range p.Windings {
			start, end := e.Nodes[2*i], e.Nodes[2*i+1]
			at := start
			if w.Resistance > 0 {
				next := c.Node(InternalNode(e.Ref, fmt.Sprintf("w%d", i+1)))
				add(Element{Ref: sub(fmt.Sprintf("r%d", i+1)), Kind: ResistorKind, Nodes: []int{at, next}, Value: w.Resistance})
				at = next
			}
			if k < 1 {
				next := c.Node(InternalNode(e.Ref, fmt.Sprintf("w%d.ideal", i+1)))
				add(Element{Ref: sub(fmt.Sprintf("leak%d", i+1)), Kind: InductorKind, Nodes: []int{at, next}, Value: (1 - k) * w.Inductance})
				at = next
			}
			ideal = append(ideal, at, end)
			if i > 0 {
				ratios = append(ratios, math.Sqrt(w.Inductance/l1))
			}
		}
		add(Element{Ref: sub("mag"), Kind: InductorKind, Nodes: []int{ideal[0], ideal[1]}, Value: k * l1})
		add(Element{Ref: sub("ideal"), Kind: IdealTransformerKind, Nodes: ideal, Ratios: ratios})
	default:
		add(e)
	}
	return added, nil
}
