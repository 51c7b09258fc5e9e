package outputs

import (
	"errors"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"syscall"
	"testing"
)

// Each test below reproduces one case of "never lose a file": the facts
// checked are POSIX.1-2017 file semantics (rename(2) is atomic within a
// folder and replaces the target; link(2); a FIFO made by mkfifo(3) stays
// a FIFO until unlinked; /dev/null is a character device that discards
// what is written, common practice on every POSIX system).

func write(t *testing.T, p, s string) {
	t.Helper()
	if err := os.WriteFile(p, []byte(s), 0o644); err != nil {
		t.Fatal(err)
	}
}

func read(t *testing.T, p string) string {
	t.Helper()
	b, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// names lists a folder, hidden entries included.
func names(t *testing.T, dir string) []string {
	t.Helper()
	es, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var s []string
	for _, e := range es {
		s = append(s, e.Name())
	}
	sort.Strings(s)
	return s
}

func equal(a, b []string) bool { return strings.Join(a, "\x00") == strings.Join(b, "\x00") }

// wantPathError checks kind and role, and that the message is one line
// naming the declared path and never a temporary name.
func wantPathError(t *testing.T, err error, kind error, role, path string) *PathError {
	t.Helper()
	var pe *PathError
	if !errors.Is(err, kind) || !errors.As(err, &pe) {
		t.Fatalf("err = %v, want *PathError wrapping %v", err, kind)
	}
	if pe.Role != role || pe.Path != path {
		t.Errorf("role %q path %q, want %q %q", pe.Role, pe.Path, role, path)
	}
	msg := err.Error()
	if strings.ContainsAny(msg, "\r\n") || !strings.HasPrefix(msg, role+" "+path+": ") || strings.Contains(msg, ".tmp") {
		t.Errorf("message %q: want one line starting %q, no temporary name", msg, role+" "+path+": ")
	}
	return pe
}

// The first case: --report naming the dry input (spelled the same,
// through a symbolic link, a hard link, or another spelling) is refused at
// Check and the input is untouched.
func TestOutputSameAsInput(t *testing.T) {
	dir := t.TempDir()
	dry := filepath.Join(dir, "dry.wav")
	write(t, dry, "dry take")
	if err := os.Symlink(dry, filepath.Join(dir, "link.wav")); err != nil {
		t.Fatal(err)
	}
	if err := os.Link(dry, filepath.Join(dir, "hard.wav")); err != nil {
		t.Fatal(err)
	}
	os.Mkdir(filepath.Join(dir, "sub"), 0o755)
	for _, report := range []string{
		dry,
		filepath.Join(dir, "link.wav"),
		filepath.Join(dir, "hard.wav"),
		filepath.Join(dir, "sub", "..", "dry.wav"),
	} {
		s := New()
		s.Input("in", dry)
		s.File("out", filepath.Join(dir, "wet.wav"))
		s.File("report", report)
		err := s.Check()
		pe := wantPathError(t, err, ErrSameAsInput, "report", report)
		if pe.Other != "in" || pe.OtherPath != dry {
			t.Errorf("%s: collides with %q %q, want in %s", report, pe.Other, pe.OtherPath, dry)
		}
		if got := read(t, dry); got != "dry take" {
			t.Errorf("%s: input now holds %q", report, got)
		}
		if want := []string{"dry.wav", "hard.wav", "link.wav", "sub"}; !equal(names(t, dir), want) {
			t.Errorf("%s: folder holds %v, want %v", report, names(t, dir), want)
		}
		s.Abort()
	}
}

// --report equal to --out, by the same spelling (neither exists yet), a
// symbolic link, a hard link, or a dot-dot spelling (both exist).
func TestOutputSameAsOutput(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "wet.wav")
	cases := []struct {
		name, report string
		setup        func()
	}{
		{"same spelling, new file", out, func() {}},
		{"dot-dot spelling, new file", filepath.Join(dir, "sub", "..", "wet.wav"), func() { os.Mkdir(filepath.Join(dir, "sub"), 0o755) }},
		{"symbolic link", filepath.Join(dir, "link.json"), func() { write(t, out, "old"); os.Symlink(out, filepath.Join(dir, "link.json")) }},
		{"hard link", filepath.Join(dir, "hard.json"), func() { write(t, out, "old"); os.Link(out, filepath.Join(dir, "hard.json")) }},
	}
	for _, tc := range cases {
		tc.setup()
		s := New()
		s.File("out", out)
		s.File("report", tc.report)
		pe := wantPathError(t, s.Check(), ErrSameAsOutput, "report", tc.report)
		if pe.Other != "out" {
			t.Errorf("%s: other role %q, want out", tc.name, pe.Other)
		}
		for _, n := range names(t, dir) {
			if strings.HasSuffix(n, ".tmp") {
				t.Errorf("%s: temporary file %s left", tc.name, n)
			}
		}
	}
}

// The data-loss case: --report in a folder that does not exist,
// with an --out that exists. Check refuses before any work; the old --out
// is untouched and nothing is left.
func TestOutputMissingFolderBeforeWork(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "wet.wav")
	write(t, out, "previous render")
	report := filepath.Join(dir, "missing", "r.json")
	s := New()
	s.File("out", out)
	s.File("report", report)
	pe := wantPathError(t, s.Check(), ErrNoFolder, "report", report)
	if pe.Detail != filepath.Join(dir, "missing") {
		t.Errorf("detail %q, want the missing folder", pe.Detail)
	}
	if read(t, out) != "previous render" || !equal(names(t, dir), []string{"wet.wav"}) {
		t.Errorf("folder after refused check: %v", names(t, dir))
	}
	if _, err := s.File("x", out).Write([]byte("x")); !errors.Is(err, ErrState) {
		t.Errorf("Write after a failed Check = %v, want ErrState", err)
	}
}

// The same case when the report's rename fails only at Commit (here a
// folder appears at its path after Check): the --out that was already
// renamed into place is restored from its backup, and no temporary or
// backup file is left.
func TestOutputCommitRollsBack(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "wet.wav")
	write(t, out, "previous render")
	if err := os.Chmod(out, 0o640); err != nil {
		t.Fatal(err)
	}
	report := filepath.Join(dir, "r.json")
	s := New()
	wav := s.File("out", out)
	rep := s.File("report", report)
	if err := s.Check(); err != nil {
		t.Fatal(err)
	}
	defer s.Abort()
	io.WriteString(wav, "new render")
	io.WriteString(rep, "{}")
	if err := os.Mkdir(report, 0o755); err != nil { // in the way of the rename
		t.Fatal(err)
	}
	write(t, filepath.Join(report, "keep"), "x")
	wantPathError(t, s.Commit(), ErrCommit, "report", report)
	if got := read(t, out); got != "previous render" {
		t.Errorf("--out after a failed commit holds %q, want the previous render", got)
	}
	if st, _ := os.Stat(out); st.Mode().Perm() != 0o640 {
		t.Errorf("restored --out has mode %v, want 0640", st.Mode().Perm())
	}
	if want := []string{"r.json", "wet.wav"}; !equal(names(t, dir), want) {
		t.Errorf("folder holds %v, want %v", names(t, dir), want)
	}
	if err := s.Commit(); !errors.Is(err, ErrState) {
		t.Errorf("second Commit = %v, want ErrState", err)
	}
}

// A successful commit replaces both files, keeps the replaced file's
// permission bits, and leaves no backup.
func TestOutputCommit(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "wet.wav")
	write(t, out, "previous render")
	os.Chmod(out, 0o600)
	report := filepath.Join(dir, "r.json")
	s := New()
	s.Input("in", filepath.Join(dir, "dry.wav")) // need not exist
	wav := s.File("out", out)
	rep := s.File("report", report)
	if err := s.Check(); err != nil {
		t.Fatal(err)
	}
	if Live() < 1 {
		t.Error("checked set not registered")
	}
	tmp := wav.TempPath()
	if filepath.Dir(tmp) != dir || !strings.HasPrefix(filepath.Base(tmp), ".wet.wav.") {
		t.Errorf("temporary %q: want a hidden file beside the target", tmp)
	}
	io.WriteString(wav, "new render")
	if _, err := wav.Seek(0, io.SeekStart); err != nil {
		t.Fatal(err)
	}
	io.WriteString(wav, "NEW")
	io.WriteString(rep, "{}")
	if read(t, out) != "previous render" {
		t.Error("target changed before Commit")
	}
	if err := s.Commit(); err != nil {
		t.Fatal(err)
	}
	if read(t, out) != "NEW render" || read(t, report) != "{}" {
		t.Errorf("after commit: %q, %q", read(t, out), read(t, report))
	}
	if st, _ := os.Stat(out); st.Mode().Perm() != 0o600 {
		t.Errorf("mode %v, want the replaced file's 0600", st.Mode().Perm())
	}
	if st, _ := os.Stat(report); st.Mode().Perm() != 0o644 {
		t.Errorf("new file mode %v, want 0644", st.Mode().Perm())
	}
	if want := []string{"r.json", "wet.wav"}; !equal(names(t, dir), want) {
		t.Errorf("folder holds %v, want %v", names(t, dir), want)
	}
	if len(s.Changed()) != 0 {
		t.Errorf("Changed = %v, want none", s.Changed())
	}
	s.Abort() // after Commit: nothing
	if read(t, out) != "NEW render" {
		t.Error("Abort after Commit changed the file")
	}
	if _, err := wav.Write([]byte("x")); !errors.Is(err, ErrState) {
		t.Errorf("Write after Commit = %v, want ErrState", err)
	}
}

// Abort removes every temporary file and leaves the targets alone.
func TestOutputAbort(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "wet.wav")
	write(t, out, "previous render")
	s := New()
	wav := s.File("out", out)
	d := s.Dir("outdir", filepath.Join(dir, "set"))
	if err := s.Check(); err != nil {
		t.Fatal(err)
	}
	io.WriteString(wav, "half a render")
	write(t, filepath.Join(d.Work(), "a.wav"), "clip")
	s.Abort()
	s.Abort()
	if want := []string{"wet.wav"}; !equal(names(t, dir), want) || read(t, out) != "previous render" {
		t.Errorf("after Abort the folder holds %v", names(t, dir))
	}
	if err := s.Commit(); !errors.Is(err, ErrState) {
		t.Errorf("Commit after Abort = %v, want ErrState", err)
	}
}

// A folder given as a file target fails at Check, before any work (the
// issue: "--out naming a directory fails only after the whole render").
func TestOutputDirectoryTarget(t *testing.T) {
	dir := t.TempDir()
	s := New()
	s.File("out", dir)
	wantPathError(t, s.Check(), ErrIsDir, "out", dir)
	if len(names(t, dir)) != 0 {
		t.Errorf("folder holds %v", names(t, dir))
	}
	// A trailing separator names no file.
	s = New()
	s.File("out", dir+"/")
	wantPathError(t, s.Check(), ErrEmptyPath, "out", dir+"/")
	s = New()
	s.File("out", "")
	wantPathError(t, s.Check(), ErrEmptyPath, "out", "")
	// A folder output over a file.
	f := filepath.Join(dir, "file")
	write(t, f, "x")
	s = New()
	s.Dir("outdir", f)
	wantPathError(t, s.Check(), ErrNotDir, "outdir", f)
}

// /dev/null as --out and --report: written in place (the usual way to
// discard output), still a character device afterwards; two outputs may
// both name it.
func TestOutputDevNull(t *testing.T) {
	st, err := os.Stat(os.DevNull)
	if err != nil || st.Mode()&fs.ModeCharDevice == 0 {
		t.Skip("no character device at", os.DevNull)
	}
	s := New()
	wav := s.File("out", os.DevNull)
	rep := s.File("report", os.DevNull)
	if err := s.Check(); err != nil {
		t.Fatal(err)
	}
	if !wav.InPlace() || !rep.InPlace() || wav.TempPath() != "" {
		t.Fatal("/dev/null not written in place")
	}
	if n, err := wav.Write(make([]byte, 4096)); n != 4096 || err != nil {
		t.Fatalf("Write = %d, %v", n, err)
	}
	io.WriteString(rep, "{}")
	if err := s.Commit(); err != nil {
		t.Fatal(err)
	}
	after, err := os.Stat(os.DevNull)
	if err != nil || after.Mode()&fs.ModeCharDevice == 0 || !os.SameFile(st, after) {
		t.Fatalf("%s is no longer the same character device: %v", os.DevNull, err)
	}
}

// A FIFO as --out: written in place to the reader at the other end, still
// a FIFO afterwards (never renamed over).
func TestOutputFIFO(t *testing.T) {
	dir := t.TempDir()
	fifo := filepath.Join(dir, "pipe")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Skip("mkfifo:", err)
	}
	got := make(chan string)
	go func() {
		f, err := os.Open(fifo)
		if err != nil {
			got <- err.Error()
			return
		}
		b, _ := io.ReadAll(f)
		f.Close()
		got <- string(b)
	}()
	s := New()
	out := s.File("out", fifo)
	if err := s.Check(); err != nil {
		t.Fatal(err)
	}
	if !out.InPlace() {
		t.Fatal("FIFO not written in place")
	}
	io.WriteString(out, "streamed bytes")
	if err := s.Commit(); err != nil {
		t.Fatal(err)
	}
	if g := <-got; g != "streamed bytes" {
		t.Errorf("reader got %q", g)
	}
	st, err := os.Lstat(fifo)
	if err != nil || st.Mode()&fs.ModeNamedPipe == 0 {
		t.Errorf("target is no longer a FIFO: %v %v", st.Mode(), err)
	}
	if want := []string{"pipe"}; !equal(names(t, dir), want) {
		t.Errorf("folder holds %v", names(t, dir))
	}
}

// A read-only folder is named as the target's folder, never by the hidden
// temporary name (issue, misleading messages). Permissions do not bind
// root, so as root the test runs itself as an unprivileged user.
func TestOutputReadOnlyFolder(t *testing.T) {
	if os.Geteuid() == 0 {
		runAsNobody(t, "TestOutputReadOnlyFolder")
		return
	}
	dir := t.TempDir()
	ro := filepath.Join(dir, "ro")
	if err := os.Mkdir(ro, 0o555); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(ro, "wet.wav")
	s := New()
	s.File("out", out)
	pe := wantPathError(t, s.Check(), ErrNotWritable, "out", out)
	if !errors.Is(pe, fs.ErrPermission) || pe.Detail != "folder "+ro {
		t.Errorf("err %v: want fs.ErrPermission and the folder named", pe)
	}
	os.Chmod(ro, 0o755)
}

// A target written by someone else between Check and Commit is replaced
// (the last writer wins) and reported by Changed.
func TestOutputChangedSinceCheck(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "wet.wav")
	s := New()
	wav := s.File("out", out)
	if err := s.Check(); err != nil {
		t.Fatal(err)
	}
	io.WriteString(wav, "first run")
	write(t, out, "another run") // a second render committed meanwhile
	if err := s.Commit(); err != nil {
		t.Fatal(err)
	}
	ch := s.Changed()
	if len(ch) != 1 || !errors.Is(ch[0], ErrChanged) || ch[0].Role != "out" {
		t.Fatalf("Changed = %v, want one ErrChanged for out", ch)
	}
	if !strings.Contains(ch[0].Error(), "last writer wins") {
		t.Errorf("notice %q", ch[0])
	}
	if read(t, out) != "first run" {
		t.Errorf("target holds %q", read(t, out))
	}
}

// WriteFile: whole or nothing; a folder target is refused.
func TestWriteFile(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "r.json")
	if err := WriteFile("report", p, []byte("{}\n")); err != nil {
		t.Fatal(err)
	}
	if read(t, p) != "{}\n" {
		t.Error("content")
	}
	wantPathError(t, WriteFile("report", dir, nil), ErrIsDir, "report", dir)
	if want := []string{"r.json"}; !equal(names(t, dir), want) {
		t.Errorf("folder holds %v", names(t, dir))
	}
}

func TestSameFile(t *testing.T) {
	dir := t.TempDir()
	a := filepath.Join(dir, "a.wav")
	b := filepath.Join(dir, "b.wav")
	write(t, a, "a")
	write(t, b, "b")
	sub := filepath.Join(dir, "sub")
	os.Mkdir(sub, 0o755)
	os.Symlink(a, filepath.Join(dir, "link.wav"))
	os.Link(a, filepath.Join(dir, "hard.wav"))
	os.Symlink(sub, filepath.Join(dir, "subLink"))
	wd, _ := os.Getwd()
	relA, err := filepath.Rel(wd, a)
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name string
		x, y string
		want bool
	}{
		{"identical", a, a, true},
		{"dot and dot-dot spelling", a, filepath.Join(sub, "..", ".", "a.wav"), true},
		{"relative and absolute", relA, a, true},
		{"symbolic link", filepath.Join(dir, "link.wav"), a, true},
		{"hard link", filepath.Join(dir, "hard.wav"), a, true},
		{"different files", a, b, false},
		{"missing, same path spelled twice", filepath.Join(dir, "new.wav"), filepath.Join(sub, "..", "new.wav"), true},
		{"missing, through a linked folder", filepath.Join(sub, "new.wav"), filepath.Join(dir, "subLink", "new.wav"), true},
		{"missing, different names", filepath.Join(dir, "new.wav"), filepath.Join(dir, "other.wav"), false},
		{"one exists, one missing", a, filepath.Join(dir, "new.wav"), false},
	}
	for _, tc := range tests {
		got, err := SameFile(tc.x, tc.y)
		if err != nil || got != tc.want {
			t.Errorf("%s: SameFile(%q, %q) = %v, %v; want %v", tc.name, tc.x, tc.y, got, err, tc.want)
		}
	}
	if _, err := SameFile(filepath.Join(a, "x.wav"), b); err == nil {
		t.Error("SameFile through a regular file: want an error")
	}
}
