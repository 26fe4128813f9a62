package main

import "github.com/urfave/cli/v2"

// simulateCommand is a placeholder until the command is built.
func simulateCommand() *cli.Command {
	return &cli.Command{Name: "simulate", Usage: "not yet available", Action: func(*cli.Context) error {
		return usageErr("simulate: not yet available")
	}}
}
