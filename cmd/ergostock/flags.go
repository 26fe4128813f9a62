package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"github.com/urfave/cli/v2"

	"ergostock/inventory"
	"ergostock/policies"
)

// systemFlags are shared by evaluate, optimize and simulate.
func systemFlags() []cli.Flag {
	return []cli.Flag{
		&cli.StringFlag{Name: "demand", Usage: "demand per period, e.g. poisson:mean=4, negbin:mean=4,var=9, normal:mean=40,sd=8, gamma:mean=5,sd=4, pmf:0=0.2,1=0.5,2=0.3", Required: true},
		&cli.IntFlag{Name: "lead-time", Usage: "lead time L in whole periods (>= 0)", Value: 0},
		&cli.Float64Flag{Name: "holding-cost", Usage: "holding cost h per unit on hand per period", Required: true},
		&cli.Float64Flag{Name: "shortage-cost", Usage: "shortage cost b per unit backordered per period, or per unit of lost demand", Required: true},
		&cli.Float64Flag{Name: "order-cost", Usage: "fixed cost K per order", Value: 0},
		&cli.Float64Flag{Name: "unit-cost", Usage: "purchase cost c per unit ordered", Value: 0},
		&cli.StringFlag{Name: "unmet", Usage: "what happens to demand not served at once: backorder or lost", Value: "backorder"},
		&cli.IntFlag{Name: "max-states", Usage: "largest chain to build, in states (lost-sales chains grow fast with the lead time)", Value: policies.DefaultMaxStates},
	}
}

// policyFlags name a policy's levels (evaluate, simulate).
func policyFlags() []cli.Flag {
	return []cli.Flag{
		&cli.IntFlag{Name: "reorder-point", Usage: "reorder point s: order when inventory position <= s"},
		&cli.IntFlag{Name: "order-up-to", Usage: "order-up-to level S (alone: base-stock S)"},
		&cli.IntFlag{Name: "order-multiple", Usage: "order multiple Q (with --reorder-point: s-nQ)"},
	}
}

// flagErr turns a *inventory.FieldError into a message naming the flag.
func flagErr(err error) error {
	var fe *inventory.FieldError
	if errors.As(err, &fe) {
		msg := fmt.Sprintf("--%s %s: want %s", strings.ReplaceAll(fe.Field, "_", "-"), fe.Value, fe.Want)
		if fe.Err != nil {
			msg += ": " + fe.Err.Error()
		}
		return usageErr("%s", msg)
	}
	return err
}

// engineErr reports an error of Evaluate or Optimize: a chain over the
// state limit is a usage error naming --max-states, an unusable input
// names its flag (see flagErr), anything else passes through.
func engineErr(c *cli.Context, err error) error {
	var se *policies.SizeError
	if errors.As(err, &se) {
		return usageErr("--max-states %d: %v", c.Int("max-states"), err)
	}
	return flagErr(err)
}

// systemFromFlags builds and validates the system from the shared flags.
func systemFromFlags(c *cli.Context) (inventory.System, error) {
	var sys inventory.System
	d, err := inventory.Parse(c.String("demand"))
	if err != nil {
		return sys, flagErr(err)
	}
	mode, err := inventory.ParseMode(c.String("unmet"))
	if err != nil {
		return sys, flagErr(err)
	}
	sys = inventory.System{
		Demand:    d,
		LeadTime:  c.Int("lead-time"),
		Holding:   c.Float64("holding-cost"),
		Shortage:  c.Float64("shortage-cost"),
		OrderCost: c.Float64("order-cost"),
		UnitCost:  c.Float64("unit-cost"),
		Mode:      mode,
	}
	if err := sys.Validate(); err != nil {
		return sys, flagErr(err)
	}
	if c.Int("max-states") < 1 {
		return sys, usageErr("--max-states %d: want a state count >= 1", c.Int("max-states"))
	}
	return sys, nil
}

// policyFromFlags reads the policy's levels: --order-up-to alone is
// base-stock; with --reorder-point it is s-S; --reorder-point with
// --order-multiple is s-nQ.
func policyFromFlags(c *cli.Context, mode inventory.Mode) (policies.Policy, error) {
	var p policies.Policy
	hasS, hasBigS, hasQ := c.IsSet("reorder-point"), c.IsSet("order-up-to"), c.IsSet("order-multiple")
	switch {
	case hasBigS && hasQ:
		return p, usageErr("--order-up-to and --order-multiple: give one of them, not both")
	case hasBigS && !hasS:
		p = policies.Policy{Kind: policies.BaseStock, OrderUpTo: c.Int("order-up-to")}
	case hasBigS && hasS:
		p = policies.Policy{Kind: policies.SS, ReorderPoint: c.Int("reorder-point"), OrderUpTo: c.Int("order-up-to")}
	case hasQ && hasS:
		p = policies.Policy{Kind: policies.SNQ, ReorderPoint: c.Int("reorder-point"), OrderMultiple: c.Int("order-multiple")}
	case hasQ:
		return p, usageErr("--order-multiple needs --reorder-point")
	case hasS:
		return p, usageErr("--reorder-point needs --order-up-to (s-S) or --order-multiple (s-nQ)")
	default:
		return p, usageErr("no policy: give --order-up-to S, or --reorder-point s with --order-up-to S or --order-multiple Q")
	}
	if err := p.Validate(mode); err != nil {
		return p, usageErr("policy: %v", err)
	}
	return p, nil
}

// evalOptions reads the evaluation options shared by the commands.
func evalOptions(c *cli.Context) policies.Options {
	return policies.Options{MaxStates: c.Int("max-states")}
}

// writeJSON prints v as indented JSON followed by a newline.
func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}

// table is an aligned text table (text/tabwriter, two spaces between
// columns) whose lines lose the padding that empty trailing cells leave.
type table struct {
	*tabwriter.Writer
	buf bytes.Buffer
	out io.Writer
}

func newTable(w io.Writer) *table {
	t := &table{out: w}
	t.Writer = tabwriter.NewWriter(&t.buf, 0, 0, 2, ' ', 0)
	return t
}

// Flush aligns the rows written so far and writes them, trimmed, to the
// table's writer.
func (t *table) Flush() error {
	if err := t.Writer.Flush(); err != nil {
		return err
	}
	for _, line := range strings.SplitAfter(t.buf.String(), "\n") {
		if line == "" {
			continue
		}
		if _, err := io.WriteString(t.out, strings.TrimRight(line, " \n")+"\n"); err != nil {
			return err
		}
	}
	t.buf.Reset()
	return nil
}
