package main

import (
	"context"
	"fmt"
	"os"
	"os/signal"
	"strings"
	"syscall"

	"github.com/urfave/cli/v2"
)

func main() { os.Exit(run(os.Args)) }

func run(args []string) int {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	err := newApp().RunContext(ctx, args)
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
