package main

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"renderchain/dsp/wavio"
)

// childEnv makes the test binary run the command line instead of the
// tests (TestMain), so that the signal tests start the program itself in a
// process of its own without building it first.
const childEnv = "RENDERCHAIN_TEST_RUN_MAIN"

func TestMain(m *testing.M) {
	if os.Getenv(childEnv) == "1" {
		os.Exit(run(append([]string{"renderchain"}, os.Args[1:]...)))
	}
	os.Exit(m.Run())
}

// child is the program started as a process of its own.
type child struct {
	cmd    *exec.Cmd
	stderr bytes.Buffer
	done   chan error
}

func startChild(t *testing.T, dir string, args ...string) *child {
	t.Helper()
	if testing.Short() {
		t.Skip("runs the program as a process of its own")
	}
	c := &child{cmd: exec.Command(os.Args[0], args...), done: make(chan error, 1)}
	c.cmd.Dir = dir
	c.cmd.Env = append(os.Environ(), childEnv+"=1")
	c.cmd.Stderr = &c.stderr
	if err := c.cmd.Start(); err != nil {
		t.Fatal(err)
	}
	go func() { c.done <- c.cmd.Wait() }()
	t.Cleanup(func() { c.cmd.Process.Kill() })
	return c
}

// wait returns the exit status, or fails after limit.
func (c *child) wait(t *testing.T, limit time.Duration) int {
	t.Helper()
	select {
	case err := <-c.done:
		var ee *exec.ExitError
		if errors.As(err, &ee) {
			if ws, ok := ee.Sys().(syscall.WaitStatus); ok && ws.Signaled() {
				t.Fatalf("ended by %v itself, not by the program (stderr %q)", ws.Signal(), c.stderr.String())
			}
			return ee.ExitCode()
		}
		if err != nil {
			t.Fatal(err)
		}
		return 0
	case <-time.After(limit):
		t.Fatalf("still running %v later (stderr %q)", limit, c.stderr.String())
	}
	return -1
}

// interrupt sends sig and waits at most limit for the program to end; it
// fails unless the exit status is 128 + the signal's number and stderr is
// the command's own one line about it. It returns the time from the signal
// to the exit.
func (c *child) interrupt(t *testing.T, sig syscall.Signal, limit time.Duration) time.Duration {
	t.Helper()
	sent := time.Now()
	if err := c.cmd.Process.Signal(sig); err != nil {
		t.Fatal(err)
	}
	code := c.wait(t, limit)
	lag := time.Since(sent)
	t.Logf("%v: exit %d, %v after the signal", sig, code, lag.Round(time.Millisecond))
	if want := 128 + int(sig); code != want {
		t.Errorf("exit %d, want %d", code, want)
	}
	oneLineError(t, sig.String(), c.stderr.String(), "interrupted by", "its temporary files are removed")
	return lag
}

// waitFor polls until cond holds, or fails after limit.
func waitFor(t *testing.T, limit time.Duration, what string, cond func() bool) {
	t.Helper()
	for end := time.Now().Add(limit); time.Now().Before(end); time.Sleep(10 * time.Millisecond) {
		if cond() {
			return
		}
	}
	t.Fatalf("%s: not within %v", what, limit)
}

// temps lists the hidden temporary files and folders in dir.
func temps(dir string) []string {
	var out []string
	ents, _ := os.ReadDir(dir)
	for _, e := range ents {
		if strings.HasPrefix(e.Name(), ".") && (strings.HasSuffix(e.Name(), ".tmp") || strings.HasSuffix(e.Name(), ".old")) {
			out = append(out, e.Name())
		}
	}
	return out
}

// longTake writes seconds of a 110 Hz sine at −12 dBFS, long enough that a
// render of it through the demo chain takes many seconds.
func longTake(t *testing.T, dir string, seconds int) string {
	t.Helper()
	x := make([]float64, 48000*seconds)
	for i := range x {
		x[i] = 0.25 * math.Sin(2*math.Pi*110*float64(i)/48000)
	}
	p := filepath.Join(dir, "long.wav")
	if err := wavio.WriteFile(p, wavio.Format{SampleRate: 48000, Channels: 1, BitDepth: 16}, x); err != nil {
		t.Fatal(err)
	}
	return p
}

// Case 7 (signals): each of SIGINT, SIGTERM, SIGHUP and SIGQUIT sent to a
// render in progress (its temporary files present) ends it with exit
// status 128 + the signal's number (the status a shell reports for a
// process a signal ended: common practice; SIGINT 2, SIGTERM 15, SIGHUP 1,
// SIGQUIT 3 on Linux and the BSDs, from memory of signal(7)), one line on
// stderr and no runtime dump; no temporary file, no output and no report
// remain. The program must stop through its own path, before the
// two-second grace after which outputs.Watch would end it: the line is the
// command's, not Watch's.
func TestSignalsLeaveNothing(t *testing.T) {
	dir := t.TempDir()
	longTake(t, dir, 60)
	chain := demoChainFrom(t, dir)
	for _, sig := range []syscall.Signal{syscall.SIGINT, syscall.SIGTERM, syscall.SIGHUP, syscall.SIGQUIT} {
		t.Run(sig.String(), func(t *testing.T) {
			c := startChild(t, dir, "render", "--chain", chain, "--in", "long.wav", "--out", "wet.wav", "--report", "r.json", "--quiet")
			waitFor(t, 60*time.Second, "the render's temporary files", func() bool { return len(temps(dir)) >= 2 })
			time.Sleep(200 * time.Millisecond)
			c.interrupt(t, sig, 20*time.Second)
			stderr := c.stderr.String()
			if strings.Contains(stderr, "goroutine ") || strings.Contains(stderr, "panic") {
				t.Errorf("a runtime dump on stderr: %q", stderr)
			}
			if left := temps(dir); len(left) > 0 {
				t.Errorf("left behind: %v", left)
			}
			for _, f := range []string{"wet.wav", "r.json"} {
				if _, err := os.Stat(filepath.Join(dir, f)); err == nil {
					t.Errorf("%s written by an interrupted render", f)
				}
			}
		})
	}
}

// demoChainFrom copies the demo chain into dir and returns its name there.
func demoChainFrom(t *testing.T, dir string) string {
	t.Helper()
	b, err := os.ReadFile(demoChain)
	if err != nil {
		t.Fatal(err)
	}
	return writeText(t, dir, "demo.toml", string(b))
}

// writeText writes text to dir/name and returns name.
func writeText(t *testing.T, dir, name, text string) string {
	t.Helper()
	if err := os.WriteFile(filepath.Join(dir, name), []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return name
}

// Case 7: two renders to one --out both succeed (the last to finish wins,
// as with any two writers of one file), and the later one says so on
// stderr: the target was created by the other since it checked its paths.
func TestTwoRendersToOneOut(t *testing.T) {
	dir := t.TempDir()
	longTake(t, dir, 8)
	dry := dryTake(t, dir)
	chain := demoChainFrom(t, dir)
	slow := startChild(t, dir, "render", "--chain", chain, "--in", "long.wav", "--out", "wet.wav", "--quiet")
	waitFor(t, 60*time.Second, "the slow render's temporary file", func() bool { return len(temps(dir)) >= 1 })
	code, _, stderr := capture(t, "render", "--chain", filepath.Join(dir, chain), "--in", dry, "--out", filepath.Join(dir, "wet.wav"), "--quiet", "--oversample", "1")
	if code != exitOK {
		t.Fatalf("the quick render: exit %d: %s", code, stderr)
	}
	if code := slow.wait(t, 300*time.Second); code != exitOK {
		t.Fatalf("the slow render: exit %d: %s", code, slow.stderr.String())
	}
	oneLineError(t, "the later render", slow.stderr.String(), "note:", "--out", "wet.wav", "created by another writer", "last writer wins")
	r, err := wavio.Open(filepath.Join(dir, "wet.wav"))
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	if r.Frames() != 8*48000 {
		t.Errorf("wet.wav has %d frames, want the later render's %d", r.Frames(), 8*48000)
	}
	if left := temps(dir); len(left) > 0 {
		t.Errorf("left behind: %v", left)
	}
}

// diodeLadderChain writes a chain whose DC solve is slow by size alone: a
// ladder of rungs rungs (series resistor, pull-up to v+, diode with series
// resistance to ground), 3 parts and 2 nodes a rung, over 8 stages.
func diodeLadderChain(t *testing.T, dir string, rungs int) string {
	t.Helper()
	var b strings.Builder
	b.WriteString("name = \"diode ladder\"\nsupply = \"9V\"\n")
	per := rungs / 8
	for s := 0; s < 8; s++ {
		fmt.Fprintf(&b, "[[stage]]\nid = \"s%d\"\nparts = [\n", s)
		prev := "in"
		for k := 0; k < per; k++ {
			n := fmt.Sprintf("n%d", k)
			fmt.Fprintf(&b, "  { ref = \"R%d\", kind = \"resistor\", value = \"1k\", pins = [%q, %q] },\n", k, prev, n)
			fmt.Fprintf(&b, "  { ref = \"P%d\", kind = \"resistor\", value = \"10k\", pins = [\"v+\", %q] },\n", k, n)
			fmt.Fprintf(&b, "  { ref = \"D%d\", kind = \"diode\", is = \"2.52n\", n = 1.75, rs = \"1\", pins = { anode = %q, cathode = \"gnd\" } },\n", k, n)
			prev = n
		}
		fmt.Fprintf(&b, "  { ref = \"R%d\", kind = \"resistor\", value = \"1k\", pins = [%q, \"out\"] },\n]\n", per, prev)
	}
	return filepath.Join(dir, writeText(t, dir, "ladder.toml", b.String()))
}

// Case 7: SIGINT during slow DC solves (operating points of a large diode
// ladder near the part bound, over a table of supplies and temperatures,
// many seconds in all) stops the program within a fraction of a second:
// the DC solve checks for cancellation at every Newton iteration. The
// bound, one second from the signal to the exit, allows for a loaded
// machine (one iteration here is one factorisation of some 650 unknowns);
// the program must stop through its own path, not Watch's two-second
// grace exit.
func TestSignalStopsSlowDCSolve(t *testing.T) {
	dir := t.TempDir()
	chain := diodeLadderChain(t, dir, 320)
	c := startChild(t, dir, "bias", "--chain", chain, "--supply", "9,8.8,8.6,8.4,8.2,8,7.8,7.6,7.4,7.2", "--temp", "0,10,20,30,40")
	time.Sleep(1500 * time.Millisecond)
	select {
	case <-c.done:
		t.Fatalf("the operating points were done within 1.5 s (stderr %q): make the chain larger", c.stderr.String())
	default:
	}
	lag := c.interrupt(t, syscall.SIGINT, 10*time.Second)
	if lag > time.Second {
		t.Errorf("stopped %v after SIGINT, want under 1 s", lag)
	}
}
