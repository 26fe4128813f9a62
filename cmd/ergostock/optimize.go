package main

import (
	"fmt"
	"io"
	"math"
	"sort"

	"github.com/urfave/cli/v2"

	"ergostock/inventory"
	"ergostock/policies"
)

// optimizeCommand finds the cheapest policy of one type, under a service
// floor if one is given, and prints its evaluation with an account of the
// search.
func optimizeCommand() *cli.Command {
	flags := append(systemFlags(),
		&cli.StringFlag{Name: "policy", Usage: "policy type to tune: base-stock, s-S or s-nQ", Value: string(policies.SS)},
		floatFlag("min-fill-rate", "cheapest policy with fill rate at least F, for F in (0, 1 - 1e-12]", false),
		floatFlag("max-stockout-probability", "cheapest policy with stockout probability at most P, for P in [1e-12, 1)", false),
		intFlag("max-evaluations", "largest number of chains a lost-sales search evaluates", policies.DefaultMaxEvaluations),
		&cli.BoolFlag{Name: "json", Usage: "print one JSON object instead of the table"},
	)
	return &cli.Command{
		Name:        "optimize",
		Usage:       "the cheapest policy of a type, exactly where theory allows, under an optional service floor",
		UsageText:   "ergostock optimize --demand SPEC --holding-cost h --shortage-cost b [--lead-time L|LAW] [--lead-time-model sequential|independent] [--review-period R] [--order-cost K] [--unit-cost c] [--unmet backorder|lost] [--policy base-stock|s-S|s-nQ] [--min-fill-rate F] [--max-stockout-probability P] [--json]",
		Description: timingHelp,
		Flags:       flags,
		OnUsageError: func(_ *cli.Context, err error, _ bool) error {
			return parseErr("optimize", err)
		},
		Action: func(c *cli.Context) error {
			if c.NArg() > 0 {
				return usageErr("optimize: unexpected argument %q (every input is a flag)", c.Args().First())
			}
			kind := policies.Kind(c.String("policy"))
			switch kind {
			case policies.BaseStock, policies.SS, policies.SNQ:
			default:
				return usageErr("--policy %s: want base-stock, s-S or s-nQ", c.String("policy"))
			}
			opt := policies.SearchOptions{Eval: evalOptions(c), MaxEvaluations: c.Int("max-evaluations")}
			for _, f := range []struct {
				name string
				dst  *float64
			}{{"min-fill-rate", &opt.MinFillRate}, {"max-stockout-probability", &opt.MaxStockout}} {
				if !c.IsSet(f.name) {
					continue
				}
				v := c.Float64(f.name)
				if !(v > 0 && v < 1) || math.IsNaN(v) {
					msg := ""
					if v == 1 || v == 0 {
						msg = fmt.Sprintf(" (it reads as %v in double precision)", v)
					}
					return usageErr("--%s %s: want a probability strictly between 0 and 1%s", f.name, typed(c, f.name), msg)
				}
				*f.dst = v
			}
			if c.Int("max-evaluations") < 1 {
				return usageErr("--max-evaluations %s: want a count >= 1", typed(c, "max-evaluations"))
			}
			sys, err := systemFromFlags(c)
			if err != nil {
				return err
			}
			o, err := policies.Optimize(sys, kind, opt)
			if err != nil {
				return engineErr(c, err)
			}
			if c.Bool("json") {
				return writeJSON(c.App.Writer, optimumJSON(sys, o))
			}
			return writeOptimum(c.App.Writer, sys, o)
		},
	}
}

// optimumObject is the JSON form of an optimum: the evaluation's object
// (every figure of SPEC section 2 at the top level, the policy, the system
// and the chain's diagnostics) and the search record.
type optimumObject struct {
	evaluationObject
	Search policies.Search `json:"search"`
}

func optimumJSON(sys inventory.System, o *policies.Optimum) optimumObject {
	return optimumObject{evaluationObject: evaluationJSON(sys, &o.Evaluation), Search: o.Search}
}

// writeOptimum prints the evaluation's table followed by the search record.
func writeOptimum(w io.Writer, sys inventory.System, o *policies.Optimum) error {
	if err := writeEvaluation(w, sys, &o.Evaluation); err != nil {
		return err
	}
	fmt.Fprintln(w)
	tw := newTable(w)
	fmt.Fprintf(tw, "search\t%s\n", o.Search.Method)
	fmt.Fprintf(tw, "policies evaluated\t%d\n", o.Search.Evaluated)
	keys := make([]string, 0, len(o.Search.Bounds))
	for k := range o.Search.Bounds {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		b := o.Search.Bounds[k]
		fmt.Fprintf(tw, "bounds %s\t%d..%d\n", k, b[0], b[1])
	}
	fmt.Fprintf(tw, "guarantee\t%s\n", o.Search.Guarantee)
	return tw.Flush()
}
