package main

import (
	"encoding/json"
	"errors"
	"fmt"
	"strings"

	"github.com/urfave/cli/v2"

	"renderchain/outputs"
	"renderchain/plotting"
)

// newOutputs starts the one outputs.Set of a command: the chain file, when
// the command has one, is declared as an input, so that no output can be
// written over it. The command declares its other inputs and its outputs
// (roles are the flags' names), calls Check before any work, defers Abort
// and ends with commitOutputs.
func newOutputs(c *cli.Context) *outputs.Set {
	s := outputs.New()
	if p := c.String("chain"); p != "" {
		s.Input("chain", p)
	}
	return s
}

// optionalFile declares the file output of flag when the flag names one.
func optionalFile(c *cli.Context, s *outputs.Set, flag string) *outputs.File {
	if p := c.String(flag); p != "" {
		return s.File(flag, p)
	}
	return nil
}

// commitOutputs puts every output of the set in place, all or none, and
// says on stderr which targets another writer created or changed while
// this command worked (this command's files replaced them all the same).
func commitOutputs(c *cli.Context, s *outputs.Set) error {
	if err := s.Commit(); err != nil {
		return err
	}
	noteChanged(c, s)
	return nil
}

// noteChanged says on stderr which targets of a committed set another
// writer created or changed while this command worked.
func noteChanged(c *cli.Context, s *outputs.Set) {
	for _, pe := range s.Changed() {
		fmt.Fprintln(c.App.ErrWriter, "renderchain: note: "+flagPathError(c.Command, pe).Error())
	}
}

// writeJSONTo writes v as indented JSON to an output of a set.
func writeJSONTo(f *outputs.File, v any) error {
	b, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		return err
	}
	return writeAll(f, append(b, '\n'))
}

// writeAll writes b to an output of a set, naming it in an error.
func writeAll(f *outputs.File, b []byte) error {
	if _, err := f.Write(b); err != nil {
		var pe *outputs.PathError
		if errors.As(err, &pe) {
			return err
		}
		return &outputs.PathError{Role: f.Role(), Path: f.Path(), Kind: outputs.ErrNotWritable, Err: err}
	}
	return nil
}

// drawTo draws a figure into an output of a set, as PNG or SVG by the
// target's name.
func drawTo(f *outputs.File, fig *plotting.Figure) error {
	format, err := plotting.FormatOf(f.Path())
	if err != nil {
		return err
	}
	return fig.Render(f, format)
}

// flagPathError returns pe with its roles shown as the command's flags
// ("--report", "--in") where the role names one.
func flagPathError(cmd *cli.Command, pe *outputs.PathError) *outputs.PathError {
	q := *pe
	if f := flagFor(cmd, pe.Role); f != "" {
		q.Role = "--" + f
	}
	if f := flagFor(cmd, pe.Other); f != "" {
		q.Other = "--" + f
	}
	return &q
}

// pathError is a fault about a path the command writes, its roles shown as
// flags; it unwraps to the original error.
type pathError struct {
	msg string
	err error
}

func (e *pathError) Error() string { return e.msg }
func (e *pathError) Unwrap() error { return e.err }

// adaptPath maps an error holding an *outputs.PathError to the command
// line: the roles become flags, and a path the command line got wrong (an
// output that is an input or another output, a folder, a missing folder,
// no file name, a socket) is a usage error; a folder that cannot be
// written or a rename that failed is a failure of the work (exit 1).
func adaptPath(cmd *cli.Command, err error, pe *outputs.PathError) error {
	msg := err.Error()
	if q := flagPathError(cmd, pe).Error(); q != pe.Error() {
		msg = strings.Replace(msg, pe.Error(), q, 1)
	}
	for _, k := range []error{outputs.ErrSameAsInput, outputs.ErrSameAsOutput, outputs.ErrIsDir, outputs.ErrNotDir,
		outputs.ErrNoFolder, outputs.ErrEmptyPath, outputs.ErrSpecial} {
		if errors.Is(pe.Kind, k) {
			return &usageError{msg: msg, err: err}
		}
	}
	return &pathError{msg: msg, err: err}
}
