package outputs

import (
	"crypto/rand"
	"encoding/hex"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
)

// move installs one file or folder (src renamed over dst), or removes an
// earlier run's file (remove: dst renamed to a backup). A dst that existed
// is kept under a backup name until the whole set is in place.
type move struct {
	o        *out
	src, dst string
	remove   bool

	backup string // the old dst, kept until the set is committed
	linked bool   // backup is a hard link (dst still there); else dst was renamed to it
	done   bool   // src is at dst (or, for remove, dst is at backup)
}

// Commit puts every output in place, all or none:
//
//  1. each temporary file is flushed to stable storage (fsync) and closed,
//     and takes the permission bits of the regular file it replaces (else
//     0644);
//  2. every target that exists is kept under a hidden backup name in its
//     folder, as a hard link (so the target never disappears) or, where
//     the file system has no hard links, by renaming it;
//  3. each temporary file is renamed over its target (POSIX rename(2),
//     atomic within one folder); a folder output that did not exist is
//     renamed into place whole, one that did has its new entries moved in
//     one by one;
//  4. when every rename succeeded the backups are removed.
//
// If any rename fails, the ones already done are undone from the backups,
// every temporary file is removed, and Commit returns a *PathError
// wrapping ErrCommit: an existing file is never removed unless its
// replacement is in place. A symbolic link at a target is replaced, not
// followed. Targets written in place (InPlace) are only closed.
//
// Targets that changed since Check are replaced all the same and listed by
// Changed. Commit after Commit or Abort returns ErrState.
func (s *Set) Commit() error {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.state != checked {
		return &PathError{Path: "output set", Kind: ErrState, Detail: "Commit " + when(s.state)}
	}
	fail := func(err error) error {
		for _, o := range s.outs {
			o.discard()
		}
		s.state = aborted
		unregister(s)
		return err
	}
	for _, o := range s.outs {
		if err := o.flush(); err != nil {
			return fail(err)
		}
	}
	moves, err := s.plan()
	if err != nil {
		return fail(err)
	}
	var made []string // folders created for folder outputs
	for _, o := range s.outs {
		if o.dir && !o.merge {
			// os.MkdirTemp made the work folder private (0700); the
			// installed folder gets the usual 0755.
			if err := os.Chmod(o.work, 0o755); err != nil {
				return fail(&PathError{Role: o.role, Path: o.path, Kind: ErrCommit, Err: err})
			}
		}
		for _, d := range o.mkdirs {
			if err := os.Mkdir(d, 0o755); err == nil {
				made = append(made, d)
			} else if !errors.Is(err, fs.ErrExist) {
				undo(moves, made)
				return fail(&PathError{Role: o.role, Path: o.path, Kind: ErrCommit, Detail: "folder " + d, Err: err})
			}
		}
	}
	for i, m := range moves {
		if err := m.apply(); err != nil {
			undo(moves[:i+1], made)
			return fail(&PathError{Role: m.o.role, Path: m.o.path, Kind: ErrCommit, Detail: m.detail(), Err: err})
		}
	}
	dirs := map[string]bool{}
	for _, m := range moves {
		if m.backup != "" {
			os.Remove(m.backup)
		}
		dirs[filepath.Dir(m.dst)] = true
	}
	for _, o := range s.outs {
		if o.dir && o.merge {
			os.RemoveAll(o.work) // emptied of everything it held
		}
		o.tmp, o.work = "", ""
	}
	for d := range dirs {
		syncDir(d)
	}
	s.state = committed
	unregister(s)
	return nil
}

// flush closes a file output: fsync and close the temporary file (or the
// in-place target). The caller holds the lock.
func (o *out) flush() error {
	if o.dir || o.f == nil {
		return nil
	}
	f := o.f
	o.f = nil
	fail := func(err error) error {
		f.Close()
		return &PathError{Role: o.role, Path: o.path, Kind: ErrCommit, Err: err}
	}
	if !o.inPlace {
		if err := f.Chmod(o.perm); err != nil {
			return fail(err)
		}
		if err := f.Sync(); err != nil {
			return fail(err)
		}
	}
	if err := f.Close(); err != nil {
		return &PathError{Role: o.role, Path: o.path, Kind: ErrCommit, Err: err}
	}
	return nil
}

// plan lists the renames of a commit and records targets that changed
// since Check. The caller holds the lock.
func (s *Set) plan() ([]*move, error) {
	in := make([]ident, len(s.inputs))
	for i, d := range s.inputs {
		in[i] = identify(d.path)
	}
	dests := map[string]*out{}
	claim := func(o *out, dst string) error {
		key, err := resolveMissing(dst)
		if err != nil {
			key = dst
		}
		if p, ok := dests[key]; ok {
			return &PathError{Role: o.role, Path: dst, Kind: ErrSameAsOutput, Other: p.role, OtherPath: p.path}
		}
		dests[key] = o
		id := identify(dst)
		for j, d := range s.inputs {
			if same(id, in[j]) {
				return &PathError{Role: o.role, Path: dst, Kind: ErrSameAsInput, Other: d.role, OtherPath: d.path,
					Detail: "writing it would destroy the input"}
			}
		}
		return nil
	}
	var moves []*move
	for _, o := range s.outs {
		switch {
		case o.dir:
			ms, err := s.planDir(o, claim, in)
			if err != nil {
				return nil, err
			}
			moves = append(moves, ms...)
		case o.inPlace:
		default:
			s.noteChange(o)
			if err := claim(o, o.path); err != nil {
				return nil, err
			}
			moves = append(moves, &move{o: o, src: o.tmp, dst: o.path})
		}
	}
	return moves, nil
}

// noteChange records a file target that changed between Check and Commit.
func (s *Set) noteChange(o *out) {
	now, err := os.Lstat(o.path)
	what := ""
	switch {
	case o.before == nil && err == nil:
		what = "created by another writer since the check"
	case o.before != nil && err != nil:
		what = "removed by another writer since the check"
	case o.before != nil && !os.SameFile(o.before, now):
		what = "replaced by another writer since the check"
	case o.before != nil && (o.before.Size() != now.Size() || !o.before.ModTime().Equal(now.ModTime())):
		what = "modified by another writer since the check"
	default:
		return
	}
	s.changed = append(s.changed, &PathError{Role: o.role, Path: o.path, Kind: ErrChanged,
		Detail: what + "; this run's file replaced it (the last writer wins)"})
}

// planDir lists the moves of a folder output.
func (s *Set) planDir(o *out, claim func(*out, string) error, in []ident) ([]*move, error) {
	if _, err := os.Stat(o.work); err != nil {
		return nil, &PathError{Role: o.role, Path: o.path, Kind: ErrCommit, Detail: "its work folder is gone", Err: err}
	}
	st, err := os.Stat(o.abs)
	switch {
	case err == nil && !st.IsDir():
		return nil, &PathError{Role: o.role, Path: o.path, Kind: ErrNotDir, Detail: "since the check"}
	case err == nil && !o.merge:
		s.changed = append(s.changed, &PathError{Role: o.role, Path: o.path, Kind: ErrChanged,
			Detail: "created by another writer since the check; this run's files were added to it"})
		o.merge, o.mkdirs = true, nil
	case err != nil && o.merge:
		return nil, &PathError{Role: o.role, Path: o.path, Kind: ErrCommit, Detail: "removed since the check", Err: err}
	}
	if !o.merge {
		if err := claim(o, o.abs); err != nil {
			return nil, err
		}
		return []*move{{o: o, src: o.work, dst: o.abs}}, nil
	}
	var moves []*move
	var walk func(src, dst string) error
	walk = func(src, dst string) error {
		entries, err := os.ReadDir(src)
		if err != nil {
			return &PathError{Role: o.role, Path: o.path, Kind: ErrCommit, Err: err}
		}
		for _, e := range entries {
			sp, dp := filepath.Join(src, e.Name()), filepath.Join(dst, e.Name())
			if sp == o.work {
				continue
			}
			li, lerr := os.Lstat(dp)
			switch {
			case e.IsDir() && lerr == nil && li.IsDir():
				if err := walk(sp, dp); err != nil {
					return err
				}
				continue
			case lerr == nil && (e.IsDir() || li.IsDir()):
				return &PathError{Role: o.role, Path: dp, Kind: ErrCommit,
					Detail: "a file and a folder of the same name"}
			}
			if err := claim(o, dp); err != nil {
				return err
			}
			moves = append(moves, &move{o: o, src: sp, dst: dp})
		}
		return nil
	}
	if err := walk(o.work, o.abs); err != nil {
		return nil, err
	}
	for _, n := range o.stale {
		dp := filepath.Join(o.abs, n)
		key, _ := resolveMissing(dp)
		if _, ours := s.claimed(moves, key); ours {
			continue
		}
		li, err := os.Lstat(dp)
		if err != nil || li.IsDir() {
			continue
		}
		id, protected := identify(dp), false
		for j := range in {
			protected = protected || same(id, in[j])
		}
		if !protected {
			moves = append(moves, &move{o: o, dst: dp, remove: true})
		}
	}
	return moves, nil
}

// claimed reports whether one of moves installs a file at key.
func (s *Set) claimed(moves []*move, key string) (*move, bool) {
	for _, m := range moves {
		if k, _ := resolveMissing(m.dst); k == key && !m.remove {
			return m, true
		}
	}
	return nil, false
}

// apply performs one move, keeping any file at dst as a backup.
func (m *move) apply() error {
	li, err := os.Lstat(m.dst)
	exists := err == nil
	if m.remove {
		if !exists {
			return nil
		}
		b, err := backupName(m.dst)
		if err != nil {
			return err
		}
		if err := os.Rename(m.dst, b); err != nil {
			return err
		}
		m.backup, m.done = b, true
		return nil
	}
	if exists {
		if li.IsDir() {
			return fmt.Errorf("a folder is in the way")
		}
		if err := m.keep(); err != nil {
			return err
		}
	}
	if err := os.Rename(m.src, m.dst); err != nil {
		return err
	}
	m.done = true
	return nil
}

// keep makes the backup of an existing dst: a hard link where the file
// system has them (dst stays in place), else a rename.
func (m *move) keep() error {
	for range 10 {
		b, err := backupName(m.dst)
		if err != nil {
			return err
		}
		err = os.Link(m.dst, b)
		if err == nil {
			m.backup, m.linked = b, true
			return nil
		}
		if errors.Is(err, fs.ErrExist) {
			continue
		}
		if err := os.Rename(m.dst, b); err != nil {
			return err
		}
		m.backup = b
		return nil
	}
	return errors.New("no free backup name")
}

// backupName returns an unused hidden name beside p.
func backupName(p string) (string, error) {
	var r [6]byte
	if _, err := rand.Read(r[:]); err != nil {
		return "", err
	}
	return filepath.Join(filepath.Dir(p), "."+filepath.Base(p)+"."+hex.EncodeToString(r[:])+".old"), nil
}

// undo reverses the moves (latest first) and removes the folders made.
func undo(moves []*move, made []string) {
	for i := len(moves) - 1; i >= 0; i-- {
		m := moves[i]
		switch {
		case m.remove && m.done:
			os.Rename(m.backup, m.dst)
		case m.done && m.backup != "":
			os.Rename(m.backup, m.dst) // the old file back over the new one, atomically
		case m.done:
			os.RemoveAll(m.dst) // ours: nothing was there before
		case m.backup != "" && m.linked:
			os.Remove(m.backup)
		case m.backup != "":
			os.Rename(m.backup, m.dst)
		}
	}
	for i := len(made) - 1; i >= 0; i-- {
		os.Remove(made[i]) // only if empty
	}
}

func (m *move) detail() string {
	if m.dst != m.o.path {
		return m.dst
	}
	return ""
}

// syncDir makes renames in folder d durable on POSIX systems (best effort:
// not every system can sync a folder).
func syncDir(d string) {
	if f, err := os.Open(d); err == nil {
		f.Sync()
		f.Close()
	}
}
