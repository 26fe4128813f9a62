package main

import "github.com/urfave/cli/v2"

// chainCommand is a placeholder until the command is built.
func chainCommand() *cli.Command {
	return &cli.Command{Name: "chain", Usage: "not yet available", Action: func(*cli.Context) error {
		return usageErr("chain: not yet available")
	}}
}
