package outputs

import (
	"errors"
	"io/fs"
	"os"
	"strings"
)

// Sentinel errors. Every *PathError wraps exactly one of them, so a caller
// can tell the cases apart with errors.Is.
var (
	// ErrEmptyPath reports an output declared with an empty path or a path
	// that names no file ("", ".", "/", "dir/").
	ErrEmptyPath = errors.New("does not name a file")
	// ErrSameAsInput reports an output that is the same file as an input.
	ErrSameAsInput = errors.New("is the same file as an input")
	// ErrSameAsOutput reports two outputs of one set that are the same file.
	ErrSameAsOutput = errors.New("is the same file as another output")
	// ErrIsDir reports a file output whose target is a folder.
	ErrIsDir = errors.New("is a folder")
	// ErrNotDir reports a folder output whose target is not a folder.
	ErrNotDir = errors.New("is not a folder")
	// ErrNoFolder reports an output whose folder does not exist.
	ErrNoFolder = errors.New("folder does not exist")
	// ErrNotWritable reports an output whose folder (or device) cannot be
	// written.
	ErrNotWritable = errors.New("cannot be written")
	// ErrSpecial reports a target that is neither a regular file, a
	// character device nor a FIFO (a block device, a socket).
	ErrSpecial = errors.New("is not a file this program writes to")
	// ErrChanged reports a target that another program created, replaced or
	// changed between Check and Commit. Commit still installs this set's
	// file (the last writer wins); Set.Changed lists these as notices.
	ErrChanged = errors.New("changed since the check")
	// ErrCommit reports a rename that failed while a set was committed;
	// every target is then as it was before Commit.
	ErrCommit = errors.New("could not be put in place")
	// ErrState reports a set used out of order: written before Check, or
	// after Commit or Abort.
	ErrState = errors.New("used out of order")
)

// PathError is a one-line fault about one declared path. Role is the name
// the caller gave the path when it declared it (a flag such as "out" or
// "report"), so that a command can map the error back to the option the
// user typed; Other and OtherPath name the path it collides with, if any.
type PathError struct {
	Role      string
	Path      string
	Kind      error  // one of the sentinels above
	Other     string // the role of the colliding path, for ErrSameAsInput and ErrSameAsOutput
	OtherPath string
	Detail    string // optional one-line detail, e.g. the folder concerned
	Err       error  // underlying operating-system error, if any
}

func (e *PathError) Error() string {
	var b strings.Builder
	if e.Role != "" {
		b.WriteString(e.Role)
		b.WriteByte(' ')
	}
	b.WriteString(e.Path)
	b.WriteString(": ")
	if e.Kind != nil {
		b.WriteString(e.Kind.Error())
	}
	if e.Other != "" || e.OtherPath != "" {
		b.WriteString(" (")
		b.WriteString(strings.TrimSpace(e.Other + " " + e.OtherPath))
		b.WriteString(")")
	}
	if e.Detail != "" {
		b.WriteString(": ")
		b.WriteString(e.Detail)
	}
	if e.Err != nil {
		b.WriteString(": ")
		b.WriteString(osText(e.Err))
	}
	return oneLine(b.String())
}

// Unwrap returns Kind and, when there is one, the operating-system error,
// so that errors.Is(err, ErrNoFolder) and errors.Is(err, fs.ErrPermission)
// both work.
func (e *PathError) Unwrap() []error {
	if e.Err != nil {
		return []error{e.Kind, e.Err}
	}
	return []error{e.Kind}
}

// osText strips the operation and the (possibly temporary) path from an
// *os.PathError or *os.LinkError, keeping only the reason: the message
// names the declared target, never the hidden temporary name.
func osText(err error) string {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return pe.Err.Error()
	}
	var le *os.LinkError
	if errors.As(err, &le) {
		return le.Err.Error()
	}
	return err.Error()
}

func oneLine(s string) string {
	if !strings.ContainsAny(s, "\r\n") {
		return s
	}
	return strings.NewReplacer("\r", `\r`, "\n", `\n`).Replace(s)
}
