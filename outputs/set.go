package outputs

import (
	"errors"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"sync"
)

// Set is every path one command reads and writes. Declare the inputs and
// outputs, call Check before any work, write the outputs, then Commit
// (after the work succeeded) or Abort (always deferred). A Set is safe for
// use by several goroutines; Abort and Cleanup may run while another
// goroutine writes.
type Set struct {
	mu      sync.Mutex
	state   state
	inputs  []decl
	outs    []*out
	changed []*PathError
}

type state int

const (
	declaring state = iota
	checked
	committed
	aborted
)

type decl struct{ role, path string }

// out is one declared output, a file or a folder.
type out struct {
	set        *Set
	dir        bool // a folder of outputs
	role, path string

	// File outputs, after Check.
	inPlace bool        // a character device or FIFO, written through
	tmp     string      // the temporary file beside the target
	f       *os.File    // the temporary file, or the target once opened in place
	before  fs.FileInfo // Lstat of the target at Check; nil when there was none
	perm    fs.FileMode // permission bits the installed file gets

	// Folder outputs, after Check.
	abs    string   // absolute target folder
	work   string   // the folder the command writes into
	merge  bool     // the target existed: move entries into it one by one
	mkdirs []string // missing parents of the target, outermost first
	stale  []string // plain names of an earlier run's files to remove
}

// File is a file output of a Set: an io.WriteSeeker over a temporary file
// beside the target, or over the target itself when that is a character
// device or a FIFO (see InPlace).
type File struct{ o *out }

// Dir is a folder output of a Set: the command writes its files into
// Work(), and Commit moves them into the target folder.
type Dir struct{ o *out }

// New returns an empty set.
func New() *Set { return &Set{} }

// Input declares a path the command reads. role names it in errors (the
// flag the user typed, e.g. "in" or "chain"). An input need not exist yet:
// opening it is the command's business; the set only refuses outputs that
// are the same file.
func (s *Set) Input(role, path string) {
	s.mu.Lock()
	defer s.mu.Unlock()
	s.inputs = append(s.inputs, decl{role, path})
}

// File declares a file the command writes. role names it in errors.
func (s *Set) File(role, path string) *File {
	s.mu.Lock()
	defer s.mu.Unlock()
	o := &out{set: s, role: role, path: path}
	s.outs = append(s.outs, o)
	return &File{o}
}

// Dir declares a folder of outputs. The folder and its missing parents
// are created on Commit; files already in an existing folder stay unless
// this set writes a file of the same name (which replaces it) or Replace
// names them.
func (s *Set) Dir(role, path string) *Dir {
	s.mu.Lock()
	defer s.mu.Unlock()
	o := &out{set: s, dir: true, role: role, path: path}
	s.outs = append(s.outs, o)
	return &Dir{o}
}

// Check validates every declared output, in declaration order, and
// returns the first fault as a *PathError naming its role:
//
//   - the path names a file (ErrEmptyPath);
//   - it is not the same file as any input (ErrSameAsInput) or another
//     output (ErrSameAsOutput), compared by device and inode where the files
//     exist (os.SameFile, which sees through symbolic links, hard links and
//     other spellings) and by resolved absolute path where they do not; two
//     outputs naming one character device (say /dev/null twice) are allowed;
//   - a file output is not a folder (ErrIsDir), a folder output not a file
//     (ErrNotDir), and neither a block device nor a socket (ErrSpecial);
//   - its folder exists (ErrNoFolder) and can be written (ErrNotWritable).
//
// Writability is proven by creating the temporary file (or folder) beside
// the target, so Check has side effects: on success the set holds one
// temporary file per regular target, registered for Cleanup; on failure it
// holds none and cannot be used again. A character device or FIFO target
// is checked with access(2) and opened later, on the first Write, because
// opening a FIFO blocks until a reader comes.
func (s *Set) Check() error {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.state != declaring {
		return &PathError{Path: "output set", Kind: ErrState, Detail: "Check called twice or after Commit/Abort"}
	}
	in := make([]ident, len(s.inputs))
	for i, d := range s.inputs {
		in[i] = identify(d.path)
	}
	outIDs := make([]ident, len(s.outs))
	for i, o := range s.outs {
		if err := o.validate(); err != nil {
			s.state = aborted
			return err
		}
		outIDs[i] = identify(o.path)
		for j, d := range s.inputs {
			if same(outIDs[i], in[j]) {
				s.state = aborted
				return &PathError{Role: o.role, Path: o.path, Kind: ErrSameAsInput, Other: d.role, OtherPath: d.path,
					Detail: "writing it would destroy the input"}
			}
		}
		for j := 0; j < i; j++ {
			if same(outIDs[i], outIDs[j]) && !(outIDs[i].charDevice() && outIDs[j].charDevice()) {
				p := s.outs[j]
				s.state = aborted
				return &PathError{Role: o.role, Path: o.path, Kind: ErrSameAsOutput, Other: p.role, OtherPath: p.path,
					Detail: "one would overwrite the other"}
			}
		}
	}
	for i, o := range s.outs {
		if err := o.prepare(); err != nil {
			for _, p := range s.outs[:i] {
				p.discard()
			}
			s.state = aborted
			return err
		}
	}
	s.state = checked
	register(s)
	return nil
}

// validate checks one output's path without side effects.
func (o *out) validate() error {
	fail := func(kind error, detail string, err error) error {
		return &PathError{Role: o.role, Path: o.path, Kind: kind, Detail: detail, Err: err}
	}
	if o.dir {
		if o.path == "" {
			return fail(ErrEmptyPath, "", nil)
		}
		abs, err := filepath.Abs(o.path)
		if err != nil {
			return fail(ErrEmptyPath, "", err)
		}
		o.abs = abs
		st, err := os.Stat(abs)
		switch {
		case err == nil && !st.IsDir():
			return fail(ErrNotDir, "", nil)
		case err == nil:
			o.merge = true
			return nil
		case !errors.Is(err, fs.ErrNotExist):
			return fail(ErrNotWritable, "", err)
		}
		// Find the nearest existing ancestor; the others are made on Commit.
		o.mkdirs = nil
		for p := filepath.Dir(abs); ; p = filepath.Dir(p) {
			st, err := os.Stat(p)
			if err == nil {
				if !st.IsDir() {
					return fail(ErrNoFolder, p+" is a file", nil)
				}
				break
			}
			if !errors.Is(err, fs.ErrNotExist) {
				return fail(ErrNoFolder, "", err)
			}
			o.mkdirs = append([]string{p}, o.mkdirs...)
			if filepath.Dir(p) == p {
				return fail(ErrNoFolder, "", err)
			}
		}
		return nil
	}

	base := filepath.Base(o.path)
	if o.path == "" || base == "." || base == ".." || base == string(filepath.Separator) ||
		os.IsPathSeparator(o.path[len(o.path)-1]) {
		return fail(ErrEmptyPath, "", nil)
	}
	st, err := os.Stat(o.path)
	if err == nil {
		m := st.Mode()
		switch {
		case m.IsDir():
			return fail(ErrIsDir, "", nil)
		case m.IsRegular():
			o.perm = m.Perm()
		case m&fs.ModeCharDevice != 0 || m&fs.ModeNamedPipe != 0:
			if err := canWrite(o.path); err != nil {
				return fail(ErrNotWritable, "", err)
			}
			o.inPlace = true
			return nil
		default:
			return fail(ErrSpecial, m.Type().String(), nil)
		}
	} else if !errors.Is(err, fs.ErrNotExist) {
		if errors.Is(err, fs.ErrPermission) {
			return fail(ErrNotWritable, "", err)
		}
		return fail(ErrNoFolder, filepath.Dir(o.path), err) // a path through a regular file, ENOTDIR
	} else {
		o.perm = 0o644
	}
	dir := filepath.Dir(o.path)
	if st, err := os.Stat(dir); err != nil {
		if errors.Is(err, fs.ErrNotExist) {
			return fail(ErrNoFolder, dir, nil)
		}
		return fail(ErrNoFolder, dir, err)
	} else if !st.IsDir() {
		return fail(ErrNoFolder, dir+" is a file", nil)
	}
	return nil
}

// prepare creates the temporary file or folder. It runs after every
// output validated.
func (o *out) prepare() error {
	fail := func(kind error, detail string, err error) error {
		return &PathError{Role: o.role, Path: o.path, Kind: kind, Detail: detail, Err: err}
	}
	if o.dir {
		at := o.abs
		if !o.merge {
			at = filepath.Dir(o.abs)
			if len(o.mkdirs) > 0 {
				at = filepath.Dir(o.mkdirs[0])
			}
		}
		w, err := os.MkdirTemp(at, "."+filepath.Base(o.abs)+".*.tmp")
		if err != nil {
			return fail(ErrNotWritable, "folder "+at, err)
		}
		o.work = w
		return nil
	}
	if o.inPlace {
		return nil
	}
	if li, err := os.Lstat(o.path); err == nil {
		o.before = li
	}
	dir := filepath.Dir(o.path)
	f, err := os.CreateTemp(dir, "."+filepath.Base(o.path)+".*.tmp")
	if err != nil {
		return fail(ErrNotWritable, "folder "+dir, err)
	}
	o.f, o.tmp = f, f.Name()
	return nil
}

// discard closes and removes what prepare made; the caller holds the lock.
func (o *out) discard() int {
	n := 0
	if o.f != nil {
		o.f.Close()
	}
	if o.tmp != "" {
		if os.Remove(o.tmp) == nil {
			n++
		}
		o.tmp = ""
	}
	if o.work != "" {
		if os.RemoveAll(o.work) == nil {
			n++
		}
		o.work = ""
	}
	o.f = nil
	return n
}

// Abort closes and removes every temporary file and folder of the set
// and leaves every target as it was. It is idempotent and does nothing
// after Commit, so `defer set.Abort()` is the intended use. What was
// already written into a character device or FIFO stays written.
func (s *Set) Abort() { s.abort() }

func (s *Set) abort() int {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.state == committed || s.state == aborted {
		return 0
	}
	n := 0
	for _, o := range s.outs {
		n += o.discard()
	}
	s.state = aborted
	unregister(s)
	return n
}

// Changed lists the targets that another writer created, replaced or
// modified between Check and Commit (each a *PathError wrapping
// ErrChanged). This set's files replaced them all the same (the last
// writer wins); a command should say so.
func (s *Set) Changed() []*PathError {
	s.mu.Lock()
	defer s.mu.Unlock()
	return append([]*PathError(nil), s.changed...)
}

// Role returns the role the file was declared with.
func (f *File) Role() string { return f.o.role }

// Path returns the target path as declared.
func (f *File) Path() string { return f.o.path }

// InPlace reports whether the target is a character device or FIFO that
// is written through rather than replaced. Such a target cannot be relied
// on to seek: write a stream whose header needs no patching (for WAV,
// wavio.NewStreamWriter). Valid after Check.
func (f *File) InPlace() bool {
	f.o.set.mu.Lock()
	defer f.o.set.mu.Unlock()
	return f.o.inPlace
}

// TempPath returns the temporary file's path ("" for an in-place target),
// for tests and diagnostics; messages should name Path.
func (f *File) TempPath() string {
	f.o.set.mu.Lock()
	defer f.o.set.mu.Unlock()
	return f.o.tmp
}

// handle returns the open file to write to, opening an in-place target on
// first use (outside the lock: opening a FIFO waits for a reader).
func (f *File) handle() (*os.File, error) {
	o := f.o
	s := o.set
	s.mu.Lock()
	if s.state != checked {
		st := s.state
		s.mu.Unlock()
		return nil, &PathError{Role: o.role, Path: o.path, Kind: ErrState, Detail: stateText(st)}
	}
	fh, inPlace := o.f, o.inPlace
	s.mu.Unlock()
	if fh != nil || !inPlace {
		return fh, nil
	}
	nf, err := os.OpenFile(o.path, os.O_WRONLY, 0)
	if err != nil {
		return nil, &PathError{Role: o.role, Path: o.path, Kind: ErrNotWritable, Err: err}
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.state != checked {
		nf.Close()
		return nil, &PathError{Role: o.role, Path: o.path, Kind: ErrState, Detail: stateText(s.state)}
	}
	if o.f != nil { // another goroutine opened it meanwhile
		nf.Close()
		return o.f, nil
	}
	o.f = nf
	return nf, nil
}

func stateText(st state) string { return "written " + when(st) }

func when(st state) string {
	switch st {
	case declaring:
		return "before Check"
	case committed:
		return "after Commit"
	}
	return "after Abort"
}

// Write writes to the temporary file (or the in-place target).
func (f *File) Write(p []byte) (int, error) {
	fh, err := f.handle()
	if err != nil {
		return 0, err
	}
	return fh.Write(p)
}

// Seek seeks in the temporary file. On an in-place target it is passed to
// the device, which may refuse it (a FIFO does).
func (f *File) Seek(offset int64, whence int) (int64, error) {
	fh, err := f.handle()
	if err != nil {
		return 0, err
	}
	return fh.Seek(offset, whence)
}

var _ io.WriteSeeker = (*File)(nil)

// Role returns the role the folder was declared with.
func (d *Dir) Role() string { return d.o.role }

// Path returns the target folder as declared.
func (d *Dir) Path() string { return d.o.path }

// Work returns the temporary folder to write the outputs into (valid after
// Check): beside the target when it does not exist yet, inside it (hidden)
// when it does, so that Commit's renames never cross a file system.
func (d *Dir) Work() string {
	d.o.set.mu.Lock()
	defer d.o.set.mu.Unlock()
	return d.o.work
}

// Replace names files (plain names, no folders) of an earlier run in the
// target folder that Commit removes along with installing this set's
// files, so a folder never mixes two runs. A name this set writes anyway
// is simply replaced; a name that is not there is ignored.
func (d *Dir) Replace(names ...string) {
	d.o.set.mu.Lock()
	defer d.o.set.mu.Unlock()
	for _, n := range names {
		if n != "" && n == filepath.Base(n) && n != "." && n != ".." {
			d.o.stale = append(d.o.stale, n)
		}
	}
}

// WriteFile writes b to path atomically: the file appears whole, replacing
// any file there, or not at all. role names the path in errors.
func WriteFile(role, path string, b []byte) error {
	s := New()
	f := s.File(role, path)
	if err := s.Check(); err != nil {
		return err
	}
	defer s.Abort()
	if _, err := f.Write(b); err != nil {
		return &PathError{Role: role, Path: path, Kind: ErrNotWritable, Err: err}
	}
	return s.Commit()
}
