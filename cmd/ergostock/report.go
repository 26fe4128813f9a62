package main

import "github.com/urfave/cli/v2"

// reportCommand is a placeholder until the command is built.
func reportCommand() *cli.Command {
	return &cli.Command{Name: "report", Usage: "not yet available", Action: func(*cli.Context) error {
		return usageErr("report: not yet available")
	}}
}
