package wavio

import (
	"errors"
	"fmt"

	"renderchain/outputs"
)

// Output is one output file written under a temporary name beside its
// final path and renamed over it only on Commit, so that a failed or
// interrupted render never leaves a partial file under the final name and
// never damages a file already there. It is a one-file outputs.Set; a
// command with several outputs declares them in one outputs.Set instead so
// that they are checked and committed together. Output is an
// io.WriteSeeker, so it can be handed to NewWriter directly.
type Output struct {
	set *outputs.Set
	f   *outputs.File
}

// CreateTemp checks finalPath (see outputs.Set.Check: not a folder, its
// folder exists and can be written) and creates a hidden temporary file
// ".<base>.<random>.tmp" beside it. The rename in Commit is atomic because
// both names are in one folder (POSIX rename(2)). A character device or
// FIFO at finalPath is written in place instead (InPlace); such a target
// may not seek, so write it with NewStreamWriter.
func CreateTemp(finalPath string) (*Output, error) {
	s := outputs.New()
	f := s.File("output", finalPath)
	if err := s.Check(); err != nil {
		return nil, fmt.Errorf("wavio: %w", err)
	}
	return &Output{set: s, f: f}, nil
}

// Name returns the temporary file's path ("" when written in place).
func (o *Output) Name() string { return o.f.TempPath() }

// InPlace reports whether the target is a device or FIFO written in place.
func (o *Output) InPlace() bool { return o.f.InPlace() }

// Write writes to the temporary file.
func (o *Output) Write(p []byte) (int, error) { return o.f.Write(p) }

// Seek seeks in the temporary file.
func (o *Output) Seek(offset int64, whence int) (int64, error) { return o.f.Seek(offset, whence) }

// Commit flushes the temporary file to stable storage and renames it over
// the final path (outputs.Set.Commit). The committed file takes the
// permission bits of the regular file it replaces, or 0644. A symbolic link
// at the final path is replaced, not followed. On any failure the temporary
// file is removed and the final path is left as it was. Commit after
// Commit or Abort returns an error wrapping ErrClosed.
func (o *Output) Commit() error {
	err := o.set.Commit()
	if errors.Is(err, outputs.ErrState) {
		return fmtErr(-1, ErrClosed, "Commit after Commit or Abort of "+o.f.Path())
	}
	if err != nil {
		return fmt.Errorf("wavio: %w", err)
	}
	return nil
}

// Abort closes and removes the temporary file. It is idempotent and does
// nothing after Commit, so `defer out.Abort()` is the intended use.
func (o *Output) Abort() { o.set.Abort() }

// SameFile reports whether paths a and b name the same file; see
// outputs.SameFile.
func SameFile(a, b string) (bool, error) { return outputs.SameFile(a, b) }

// WriteFileAtomic writes b to path through CreateTemp and Commit: the file
// appears whole or not at all (outputs.WriteFile).
func WriteFileAtomic(path string, b []byte) error {
	if err := outputs.WriteFile("output", path, b); err != nil {
		return fmt.Errorf("wavio: %w", err)
	}
	return nil
}

// WriteFile writes the interleaved samples x as a whole WAV file of format
// f at path, atomically (CreateTemp, then Commit; nothing is left on
// error). A device or FIFO at path is written in place as a stream.
func WriteFile(path string, f Format, x []float64) error {
	o, err := CreateTemp(path)
	if err != nil {
		return err
	}
	defer o.Abort()
	var w *Writer
	if o.InPlace() {
		if f.Channels > 0 && len(x)%f.Channels != 0 {
			return fmtErr(-1, ErrPartialFrame, fmt.Sprintf("%d samples is not a whole number of %d-channel frames", len(x), f.Channels))
		}
		frames := int64(0)
		if f.Channels > 0 {
			frames = int64(len(x) / f.Channels)
		}
		w, err = NewStreamWriter(o, f, frames)
	} else {
		w, err = NewWriter(o, f)
	}
	if err == nil {
		err = w.Write(x)
	}
	if err == nil {
		err = w.Close()
	}
	if err != nil {
		return err
	}
	return o.Commit()
}
