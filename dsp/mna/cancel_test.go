package mna_test

import (
	"context"
	"errors"
	"fmt"
	"strings"
	"testing"
	"time"

	"renderchain/dsp/mna"
	"renderchain/models"
)

// errStop is the cause a countdown context reports once done.
var errStop = errors.New("stop requested")

// countdown is a context that becomes done at its n-th check (the n-th
// call of Done) and counts every check, so a test can tell where a solve
// looked at it and that it returned at once.
type countdown struct {
	context.Context
	n, calls int
	open     chan struct{}
	closed   chan struct{}
}

func newCountdown(n int) *countdown {
	c := &countdown{Context: context.Background(), n: n, open: make(chan struct{}), closed: make(chan struct{})}
	close(c.closed)
	return c
}

func (c *countdown) Done() <-chan struct{} {
	c.calls++
	if c.n > 0 && c.calls >= c.n {
		return c.closed
	}
	return c.open
}

func (c *countdown) Err() error {
	if c.n > 0 && c.calls >= c.n {
		return errStop
	}
	return nil
}

// TestSolveDCContextStopsAtOnce: the DC solve checks its context at every
// Newton iteration of every continuation and returns at the first check
// that finds it done. The trigger circuit of TestSolveDCContinuation needs
// all three (plain Newton runs out of its 200 iterations, gmin stepping
// fails, source stepping finishes), so stopping at the 1st, 100th, 250th
// and next-to-last check lands in each. Expected: a *mna.CancelError that
// unwraps to the context's cause, after exactly n checks (not one more
// iteration); a context that never becomes done changes nothing (same
// method, iterations and node voltages as SolveDC, compared exactly: the
// same arithmetic runs).
func TestSolveDCContextStopsAtOnce(t *testing.T) {
	ref, err := mna.SolveDC(schmitt(0.84).c, mna.DCOptions{})
	if err != nil {
		t.Fatal(err)
	}
	never := newCountdown(0)
	op, err := mna.SolveDCContext(never, schmitt(0.84).c, mna.DCOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if op.Method != ref.Method || op.Iterations != ref.Iterations || fmt.Sprint(op.Node) != fmt.Sprint(ref.Node) {
		t.Errorf("with a context: %s, %d iterations, %v; without: %s, %d, %v", op.Method, op.Iterations, op.Node, ref.Method, ref.Iterations, ref.Node)
	}
	if ref.Method != "source" || never.calls < 300 {
		t.Fatalf("the trigger no longer needs source stepping (%s, %d checks): pick another input level", ref.Method, never.calls)
	}
	for _, n := range []int{1, 100, 250, never.calls - 1} {
		ctx := newCountdown(n)
		op, err := mna.SolveDCContext(ctx, schmitt(0.84).c, mna.DCOptions{})
		var ce *mna.CancelError
		if op != nil || !errors.As(err, &ce) || !errors.Is(err, errStop) {
			t.Errorf("done at check %d: %v, %v; want a *mna.CancelError wrapping the cause", n, op, err)
		}
		if ctx.calls != n {
			t.Errorf("done at check %d: the solve checked %d times: it went on after the context was done", n, ctx.calls)
		}
		oneLine(t, err)
	}
}

// diodeLadder is a DC-heavy circuit of k rungs: a series resistor, a pull-up
// to the supply and a diode with series resistance to ground per rung, so
// 2k+1 nodes and k junctions for Newton to settle.
func diodeLadder(k int) *netlist {
	n := newNet()
	n.V("V1", "v+", "gnd", 9)
	prev := "v+"
	for j := 0; j < k; j++ {
		a, jn := fmt.Sprint("a", j), fmt.Sprint("j", j)
		n.R(fmt.Sprint("R", j), prev, a, 1e3)
		n.R(fmt.Sprint("P", j), "v+", a, 10e3)
		n.R(fmt.Sprint("S", j), a, jn, 1)
		n.D(fmt.Sprint("D", j), jn, "gnd", siDiode())
		prev = a
	}
	return n
}

// TestSolveDCCancelLatency: a real cancellation (context.WithCancel from
// another goroutine) stops a large solve (a 400-rung diode ladder, 801
// nodes, dense LU of 800 unknowns per iteration) well within a fraction of
// a second. The bound, 500 ms after the cancel, allows for a loaded
// machine: one iteration is one factorisation, tens of milliseconds here.
func TestSolveDCCancelLatency(t *testing.T) {
	if testing.Short() {
		t.Skip("large circuit")
	}
	c := diodeLadder(400).c
	ctx, cancel := context.WithCancelCause(context.Background())
	var at time.Time
	go func() {
		time.Sleep(20 * time.Millisecond)
		at = time.Now()
		cancel(errStop)
	}()
	_, err := mna.SolveDCContext(ctx, c, mna.DCOptions{})
	end := time.Now()
	if err == nil {
		t.Skip("the solve finished before the cancel came (a fast machine): nothing to measure")
	}
	if !errors.Is(err, errStop) {
		t.Fatalf("error %v, want the cancel's cause", err)
	}
	lag := end.Sub(at)
	t.Logf("stopped %v after the cancel", lag)
	if lag > 500*time.Millisecond {
		t.Errorf("stopped %v after the cancel, want under 500 ms", lag)
	}
}

// TestSingularNamesThePart: a singular DC system is reported at the
// unknown where elimination stopped, by the names of the circuit: two
// ideal buffers driving each other leave the level of their loop
// undetermined (V(a) = V(b) twice), and the message names one of them.
// A node that only a capacitor holds (no DC path) is Check's business and
// names the node. Expected wording from the package's own messages.
func TestSingularNamesThePart(t *testing.T) {
	buffers := newNet()
	buffers.Buf("B1", "a", "b")
	buffers.Buf("B2", "b", "a")
	buffers.R("R1", "a", "gnd", 1e3)
	buffers.R("R2", "b", "gnd", 1e3)
	_, err := mna.SolveDC(buffers.c, mna.DCOptions{})
	var ce *models.CircuitError
	if !errors.As(err, &ce) || !strings.Contains(err.Error(), "singular") ||
		!(strings.Contains(err.Error(), "B1") || strings.Contains(err.Error(), "B2")) {
		t.Errorf("buffer loop: %v; want a singular-system error naming B1 or B2", err)
	}
	oneLine(t, err)

	// Layout.Unknown names nodes with their parts and branches by their element.
	n := newNet()
	n.V("V1", "a", "gnd", 1)
	n.R("R1", "a", "b", 1e3)
	n.R("R2", "b", "gnd", 1e3)
	lay := mna.NewLayout(n.c, true)
	if got, want := lay.Unknown(n.c, lay.Row(n.node("b"))), "node b (parts R1, R2)"; got != want {
		t.Errorf("Unknown(node b) = %q, want %q", got, want)
	}
	if got, want := lay.Unknown(n.c, lay.BranchRow(0)), "the current of V1"; got != want {
		t.Errorf("Unknown(branch of V1) = %q, want %q", got, want)
	}
}
