package main

import "github.com/urfave/cli/v2"

// biasCommand is a placeholder until its issue lands.
func biasCommand() *cli.Command {
	return &cli.Command{Name: "bias", Usage: "DC operating point: node voltages and transistor bias (not built yet)", Hidden: true,
		Action: func(c *cli.Context) error { return usagef("bias is not built yet") }}
}
