package outputs

import (
	"bufio"
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// helperEnv makes the test binary act as a command for the signal tests.
const helperEnv = "OUTPUTS_SIGNAL_HELPER"

// TestHelperCommand is not a test: run by the signal tests as a child
// process, it checks a set (a file and a folder output in $dir), writes,
// prints "ready" and then either waits for its context (cooperative) or
// ignores it, like a long solve that never checks it (stuck).
func TestHelperCommand(t *testing.T) {
	spec := os.Getenv(helperEnv)
	if spec == "" {
		t.Skip("helper process only")
	}
	mode, dir, _ := strings.Cut(spec, ":")
	ctx, stop := Watch(context.Background(), 300*time.Millisecond, os.Stderr)
	defer stop()
	s := New()
	f := s.File("out", filepath.Join(dir, "wet.wav"))
	d := s.Dir("outdir", filepath.Join(dir, "set"))
	if err := s.Check(); err != nil {
		fmt.Println(err)
		os.Exit(3)
	}
	f.Write([]byte("partial render"))
	os.WriteFile(filepath.Join(d.Work(), "clip.wav"), []byte("clip"), 0o644)
	fmt.Println("ready")
	if mode == "stuck" {
		time.Sleep(time.Minute)
		os.Exit(4)
	}
	<-ctx.Done()
	s.Abort()
	var se *SignalError
	if !errors.As(context.Cause(ctx), &se) {
		os.Exit(5)
	}
	fmt.Fprintln(os.Stderr, se)
	os.Exit(se.ExitCode())
}

// SIGINT, SIGTERM, SIGHUP and SIGQUIT all leave nothing behind, whether the
// command checks its context (it aborts its own set) or not (Watch's grace
// period runs out and Cleanup removes the files); the exit status is
// 128 + the signal number (POSIX shells report a process ended by signal n
// so; common practice) and SIGQUIT prints no goroutine dump.
func TestWatchSignals(t *testing.T) {
	if os.Getenv(helperEnv) != "" {
		t.Skip("in the helper")
	}
	exe, err := os.Executable()
	if err != nil {
		t.Skip(err)
	}
	for _, sig := range []syscall.Signal{syscall.SIGINT, syscall.SIGTERM, syscall.SIGHUP, syscall.SIGQUIT} {
		for _, mode := range []string{"cooperative", "stuck"} {
			dir := t.TempDir()
			write(t, filepath.Join(dir, "wet.wav"), "previous render")
			cmd := exec.Command(exe, "-test.run=^TestHelperCommand$")
			cmd.Env = append(os.Environ(), helperEnv+"="+mode+":"+dir)
			var stderr strings.Builder
			cmd.Stderr = &stderr
			stdout, _ := cmd.StdoutPipe()
			if err := cmd.Start(); err != nil {
				t.Fatal(err)
			}
			line, _ := bufio.NewReader(stdout).ReadString('\n')
			if line != "ready\n" {
				cmd.Process.Kill()
				cmd.Wait()
				t.Fatalf("%v %s: helper said %q", sig, mode, line)
			}
			cmd.Process.Signal(sig)
			go io.Copy(io.Discard, stdout)
			err := cmd.Wait()
			var ee *exec.ExitError
			if !errors.As(err, &ee) || ee.ExitCode() != 128+int(sig) {
				t.Errorf("%v %s: exit %v, want status %d; stderr %q", sig, mode, err, 128+int(sig), stderr.String())
			}
			msg := stderr.String()
			if !strings.Contains(msg, "interrupted by SIG") || strings.Contains(msg, "goroutine ") {
				t.Errorf("%v %s: stderr %q: want the one-line notice, no dump", sig, mode, msg)
			}
			if want := []string{"wet.wav"}; !equal(names(t, dir), want) || read(t, filepath.Join(dir, "wet.wav")) != "previous render" {
				t.Errorf("%v %s: folder holds %v after the signal", sig, mode, names(t, dir))
			}
		}
	}
}

// Cleanup removes the temporary files of every live set of the process.
func TestCleanup(t *testing.T) {
	dir := t.TempDir()
	a, b := New(), New()
	a.File("out", filepath.Join(dir, "a.wav"))
	b.File("out", filepath.Join(dir, "b.wav"))
	b.Dir("outdir", filepath.Join(dir, "set"))
	if err := a.Check(); err != nil {
		t.Fatal(err)
	}
	if err := b.Check(); err != nil {
		t.Fatal(err)
	}
	if len(names(t, dir)) != 3 {
		t.Fatalf("want 3 temporaries, folder holds %v", names(t, dir))
	}
	if n := Cleanup(); n != 3 {
		t.Errorf("Cleanup removed %d, want 3", n)
	}
	if len(names(t, dir)) != 0 {
		t.Errorf("folder holds %v", names(t, dir))
	}
	if err := a.Commit(); !errors.Is(err, ErrState) {
		t.Errorf("Commit after Cleanup = %v, want ErrState", err)
	}
}

// runAsNobody re-runs the named test as user and group 65534 (nobody on
// most systems), for checks of permissions, which do not bind root. The
// test binary is copied where that user can run it.
func runAsNobody(t *testing.T, name string) {
	t.Helper()
	if os.Getenv("OUTPUTS_AS_NOBODY") != "" {
		t.Fatal("still root in the unprivileged run")
	}
	exe, err := os.Executable()
	if err != nil {
		t.Skip(err)
	}
	dir, err := os.MkdirTemp("", "outputs-nobody")
	if err != nil {
		t.Skip(err)
	}
	defer os.RemoveAll(dir)
	os.Chmod(dir, 0o755)
	bin := filepath.Join(dir, "test.bin")
	b, err := os.ReadFile(exe)
	if err != nil || os.WriteFile(bin, b, 0o755) != nil {
		t.Skip("cannot copy the test binary")
	}
	cmd := exec.Command(bin, "-test.run=^"+name+"$", "-test.v")
	cmd.Dir = dir
	cmd.Env = append(os.Environ(), "OUTPUTS_AS_NOBODY=1", "TMPDIR="+os.TempDir(), "HOME="+dir, "GOCOVERDIR=")
	cmd.SysProcAttr = &syscall.SysProcAttr{Credential: &syscall.Credential{Uid: 65534, Gid: 65534}}
	outb, err := cmd.CombinedOutput()
	out := string(outb)
	if err != nil && strings.Contains(out, "permission denied") && !strings.Contains(out, "--- FAIL") {
		t.Skipf("cannot run as an unprivileged user here: %v", err)
	}
	if err != nil || !strings.Contains(out, "--- PASS: "+name) {
		t.Fatalf("unprivileged run: %v\n%s", err, out)
	}
}
