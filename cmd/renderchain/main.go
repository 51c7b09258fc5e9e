package main

import (
	"context"
	"errors"
	"fmt"
	"os"
	"os/signal"
	"strings"
	"syscall"

	"github.com/urfave/cli/v2"
)

// Exit statuses.
const (
	exitOK      = 0
	exitFailure = 1 // the work could not be done (bad input file, chain, value)
	exitUsage   = 2 // the command line itself is wrong
)

// usageError marks a mistake on the command line.
type usageError struct{ msg string }

func (e *usageError) Error() string { return e.msg }

func usagef(format string, a ...any) error { return &usageError{fmt.Sprintf(format, a...)} }

func main() { os.Exit(run(os.Args)) }

func run(args []string) int {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	app := newApp()
	err := app.RunContext(ctx, args)
	if err == nil {
		return exitOK
	}
	msg := strings.ReplaceAll(strings.TrimSpace(err.Error()), "\n", "; ")
	fmt.Fprintln(os.Stderr, "renderchain: "+msg)
	var ue *usageError
	if errors.As(err, &ue) || isFlagError(err) {
		return exitUsage
	}
	return exitFailure
}

// isFlagError recognises the flag parser's own complaints.
func isFlagError(err error) bool {
	s := err.Error()
	return strings.HasPrefix(s, "flag provided but not defined") || strings.HasPrefix(s, "invalid value") ||
		strings.Contains(s, "Required flag") || strings.HasPrefix(s, "No help topic")
}

func newApp() *cli.App {
	return &cli.App{
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
}
