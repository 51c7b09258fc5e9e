package chains_test

import (
	"errors"
	"strings"
	"testing"

	"renderchain/chains"
	"renderchain/internal/testchains"
)

// The wiring rule, written once: every stage's ends as Build names them,
// and every name a user can write resolves to the node Build made. For
// every example chain: every node of the flat circuit (but ground and the
// nodes inside parts), every STAGE.in and STAGE.out, and in, out and v+.
// In the demo, volume.out and amp.in are the chain's output "out" (the
// amplifier-input stage is a shunt behind the volume pot: the wiring
// rule), and fuzz.out is tone.in.
func TestEveryNodeResolves(t *testing.T) {
	for _, ex := range testchains.Examples(t) {
		name, ch, c := ex.Name, ex.Chain, ex.Circuit
		w := ch.Wiring()
		names := append(w.Names(c), "")
		if len(names) < len(ch.Stages)*2 {
			t.Fatalf("%s: names %v", name, names)
		}
		for _, n := range names {
			got, err := w.Resolve(c, n)
			if err != nil || got <= 0 {
				t.Errorf("%s: %q: %v", name, n, err)
			}
		}
		for k, st := range ch.Stages {
			e := w.Stages[k]
			in, _ := w.Resolve(c, st.ID+".in")
			out, _ := w.Resolve(c, st.ID+".out")
			if c.Lookup(e.In) != in || (c.Lookup(e.Out) != out && !(e.Out == w.Out && out == c.Output)) {
				t.Errorf("%s: stage %s ends %q/%q resolve to %d/%d", name, st.ID, e.In, e.Out, in, out)
			}
			if k > 0 && w.Stages[k-1].Out != e.Feed {
				t.Errorf("%s: stage %s is fed by %q, not by the stage before (%q)", name, st.ID, e.Feed, w.Stages[k-1].Out)
			}
		}
	}
	ch, _ := chains.Example("demo")
	c, _ := ch.Build()
	w := ch.Wiring()
	for probe, want := range map[string]int{"volume.out": c.Output, "amp.in": c.Output, "amp.out": c.Output, "tone.in": c.Lookup("fuzz.out"), "pickup.in": c.Lookup("in")} {
		if got, err := w.Resolve(c, probe); got != want || err != nil {
			t.Errorf("demo %s = node %d, %v; want %d", probe, got, err, want)
		}
	}
	if n := w.Node("fuzz", "c2"); n != "fuzz.c2" || w.Node("amp", "in") != "out" || w.Node("fuzz", "v+") != "v+" {
		t.Errorf("pin names: fuzz.c2 → %q, amp.in → %q", n, w.Node("amp", "in"))
	}
	for _, bad := range []string{"gnd", "fuzz.nowhere", "nostage.out"} {
		_, err := w.Resolve(c, bad)
		var ne *chains.NodeError
		if !errors.As(err, &ne) || !errors.Is(err, chains.ErrNoNode) || strings.Contains(err.Error(), "\n") {
			t.Errorf("%q: %v", bad, err)
		}
	}
}
