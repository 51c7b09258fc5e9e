package measure

import (
	"context"
	"testing"

	"renderchain/chains"
	"renderchain/internal/testchains"
)

// Regression (probes "volume.out" and "amp.in" of the demo were refused):
// every node of every example chain, and every STAGE.in and STAGE.out,
// can be probed by the small-signal response and by the sine bench, and
// the bench reports the node by its circuit name ("out" for the output).
// The sine runs are short (no oversampling, 10 ms records, 50 ms of
// settling): this checks the resolution of names, not the figures.
func TestEveryNodeCanBeProbed(t *testing.T) {
	for _, ex := range testchains.Examples(t) {
		name, ch, c := ex.Name, ex.Chain, ex.Circuit
		for _, probe := range ch.Wiring().Names(c) {
			if _, err := SmallSignal(ch, []float64{1000}, ResponseOptions{Probe: probe}); err != nil {
				t.Errorf("%s: response --probe %s: %v", name, probe, err)
			}
			r, err := Sine(context.Background(), ch, 1000, 0.01, Options{Probe: probe, Oversample: 1, MaxSettle: 0.05, MinRecord: 0.01})
			if err != nil {
				t.Errorf("%s: measure --probe %s: %v", name, probe, err)
				continue
			}
			want, _ := ch.Wiring().Resolve(c, probe)
			if r.Probe != chains.NodeName(c, want) {
				t.Errorf("%s: probe %s reported as %q, want %q", name, probe, r.Probe, chains.NodeName(c, want))
			}
		}
	}
}
