package main

import "github.com/urfave/cli/v2"

// responseCommand is a placeholder until its issue lands.
func responseCommand() *cli.Command {
	return &cli.Command{Name: "response", Usage: "small-signal frequency response (not built yet)", Hidden: true,
		Action: func(c *cli.Context) error { return usagef("response is not built yet") }}
}
