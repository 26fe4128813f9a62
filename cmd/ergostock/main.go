// Command ergostock evaluates and tunes replenishment policies from the
// stationary distribution of the Markov chain of stock levels.
//
// Exit status: 0 on success; 1 when the input cannot be used or a solve
// fails; 2 for a command-line usage error; 3 when a batch finished but some
// items failed.
package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/urfave/cli/v2"
)

// version is set at build time with -ldflags "-X main.version=...".
var version = "0.1.0-dev"

// exitError carries an exit status other than 1.
type exitError struct {
	code int
	err  error
}

func (e *exitError) Error() string { return e.err.Error() }
func (e *exitError) Unwrap() error { return e.err }

// usageErr marks an error in the command line itself (exit status 2).
func usageErr(format string, a ...any) error {
	return &exitError{code: 2, err: fmt.Errorf(format, a...)}
}

func newApp(stdin io.Reader, stdout, stderr io.Writer) *cli.App {
	app := &cli.App{
		Name:            "ergostock",
		Usage:           "exact service and cost of replenishment policies from Markov chains of stock levels",
		Version:         version,
		Reader:          stdin,
		Writer:          stdout,
		ErrWriter:       stderr,
		HideHelpCommand: true,
		Commands: []*cli.Command{
			chainCommand(),
			evaluateCommand(),
			optimizeCommand(),
			simulateCommand(),
			fitCommand(),
			batchCommand(),
			reportCommand(),
			mergeCommand(),
			serveCommand(),
			networkCommand(),
		},
		OnUsageError: func(c *cli.Context, err error, isSubcommand bool) error {
			return usageErr("%s (see --help)", flagMessage(nil, err))
		},
		ExitErrHandler: func(*cli.Context, error) {}, // main reports errors itself
	}
	for _, cmd := range app.Commands {
		oneLineUsage(cmd)
	}
	return app
}

// oneLineUsage makes every command-line mistake of cmd a one-line usage
// error with exit status 2: a flag that does not parse, a missing required
// flag (checked here rather than by the cli package, which would print the
// whole help text and exit 1) and a stray argument.
func oneLineUsage(cmd *cli.Command) {
	name := cmd.Name
	// One wording for every command, whatever the command itself set.
	cmd.OnUsageError = func(_ *cli.Context, err error, _ bool) error {
		return usageErr("%s: %s (see ergostock %s --help)", name, flagMessage(cmd, err), name)
	}
	required := unrequire(cmd.Flags)
	action := cmd.Action
	if action == nil {
		return
	}
	cmd.Action = func(c *cli.Context) error {
		for _, f := range required {
			if !c.IsSet(f) {
				return usageErr("%s: --%s is required (see --help)", name, f)
			}
		}
		if c.NArg() > 0 && cmd.ArgsUsage == "" { // a command that takes arguments says so in ArgsUsage
			return usageErr("%s: unexpected argument %q (every input is given by a flag)", name, c.Args().First())
		}
		return action(c)
	}
}

// run executes the command line and returns the exit status.
func run(args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	return runContext(context.Background(), args, stdin, stdout, stderr)
}

// runContext is run with a context that the commands pass on to the
// engine (serve runs evaluate and optimize through it, with a deadline).
func runContext(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	app := newApp(stdin, stdout, stderr)
	if len(args) > 1 && !strings.HasPrefix(args[1], "-") && args[1] != "help" && app.Command(args[1]) == nil {
		fmt.Fprintf(stderr, "ergostock: unknown command %q: want one of %s (see --help)\n", args[1], commandNames(app))
		return 2
	}
	if len(args) > 1 {
		if cmd := app.Command(args[1]); cmd != nil {
			args = append([]string(nil), args...)
			if err := normalizeNumbers(cmd, args[2:]); err != nil {
				fmt.Fprintf(stderr, "ergostock: %s: %v\n", cmd.Name, err)
				return 2
			}
		}
	}
	err := app.RunContext(ctx, args)
	if err == nil {
		return 0
	}
	fmt.Fprintf(stderr, "ergostock: %v\n", oneLine(err.Error()))
	var ee *exitError
	if errors.As(err, &ee) {
		return ee.code
	}
	return 1
}

// commandNames lists the app's commands for messages.
func commandNames(app *cli.App) string {
	var names []string
	for _, c := range app.Commands {
		names = append(names, c.Name)
	}
	return strings.Join(names, ", ")
}

// oneLine folds a message onto a single line.
func oneLine(s string) string {
	b := []byte(s)
	for i, c := range b {
		if c == '\n' || c == '\r' {
			b[i] = ' '
		}
	}
	return string(b)
}

func main() {
	os.Exit(run(os.Args, os.Stdin, os.Stdout, os.Stderr))
}
