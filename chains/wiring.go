package chains

import (
	"errors"
	"fmt"
	"slices"
	"strings"

	"renderchain/models"
)

// Ends are where one stage meets the chain, as node names of the flat
// circuit: Feed drives the stage (the previous stage's out, or "in"), In
// is the stage's own "in" (Feed itself, or a node of its own behind an
// ideal buffer), Out its "out" (its In for a shunt stage, one that never
// names "out").
type Ends struct {
	Stage         string
	Feed, In, Out string
	Buffered      bool
	Shunt         bool
	Environment   bool
}

// Wiring is the chain's wiring rule applied once: every stage's ends and
// the chain's own. Build flattens the chain with it, and every reader of
// node names (probes, the symmetric-clip search, electrolytic polarity)
// resolves names through it.
//
// The rule: stage k's out is stage k+1's in, one node, so every stage
// loads the one before it. Each stage's out node is named "STAGE.out",
// except the one that ends up as the chain's output, which is "out": the
// last stage's, or, behind trailing shunt stages (which pass their in
// through), the last stage that drives an out of its own. A buffered
// stage's in is a node of its own, "STAGE.in", fed by an ideal unity-gain
// buffer from the node before it (named "out" when a buffered shunt stage
// is the chain's output).
//
// Nets (the chain's nets list) are entries of the wiring too: a pin on a
// net lands on the node of the net's own name, whichever stage writes it.
// A dotted pin name "STAGE.name" lands on that stage's node (its ends for
// "STAGE.in" and "STAGE.out"); the lint (Flatten) refuses one that names
// no node of that stage.
type Wiring struct {
	Stages []Ends
	// Out is the chain's output node: "out", or "in" when every stage is
	// an unbuffered shunt.
	Out string
	// Nets are the chain's shared nodes besides gnd, v+, in and out.
	Nets []string
}

// Wiring returns the chain's wiring (see Wiring).
func (ch *Chain) Wiring() *Wiring {
	n := len(ch.Stages)
	outName := make([]string, n)
	for k, st := range ch.Stages {
		outName[k] = st.ID + ".out"
	}
	bufferedOut := -1 // a buffered shunt stage whose buffer output is the chain's output
	for k := n - 1; k >= 0; k-- {
		st := ch.Stages[k]
		outName[k] = "out"
		if st.usesPin("out") {
			break
		}
		if st.Buffer {
			bufferedOut = k
			break
		}
	}
	w := &Wiring{Stages: make([]Ends, n), Nets: ch.Nets}
	prev := "in"
	for k, st := range ch.Stages {
		e := Ends{Stage: st.ID, Feed: prev, In: prev, Buffered: st.Buffer, Environment: st.Environment}
		if st.Buffer {
			e.In = st.ID + ".in"
			if k == bufferedOut {
				e.In = "out"
			}
		}
		e.Out = outName[k]
		if !st.usesPin("out") {
			e.Out, e.Shunt = e.In, true
		}
		w.Stages[k] = e
		prev = e.Out
	}
	w.Out = prev
	return w
}

// Ends returns the ends of the stage of the given id, or nil.
func (w *Wiring) Ends(stage string) *Ends {
	for i := range w.Stages {
		if w.Stages[i].Stage == stage {
			return &w.Stages[i]
		}
	}
	return nil
}

// Node returns the flat circuit's name of a pin name written in a stage's
// parts: gnd, v+ and the nets are shared, in and out are the stage's
// ends, a dotted name "OTHER.name" is that stage's node (OTHER.in and
// OTHER.out its ends), any other name is local, "STAGE.name".
func (w *Wiring) Node(stage, pin string) string {
	switch pin {
	case "gnd", "v+":
		return pin
	case "in", "out":
		if e := w.Ends(stage); e != nil {
			if pin == "in" {
				return e.In
			}
			return e.Out
		}
	}
	if slices.Contains(w.Nets, pin) {
		return pin
	}
	if other, name, dotted := strings.Cut(pin, "."); dotted {
		if name == "in" || name == "out" {
			if e := w.Ends(other); e != nil {
				return w.Node(other, name)
			}
		}
		return pin
	}
	return stage + "." + pin
}

// InternalNode tells the nodes Build adds inside a part
// ("STAGE.REF#role", models.InternalNode: a diode's junction behind its
// series resistance, a transistor's base behind its base resistance, an
// op-amp's gain node) from a stage's own nodes ("STAGE.node") and the
// shared ones. A chain file cannot write the mark.
func InternalNode(name string) bool { return models.IsInternal(name) }

// ErrNoNode is the sentinel of a node name that names no node.
var ErrNoNode = errors.New("no such node")

// NodeError reports a node name that cannot be resolved: the name as
// written and why.
type NodeError struct {
	Name string
	Msg  string
}

func (e *NodeError) Error() string { return fmt.Sprintf("node %q: %s", e.Name, e.Msg) }

// Unwrap returns ErrNoNode.
func (e *NodeError) Unwrap() error { return ErrNoNode }

// Resolve finds a node of the circuit c built from the chain by the name
// a user writes: "out" (or "") the chain's output, "in", "v+", a stage's
// local node "fuzz.c1", or a stage's ends "tone.in" and "tone.out", which
// are shared with its neighbours. Ground is the reference, not a node to
// resolve.
func (w *Wiring) Resolve(c *models.Circuit, name string) (int, error) {
	name = strings.TrimSpace(name)
	switch name {
	case "", "out":
		return c.Output, nil
	case "gnd":
		return 0, &NodeError{Name: name, Msg: "ground is the reference, not a node to probe"}
	}
	if stage, end, ok := strings.Cut(name, "."); ok && (end == "in" || end == "out") {
		if e := w.Ends(stage); e != nil {
			pick := e.In
			if end == "out" {
				pick = e.Out
			}
			if pick == w.Out {
				return c.Output, nil
			}
			if n := c.Lookup(pick); n > 0 {
				return n, nil
			}
		}
	}
	if n := c.Lookup(name); n > 0 {
		return n, nil
	}
	return 0, &NodeError{Name: name, Msg: "no such node (nodes: " + NodeList(c) + ")"}
}

// Names lists every node name a user can write for the circuit c built
// from the chain, each once: in, out and v+, the circuit's own nodes (but
// ground and the nodes inside parts), and every stage's STAGE.in and
// STAGE.out.
func (w *Wiring) Names(c *models.Circuit) []string {
	names := []string{"in", "out", "v+"}
	for i, n := range c.Nodes {
		if i != models.Ground && !InternalNode(n) && !slices.Contains(names, n) {
			names = append(names, n)
		}
	}
	for _, e := range w.Stages {
		for _, n := range []string{e.Stage + ".in", e.Stage + ".out"} {
			if !slices.Contains(names, n) {
				names = append(names, n)
			}
		}
	}
	return names
}

// NodeName is the name a report uses for node n of c: "out" for the
// chain's output, else the node's own name.
func NodeName(c *models.Circuit, n int) string {
	if n == c.Output {
		return "out"
	}
	if n >= 0 && n < len(c.Nodes) {
		return c.Nodes[n]
	}
	return fmt.Sprint(n)
}

// NodeList lists the circuit's nodes a user can name (not ground, not the
// nodes inside parts), at most 24 of them.
func NodeList(c *models.Circuit) string {
	var names []string
	for i, n := range c.Nodes {
		if i == models.Ground || InternalNode(n) {
			continue
		}
		names = append(names, n)
	}
	const most = 24
	if len(names) > most {
		return fmt.Sprintf("%s, … %d more", strings.Join(names[:most], ", "), len(names)-most)
	}
	return strings.Join(names, ", ")
}
