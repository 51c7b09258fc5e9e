package wavio

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func dirNames(t *testing.T, dir string) []string {
	t.Helper()
	es, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, e := range es {
		names = append(names, e.Name())
	}
	return names
}

// writeWAV renders a short tone into o through a Writer.
func writeWAV(t *testing.T, o *Output) {
	t.Helper()
	w, err := NewWriter(o, Format{SampleRate: 48000, Channels: 1, BitDepth: 16})
	if err != nil {
		t.Fatal(err)
	}
	src := make([]float64, 480)
	for i := range src {
		src[i] = 0.5 * math.Sin(2*math.Pi*float64(i)/48)
	}
	if err := w.Write(src); err != nil {
		t.Fatal(err)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
}

func TestOutputCommit(t *testing.T) {
	dir := t.TempDir()
	final := filepath.Join(dir, "out.wav")
	o, err := CreateTemp(final)
	if err != nil {
		t.Fatal(err)
	}
	defer o.Abort()
	tmp := o.Name()
	if filepath.Dir(tmp) != dir || !strings.HasPrefix(filepath.Base(tmp), ".out.wav.") || !strings.HasSuffix(tmp, ".tmp") {
		t.Errorf("temporary name %q: want .out.wav.*.tmp in %s", tmp, dir)
	}
	writeWAV(t, o)
	if _, err := os.Stat(final); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("final path exists before Commit: %v", err)
	}
	if err := o.Commit(); err != nil {
		t.Fatal(err)
	}
	if names := dirNames(t, dir); len(names) != 1 || names[0] != "out.wav" {
		t.Errorf("directory holds %v, want [out.wav]", names)
	}
	st, err := os.Stat(final)
	if err != nil {
		t.Fatal(err)
	}
	if st.Mode().Perm() != 0o644 {
		t.Errorf("mode %v, want 0644", st.Mode().Perm())
	}
	r, err := Open(final)
	if err != nil {
		t.Fatal(err)
	}
	if r.Frames() != 480 {
		t.Errorf("committed file has %d frames, want 480", r.Frames())
	}
	r.Close()
	o.Abort() // after Commit: no effect
	if _, err := os.Stat(final); err != nil {
		t.Errorf("Abort after Commit removed the file: %v", err)
	}
	if err := o.Commit(); !errors.Is(err, ErrClosed) {
		t.Errorf("second Commit = %v, want ErrClosed", err)
	}
}

func TestOutputReplacesExisting(t *testing.T) {
	dir := t.TempDir()
	final := filepath.Join(dir, "out.wav")
	if err := os.WriteFile(final, []byte("old contents"), 0o600); err != nil {
		t.Fatal(err)
	}
	o, err := CreateTemp(final)
	if err != nil {
		t.Fatal(err)
	}
	writeWAV(t, o)
	if b, _ := os.ReadFile(final); string(b) != "old contents" {
		t.Error("existing file changed before Commit")
	}
	if err := o.Commit(); err != nil {
		t.Fatal(err)
	}
	st, _ := os.Stat(final)
	if st.Mode().Perm() != 0o600 {
		t.Errorf("mode %v, want the replaced file's 0600", st.Mode().Perm())
	}
	if r, err := Open(final); err != nil {
		t.Errorf("replaced file unreadable: %v", err)
	} else {
		r.Close()
	}
}

func TestOutputAbort(t *testing.T) {
	dir := t.TempDir()
	o, err := CreateTemp(filepath.Join(dir, "out.wav"))
	if err != nil {
		t.Fatal(err)
	}
	writeWAV(t, o)
	o.Abort()
	o.Abort() // idempotent
	if names := dirNames(t, dir); len(names) != 0 {
		t.Errorf("directory holds %v after Abort, want nothing", names)
	}
	if err := o.Commit(); !errors.Is(err, ErrClosed) {
		t.Errorf("Commit after Abort = %v, want ErrClosed", err)
	}
}

// render is the pattern a command follows: Abort deferred, Commit only
// after every write succeeded.
func render(final string, src []float64) (err error) {
	o, err := CreateTemp(final)
	if err != nil {
		return err
	}
	defer o.Abort()
	w, err := NewWriter(o, Format{SampleRate: 48000, Channels: 1, BitDepth: 32, Float: true})
	if err != nil {
		return err
	}
	if err := w.Write(src); err != nil {
		return err
	}
	if err := w.Close(); err != nil {
		return err
	}
	return o.Commit()
}

func TestOutputFailedWriteLeavesNothing(t *testing.T) {
	dir := t.TempDir()
	final := filepath.Join(dir, "out.wav")
	if err := render(final, []float64{0, 0.5, math.NaN()}); !errors.Is(err, ErrNonFinite) {
		t.Fatalf("render = %v, want ErrNonFinite", err)
	}
	if names := dirNames(t, dir); len(names) != 0 {
		t.Errorf("directory holds %v after a failed render, want nothing", names)
	}

	// An operating-system write failure: the output is aborted (as a
	// signal's cleanup would) under the writer.
	o, err := CreateTemp(final)
	if err != nil {
		t.Fatal(err)
	}
	w, err := NewWriter(o, Format{SampleRate: 48000, Channels: 1, BitDepth: 16})
	if err != nil {
		t.Fatal(err)
	}
	o.Abort()
	if err := w.Write([]float64{0.1}); err == nil {
		t.Error("Write after Abort succeeded")
	}
	if names := dirNames(t, dir); len(names) != 0 {
		t.Errorf("directory holds %v after an I/O failure, want nothing", names)
	}
}

// A folder at the final path, a missing folder, an empty path: refused by
// CreateTemp before anything is written, with a message that names the
// final path and never the hidden temporary name.
func TestOutputRefusedTargets(t *testing.T) {
	dir := t.TempDir()
	taken := filepath.Join(dir, "taken")
	if err := os.Mkdir(taken, 0o755); err != nil {
		t.Fatal(err)
	}
	missing := filepath.Join(dir, "missing", "x.wav")
	for _, p := range []string{taken, missing, ""} {
		o, err := CreateTemp(p)
		if err == nil {
			o.Abort()
			t.Errorf("CreateTemp(%q) succeeded", p)
			continue
		}
		msg := err.Error()
		if strings.ContainsAny(msg, "\r\n") || strings.Contains(msg, ".tmp") || !strings.Contains(msg, "output "+p+":") {
			t.Errorf("CreateTemp(%q): message %q: want one line naming the target", p, msg)
		}
	}
	if names := dirNames(t, dir); len(names) != 1 || names[0] != "taken" {
		t.Errorf("directory holds %v, want [taken]", names)
	}
}

// SameFile is outputs.SameFile (tested there); one hard link and one
// distinct file check that it is wired through.
func TestSameFile(t *testing.T) {
	dir := t.TempDir()
	a, b, h := filepath.Join(dir, "a.wav"), filepath.Join(dir, "b.wav"), filepath.Join(dir, "h.wav")
	os.WriteFile(a, []byte("a"), 0o644)
	os.WriteFile(b, []byte("b"), 0o644)
	if err := os.Link(a, h); err != nil {
		t.Fatal(err)
	}
	if same, err := SameFile(a, h); !same || err != nil {
		t.Errorf("hard link: %v, %v", same, err)
	}
	if same, err := SameFile(a, b); same || err != nil {
		t.Errorf("different files: %v, %v", same, err)
	}
}

// WriteFile round-trips samples exactly (16-bit codes here) and leaves no
// file when the samples are refused (NaN).
func TestWriteFile(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "w.wav")
	x := []float64{0, 0.5, -0.5, 0.25}
	if err := WriteFile(path, Format{SampleRate: 48000, Channels: 1, BitDepth: 16}, x); err != nil {
		t.Fatal(err)
	}
	f, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	got := make([]float64, 8)
	n, _ := f.Read(got)
	f.Close()
	if n != len(x) {
		t.Fatalf("read %d samples", n)
	}
	for i := range x {
		if got[i] != x[i] { // 0, ±0.5, 0.25 are exact 16-bit codes
			t.Errorf("sample %d = %g, want %g", i, got[i], x[i])
		}
	}
	bad := filepath.Join(dir, "bad.wav")
	if err := WriteFile(bad, Format{SampleRate: 48000, Channels: 1, BitDepth: 16}, []float64{math.NaN()}); err == nil {
		t.Fatal("NaN accepted")
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 1 {
		t.Errorf("files left: %d", len(ents))
	}
}
