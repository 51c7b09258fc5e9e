package outputs

import (
	"errors"
	"io/fs"
	"os"
	"path/filepath"
)

// ident is what identifies a path: the file it reaches when it exists,
// else its absolute path with symbolic links in its folder resolved.
type ident struct {
	info fs.FileInfo // os.Stat, following links; nil when missing
	abs  string
}

func identify(p string) ident {
	if st, err := os.Stat(p); err == nil {
		return ident{info: st}
	}
	abs, err := resolveMissing(p)
	if err != nil {
		abs = filepath.Clean(p)
	}
	return ident{abs: abs}
}

func same(a, b ident) bool {
	switch {
	case a.info != nil && b.info != nil:
		return os.SameFile(a.info, b.info)
	case a.info == nil && b.info == nil:
		return a.abs == b.abs
	}
	return false
}

func (id ident) charDevice() bool {
	return id.info != nil && id.info.Mode()&fs.ModeCharDevice != 0
}

// SameFile reports whether paths a and b name the same file. When both
// exist it compares device and inode (os.SameFile), which sees through
// symbolic links, hard links and different spellings. When neither exists
// it compares absolute, cleaned paths after resolving symbolic links in the
// parent folder. When exactly one exists the answer is false. Errors other
// than non-existence (permission, a path through a regular file) are
// returned. Case-insensitive file systems are not taken into account for
// missing files.
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
// with symbolic links in its folder resolved where that folder exists.
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
