package main

import "github.com/urfave/cli/v2"

func demoCommand() *cli.Command {
	return &cli.Command{Name: "demo", Usage: "render the built-in demo", Action: func(c *cli.Context) error { return usagef("demo: not yet") }}
}
