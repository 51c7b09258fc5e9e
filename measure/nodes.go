package measure

import (
	"errors"

	"renderchain/chains"
	"renderchain/models"
)

// ResolveNode finds a node of the flattened circuit c (built from ch) by
// the name a user writes, through the chain's wiring (chains.Wiring.Resolve):
// "in", "out", "v+", a stage's local node "fuzz.c1", or a stage's own ends
// "tone.in" and "tone.out". An empty name is the chain's output.
func ResolveNode(ch *chains.Chain, c *models.Circuit, name string) (int, error) {
	n, err := ch.Wiring().Resolve(c, name)
	var ne *chains.NodeError
	if errors.As(err, &ne) {
		return 0, inputErr("--probe", name, "%s", ne.Msg)
	}
	return n, err
}

// nodeName is the name a report uses for node n.
func nodeName(c *models.Circuit, n int) string { return chains.NodeName(c, n) }
