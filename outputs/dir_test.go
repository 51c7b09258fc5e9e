package outputs

import (
	"errors"
	"os"
	"path/filepath"
	"testing"
)

// A folder output that does not exist (nor its parent) is built beside
// and moved in whole; nothing is visible before Commit.
func TestDirCreate(t *testing.T) {
	root := t.TempDir()
	target := filepath.Join(root, "a", "b", "set")
	s := New()
	d := s.Dir("outdir", target)
	if err := s.Check(); err != nil {
		t.Fatal(err)
	}
	defer s.Abort()
	if filepath.Dir(d.Work()) != root {
		t.Errorf("work folder %s: want it in the nearest existing folder %s", d.Work(), root)
	}
	write(t, filepath.Join(d.Work(), "x.wav"), "clip")
	os.Mkdir(filepath.Join(d.Work(), "plots"), 0o755)
	write(t, filepath.Join(d.Work(), "plots", "p.svg"), "plot")
	if _, err := os.Stat(filepath.Join(root, "a")); !errors.Is(err, os.ErrNotExist) {
		t.Error("parent made before Commit")
	}
	if err := s.Commit(); err != nil {
		t.Fatal(err)
	}
	if read(t, filepath.Join(target, "x.wav")) != "clip" || read(t, filepath.Join(target, "plots", "p.svg")) != "plot" {
		t.Error("content")
	}
	if want := []string{"a"}; !equal(names(t, root), want) {
		t.Errorf("root holds %v, want %v", names(t, root), want)
	}
	if st, err := os.Stat(target); err != nil || st.Mode().Perm() != 0o755 {
		t.Errorf("installed folder: %v, %v; want mode 0755", st.Mode(), err)
	}
}

// A folder output that exists: new files go in, same-named files are
// replaced, files named by Replace are removed, everything else stays, and
// the work folder is gone.
func TestDirMerge(t *testing.T) {
	target := t.TempDir()
	write(t, filepath.Join(target, "mine.txt"), "the user's")
	write(t, filepath.Join(target, "ab.json"), "old manifest")
	write(t, filepath.Join(target, "old-clip.wav"), "old clip")
	os.Mkdir(filepath.Join(target, "plots"), 0o755)
	write(t, filepath.Join(target, "plots", "keep.svg"), "keep")
	s := New()
	d := s.Dir("outdir", target)
	if err := s.Check(); err != nil {
		t.Fatal(err)
	}
	defer s.Abort()
	if filepath.Dir(d.Work()) != target {
		t.Errorf("work folder %s: want it inside the existing target", d.Work())
	}
	write(t, filepath.Join(d.Work(), "ab.json"), "new manifest")
	write(t, filepath.Join(d.Work(), "new-clip.wav"), "new clip")
	os.Mkdir(filepath.Join(d.Work(), "plots"), 0o755)
	write(t, filepath.Join(d.Work(), "plots", "p.svg"), "plot")
	d.Replace("old-clip.wav", "ab.json", "../escape", "")
	if err := s.Commit(); err != nil {
		t.Fatal(err)
	}
	if want := []string{"ab.json", "mine.txt", "new-clip.wav", "plots"}; !equal(names(t, target), want) {
		t.Errorf("target holds %v, want %v", names(t, target), want)
	}
	if want := []string{"keep.svg", "p.svg"}; !equal(names(t, filepath.Join(target, "plots")), want) {
		t.Errorf("plots holds %v, want %v", names(t, filepath.Join(target, "plots")), want)
	}
	if read(t, filepath.Join(target, "ab.json")) != "new manifest" || read(t, filepath.Join(target, "mine.txt")) != "the user's" {
		t.Error("content")
	}
}

// A folder output whose set would write a file that is an input (the dry
// take kept inside --outdir): the commit is refused and undone, the input
// survives.
func TestDirProtectsInput(t *testing.T) {
	target := t.TempDir()
	dry := filepath.Join(target, "dry.wav")
	write(t, dry, "dry take")
	write(t, filepath.Join(target, "ab.json"), "old manifest")
	s := New()
	s.Input("in", dry)
	d := s.Dir("outdir", target)
	if err := s.Check(); err != nil {
		t.Fatal(err)
	}
	defer s.Abort()
	write(t, filepath.Join(d.Work(), "ab.json"), "new manifest")
	write(t, filepath.Join(d.Work(), "dry.wav"), "a clip named like the input")
	d.Replace("dry.wav")
	err := s.Commit()
	var pe *PathError
	if !errors.Is(err, ErrSameAsInput) || !errors.As(err, &pe) || pe.Other != "in" {
		t.Fatalf("Commit = %v, want ErrSameAsInput naming in", err)
	}
	if read(t, dry) != "dry take" || read(t, filepath.Join(target, "ab.json")) != "old manifest" {
		t.Error("a refused commit changed the folder")
	}
	if want := []string{"ab.json", "dry.wav"}; !equal(names(t, target), want) {
		t.Errorf("target holds %v, want %v", names(t, target), want)
	}
}

// A folder output and a file output inside it that would both install one
// file: refused at Commit, nothing changed.
func TestDirAndFileCollide(t *testing.T) {
	target := t.TempDir()
	s := New()
	d := s.Dir("outdir", target)
	f := s.File("report", filepath.Join(target, "report.json"))
	if err := s.Check(); err != nil {
		t.Fatal(err)
	}
	defer s.Abort()
	write(t, filepath.Join(d.Work(), "report.json"), "from the folder")
	f.Write([]byte("from the file"))
	if err := s.Commit(); !errors.Is(err, ErrSameAsOutput) {
		t.Fatalf("Commit = %v, want ErrSameAsOutput", err)
	}
	if len(names(t, target)) != 0 {
		t.Errorf("target holds %v", names(t, target))
	}
}
