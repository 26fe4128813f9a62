package main

import "github.com/urfave/cli/v2"

// optimizeCommand is a placeholder until the command is built.
func optimizeCommand() *cli.Command {
	return &cli.Command{Name: "optimize", Usage: "not yet available", Action: func(*cli.Context) error {
		return usageErr("optimize: not yet available")
	}}
}
