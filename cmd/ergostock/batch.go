package main

import "github.com/urfave/cli/v2"

// batchCommand is a placeholder until the command is built.
func batchCommand() *cli.Command {
	return &cli.Command{Name: "batch", Usage: "not yet available", Action: func(*cli.Context) error {
		return usageErr("batch: not yet available")
	}}
}
