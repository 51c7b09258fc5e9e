package wavio

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
)

// Output is a file written under a temporary name beside its final path and
// renamed over the final path only on Commit, so that a failed or
// interrupted render never leaves a partial file under the final name and
// never damages a file already there. Output is an io.WriteSeeker, so it can
// be handed to NewWriter directly.
type Output struct {
	f     *os.File
	tmp   string
	final string
	done  bool // committed or aborted
}

// CreateTemp creates a temporary file in the directory of finalPath, named
// ".<base>.<random>.tmp" so that it is hidden from ordinary listings and
// sorts beside the final name. The rename in Commit is atomic because both
// names are in one directory (POSIX rename(2)).
func CreateTemp(finalPath string) (*Output, error) {
	base := filepath.Base(finalPath)
	if finalPath == "" || base == "." || base == ".." || base == string(filepath.Separator) {
		return nil, fmt.Errorf("wavio: output path %q does not name a file", finalPath)
	}
	f, err := os.CreateTemp(filepath.Dir(finalPath), "."+base+".*.tmp")
	if err != nil {
		return nil, fmt.Errorf("wavio: %w", err)
	}
	return &Output{f: f, tmp: f.Name(), final: finalPath}, nil
}

// File returns the open temporary file.
func (o *Output) File() *os.File { return o.f }

// Name returns the temporary file's path.
func (o *Output) Name() string { return o.tmp }

// Write writes to the temporary file.
func (o *Output) Write(p []byte) (int, error) { return o.f.Write(p) }

// Seek seeks in the temporary file.
func (o *Output) Seek(offset int64, whence int) (int64, error) { return o.f.Seek(offset, whence) }

// Commit flushes the temporary file to stable storage, closes it and renames
// it over the final path, then syncs the directory (best effort). The
// committed file takes the permission bits of the regular file it replaces,
// or 0644. A symbolic link at the final path is replaced, not followed. On
// any failure the temporary file is removed and the final path is left as it
// was. Commit after Commit or Abort returns an error wrapping ErrClosed.
func (o *Output) Commit() error {
	if o.done {
		return fmtErr(-1, ErrClosed, "Commit after Commit or Abort of "+o.final)
	}
	o.done = true
	perm := fs.FileMode(0o644)
	if st, err := os.Lstat(o.final); err == nil && st.Mode().IsRegular() {
		perm = st.Mode().Perm()
	}
	fail := func(err error) error {
		o.f.Close()
		os.Remove(o.tmp)
		return fmt.Errorf("wavio: committing %s: %w", o.final, err)
	}
	if err := o.f.Chmod(perm); err != nil {
		return fail(err)
	}
	if err := o.f.Sync(); err != nil {
		return fail(err)
	}
	if err := o.f.Close(); err != nil {
		os.Remove(o.tmp)
		return fmt.Errorf("wavio: committing %s: %w", o.final, err)
	}
	if err := os.Rename(o.tmp, o.final); err != nil {
		os.Remove(o.tmp)
		return fmt.Errorf("wavio: committing %s: %w", o.final, err)
	}
	if d, err := os.Open(filepath.Dir(o.final)); err == nil {
		d.Sync() // makes the rename durable on POSIX systems; not all support it
		d.Close()
	}
	return nil
}

// Abort closes and removes the temporary file. It is idempotent and does
// nothing after Commit, so `defer out.Abort()` is the intended use.
func (o *Output) Abort() {
	if o.done {
		return
	}
	o.done = true
	o.f.Close()
	os.Remove(o.tmp)
}

// SameFile reports whether paths a and b name the same file. When both exist
// it compares device and inode (os.SameFile), which sees through symbolic
// links, hard links and different spellings. When neither exists it
// compares absolute, cleaned paths after resolving symbolic links in the
// parent directory. When exactly one exists the answer is false. Errors
// other than non-existence (permission, not a directory) are returned.
// Case-insensitive file systems are not taken into account for missing
// files.
func SameFile(a, b string) (bool, error) {
	sa, errA := os.Stat(a)
	sb, errB := os.Stat(b)
	if errA == nil && errB == nil {
		return os.SameFile(sa, sb), nil
	}
	if errA != nil && !errors.Is(errA, fs.ErrNotExist) {
		return false, errA
	}
	if errB != nil && !errors.Is(errB, fs.ErrNotExist) {
		return false, errB
	}
	if (errA == nil) != (errB == nil) {
		return false, nil
	}
	pa, err := resolveMissing(a)
	if err != nil {
		return false, err
	}
	pb, err := resolveMissing(b)
	if err != nil {
		return false, err
	}
	return pa == pb, nil
}

// resolveMissing returns the absolute path of a file that does not exist,
// with symbolic links in its directory resolved where that directory exists.
func resolveMissing(p string) (string, error) {
	abs, err := filepath.Abs(p)
	if err != nil {
		return "", err
	}
	dir, base := filepath.Dir(abs), filepath.Base(abs)
	if rd, err := filepath.EvalSymlinks(dir); err == nil {
		dir = rd
	}
	return filepath.Join(dir, base), nil
}

// WriteFileAtomic writes b to path through CreateTemp and Commit: the file
// appears whole or not at all, with the permissions CreateTemp gives it.
func WriteFileAtomic(path string, b []byte) error {
	o, err := CreateTemp(path)
	if err != nil {
		return err
	}
	if _, err := o.Write(b); err != nil {
		o.Abort()
		return err
	}
	return o.Commit()
}

// WriteFile writes the interleaved samples x as a whole WAV file of format
// f at path, atomically (CreateTemp, then Commit; nothing is left on error).
func WriteFile(path string, f Format, x []float64) error {
	o, err := CreateTemp(path)
	if err != nil {
		return err
	}
	w, err := NewWriter(o, f)
	if err == nil {
		err = w.Write(x)
	}
	if err == nil {
		err = w.Close()
	}
	if err != nil {
		o.Abort()
		return err
	}
	return o.Commit()
}
