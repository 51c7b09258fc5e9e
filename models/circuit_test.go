package models_test

import (
	"errors"
	"math"
	"strings"
	"testing"

	"renderchain/models"
)

// netlist builds a circuit from a compact description: each part is
// kind, ref, node names and a value.
type part struct {
	kind  models.Kind
	ref   string
	nodes []string
	value float64
}

func build(temp float64, parts ...part) *models.Circuit {
	c := models.NewCircuit("test", temp)
	for _, p := range parts {
		e := models.Element{Ref: p.ref, Kind: p.kind, Value: p.value}
		for _, n := range p.nodes {
			e.Nodes = append(e.Nodes, c.Node(n))
		}
		switch p.kind {
		case models.DiodeKind:
			e.Diode = siDiode()
		case models.BJTKind:
			e.BJT = *models.Presets["si-npn"].BJT
		}
		c.Add(e)
	}
	return c
}

func res(ref, a, b string, v float64) part { return part{models.ResistorKind, ref, []string{a, b}, v} }
func capa(ref, a, b string, v float64) part {
	return part{models.CapacitorKind, ref, []string{a, b}, v}
}
func ind(ref, a, b string, v float64) part { return part{models.InductorKind, ref, []string{a, b}, v} }
func vsrc(ref, a, b string, v float64) part {
	return part{models.VoltageSourceKind, ref, []string{a, b}, v}
}

// goodStage is a voltage-divider-biased common-emitter stage with coupling
// and bypass capacitors and a clipping diode: every node has a DC path.
func goodStage() []part {
	return []part{
		vsrc("V1", "v+", "gnd", 9),
		vsrc("Vin", "in", "gnd", 0),
		capa("C1", "in", "b", 100e-9),
		res("R1", "v+", "b", 47e3),
		res("R2", "b", "gnd", 10e3),
		res("RC", "v+", "c", 4.7e3),
		res("RE", "e", "gnd", 1e3),
		capa("CE", "e", "gnd", 100e-6),
		{models.BJTKind, "Q1", []string{"c", "b", "e"}, 0},
		capa("C2", "c", "out", 100e-9),
		res("RL", "out", "gnd", 1e6),
		{models.DiodeKind, "D1", []string{"out", "gnd"}, 0},
		ind("L1", "v+", "x", 1),
		res("RX", "x", "gnd", 1e3),
		{models.BufferKind, "B1", []string{"y", "c"}, 0},
		res("RY", "y", "gnd", 1e4),
	}
}

// TestCircuitCheck: Check must pass solvable circuits and name the part or
// node of each defect it documents: a node reached only through
// capacitors floats at DC, a loop of ideal sources and inductors is a
// short at DC, values must be positive and finite, and no two-pin part may
// have both pins on one node. (A node without a DC path to the reference,
// or a loop of ideal voltage sources and inductors, makes the DC nodal
// equations singular: common practice.)
func TestCircuitCheck(t *testing.T) {
	good := goodStage()
	cases := []struct {
		name  string
		parts []part
		what  string // "" for a good circuit, else the ref or node named
		words string // a fragment of the reason
	}{
		{"good stage", good, "", ""},
		{"divider", []part{vsrc("V1", "a", "gnd", 9), res("R1", "a", "b", 1e3), res("R2", "b", "gnd", 1e3)}, "", ""},
		{"negative supply is fine", []part{vsrc("V1", "a", "gnd", -9), res("R1", "a", "gnd", 1e3)}, "", ""},
		{"series sources are fine", []part{vsrc("V1", "a", "gnd", 4.5), vsrc("V2", "b", "a", 4.5), res("R1", "b", "gnd", 1e3)}, "", ""},
		{"floating through a capacitor",
			[]part{vsrc("V1", "a", "gnd", 9), res("R1", "a", "b", 1e3), capa("C1", "b", "f", 1e-6), res("R2", "f", "g", 1e3), capa("C2", "g", "gnd", 1e-6)},
			"node f", "no DC path"},
		{"floating pair behind capacitors",
			[]part{vsrc("V1", "a", "gnd", 9), capa("C1", "a", "m", 1e-6), res("R1", "m", "k", 1e3), capa("C2", "k", "gnd", 1e-6)},
			"node k", "no DC path"},
		{"buffer input only", []part{{models.BufferKind, "B1", []string{"o", "i"}, 0}, res("R1", "o", "gnd", 1e3), capa("C1", "i", "gnd", 1e-9)},
			"node i", "no DC path"},
		{"two sources in parallel", []part{vsrc("V1", "a", "gnd", 9), vsrc("V2", "a", "gnd", 9), res("R1", "a", "gnd", 1e3)},
			"V2", "short across a source"},
		{"source loop", []part{vsrc("V1", "a", "gnd", 9), vsrc("V2", "b", "a", 1), vsrc("V3", "b", "gnd", 10), res("R1", "b", "gnd", 1e3)},
			"V3", "short across a source"},
		{"inductor across a source", []part{vsrc("V1", "a", "gnd", 9), ind("L1", "a", "gnd", 1e-3), res("R1", "a", "gnd", 1e3)},
			"L1", "inductor"},
		{"inductor loop through two sources", []part{vsrc("V1", "a", "gnd", 9), ind("L1", "a", "b", 1e-3), vsrc("V2", "b", "gnd", 9)},
			"V2", "short across a source"},
		{"zero resistor", []part{vsrc("V1", "a", "gnd", 9), res("R1", "a", "gnd", 0)}, "R1", "positive"},
		{"negative resistor", []part{vsrc("V1", "a", "gnd", 9), res("R1", "a", "gnd", -1e3)}, "R1", "positive"},
		{"NaN capacitor", []part{vsrc("V1", "a", "gnd", 9), res("R1", "a", "gnd", 1e3), capa("C1", "a", "gnd", math.NaN())}, "C1", "positive"},
		{"infinite resistor", []part{vsrc("V1", "a", "gnd", 9), res("R1", "a", "gnd", math.Inf(1))}, "R1", "finite"},
		{"zero inductor", []part{vsrc("V1", "a", "gnd", 9), res("R1", "a", "b", 1e3), ind("L1", "b", "gnd", 0)}, "L1", "positive"},
		{"resistor on one node", []part{vsrc("V1", "a", "gnd", 9), res("R1", "a", "gnd", 1e3), res("R2", "a", "a", 1e3)}, "R2", "both pins"},
		{"capacitor on one node", []part{vsrc("V1", "a", "gnd", 9), res("R1", "a", "gnd", 1e3), capa("C1", "a", "a", 1e-9)}, "C1", "both pins"},
		{"source on one node", []part{vsrc("V1", "a", "a", 9), res("R1", "a", "gnd", 1e3)}, "V1", "both terminals"},
	}
	for _, c := range cases {
		err := build(tnom, c.parts...).Check()
		if c.what == "" {
			if err != nil {
				t.Errorf("%s: Check = %v, want nil", c.name, err)
			}
			continue
		}
		var ce *models.CircuitError
		if !errors.As(err, &ce) {
			t.Errorf("%s: Check = %v (%T), want a *models.CircuitError", c.name, err, err)
			continue
		}
		if ce.What != c.what || !strings.Contains(ce.Reason, c.words) {
			t.Errorf("%s: Check = %q, want it to name %q with %q", c.name, err, c.what, c.words)
		}
		oneLine(t, err)
	}

	// Device parameters.
	bad := []struct {
		name string
		mod  func(*models.Element)
		what string
	}{
		{"diode Is = 0", func(e *models.Element) { e.Diode.Is = 0 }, "D1"},
		{"diode n < 0", func(e *models.Element) { e.Diode.N = -1 }, "D1"},
		{"transistor hFE = 0", func(e *models.Element) { e.BJT.BetaF = 0 }, "Q1"},
		{"transistor βR NaN", func(e *models.Element) { e.BJT.BetaR = math.NaN() }, "Q1"},
		{"transistor Icbo < 0", func(e *models.Element) { e.BJT.Icbo = -1e-6 }, "Q1"},
	}
	for _, b := range bad {
		c := build(tnom, good...)
		b.mod(c.Element(b.what))
		var ce *models.CircuitError
		if err := c.Check(); !errors.As(err, &ce) || ce.What != b.what {
			t.Errorf("%s: Check = %v, want a CircuitError naming %s", b.name, err, b.what)
		}
	}

	// A pin on a node the circuit does not have.
	c := build(tnom, good...)
	c.Element("R1").Nodes[1] = 99
	var ce *models.CircuitError
	if err := c.Check(); !errors.As(err, &ce) || ce.What != "R1" {
		t.Errorf("unknown node: Check = %v, want a CircuitError naming R1", err)
	}
}

// TestCircuitCheckSourcesAndTemperature: Check documents "element values
// positive and finite" and "the circuit is solvable". A source of NaN or
// infinite volts, or a circuit at a temperature that is not a positive
// number of kelvin (Vt = k·T/q is then zero, negative or NaN and every
// junction's exponential is undefined), cannot be solved, so Check must
// reject it with a CircuitError rather than leave the DC solver to fail
// with a misleading non-convergence.
func TestCircuitCheckSourcesAndTemperature(t *testing.T) {
	var failures []string
	for _, v := range []float64{math.NaN(), math.Inf(1), math.Inf(-1)} {
		c := build(tnom, vsrc("V1", "a", "gnd", v), res("R1", "a", "gnd", 1e3))
		var ce *models.CircuitError
		if err := c.Check(); !errors.As(err, &ce) {
			failures = append(failures, "source of "+models.FormatValue(v, "V")+" accepted")
		}
	}
	for _, temp := range []float64{0, -10, math.NaN()} {
		c := build(temp, goodStage()...)
		var ce *models.CircuitError
		if err := c.Check(); !errors.As(err, &ce) {
			failures = append(failures, "temperature "+models.FormatValue(temp, "K")+" accepted")
		}
	}
	if len(failures) > 0 {
		t.Error("Check does not validate source values or the temperature: " + strings.Join(failures, "; "))
	}
}

// TestCircuitCheckPinCount: an element with the wrong number of pins (a
// resistor with one, a transistor with two) is a malformed circuit, and
// Check must say so with a CircuitError; it must never panic (house rule).
func TestCircuitCheckPinCount(t *testing.T) {
	cases := []struct {
		name string
		e    models.Element
	}{
		{"resistor with one pin", models.Element{Ref: "R9", Kind: models.ResistorKind, Nodes: []int{1}, Value: 1e3}},
		{"transistor with two pins", models.Element{Ref: "Q9", Kind: models.BJTKind, Nodes: []int{1, 0}, BJT: *models.Presets["si-npn"].BJT}},
		{"source with no pins", models.Element{Ref: "V9", Kind: models.VoltageSourceKind, Value: 1}},
	}
	var failures []string
	for _, c := range cases {
		circ := build(tnom, vsrc("V1", "a", "gnd", 9), res("R1", "a", "gnd", 1e3))
		circ.Add(c.e)
		var err error
		if p := mustNotPanic(func() { err = circ.Check() }); p != nil {
			failures = append(failures, c.name+": panic: "+toString(p))
			continue
		}
		var ce *models.CircuitError
		if !errors.As(err, &ce) || ce.What != c.e.Ref {
			failures = append(failures, c.name+": Check = "+toString(err))
		}
	}
	if len(failures) > 0 {
		t.Error("Check does not verify pin counts: " + strings.Join(failures, "; "))
	}
}

func toString(v any) string {
	switch x := v.(type) {
	case error:
		return x.Error()
	case string:
		return x
	case nil:
		return "nil"
	}
	return "non-error panic"
}

// TestCircuitDevices: Devices lists the nonlinear parts in element order
// with their ports as documented: a diode is one port anode → cathode, a
// transistor two ports (base, emitter) and (collector, emitter).
func TestCircuitDevices(t *testing.T) {
	c := build(tnom, goodStage()...)
	devs := c.Devices()
	if len(devs) != 2 {
		t.Fatalf("%d devices, want 2", len(devs))
	}
	q, d := devs[0], devs[1]
	col, base, em, out := c.Lookup("c"), c.Lookup("b"), c.Lookup("e"), c.Lookup("out")
	if q.Ref != "Q1" || q.Model.Ports() != 2 || len(q.Ports) != 2 ||
		q.Ports[0] != (models.Port{Plus: base, Minus: em}) || q.Ports[1] != (models.Port{Plus: col, Minus: em}) {
		t.Errorf("transistor instance %+v", q)
	}
	if _, ok := q.Model.(*models.BJT); !ok || c.Elements[q.Element].Ref != "Q1" {
		t.Errorf("transistor model %T, element %d", q.Model, q.Element)
	}
	if d.Ref != "D1" || d.Model.Ports() != 1 || d.Ports[0] != (models.Port{Plus: out, Minus: models.Ground}) {
		t.Errorf("diode instance %+v", d)
	}
	if c.Lookup("nowhere") != -1 || c.Nodes[models.Ground] != "gnd" {
		t.Errorf("Lookup of an unknown node or ground name wrong")
	}
	// Clone is deep: changing the copy leaves the original alone.
	k := c.Clone()
	k.Element("R1").Value = 1
	k.Element("R1").Nodes[0] = 0
	k.Nodes[1] = "renamed"
	if c.Element("R1").Value != 47e3 || c.Element("R1").Nodes[0] == 0 || c.Nodes[1] == "renamed" {
		t.Errorf("Clone shares storage with the original")
	}
	if c.Element("nothing") != nil {
		t.Errorf("Element of an unknown ref is not nil")
	}
}
