package measure

import (
	"context"
	"strings"
	"testing"

	"renderchain/internal/testchains"
)

// Warnings travel: a sine measurement, a small-signal response and a
// swept response of the cascade with overall feedback carry its stability
// warning and the rendered check's line; with the feedback capacitor
// shrunk to 1 pF (the loop all but open: three stages in a row, stable by
// the pole analysis) they carry neither, and a response of both variants
// names the one the warning belongs to (report.Combine).
func TestWarningsTravel(t *testing.T) {
	ctx := context.Background()
	ch := testchains.Cascade(t, true)
	osc := func(w []string) bool {
		return len(w) > 1 && strings.HasPrefix(w[0], "self-oscillates near ") && strings.HasPrefix(w[1], "rendered check ")
	}
	r, err := Sine(ctx, ch, 1000, 0.01, Options{Oversample: 1, MaxSettle: 0.2})
	if err != nil {
		t.Fatal(err)
	}
	if !osc(r.Warnings) {
		t.Errorf("sine: %q", r.Warnings)
	}
	vs, err := Expand([]string{"fuzz.CF=22n,1p"})
	if err != nil {
		t.Fatal(err)
	}
	rep, err := RunResponse(ctx, ch, vs, []float64{100, 1000}, ResponseOptions{Oversample: 1})
	if err != nil {
		t.Fatal(err)
	}
	if !osc(rep.Curves[0].Warnings) || strings.Contains(strings.Join(rep.Curves[1].Warnings, " "), "oscillat") {
		t.Errorf("curves: %q / %q", rep.Curves[0].Warnings, rep.Curves[1].Warnings)
	}
	if len(rep.Warnings) == 0 || !strings.HasPrefix(rep.Warnings[0], "fuzz.CF=22n: self-oscillates near ") {
		t.Errorf("report: %q", rep.Warnings)
	}
	sw, err := RunSwept(ctx, ch, nil, []float64{100, 1000}, SweptOptions{Amplitude: 0.01, Duration: 0.5, Oversample: 1, Orders: 2}, 1)
	if err != nil {
		t.Fatal(err)
	}
	if !osc(sw.Warnings) {
		t.Errorf("swept: %q", sw.Warnings)
	}
}
