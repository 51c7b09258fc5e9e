package chains

import (
	"fmt"
	"slices"
	"strings"
)

// Shared node names every stage sees without declaring them.
var sharedNames = []string{"gnd", "v+", "in", "out"}

// EMF is the node name, inside the [power] table, of the ideal supply's
// terminal: the supply network runs from emf to v+. It is reported as
// "power.emf".
const EMF = "emf"

// PowerID is the id of the supply network: its parts are "power.REF" in
// reports and --set keys, its own nodes "power.NAME".
const PowerID = "power"

// parseNets reads the top-level nets list: node names shared by every
// stage (a filtered rail, a bias reference, a second supply), declared
// once. A net is reported by its own name and probed by it. A net name is
// written like any node name, without a dot (a dot reaches one stage's
// node), and is none of gnd, v+, in, out and emf.
func (ch *Chain) parseNets(v any) error {
	if v == nil {
		return nil
	}
	line := ch.loc.findKey("", "nets")
	fail := func(format string, a ...any) error {
		return &Error{File: ch.File, Line: line, Where: "nets", Msg: fmt.Sprintf(format, a...)}
	}
	list, ok := v.([]any)
	if !ok {
		return fail(`want a list of node names, e.g. nets = ["vf", "vref"]`)
	}
	for _, x := range list {
		name, ok := x.(string)
		switch {
		case !ok || strings.TrimSpace(name) == "":
			return fail("%v is not a node name", x)
		case name != strings.TrimSpace(name) || strings.ContainsAny(name, " \t"):
			return fail("%q: a node name has no spaces", name)
		case slices.Contains(sharedNames, name):
			return fail("%q is shared by every stage already: leave it out of nets", name)
		case name == EMF:
			return fail("%q is the supply network's own node: pick another name", name)
		case strings.Contains(name, "."):
			return fail("%q: a net name has no dot (a dotted name reaches one stage's node)", name)
		case slices.Contains(ch.Nets, name):
			return fail("%q is declared twice", name)
		}
		ch.Nets = append(ch.Nets, name)
	}
	return nil
}

// isNet reports a declared net.
func (ch *Chain) isNet(name string) bool { return slices.Contains(ch.Nets, name) }
