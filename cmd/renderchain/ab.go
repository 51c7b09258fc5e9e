package main

import "github.com/urfave/cli/v2"

// abCommand is a placeholder until its issue lands.
func abCommand() *cli.Command {
	return &cli.Command{Name: "ab", Usage: "loudness-matched A/B clips and a listening page (not built yet)", Hidden: true,
		Action: func(c *cli.Context) error { return usagef("ab is not built yet") }}
}
