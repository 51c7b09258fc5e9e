package chains

import (
	"fmt"
	"maps"
	"slices"

	"renderchain/models"
)

// Build flattens the chain into one circuit by its Wiring: stage k's out
// is stage k+1's in (one node, so every stage loads the one before it),
// the signal source drives "in", the supply is an ideal source on "v+",
// and the output load hangs on the chain's output. A stage with buffer =
// true is fed through an ideal unity-gain buffer instead. A stage whose
// parts never use "out" is a shunt stage: its out is its in. A chain beyond
// the limits of CheckSize is refused first, with a *LimitError.
func (ch *Chain) Build() (*models.Circuit, error) {
	if err := ch.CheckSize(); err != nil { // the one place: nothing is built or allocated beyond the limits
		return nil, err
	}
	w := ch.Wiring()
	if err := ch.checkPinNames(w); err != nil {
		return nil, err
	}
	c := models.NewCircuit(ch.Name, ch.Temperature)
	in := c.Node("in")
	vplus := c.Node("v+")
	c.Input = in
	c.Add(models.Element{Ref: "input.source", Kind: models.VoltageSourceKind, Nodes: []int{in, models.Ground}, Signal: true})
	c.Add(models.Element{Ref: "supply", Kind: models.VoltageSourceKind, Nodes: []int{vplus, models.Ground}, Value: ch.Supply})
	for k, st := range ch.Stages {
		e := w.Stages[k]
		if e.Buffered {
			c.Add(models.Element{Ref: st.ID + ".buffer", Kind: models.BufferKind, Nodes: []int{c.Node(e.In), c.Node(e.Feed)}})
		}
		node := func(pin string) int {
			if pin == "gnd" {
				return models.Ground
			}
			return c.Node(w.Node(st.ID, pin))
		}
		for _, p := range st.Parts {
			if err := ch.addPart(c, st, p, node); err != nil {
				return nil, err
			}
		}
	}
	out := c.Node(w.Out)
	c.Output = out
	if ch.Load > 0 {
		c.Add(models.Element{Ref: "output.load", Kind: models.ResistorKind, Nodes: []int{out, models.Ground}, Value: ch.Load})
	}
	if err := c.Check(); err != nil {
		return nil, &Error{File: ch.File, Msg: err.Error()}
	}
	c.AddLeaks()
	return c, nil
}

// checkPinNames refuses a pin whose node would be named like a node Build
// adds inside a part (InternalNode, models.IsInternal): such a pin would
// silently join that part's inside (a wire to a diode's junction behind
// its series resistance, say).
func (ch *Chain) checkPinNames(w *Wiring) error {
	for _, st := range ch.Stages {
		for _, p := range st.Parts {
			for _, role := range slices.Sorted(maps.Keys(p.Pins)) {
				pin := p.Pins[role]
				if n := w.Node(st.ID, pin); InternalNode(n) || models.IsInternal(n) {
					return &Error{File: ch.File, Line: ch.loc.find(st.index, `"`+pin+`"`), Where: "stage " + st.ID + ": part " + p.Ref,
						Msg: fmt.Sprintf("node %q: a node name has no '.' or '%s' (those name the inside of parts)", pin, models.InternalMark)}
				}
			}
		}
	}
	return nil
}

func (st *Stage) usesPin(name string) bool {
	for _, p := range st.Parts {
		for _, n := range p.Pins {
			if n == name {
				return true
			}
		}
	}
	return false
}

func (ch *Chain) addPart(c *models.Circuit, st *Stage, p *Part, node func(string) int) error {
	ref := st.ID + "." + p.Ref
	two := func(kind models.Kind, v float64) {
		c.Add(models.Element{Ref: ref, Kind: kind, Nodes: []int{node(p.Pins["1"]), node(p.Pins["2"])}, Value: v})
	}
	switch p.Kind {
	case Resistor:
		two(models.ResistorKind, p.Value)
	case Capacitor:
		two(models.CapacitorKind, p.Value)
	case Cable:
		two(models.CapacitorKind, p.Value*p.PerMetre)
	case Inductor:
		two(models.InductorKind, p.Value)
	case Pot:
		x := st.Knobs[p.Knob]
		lower, upper := models.PotSections(p.Value, p.Taper, x)
		ccw, wiper := node(p.Pins["ccw"]), node(p.Pins["wiper"])
		// A section whose ends are wired together (a wiper tied to an end,
		// common practice for a rheostat) carries no current: leave it out.
		if ccw != wiper {
			c.Add(models.Element{Ref: ref + ".ccw", Kind: models.ResistorKind, Nodes: []int{ccw, wiper}, Value: lower})
		}
		if cwName, ok := p.Pins["cw"]; ok {
			if cw := node(cwName); cw != wiper {
				c.Add(models.Element{Ref: ref + ".cw", Kind: models.ResistorKind, Nodes: []int{wiper, cw}, Value: upper})
			}
		}
	case Diode:
		dp := p.DiodeParams()
		a, k := node(p.Pins["anode"]), node(p.Pins["cathode"])
		if dp.Rs > 0 {
			j := c.Node(internalName(st.ID, p.Ref, "junction"))
			c.Add(models.Element{Ref: ref + ".rs", Kind: models.ResistorKind, Nodes: []int{a, j}, Value: dp.Rs})
			a = j
		}
		c.Add(models.Element{Ref: ref, Kind: models.DiodeKind, Nodes: []int{a, k}, Diode: dp})
	case NPN, PNP:
		c.Add(models.Element{Ref: ref, Kind: models.BJTKind,
			Nodes: []int{node(p.Pins["c"]), node(p.Pins["b"]), node(p.Pins["e"])}, BJT: p.BJTParams()})
	default:
		return &Error{File: ch.File, Where: "part " + ref, Msg: fmt.Sprintf("kind %s cannot be built", p.Kind)}
	}
	return nil
}

// Stage returns the stage of the given id, or nil.
func (ch *Chain) Stage(id string) *Stage {
	for _, st := range ch.Stages {
		if st.ID == id {
			return st
		}
	}
	return nil
}

// Clone returns a deep copy of the chain, for variants.
func (ch *Chain) Clone() *Chain {
	d := *ch
	d.Stages = nil
	for _, st := range ch.Stages {
		s := *st
		s.Knobs = map[string]float64{}
		for k, v := range st.Knobs {
			s.Knobs[k] = v
		}
		s.Parts = nil
		for _, p := range st.Parts {
			s.Parts = append(s.Parts, clonePart(p))
		}
		d.Stages = append(d.Stages, &s)
	}
	return &d
}
