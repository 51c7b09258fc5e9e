package main

import "github.com/urfave/cli/v2"

// spreadCommand is a placeholder until its issue lands.
func spreadCommand() *cli.Command {
	return &cli.Command{Name: "spread", Usage: "Monte Carlo over part tolerances (not built yet)", Hidden: true,
		Action: func(c *cli.Context) error { return usagef("spread is not built yet") }}
}
