package main

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"github.com/urfave/cli/v2"

	"renderchain/plotting"
)

// figureFile is a figure and the file it goes to.
type figureFile struct {
	path string
	what string // for the note on stderr: "scope view of tone.tone=0"
	fig  *plotting.Figure
}

// checkPlotFlag refuses a --plot file whose name is neither .png nor .svg
// before any work is done.
func checkPlotFlag(c *cli.Context) (string, error) {
	p := c.String("plot")
	if p == "" {
		return "", nil
	}
	if _, err := plotting.FormatOf(p); err != nil {
		return "", usagef("--plot: %v", err)
	}
	return p, nil
}

// saveFigures draws every figure first, then writes each through the
// atomic writer the command's other outputs use (temporary file, then
// rename). If a drawing fails nothing is written; if a write fails, the
// figures this call already wrote are removed. Unless quiet, each file
// written is named on stderr with what it shows.
func saveFigures(c *cli.Context, files []figureFile, quiet bool) error {
	bufs := make([][]byte, len(files))
	for i, f := range files {
		format, err := plotting.FormatOf(f.path)
		if err != nil {
			return err
		}
		var b bytes.Buffer
		if err := f.fig.Render(&b, format); err != nil {
			return fmt.Errorf("drawing %s: %w", f.path, err)
		}
		bufs[i] = b.Bytes()
	}
	for i, f := range files {
		if err := writeFileAtomic(f.path, bufs[i]); err != nil {
			for _, done := range files[:i] {
				os.Remove(done.path)
			}
			return fmt.Errorf("writing plot %s: %w", f.path, err)
		}
	}
	if !quiet {
		for _, f := range files {
			fmt.Fprintf(c.App.ErrWriter, "plot: %s (%s)\n", f.path, f.what)
		}
	}
	return nil
}

// siblingPath names a companion figure of a --plot file: FILE.png gives
// FILE-scope.png for the only one (n = 1), FILE-scope-01.png … for
// several (numbered from 1 in report order, zero-padded to the count's
// width so the files sort in order).
func siblingPath(path, tag string, i, n int) string {
	ext := filepath.Ext(path)
	stem := strings.TrimSuffix(path, ext)
	if n == 1 {
		return stem + "-" + tag + ext
	}
	return fmt.Sprintf("%s-%s-%0*d%s", stem, tag, len(fmt.Sprint(n)), i+1, ext)
}
