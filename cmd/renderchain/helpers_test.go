package main

import (
	"io"
	"os"
	"testing"
)

// capture runs the command line with stdout and stderr captured and
// returns the exit status and both streams.
func capture(t *testing.T, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	pipe := func(f **os.File) (func() string, func()) {
		r, w, err := os.Pipe()
		if err != nil {
			t.Fatal(err)
		}
		old := *f
		*f = w
		got := make(chan string)
		go func() { b, _ := io.ReadAll(r); got <- string(b) }()
		return func() string { return <-got }, func() { *f = old; w.Close() }
	}
	out, restoreOut := pipe(&os.Stdout)
	errs, restoreErr := pipe(&os.Stderr)
	code = run(append([]string{"renderchain"}, args...))
	restoreOut()
	restoreErr()
	return code, out(), errs()
}
