package measure

import (
	"fmt"
	"strings"

	"renderchain/chains"
	"renderchain/models"
)

// ResolveNode finds a node of the flattened circuit c (built from ch) by
// the name a user writes: "in", "out", "v+", a stage's local node
// "fuzz.c1", or a stage's own ends "tone.in" and "tone.out", which are the
// shared nodes between stages. An empty name is the chain's output.
func ResolveNode(ch *chains.Chain, c *models.Circuit, name string) (int, error) {
	name = strings.TrimSpace(name)
	if name == "" || name == "out" {
		return c.Output, nil
	}
	if name == "gnd" {
		return 0, inputErr("--probe", name, "ground is the reference, not a node to probe")
	}
	if n := c.Lookup(name); n > 0 {
		return n, nil
	}
	// A stage's ends: replay the chain's wiring rule (stage k's out is
	// stage k+1's in; a buffered stage has its own in; a shunt stage's
	// out is its in; the last stage's out is the chain's out).
	if id, end, ok := strings.Cut(name, "."); ok && (end == "in" || end == "out") {
		prev := "in"
		for k, st := range ch.Stages {
			in := prev
			if st.Buffer {
				in = st.ID + ".in"
			}
			out := st.ID + ".out"
			if k == len(ch.Stages)-1 {
				out = "out"
			}
			if !usesOut(st) {
				out = in
			}
			if st.ID == id {
				pick := in
				if end == "out" {
					pick = out
				}
				if pick == "out" {
					return c.Output, nil
				}
				if n := c.Lookup(pick); n > 0 {
					return n, nil
				}
			}
			prev = out
		}
	}
	return 0, inputErr("--probe", name, "no such node (nodes: %s)", nodeList(c))
}

func usesOut(st *chains.Stage) bool {
	for _, p := range st.Parts {
		for _, n := range p.Pins {
			if n == "out" {
				return true
			}
		}
	}
	return false
}

func nodeList(c *models.Circuit) string {
	var names []string
	for i, n := range c.Nodes {
		if i == 0 || strings.HasSuffix(n, ".junction") {
			continue
		}
		names = append(names, n)
	}
	const max = 24
	if len(names) > max {
		return fmt.Sprintf("%s, … %d more", strings.Join(names[:max], ", "), len(names)-max)
	}
	return strings.Join(names, ", ")
}

// nodeName is the name a report uses for node n.
func nodeName(c *models.Circuit, n int) string {
	if n == c.Output {
		return "out"
	}
	if n >= 0 && n < len(c.Nodes) {
		return c.Nodes[n]
	}
	return fmt.Sprint(n)
}
