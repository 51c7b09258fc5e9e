package main

import (
	"errors"
	"fmt"
	"slices"
	"strings"

	"github.com/urfave/cli/v2"

	"renderchain/models"
	"renderchain/outputs"
)

// Exit statuses.
const (
	exitOK      = 0
	exitFailure = 1 // the work could not be done (bad input file, chain, value)
	exitUsage   = 2 // the command line itself is wrong
)

// usageError is a mistake on the command line. It is a cli.ExitCoder with
// status exitUsage, the CLI library's own mechanism for exit statuses.
type usageError struct {
	msg string
	err error // the underlying error, if any
}

func (e *usageError) Error() string { return e.msg }

// ExitCode implements cli.ExitCoder.
func (e *usageError) ExitCode() int { return exitUsage }

// Unwrap returns the underlying error.
func (e *usageError) Unwrap() error { return e.err }

func usagef(format string, a ...any) error { return &usageError{msg: fmt.Sprintf(format, a...)} }

// badFlag is the usage error of a flag whose value does not parse or is
// out of range: "--amplitude "0": must be above 0 V …".
func badFlag(flag, text string, err error) error {
	var pe *models.PolarityError
	if errors.As(err, &pe) {
		return &usageError{msg: fmt.Sprintf("--%s %q: %s", flag, text, pe.Advice()), err: err}
	}
	return &usageError{msg: fmt.Sprintf("--%s %q %s", flag, text, models.Reason(err)), err: err}
}

// fieldFlags maps the option fields a library names in its errors to the
// flags of a command where the two names differ; elsewhere the flag is the
// field with "-" for "_" (sweep_level → --sweep-level).
var fieldFlags = map[string]map[string]string{
	"measure": {"frequency": "freq", "settle_tolerance": "settle-tol", "max_settle": "settle-max",
		"min_record": "record", "sample_rate": "rate", "temperature": "temp"},
	"response": {"frequency": "freqs", "frequencies": "freqs", "sample_rate": "rate"},
	"bias":     {"frequency": "freq", "temperature": "temp"},
	"spread":   {"frequency": "freq"},
	"render":   {"output": "out", "input": "in"},
	"ab":       {"input": "in", "output": "outdir"},
	"demo":     {"output": "outdir"},
}

// flagFor returns the flag of cmd that sets field, or "".
func flagFor(cmd *cli.Command, field string) string {
	if cmd == nil {
		return ""
	}
	name, ok := fieldFlags[cmd.Name][field]
	if !ok {
		name = strings.ReplaceAll(field, "_", "-")
	}
	for _, f := range cmd.Flags {
		if slices.Contains(f.Names(), name) {
			return name
		}
	}
	return ""
}

// adapt is the one place errors meet the command line: a library's
// *models.FieldError on an option this command sets from a flag becomes a
// usage error naming that flag (exit 2); an *outputs.PathError names its
// flags too (adaptPath); everything else is passed on (exit 1 unless it
// carries its own exit status).
func adapt(c *cli.Context, err error) error {
	var fe *models.FieldError
	var ue *usageError
	var pe *outputs.PathError
	if err == nil || errors.As(err, &ue) {
		return err
	}
	if errors.As(err, &pe) {
		return adaptPath(c.Command, err, pe)
	}
	if !errors.As(err, &fe) {
		return err
	}
	flag := flagFor(c.Command, fe.Field)
	if flag == "" {
		return err
	}
	if fe.Value == "" {
		return &usageError{msg: fmt.Sprintf("--%s: %s", flag, fe.Msg), err: err}
	}
	return &usageError{msg: fmt.Sprintf("--%s %q: %s", flag, fe.Value, fe.Msg), err: err}
}

// onUsageError is the CLI library's hook for flags it cannot parse
// (unknown flag, a value of the wrong type): a usage error, exit 2.
func onUsageError(_ *cli.Context, err error, _ bool) error {
	return &usageError{msg: err.Error(), err: err}
}

// libraryUsage is the exit status the CLI library gives its own usage
// errors (an unknown help topic); this command's is exitUsage.
const libraryUsage = 3

// exitStatus returns the exit status of a command's error: the
// cli.ExitCoder's own, else exitFailure.
func exitStatus(err error) int {
	if err == nil {
		return exitOK
	}
	var ec cli.ExitCoder
	if errors.As(err, &ec) && ec.ExitCode() != 0 {
		if ec.ExitCode() == libraryUsage {
			return exitUsage
		}
		return ec.ExitCode()
	}
	return exitFailure
}

// requireFlags is a Before hook: the named flags must be given (the
// library's own Required check prints the whole help and cannot be told
// from other errors without reading its text).
func requireFlags(names ...string) cli.BeforeFunc {
	return func(c *cli.Context) error {
		var missing []string
		for _, n := range names {
			if !c.IsSet(n) {
				missing = append(missing, "--"+n)
			}
		}
		if len(missing) > 0 {
			return usagef("%s: missing %s", c.Command.Name, strings.Join(missing, ", "))
		}
		return nil
	}
}

// unknownCommand is the application's action: a word that is no command is
// a usage error; no word, or "help", shows the help ("help COMMAND" that
// command's).
func unknownCommand(c *cli.Context) error {
	if c.Args().First() == "help" {
		if topic := c.Args().Get(1); topic != "" {
			if c.App.Command(topic) == nil {
				return usagef("no command %q to help with", topic)
			}
			return cli.ShowCommandHelp(c, topic)
		}
		return cli.ShowAppHelp(c)
	}
	if c.NArg() > 0 {
		var names []string
		for _, cmd := range c.App.VisibleCommands() {
			names = append(names, cmd.Name)
		}
		return usagef("no command %q (commands: %s)", c.Args().First(), strings.Join(names, ", "))
	}
	return cli.ShowAppHelp(c)
}
