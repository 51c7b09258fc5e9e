package mna

import (
	"errors"
	"fmt"
	"strings"

	"renderchain/models"
)

// maxNamed is how many parts a singular-system message lists.
const maxNamed = 6

// Unknown describes unknown k of the layout in the circuit's own terms:
// "node fuzz.c1 (parts fuzz.R3, fuzz.C2)" for a node voltage, "the
// current of supply" for a branch current. Parts are listed by ref, at
// most six, in circuit order.
func (l *Layout) Unknown(c *models.Circuit, k int) string {
	if k < 0 || k >= l.Dim {
		return fmt.Sprintf("unknown %d", k)
	}
	if k < l.Nodes-1 {
		n := k + 1
		var refs []string
		seen := map[string]bool{}
		for _, e := range c.Elements {
			for _, m := range e.Nodes {
				if m == n && !seen[e.Ref] {
					seen[e.Ref] = true
					refs = append(refs, e.Ref)
					break
				}
			}
		}
		name := fmt.Sprintf("%d", n)
		if n < len(c.Nodes) {
			name = c.Nodes[n]
		}
		switch {
		case len(refs) == 0:
			return "node " + name + " (no part on it)"
		case len(refs) > maxNamed:
			return fmt.Sprintf("node %s (parts %s and %d more)", name, strings.Join(refs[:maxNamed], ", "), len(refs)-maxNamed)
		}
		return "node " + name + " (parts " + strings.Join(refs, ", ") + ")"
	}
	b := k - (l.Nodes - 1)
	for e, first := range l.Branches {
		if b >= first && b < first+max(1, branchCount(&c.Elements[e], true)) {
			return "the current of " + c.Elements[e].Ref
		}
	}
	return fmt.Sprintf("branch current %d", b)
}

// Singular turns a factorisation failure of the system of c, laid out by
// l, into a one-line *models.CircuitError that names where elimination
// stopped: the node (with the parts on it) or the branch whose voltage or
// current the equations leave undetermined. what says which system failed
// ("DC equations are singular", "the wave digital adaptor is singular").
// An error that is not a *SingularError gives the message without a place.
func Singular(c *models.Circuit, l *Layout, err error, what string) error {
	var se *SingularError
	if errors.As(err, &se) {
		return &models.CircuitError{What: "circuit", Reason: fmt.Sprintf("%s at %s: a node or loop there is undetermined", what, l.Unknown(c, se.Column))}
	}
	return &models.CircuitError{What: "circuit", Reason: what + " (a node or loop is undetermined)"}
}
