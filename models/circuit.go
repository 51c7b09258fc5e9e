package models

import (
	"fmt"
	"math"
	"sort"
)

// Kind is the kind of a flat-circuit element.
type Kind int

// Element kinds. Pots and trimmers are flattened to resistors; a diode's
// series resistance to a resistor and an internal node.
//
// OpAmpKind and TransformerKind are parts, not elements: Circuit.AddPart
// replaces them by the elements their models are made of, and Check
// rejects them in a circuit.
const (
	ResistorKind Kind = iota
	CapacitorKind
	InductorKind
	VoltageSourceKind // ideal: Nodes[0] is +, Nodes[1] is −
	DiodeKind         // Nodes: anode, cathode
	BJTKind           // Nodes: collector, base, emitter
	BufferKind        // ideal unity-gain buffer: V(Nodes[0]) = V(Nodes[1]), input draws no current
	// ControlledCurrentKind is a voltage-controlled current source, Nodes:
	// out+, out−, control+, control−. A current Value·(V(control+) −
	// V(control−)) flows from out+ through the source to out− (Value in
	// siemens); the control pins draw nothing.
	ControlledCurrentKind
	// IdealTransformerKind is an ideal transformer of N ≥ 2 windings,
	// Nodes: start and end of winding 1, then of winding 2, …; Ratios[i]
	// is the turns ratio of winding i+2 to winding 1. Winding voltages are
	// V_k = Ratios[k−2]·V_1 and the currents into the start pins satisfy
	// I_1 + Σ Ratios[k−2]·I_k = 0: no energy is stored or lost, and DC
	// passes as readily as AC.
	IdealTransformerKind
	JFETKind    // Nodes: drain, gate, source
	MOSFETKind  // Nodes: drain, gate, source (body tied to source)
	LimiterKind // soft limiter one-port, Nodes: +, −
	// OpAmpKind is an op-amp part, Nodes: non-inverting input, inverting
	// input, output, positive supply, negative supply (see OpAmpParams).
	OpAmpKind
	// TransformerKind is a transformer part, Nodes: start and end of each
	// winding in order (see TransformerParams).
	TransformerKind
)

var kindNames = [...]string{"resistor", "capacitor", "inductor", "voltage source", "diode", "transistor", "buffer",
	"controlled current source", "ideal transformer", "JFET", "MOSFET", "limiter", "op-amp", "transformer"}

func (k Kind) String() string {
	if int(k) < len(kindNames) {
		return kindNames[k]
	}
	return "element"
}

// Ground is the index of the reference node "gnd" in every Circuit.
const Ground = 0

// Element is one part of a flat circuit. Value is in SI units: ohms, farads,
// henries, or the DC volts of a source.
type Element struct {
	Ref   string // the chain's name for it, e.g. "fuzz.R3"
	Kind  Kind
	Nodes []int
	Value float64
	// Signal marks the voltage source that carries the chain's input: its
	// voltage is Value plus the signal sample.
	Signal      bool
	Diode       DiodeParams
	BJT         BJTParams
	JFET        JFETParams
	MOSFET      MOSFETParams
	Limiter     LimiterParams
	OpAmp       OpAmpParams
	Transformer TransformerParams
	Ratios      []float64 // turns ratios of an ideal transformer
}

// Circuit is a flat circuit: plain data that every analysis reads. Node 0
// is ground. Temperature is in kelvin.
type Circuit struct {
	Name        string
	Nodes       []string
	Elements    []Element
	Temperature float64
	Output      int // node index of the chain's output
	Input       int // node index the signal source drives
}

// NewCircuit returns an empty circuit holding only the ground node.
func NewCircuit(name string, temperature float64) *Circuit {
	return &Circuit{Name: name, Nodes: []string{"gnd"}, Temperature: temperature}
}

// Node returns the index of the named node, adding it if new.
func (c *Circuit) Node(name string) int {
	for i, n := range c.Nodes {
		if n == name {
			return i
		}
	}
	c.Nodes = append(c.Nodes, name)
	return len(c.Nodes) - 1
}

// Lookup returns the index of the named node, or −1.
func (c *Circuit) Lookup(name string) int {
	for i, n := range c.Nodes {
		if n == name {
			return i
		}
	}
	return -1
}

// Add appends an element and returns its index.
func (c *Circuit) Add(e Element) int {
	c.Elements = append(c.Elements, e)
	return len(c.Elements) - 1
}

// Element returns the element of the given ref, or nil.
func (c *Circuit) Element(ref string) *Element {
	for i := range c.Elements {
		if c.Elements[i].Ref == ref {
			return &c.Elements[i]
		}
	}
	return nil
}

// Clone returns a deep copy, so a variant can be changed without touching c.
func (c *Circuit) Clone() *Circuit {
	d := *c
	d.Nodes = append([]string(nil), c.Nodes...)
	d.Elements = make([]Element, len(c.Elements))
	for i, e := range c.Elements {
		e.Nodes = append([]int(nil), e.Nodes...)
		e.Ratios = append([]float64(nil), e.Ratios...)
		e.Transformer.Windings = append([]Winding(nil), e.Transformer.Windings...)
		d.Elements[i] = e
	}
	return &d
}

// Port is one port of a nonlinear device: current flows into Plus and out of
// Minus, the port voltage is V(Plus) − V(Minus).
type Port struct{ Plus, Minus int }

// DeviceInstance is a nonlinear element of a circuit, evaluated at the
// circuit's temperature, with its ports located in the node list.
type DeviceInstance struct {
	Element int // index into Circuit.Elements
	Ref     string
	Model   Nonlinear
	Ports   []Port
}

// Devices returns the circuit's nonlinear devices in element order.
func (c *Circuit) Devices() []DeviceInstance {
	var out []DeviceInstance
	for k, e := range c.Elements {
		switch e.Kind {
		case DiodeKind:
			out = append(out, DeviceInstance{Element: k, Ref: e.Ref, Model: NewDiode(e.Diode, c.Temperature),
				Ports: []Port{{e.Nodes[0], e.Nodes[1]}}})
		case BJTKind:
			col, base, em := e.Nodes[0], e.Nodes[1], e.Nodes[2]
			out = append(out, DeviceInstance{Element: k, Ref: e.Ref, Model: NewBJT(e.BJT, c.Temperature),
				Ports: []Port{{base, em}, {col, em}}})
		case JFETKind, MOSFETKind:
			d, g, src := e.Nodes[0], e.Nodes[1], e.Nodes[2]
			var m Nonlinear
			if e.Kind == JFETKind {
				m = NewJFET(e.JFET, c.Temperature)
			} else {
				m = NewMOSFET(e.MOSFET, c.Temperature)
			}
			out = append(out, DeviceInstance{Element: k, Ref: e.Ref, Model: m, Ports: []Port{{g, src}, {d, src}}})
		case LimiterKind:
			out = append(out, DeviceInstance{Element: k, Ref: e.Ref, Model: NewLimiter(e.Limiter),
				Ports: []Port{{e.Nodes[0], e.Nodes[1]}}})
		}
	}
	return out
}

// CircuitError reports a circuit that no analysis can solve, naming the
// node or part at fault.
type CircuitError struct {
	What   string // node or part ref
	Reason string
}

func (e *CircuitError) Error() string { return e.What + ": " + e.Reason }

// Check verifies that the circuit is solvable: element values positive and
// finite, device parameters in range, no element with both ends on one
// node, every node with a DC path to ground (a node reached only through
// capacitors floats), no loop of ideal voltage sources, inductors and
// ideal transformer windings (a short at DC), no part that needed AddPart
// put in without it.
func (c *Circuit) Check() error {
	n := len(c.Nodes)
	if !(c.Temperature > 0) || math.IsInf(c.Temperature, 0) {
		return &CircuitError{"circuit", fmt.Sprintf("temperature %g K must be positive and finite", c.Temperature)}
	}
	conduct := newUnion(n) // DC-conducting connectivity
	vloop := newUnion(n)   // voltage-defined connectivity
	for _, e := range c.Elements {
		if want := pinCount(e); len(e.Nodes) != want {
			return &CircuitError{e.Ref, fmt.Sprintf("a %s has %d pins, got %d", e.Kind, want, len(e.Nodes))}
		}
		for _, nd := range e.Nodes {
			if nd < 0 || nd >= n {
				return &CircuitError{e.Ref, "pin on an unknown node"}
			}
		}
		if r := c.checkElement(e); r != "" {
			return &CircuitError{e.Ref, r}
		}
		switch e.Kind {
		case ResistorKind, InductorKind, VoltageSourceKind, DiodeKind, LimiterKind:
			conduct.join(e.Nodes[0], e.Nodes[1])
		case BJTKind, JFETKind:
			conduct.join(e.Nodes[0], e.Nodes[1])
			conduct.join(e.Nodes[1], e.Nodes[2])
		case MOSFETKind:
			conduct.join(e.Nodes[0], e.Nodes[2]) // the gate is insulated
		case BufferKind:
			conduct.join(e.Nodes[0], Ground) // the buffer's output is driven from ground
		case IdealTransformerKind:
			for k := 0; k < len(e.Nodes); k += 2 {
				conduct.join(e.Nodes[k], e.Nodes[k+1])
			}
		}
		// Voltage-defined branches: sources, inductors (at DC), buffer
		// outputs and the windings after the first of an ideal transformer
		// (their voltages are fixed by the first's).
		var pairs [][2]int
		switch e.Kind {
		case VoltageSourceKind, InductorKind:
			pairs = [][2]int{{e.Nodes[0], e.Nodes[1]}}
		case BufferKind:
			pairs = [][2]int{{e.Nodes[0], Ground}}
		case IdealTransformerKind:
			for k := 2; k < len(e.Nodes); k += 2 {
				pairs = append(pairs, [2]int{e.Nodes[k], e.Nodes[k+1]})
			}
		}
		for _, pr := range pairs {
			a, b := pr[0], pr[1]
			if vloop.find(a) == vloop.find(b) {
				what := "short across a source"
				switch e.Kind {
				case InductorKind:
					what = "inductor closes a loop of sources and inductors (a short at DC)"
				case IdealTransformerKind:
					what = "winding closes a loop of sources, inductors and windings (a short at DC)"
				}
				return &CircuitError{e.Ref, what + " between " + c.Nodes[a] + " and " + c.Nodes[b]}
			}
			vloop.join(a, b)
		}
	}
	var floating []string
	for i := 1; i < n; i++ {
		if conduct.find(i) != conduct.find(Ground) {
			floating = append(floating, c.Nodes[i])
		}
	}
	if len(floating) > 0 {
		sort.Strings(floating)
		return &CircuitError{"node " + floating[0], "has no DC path to ground: only capacitors connect it to the rest of the circuit"}
	}
	return nil
}

// checkElement reports what is wrong with one element's values, or "".
func (c *Circuit) checkElement(e Element) string {
	samePins := func(a, b int) string {
		if e.Nodes[a] == e.Nodes[b] {
			return "both pins on node " + c.Nodes[e.Nodes[a]]
		}
		return ""
	}
	switch e.Kind {
	case ResistorKind, CapacitorKind, InductorKind:
		if !(e.Value > 0) || e.Value > 1e15 {
			return fmt.Sprintf("%s value %g must be positive and finite", e.Kind, e.Value)
		}
		return samePins(0, 1)
	case VoltageSourceKind, BufferKind:
		if !finite(e.Value) {
			return fmt.Sprintf("source value %g is not finite", e.Value)
		}
		if e.Nodes[0] == e.Nodes[1] {
			return "both terminals on node " + c.Nodes[e.Nodes[0]]
		}
	case ControlledCurrentKind:
		if !finite(e.Value) || math.Abs(e.Value) > 1e6 {
			return fmt.Sprintf("transconductance %g S must be finite", e.Value)
		}
		return samePins(0, 1)
	case IdealTransformerKind:
		if len(e.Ratios) == 0 {
			return "an ideal transformer needs at least two windings"
		}
		for k, r := range e.Ratios {
			if !(r > 0) || r > 1e6 {
				return fmt.Sprintf("turns ratio %d (%g) must be positive and finite", k+2, r)
			}
		}
		for k := 0; k < len(e.Nodes); k += 2 {
			if r := samePins(k, k+1); r != "" {
				return fmt.Sprintf("winding %d: %s", k/2+1, r)
			}
		}
	case DiodeKind:
		return e.Diode.check()
	case BJTKind:
		if r := e.BJT.check(); r != "" {
			return r
		}
		if e.BJT.BaseResistance > 0 && c.Nodes[e.Nodes[1]] != InternalNode(e.Ref, "base") {
			return "base resistance needs the internal base node: add the part with Circuit.AddPart"
		}
	case JFETKind:
		return e.JFET.check()
	case MOSFETKind:
		return e.MOSFET.check()
	case LimiterKind:
		return e.Limiter.check()
	case OpAmpKind, TransformerKind:
		return "a " + e.Kind.String() + " is a part: add it with Circuit.AddPart"
	}
	return ""
}

// pinCount is the number of pins of an element.
func pinCount(e Element) int {
	switch e.Kind {
	case BJTKind, JFETKind, MOSFETKind:
		return 3
	case ControlledCurrentKind:
		return 4
	case OpAmpKind:
		return 5
	case IdealTransformerKind:
		return 2 * (len(e.Ratios) + 1)
	case TransformerKind:
		return 2 * len(e.Transformer.Windings)
	}
	return 2
}

type union []int

func newUnion(n int) union {
	u := make(union, n)
	for i := range u {
		u[i] = i
	}
	return u
}

func (u union) find(i int) int {
	for u[i] != i {
		u[i] = u[u[i]]
		i = u[i]
	}
	return i
}

func (u union) join(a, b int) { u[u.find(a)] = u.find(b) }

// LeakResistance is the resistance from ground that AddLeaks puts on a
// node reached only by semiconductor junctions (and capacitors): 1 TΩ, the
// reciprocal of the classical minimum conductance of circuit simulation
// (GMIN = 1e-12 S; L. W. Nagel, UCB ERL-M520, 1975), standing for board
// and package leakage.
const LeakResistance = 1e12

// AddLeaks gives every node that no resistor, inductor, source or buffer
// reaches (only diode and transistor terminals, and capacitors) a
// LeakResistance to ground, and returns how many it added. Without it such
// a node, e.g. between two diodes in series or between the two transistors
// of a compound pair, has no defined voltage when its junctions are off,
// and the wave digital root sees a cut-set of nonlinear ports, where the
// Kirchhoff-domain relation v = p + K·i has no finite K. Ordinary nodes
// are untouched.
func (c *Circuit) AddLeaks() int {
	linear := make([]bool, len(c.Nodes))
	used := make([]bool, len(c.Nodes))
	for _, e := range c.Elements {
		for _, n := range e.Nodes {
			used[n] = true
		}
		switch e.Kind {
		case ResistorKind, InductorKind, VoltageSourceKind, BufferKind, IdealTransformerKind:
			for _, n := range e.Nodes {
				linear[n] = true
			}
		}
	}
	added := 0
	for n := 1; n < len(c.Nodes); n++ {
		if used[n] && !linear[n] {
			c.Add(Element{Ref: "leak." + c.Nodes[n], Kind: ResistorKind, Nodes: []int{n, Ground}, Value: LeakResistance})
			added++
		}
	}
	return added
}
