package main

import "github.com/urfave/cli/v2"

// fitCommand is a placeholder until the command is built.
func fitCommand() *cli.Command {
	return &cli.Command{Name: "fit", Usage: "not yet available", Action: func(*cli.Context) error {
		return usageErr("fit: not yet available")
	}}
}
