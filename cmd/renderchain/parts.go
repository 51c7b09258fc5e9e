package main

import "github.com/urfave/cli/v2"

// partsCommand is a placeholder until its issue lands.
func partsCommand() *cli.Command {
	return &cli.Command{Name: "parts", Usage: "parts list with E-series values (not built yet)", Hidden: true,
		Action: func(c *cli.Context) error { return usagef("parts is not built yet") }}
}
