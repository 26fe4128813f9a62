package main

import "github.com/urfave/cli/v2"

// evaluateCommand is a placeholder until the command is built.
func evaluateCommand() *cli.Command {
	return &cli.Command{Name: "evaluate", Usage: "not yet available", Action: func(*cli.Context) error {
		return usageErr("evaluate: not yet available")
	}}
}
