package main

import (
	"bytes"
	"fmt"
	"path/filepath"
	"strings"

	"github.com/urfave/cli/v2"

	"renderchain/outputs"
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

// plotFiles declares, before any work, the --plot file at path and the n
// companion figures tagged tag beside it (siblingPath) as outputs of the
// command's set, role "plot"; it returns them by path. No path: none.
func plotFiles(set *outputs.Set, path, tag string, n int) map[string]*outputs.File {
	files := map[string]*outputs.File{}
	if path == "" {
		return files
	}
	files[path] = set.File("plot", path)
	for i := 0; i < n; i++ {
		p := siblingPath(path, tag, i, n)
		files[p] = set.File("plot", p)
	}
	return files
}

// saveFigures draws every figure first, then writes each into its file of
// the command's set (declared by plotFiles before the work, put in place
// with the command's other outputs by commitOutputs). If a drawing fails
// nothing is written; a figure whose file was not declared is an error.
func saveFigures(files []figureFile, outs map[string]*outputs.File) error {
	bufs := make([][]byte, len(files))
	for i, f := range files {
		format, err := plotting.FormatOf(f.path)
		if err != nil {
			return err
		}
		if outs[f.path] == nil {
			return fmt.Errorf("writing plot %s: not declared before the work", f.path)
		}
		var b bytes.Buffer
		if err := f.fig.Render(&b, format); err != nil {
			return fmt.Errorf("drawing %s: %w", f.path, err)
		}
		bufs[i] = b.Bytes()
	}
	for i, f := range files {
		if err := writeAll(outs[f.path], bufs[i]); err != nil {
			return err
		}
	}
	return nil
}

// noteFigures names each figure file with what it shows on stderr, once
// they are in place, unless quiet.
func noteFigures(c *cli.Context, files []figureFile, quiet bool) {
	if quiet {
		return
	}
	for _, f := range files {
		fmt.Fprintf(c.App.ErrWriter, "plot: %s (%s)\n", f.path, f.what)
	}
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
