package measure

import (
	"context"
	"errors"
	"math"
	"math/cmplx"
	"reflect"
	"strings"
	"sync/atomic"
	"testing"

	"renderchain/chains"
	"renderchain/report"
)

// A level sweep over the clipper, on one worker and on two: the same
// figures in the same order (the pool must not change results), steps
// rising as planned, and distortion growing with level as the diodes
// conduct (physics: the clipper is linear well below its ~0.5 V knee).
func TestRunLevelSweepDeterministic(t *testing.T) {
	ch := loadChain(t, "clipper")
	sw, err := ParseLevelSweep("10mV..3V", 6)
	if err != nil {
		t.Fatal(err)
	}
	var calls atomic.Int64
	plan := Plan{Freq: 1000, Amplitude: 0.1, Sweep: sw, Workers: 1, Progress: func(done, total int) {
		calls.Add(1)
		if total != 6 || done < 1 || done > 6 {
			t.Errorf("progress %d/%d", done, total)
		}
	}}
	one, err := Run(context.Background(), ch, plan)
	if err != nil {
		t.Fatal(err)
	}
	plan.Workers, plan.Progress = 2, nil
	two, err := Run(context.Background(), ch, plan)
	if err != nil {
		t.Fatal(err)
	}
	if calls.Load() != 6 {
		t.Errorf("progress called %d times, want 6", calls.Load())
	}
	if len(one.Measurements) != 6 || len(two.Measurements) != 6 {
		t.Fatalf("%d and %d measurements, want 6", len(one.Measurements), len(two.Measurements))
	}
	for i := range one.Measurements {
		a, b := one.Measurements[i], two.Measurements[i]
		if !reflect.DeepEqual(a, b) {
			t.Errorf("step %d differs between 1 and 2 workers: THD %.9g vs %.9g", i, a.THDPercent, b.THDPercent)
		}
		if a.AmplitudeV != sw.StepList[i] || *a.SweepValue != sw.StepList[i] {
			t.Errorf("step %d at %g V, want %g V", i, a.AmplitudeV, sw.StepList[i])
		}
		if i > 0 && a.THDPercent <= one.Measurements[i-1].THDPercent {
			t.Errorf("THD_F fell from %.4g %% to %.4g %% as the level rose to %g V", one.Measurements[i-1].THDPercent, a.THDPercent, a.AmplitudeV)
		}
	}
	if low := one.Measurements[0]; low.THDPercent > 0.1 {
		t.Errorf("10 mV: THD_F %.3g %%, want under 0.1 %% (far below the knee)", low.THDPercent)
	}
}

// A knob sweep over conditions: every condition × step, in order, each
// result naming its overrides; the knob really moves (the blend network's
// 100 Hz gain falls from the low-pass side to the high-pass side).
func TestRunKnobSweepWithConditions(t *testing.T) {
	ch := loadChain(t, "blend")
	sw, err := ParseKnobSweep("tone.tone=0..1", 3)
	if err != nil {
		t.Fatal(err)
	}
	vs, err := Expand([]string{"output.load=1M,100k"})
	if err != nil {
		t.Fatal(err)
	}
	rep, err := Run(context.Background(), ch, Plan{Variants: vs, Freq: 100, Amplitude: 0.1, Sweep: sw})
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Measurements) != 6 {
		t.Fatalf("%d measurements, want 6", len(rep.Measurements))
	}
	wantSets := []string{
		"output.load=1M tone.tone=0", "output.load=1M tone.tone=0.5", "output.load=1M tone.tone=1",
		"output.load=100k tone.tone=0", "output.load=100k tone.tone=0.5", "output.load=100k tone.tone=1",
	}
	for i, m := range rep.Measurements {
		if got := strings.Join(m.Settings, " "); got != wantSets[i] {
			t.Errorf("measurement %d settings %q, want %q", i, got, wantSets[i])
		}
	}
	// Each measured gain against the closed form of the network (load
	// 1 MΩ rows only; tolerance: the converter's 0.01 dB ripple and the
	// bilinear warp, below 1e-4 dB at 100 Hz).
	for i, x := range []float64{0, 0.5, 1} {
		want := report.DB(cmplx.Abs(blendH(warped(100, internalFs), x)))
		if got := float64(rep.Measurements[i].GainDB); math.Abs(got-want) > rippleLimit {
			t.Errorf("tone %g: gain %.4f dB, closed form %.4f dB", x, got, want)
		}
	}
}

func TestRunErrors(t *testing.T) {
	ch := loadChain(t, "clipper")
	sw, _ := ParseKnobSweep("clip.nothing=0..1", 3)
	_, err := Run(context.Background(), ch, Plan{Freq: 1000, Amplitude: 0.1, Sweep: sw})
	var se *chains.SetError
	if !errors.As(err, &se) {
		t.Errorf("unknown knob: %v, want a *chains.SetError", err)
	}
	vs, _ := Expand([]string{"clip.R1=10k,bogus"})
	if _, err := Run(context.Background(), ch, Plan{Variants: vs, Freq: 1000, Amplitude: 0.1}); err == nil || !strings.Contains(err.Error(), "bogus") {
		t.Errorf("bad value in a family: %v, want an error naming it", err)
	}
	if _, err := Run(context.Background(), ch, Plan{Freq: 1000, Amplitude: -1}); err == nil {
		t.Error("negative amplitude: want an error")
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Run(ctx, ch, Plan{Freq: 1000, Amplitude: 0.1}); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: %v", err)
	}
}
