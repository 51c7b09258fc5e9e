package chains

import (
	"errors"
	"fmt"
	"slices"
	"strings"

	"renderchain/models"
)

// Flat is a chain flattened to one circuit, with what the lint found on
// the way. Every command reaches it through Flatten (Build is Flatten
// without the findings), and CheckOperatingPoint adds what only the DC
// operating point shows.
type Flat struct {
	Chain   *Chain
	Circuit *models.Circuit
	Wiring  *Wiring
	// Findings are the notes and warnings of the lint, in the order
	// found; a fault is returned by Flatten as an error instead.
	Findings Findings
}

// Flatten lints the chain's wiring and flattens it into one circuit by
// its Wiring: stage k's out is stage k+1's in (one node, so every stage
// loads the one before it), the signal source drives "in", the supply is
// an ideal source on "v+" (or on "power.emf" behind the [power] table's
// network), the nets are nodes of their own names, and the output load
// hangs on the chain's output. A stage with buffer = true is fed through
// an ideal unity-gain buffer instead. A stage whose parts never use "out"
// is a shunt stage: its out is its in.
//
// The lint refuses, as an *Error with the file, the line and the part:
// a dangling node (one part on it), a name that is a slip for a shared
// one ("V+", "gdn", "vcc" with nothing joining it to the supply), a
// dotted name that names no node of another stage, a stage that takes
// the signal and holds a transistor but never names out, a resistor under
// ShortResistance straight across the supply, and every fault of
// models.Circuit.Check, each with the fix where there is an obvious one.
// A node reached only through capacitors (two coupling capacitors in
// series) gets models.LeakResistance to ground, as a node reached only
// by junctions does, and a Note says so.
func (ch *Chain) Flatten() (*Flat, error) {
	if err := ch.CheckSize(); err != nil { // the one place: nothing is built or allocated beyond the limits
		return nil, err
	}
	w := ch.Wiring()
	uses := ch.pinUses(w)
	f := &Flat{Chain: ch, Wiring: w}
	f.Findings = ch.lintWiring(w, uses)
	f.Findings = append(f.Findings, ch.valueFindings()...)
	if ch.SupplyAssumed && ch.hasDevices() {
		f.Findings = append(f.Findings, Finding{File: ch.File, Where: "supply", Severity: Note,
			Msg: "the file gives no supply: 9 V, negative ground, assumed; write supply = \"9V\" (or \"-9V\" for a positive-ground build) to say so"})
	}
	if err := f.Findings.Err(); err != nil {
		return nil, err
	}
	c := models.NewCircuit(ch.Name, ch.Temperature)
	in := c.Node("in")
	vplus := c.Node("v+")
	c.Input = in
	emf := vplus
	if ch.Power != nil {
		emf = c.Node(w.Node(PowerID, EMF))
	}
	c.Add(models.Element{Ref: "input.source", Kind: models.VoltageSourceKind, Nodes: []int{in, models.Ground}, Signal: true})
	c.Add(models.Element{Ref: "supply", Kind: models.VoltageSourceKind, Nodes: []int{emf, models.Ground}, Value: ch.Supply})
	stageNode := func(st *Stage) func(string) int {
		return func(pin string) int {
			if pin == "gnd" {
				return models.Ground
			}
			return c.Node(w.Node(st.ID, pin))
		}
	}
	var open []int // nodes left on open switch contacts
	addParts := func(st *Stage) error {
		node := stageNode(st)
		for _, p := range st.Parts {
			if p.Kind == Switch {
				open = append(open, p.addSwitch(c, st.ID+"."+p.Ref, node)...)
				continue
			}
			if err := ch.addPart(c, st, p, node); err != nil {
				return err
			}
		}
		return nil
	}
	if ch.Power != nil {
		if err := addParts(ch.Power); err != nil {
			return nil, err
		}
	}
	for k, st := range ch.Stages {
		e := w.Stages[k]
		if e.Buffered {
			c.Add(models.Element{Ref: st.ID + ".buffer", Kind: models.BufferKind, Nodes: []int{c.Node(e.In), c.Node(e.Feed)}})
		}
		if err := addParts(st); err != nil {
			return nil, err
		}
	}
	leakOpenContacts(c, open)
	out := c.Node(w.Out)
	c.Output = out
	if ch.Load > 0 {
		c.Add(models.Element{Ref: "output.load", Kind: models.ResistorKind, Nodes: []int{out, models.Ground}, Value: ch.Load})
	}
	capOnly := capacitorOnlyNodes(c)
	c.AddLeaks()
	if err := c.Check(); err != nil {
		return nil, ch.placeCircuitError(err, uses)
	}
	for _, n := range capOnly {
		f.Findings = append(f.Findings, ch.capacitorNote(c.Nodes[n], uses))
	}
	f.Circuit = c
	return f, nil
}

// capacitorOnlyNodes lists the nodes (not ground) that only capacitors
// touch.
func capacitorOnlyNodes(c *models.Circuit) []int {
	capOnly := make([]bool, len(c.Nodes))
	other := make([]bool, len(c.Nodes))
	for _, e := range c.Elements {
		for _, n := range e.Nodes {
			if e.Kind == models.CapacitorKind {
				capOnly[n] = true
			} else {
				other[n] = true
			}
		}
	}
	var out []int
	for n := 1; n < len(c.Nodes); n++ {
		if capOnly[n] && !other[n] {
			out = append(out, n)
		}
	}
	return out
}

// capacitorNote is the note on a node reached only through capacitors.
func (ch *Chain) capacitorNote(node string, uses []pinUse) Finding {
	var refs []string
	var first *pinUse
	for i, u := range uses {
		if u.node == node {
			if first == nil {
				first = &uses[i]
			}
			if !slices.Contains(refs, u.part.Ref) {
				refs = append(refs, u.part.Ref)
			}
		}
	}
	msg := fmt.Sprintf("node %s is reached only through capacitors (%s): it gets a %g TΩ leak to ground, the minimum conductance junction-only nodes get, so it idles at 0 V (in a build the capacitors' own leakage sets it)",
		node, strings.Join(refs, ", "), models.LeakResistance/1e12)
	fd := Finding{File: ch.File, Msg: msg, Severity: Note}
	if first != nil {
		fd.Line, fd.Where = ch.partLine(first.st, first.part), first.st.where()
	}
	return fd
}

// placeCircuitError turns a *models.CircuitError of the flat circuit into
// an *Error with the file, the line, the stage and the part, and the fix
// where there is an obvious one.
func (ch *Chain) placeCircuitError(err error, uses []pinUse) error {
	var ce *models.CircuitError
	if !errors.As(err, &ce) {
		return &Error{File: ch.File, Msg: err.Error(), Err: err}
	}
	if node, ok := strings.CutPrefix(ce.What, "node "); ok {
		e := &Error{File: ch.File, Msg: fmt.Sprintf("node %s %s", node, ce.Reason), Err: err}
		for _, u := range uses {
			if u.node == node {
				e.Line, e.Where = ch.partLine(u.st, u.part), u.st.where()
				e.Msg = fmt.Sprintf("part %s: %s is on node %s, which %s", u.part.Ref, u.pinLabel(), node, ce.Reason)
				break
			}
		}
		if strings.Contains(ce.Reason, "DC path") {
			e.Msg += "; give it one: a resistor to gnd (1 MΩ is common practice for a pull-down) or to a bias node, or check the spelling of its pins"
		}
		return e
	}
	st, p := ch.partOf(ce.What)
	if p == nil {
		where := ce.What
		line := 0
		if ch.loc != nil {
			switch where {
			case "supply":
				line = ch.loc.findKey("", "supply")
			case "output.load":
				line = ch.loc.findKey("output", "load")
			}
		}
		return &Error{File: ch.File, Line: line, Where: where, Msg: ce.Reason, Err: err}
	}
	msg := "part " + p.Ref + ": " + ce.Reason
	switch {
	case strings.Contains(ce.Reason, "both pins on node"), strings.Contains(ce.Reason, "both terminals on node"):
		msg += ": it carries no current and does nothing; move one pin to the node it belongs on"
	case strings.Contains(ce.Reason, "closes a loop"):
		msg += ": at DC an inductor is a wire; put the coil's winding resistance in series (a resistor) or move a pin"
	}
	return &Error{File: ch.File, Line: ch.partLine(st, p), Where: st.where(), Msg: msg, Err: err}
}

// partOf finds the stage and part an element of the flat circuit was made
// from: "STAGE.REF", or "STAGE.REF.x" for the pieces of a part (a pot's
// sections, a diode's series resistance). Elements of the chain itself
// ("supply", "input.source", "output.load", "STAGE.buffer") have none.
func (ch *Chain) partOf(ref string) (*Stage, *Part) {
	id, rest, ok := strings.Cut(ref, ".")
	if !ok {
		return nil, nil
	}
	st := ch.StageOf(id)
	if st == nil {
		return nil, nil
	}
	pref, _, _ := strings.Cut(rest, ".")
	if p := st.part(pref); p != nil {
		return st, p
	}
	return nil, nil
}

// hasDevices tells whether any stage (or the power network) holds a
// semiconductor or an op-amp: a part the supply matters to.
func (ch *Chain) hasDevices() bool {
	for _, st := range ch.PartStages() {
		for _, p := range st.Parts {
			if p.Kind.Device() {
				return true
			}
		}
	}
	return false
}
