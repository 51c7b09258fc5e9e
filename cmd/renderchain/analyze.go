package main

import "github.com/urfave/cli/v2"

// analyzeCommand is a placeholder until its issue lands.
func analyzeCommand() *cli.Command {
	return &cli.Command{Name: "analyze", Usage: "levels, spectrum and loudness of a WAV file (not built yet)", Hidden: true,
		Action: func(c *cli.Context) error { return usagef("analyze is not built yet") }}
}
