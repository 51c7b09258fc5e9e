package main

import (
	"context"
	"errors"
	"fmt"
	"os"
	"strings"
	"time"

	"github.com/urfave/cli/v2"

	"renderchain/outputs"
)

func main() { os.Exit(run(os.Args)) }

// signalGrace is how long a command may take to stop after the first
// signal before outputs.Watch removes every temporary file and exits: the
// solvers check for cancellation at least once per Newton iteration or
// block of samples, far more often than this.
const signalGrace = 2 * time.Second

// run runs the command line and returns the exit status. SIGINT, SIGTERM,
// SIGHUP and SIGQUIT cancel the command's context (outputs.Watch): the
// command stops, its deferred Abort removes its temporary files, and the
// status is 128 + the signal's number, as a shell reports for a process a
// signal ended (common practice), with one line on stderr and no dump.
func run(args []string) int {
	ctx, stop := outputs.Watch(context.Background(), signalGrace, os.Stderr)
	defer stop()
	err := newApp().RunContext(ctx, args)
	var se *outputs.SignalError
	if err != nil && errors.As(context.Cause(ctx), &se) {
		fmt.Fprintf(os.Stderr, "renderchain: %s: stopped before the work was done; its temporary files are removed\n", se.Error())
		return se.ExitCode()
	}
	if err != nil {
		msg := strings.ReplaceAll(strings.TrimSpace(err.Error()), "\n", "; ")
		fmt.Fprintln(os.Stderr, "renderchain: "+msg)
	}
	return exitStatus(err)
}

func newApp() *cli.App {
	app := &cli.App{
		Name:  "renderchain",
		Usage: "render and measure a fuzz + tone + volume circuit simulated at the component level",
		Description: "Renders a dry guitar recording through a chain of circuit stages solved as a wave digital\n" +
			"filter with diode and transistor models, and measures what the circuit does.\n\n" +
			"Fuzz renders are loud: start playback low.",
		Writer:                    os.Stdout,
		ErrWriter:                 os.Stderr,
		DisableSliceFlagSeparator: true,
		Suggest:                   true,
		HideHelpCommand:           true,
		ExitErrHandler:            func(*cli.Context, error) {},
		OnUsageError:              onUsageError,
		Action:                    unknownCommand,
		Commands: []*cli.Command{
			renderCommand(),
			demoCommand(),
			templatesCommand(),
			measureCommand(),
			responseCommand(),
			analyzeCommand(),
			biasCommand(),
			spreadCommand(),
			partsCommand(),
			abCommand(),
		},
	}
	for _, cmd := range app.Commands {
		cmd.OnUsageError = onUsageError
		if action := cmd.Action; action != nil {
			cmd.Action = func(c *cli.Context) error { return adapt(c, action(c)) }
		}
	}
	return app
}
