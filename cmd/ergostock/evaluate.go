package main

import (
	"fmt"
	"io"
	"strconv"

	"github.com/urfave/cli/v2"

	"ergostock/chain"
	"ergostock/inventory"
	"ergostock/policies"
)

// evaluateCommand prints every figure of one policy, computed exactly from
// the stationary distribution of the chain the policy induces.
func evaluateCommand() *cli.Command {
	flags := append(systemFlags(), policyFlags()...)
	flags = append(flags, &cli.BoolFlag{Name: "json", Usage: "print one JSON object instead of the table"})
	required := unrequire(flags)
	return &cli.Command{
		Name:        "evaluate",
		Usage:       "exact service and cost of one policy, from the stationary law of its chain",
		UsageText:   "ergostock evaluate --demand SPEC --holding-cost h --shortage-cost b [--lead-time L|LAW] [--lead-time-model sequential|independent] [--review-period R] [--order-cost K] [--unit-cost c] [--unmet backorder|lost] (--order-up-to S | --reorder-point s --order-up-to S | --reorder-point s --order-multiple Q) [--json]",
		Description: timingHelp,
		Flags:       flags,
		// A flag that does not parse is a one-line usage error, without the
		// help text on stdout.
		OnUsageError: func(_ *cli.Context, err error, _ bool) error {
			return parseErr("evaluate", err)
		},
		Action: func(c *cli.Context) error {
			for _, name := range required {
				if !c.IsSet(name) {
					return usageErr("--%s: required (see --help)", name)
				}
			}
			if c.NArg() > 0 {
				return usageErr("evaluate: unexpected argument %q (every input is a flag)", c.Args().First())
			}
			sys, err := systemFromFlags(c)
			if err != nil {
				return err
			}
			p, err := policyFromFlags(c, sys.Mode)
			if err != nil {
				return err
			}
			e, err := policies.Evaluate(sys, p, evalOptions(c))
			if err != nil {
				return engineErr(c, err)
			}
			keepLevels(c.Context, e)
			if c.Bool("json") {
				return writeJSON(c.App.Writer, evaluationJSON(sys, e))
			}
			return writeEvaluation(c.App.Writer, sys, e)
		},
	}
}

// unrequire clears the Required mark of the flags and returns their names,
// so that the command checks them itself and a missing one is a one-line
// usage error (exit status 2) rather than the help text and status 1.
func unrequire(flags []cli.Flag) []string {
	var names []string
	for _, f := range flags {
		switch f := f.(type) {
		case *cli.StringFlag:
			if f.Required {
				f.Required = false
				names = append(names, f.Name)
			}
		case *cli.Float64Flag:
			if f.Required {
				f.Required = false
				names = append(names, f.Name)
			}
		case *cli.IntFlag:
			if f.Required {
				f.Required = false
				names = append(names, f.Name)
			}
		case *cli.GenericFlag:
			if f.Required {
				f.Required = false
				names = append(names, f.Name)
			}
		}
	}
	return names
}

// policyObject is a policy as JSON: its type and only the levels that
// apply to it.
type policyObject struct {
	Type          policies.Kind `json:"type"`
	ReorderPoint  *int          `json:"reorder_point,omitempty"`
	OrderUpTo     *int          `json:"order_up_to,omitempty"`
	OrderMultiple *int          `json:"order_multiple,omitempty"`
}

func newPolicyObject(p policies.Policy) policyObject {
	o := policyObject{Type: p.Kind}
	s, S, q := p.ReorderPoint, p.OrderUpTo, p.OrderMultiple
	switch p.Kind {
	case policies.BaseStock:
		o.OrderUpTo = &S
	case policies.SS:
		o.ReorderPoint, o.OrderUpTo = &s, &S
	case policies.SNQ:
		o.ReorderPoint, o.OrderMultiple = &s, &q
	}
	return o
}

// evaluationObject is the JSON form of an evaluation: every figure of
// SPEC section 2 at the top level, the policy, the system it was evaluated
// on, and the chain's size and solver diagnostics.
type evaluationObject struct {
	inventory.Figures
	Policy policyObject `json:"policy"`
	Demand string       `json:"demand"`
	timingJSON
	Unmet         inventory.Mode    `json:"unmet"`
	States        int               `json:"states"`
	Diagnostics   chain.Diagnostics `json:"diagnostics"`
	NeglectedMass float64           `json:"neglected_mass"`
	FlowBalance   float64           `json:"flow_balance"`
}

func evaluationJSON(sys inventory.System, e *policies.Evaluation) evaluationObject {
	return evaluationObject{
		Figures:       e.Figures,
		Policy:        newPolicyObject(e.Policy),
		Demand:        sys.Demand.String(),
		timingJSON:    newTimingJSON(sys),
		Unmet:         sys.Mode,
		States:        e.States,
		Diagnostics:   e.Diagnostics,
		NeglectedMass: e.Neglected,
		FlowBalance:   e.FlowBalance,
	}
}

// writeEvaluation prints the aligned table: the policy and system, every
// figure with its unit, and the chain's size and diagnostics.
func writeEvaluation(w io.Writer, sys inventory.System, e *policies.Evaluation) error {
	tw := newTable(w)
	fmt.Fprintf(tw, "policy\t%v\t\n", e.Policy)
	fmt.Fprintf(tw, "demand\t%s\tper period\n", sys.Demand)
	writeTiming(tw, sys)
	fmt.Fprintf(tw, "unmet demand\t%s\t\n", sys.Mode)
	fmt.Fprintf(tw, "\t\t\n")
	for _, f := range e.Figures.Fields() {
		fmt.Fprintf(tw, "%s\t%s\t%s\n", f.Label, num(f.Value), f.Unit)
	}
	d := e.Diagnostics
	fmt.Fprintf(tw, "\t\t\n")
	fmt.Fprintf(tw, "chain states\t%d\t\n", e.States)
	fmt.Fprintf(tw, "chain transitions\t%d\t\n", d.NonZeros)
	if d.Transient > 0 {
		fmt.Fprintf(tw, "transient states\t%d\tgiven probability 0\n", d.Transient)
	}
	fmt.Fprintf(tw, "solver\t%s\t%d iterations\n", d.Method, d.Iterations)
	fmt.Fprintf(tw, "residual\t%s\t||pi P - pi||_1\n", num(d.Residual))
	fmt.Fprintf(tw, "balance\t%s\tmax |flow out - flow in| over states\n", num(d.Balance))
	fmt.Fprintf(tw, "neglected mass\t%s\tprobability\n", num(e.Neglected))
	fmt.Fprintf(tw, "flow balance\t%s\t|units ordered - units served| per period\n", num(e.FlowBalance))
	return tw.Flush()
}

// num prints a figure with 6 significant digits.
func num(v float64) string { return strconv.FormatFloat(v, 'g', 6, 64) }
