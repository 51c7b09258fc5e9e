package outputs

import (
	"context"
	"fmt"
	"io"
	"os"
	"os/signal"
	"sync"
	"syscall"
	"time"
)

// live is the process-wide registry of sets that hold temporary files:
// registered by Check, removed by Commit and Abort.
var live struct {
	sync.Mutex
	sets map[*Set]struct{}
}

func register(s *Set) {
	live.Lock()
	defer live.Unlock()
	if live.sets == nil {
		live.sets = map[*Set]struct{}{}
	}
	live.sets[s] = struct{}{}
}

func unregister(s *Set) {
	live.Lock()
	defer live.Unlock()
	delete(live.sets, s)
}

// Live returns the number of sets that hold temporary files now.
func Live() int {
	live.Lock()
	defer live.Unlock()
	return len(live.sets)
}

// Cleanup aborts every set of the process that holds temporary files and
// returns how many temporary files and folders it removed. A set in the
// middle of Commit finishes its Commit first (it holds its lock), so
// Cleanup never leaves a set half committed. It is safe to call from any
// goroutine, any number of times.
func Cleanup() int {
	live.Lock()
	sets := make([]*Set, 0, len(live.sets))
	for s := range live.sets {
		sets = append(sets, s)
	}
	live.Unlock()
	n := 0
	for _, s := range sets {
		n += s.abort()
	}
	return n
}

// Signals are the signals Watch handles: interrupt from the terminal,
// termination, hang-up of the terminal, and quit (which would otherwise
// end the program with a dump of every goroutine).
var Signals = []os.Signal{syscall.SIGINT, syscall.SIGTERM, syscall.SIGHUP, syscall.SIGQUIT}

// SignalError is the cause of a context cancelled by Watch.
type SignalError struct{ Signal os.Signal }

func (e *SignalError) Error() string { return "interrupted by " + signalName(e.Signal) }

// ExitCode is 128 + the signal number, the status a shell reports for a
// process ended by that signal (common practice); 1 if it has no number.
func (e *SignalError) ExitCode() int {
	if s, ok := e.Signal.(syscall.Signal); ok {
		return 128 + int(s)
	}
	return 1
}

// Watch is the one call a command-line program makes at start. It returns
// a context that is cancelled, with a *SignalError as its cause
// (context.Cause), on the first of SIGINT, SIGTERM, SIGHUP or SIGQUIT, so
// that work checking the context stops and its deferred Abort calls remove
// their temporary files. If the program is still running grace later, or a
// second signal comes, Watch calls Cleanup, writes one line to msg (for
// example os.Stderr; nil for none) and exits with status 128 + the signal
// number (common practice for a process ended by a signal), so that work
// that never checks the context (a long solve) cannot keep the program
// alive or leave a temporary file behind. stop releases the signals to
// their default handling.
func Watch(parent context.Context, grace time.Duration, msg io.Writer) (ctx context.Context, stop func()) {
	ctx, cancel := context.WithCancelCause(parent)
	ch := make(chan os.Signal, 2)
	signal.Notify(ch, Signals...)
	done := make(chan struct{})
	var once sync.Once
	stop = func() {
		once.Do(func() {
			signal.Stop(ch)
			close(done)
			cancel(context.Canceled)
		})
	}
	go func() {
		var sig os.Signal
		select {
		case sig = <-ch:
		case <-done:
			return
		}
		cancel(&SignalError{Signal: sig})
		t := time.NewTimer(grace)
		defer t.Stop()
		select {
		case <-done:
			return
		case <-ch:
		case <-t.C:
		}
		n := Cleanup()
		if msg != nil {
			fmt.Fprintf(msg, "%s: stopped before the work was done; %d temporary file(s) removed\n", (&SignalError{sig}).Error(), n)
		}
		os.Exit((&SignalError{sig}).ExitCode())
	}()
	return ctx, stop
}

func signalName(s os.Signal) string {
	switch s {
	case syscall.SIGINT:
		return "SIGINT"
	case syscall.SIGTERM:
		return "SIGTERM"
	case syscall.SIGHUP:
		return "SIGHUP"
	case syscall.SIGQUIT:
		return "SIGQUIT"
	}
	return s.String()
}
