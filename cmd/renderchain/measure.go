package main

import "github.com/urfave/cli/v2"

// measureCommand is a placeholder until its issue lands.
func measureCommand() *cli.Command {
	return &cli.Command{Name: "measure", Usage: "THD and harmonics of a sine through the chain (not built yet)", Hidden: true,
		Action: func(c *cli.Context) error { return usagef("measure is not built yet") }}
}
