package main

import (
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"

	"github.com/urfave/cli/v2"

	"ergostock/chain"
)

// chainCommand solves the stationary distribution of a transition matrix
// read from a file.
func chainCommand() *cli.Command {
	methods := make([]string, len(chain.Methods))
	for i, m := range chain.Methods {
		methods[i] = string(m)
	}
	return &cli.Command{
		Name:      "chain",
		Usage:     "stationary distribution of a Markov chain read from a file",
		UsageText: "ergostock chain --matrix FILE [--method NAME] [--tol X] [--max-iter N] [--json]",
		Description: "FILE is a dense CSV matrix (one row a line, optional header line of state labels)\n" +
			"or a list with the header from,to,probability; - reads standard input.",
		Flags: []cli.Flag{
			&cli.StringFlag{Name: "matrix", Usage: "transition matrix `FILE` (dense CSV or from,to,probability list; - for stdin); required"},
			&cli.StringFlag{Name: "method", Usage: "solver: " + strings.Join(methods, ", "), Value: string(chain.MethodAuto)},
			&cli.Float64Flag{Name: "tol", Usage: "target residual ||pi P - pi||_1 of the iterative methods (power, gauss-seidel, iad, gmres); above 0 and below 2, and not below what double precision reaches on the chain", Value: chain.DefaultTol},
			&cli.IntFlag{Name: "max-iter", Usage: "iteration cap of the iterative methods", Value: chain.DefaultMaxIter},
			&cli.BoolFlag{Name: "json", Usage: "print one JSON object instead of a table"},
		},
		Action: runChain,
		OnUsageError: func(_ *cli.Context, err error, _ bool) error {
			return usageErr("chain: %v (see ergostock chain --help)", err)
		},
	}
}

// chainJSON is the --json output (keys fixed by the command-line contract,
// plus extras).
type chainJSON struct {
	States       []string  `json:"states"`
	Distribution []float64 `json:"distribution"`
	Method       string    `json:"method"`
	Iterations   int       `json:"iterations"`
	Residual     float64   `json:"residual"`
	Balance      float64   `json:"balance"`
	BalanceState string    `json:"balance_state"`
	NonZeros     int       `json:"nonzeros"`
	Period       int       `json:"period"`
	Lazy         bool      `json:"lazy"`
	Transient    []string  `json:"transient"`
	Fallback     string    `json:"fallback,omitempty"`
}

func runChain(c *cli.Context) error {
	if c.Args().Len() > 0 {
		return usageErr("chain: unexpected argument %q", c.Args().First())
	}
	meth, err := chain.ParseMethod(c.String("method"))
	if err != nil {
		return usageErr("--method %s: %v", c.String("method"), err)
	}
	tol := c.Float64("tol")
	if !(tol > 0) || math.IsInf(tol, 0) {
		return usageErr("--tol %v: want a finite number > 0", tol)
	}
	if tol >= 2 {
		return usageErr("--tol %v: want a number < 2 (the residual ||pi P - pi||_1 of any probability vector is at most 2, so the start vector would pass)", tol)
	}
	maxIter := c.Int("max-iter")
	if maxIter < 1 {
		return usageErr("--max-iter %d: want an integer >= 1", maxIter)
	}
	name := c.String("matrix")
	if name == "" {
		return usageErr("--matrix: want a file name (or - for standard input)")
	}
	var r io.Reader
	display := name
	if name == "-" {
		r, display = c.App.Reader, "stdin"
	} else {
		f, err := os.Open(name)
		if err != nil {
			var pe *os.PathError
			if errors.As(err, &pe) {
				return fmt.Errorf("--matrix %s: cannot open: %w", name, pe.Err)
			}
			return fmt.Errorf("--matrix %s: %w", name, err)
		}
		defer f.Close()
		r = f
	}
	m, err := chain.Read(r, display)
	if err != nil {
		return err
	}
	res, err := chain.Solve(m, chain.Options{Method: meth, Tol: tol, MaxIter: maxIter})
	var te *chain.TolError
	if errors.As(err, &te) {
		return usageErr("--tol %v: %s: %s", tol, display, strings.TrimPrefix(te.Error(), fmt.Sprintf("tolerance %v: ", te.Tol)))
	}
	if err != nil {
		return fmt.Errorf("%s: %w", display, err)
	}
	for i, p := range res.Pi {
		// chain.Solve never returns such a value; the command never
		// prints one.
		if !(p >= 0) || math.IsInf(p, 0) {
			return fmt.Errorf("%s: method %s gave probability %v to state %s: not printed (try --method gth or gmres)", display, res.Diagnostics.Method, p, m.Label(i))
		}
	}
	d := res.Diagnostics
	transient := []string{}
	if d.Transient > 0 {
		for _, s := range chain.Classify(m).Transient {
			transient = append(transient, m.Label(s))
		}
	}
	if c.Bool("json") {
		out := chainJSON{
			States:       m.Labels,
			Distribution: res.Pi,
			Method:       string(d.Method),
			Iterations:   d.Iterations,
			Residual:     d.Residual,
			Balance:      d.Balance,
			BalanceState: m.Label(d.BalanceState),
			NonZeros:     d.NonZeros,
			Period:       d.Period,
			Lazy:         d.Lazy,
			Transient:    transient,
			Fallback:     d.Fallback,
		}
		return writeJSON(c.App.Writer, out)
	}
	w := c.App.Writer
	tw := newTable(w)
	fmt.Fprintln(tw, "state\tprobability")
	for i, p := range res.Pi {
		fmt.Fprintf(tw, "%s\t%s\n", m.Label(i), strconv.FormatFloat(p, 'g', 15, 64))
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	method := string(d.Method)
	if d.Lazy {
		method += " (on the lazy chain (I+P)/2: the chain is periodic)"
	}
	fmt.Fprintf(w, "\nmethod      %s\n", method)
	if d.Fallback != "" {
		fmt.Fprintf(w, "fallback    %s\n", d.Fallback)
	}
	fmt.Fprintf(w, "iterations  %d\n", d.Iterations)
	fmt.Fprintf(w, "residual    %.3g  (||pi P - pi||_1)\n", d.Residual)
	fmt.Fprintf(w, "balance     %.3g  (largest |flow out - flow in|, at state %s)\n", d.Balance, m.Label(d.BalanceState))
	fmt.Fprintf(w, "states      %d, %d non-zero transitions\n", d.States, d.NonZeros)
	closed := d.States - d.Transient
	fmt.Fprintf(w, "closed      one class of %d %s, period %d\n", closed, chainPlural(closed, "state", "states"), d.Period)
	if len(transient) == 0 {
		fmt.Fprintln(w, "transient   none")
	} else {
		const show = 10
		list := transient
		more := ""
		if len(list) > show {
			more = fmt.Sprintf(", ... %d more", len(list)-show)
			list = list[:show]
		}
		fmt.Fprintf(w, "transient   %d (probability 0): %s%s\n", len(transient), strings.Join(list, ", "), more)
	}
	return nil
}

func chainPlural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}
