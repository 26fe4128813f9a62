package main

import (
	"fmt"
	"io"
	"math"
	"sort"
	"strings"

	"github.com/urfave/cli/v2"

	"ergostock/inventory"
	"ergostock/policies"
	"ergostock/policies/uncertainty"
)

// optimizeCommand finds the cheapest policy of one type, under a service
// floor if one is given, and prints its evaluation with an account of the
// search.
func optimizeCommand() *cli.Command {
	flags := systemFlags()
	// --demand may come from the fit of --history --sku instead: checked
	// in the action.
	for _, f := range flags {
		if f, ok := f.(*cli.StringFlag); ok && f.Name == "demand" {
			f.Required = false
		}
	}
	flags = append(flags,
		&cli.StringFlag{Name: "policy", Usage: "policy type to tune: base-stock, s-S or s-nQ", Value: string(policies.SS)},
		floatFlag("min-fill-rate", "cheapest policy with fill rate at least F, for F in (0, 1 - 1e-12]", false),
		floatFlag("max-stockout-probability", "cheapest policy with stockout probability at most P, for P in [1e-12, 1)", false),
		intFlag("max-evaluations", "largest number of chains a lost-sales search evaluates", policies.DefaultMaxEvaluations),
		&cli.BoolFlag{Name: "json", Usage: "print one JSON object instead of the table"},
		&cli.StringFlag{Name: "history", Usage: "demand history (CSV with sku, date or period, quantity): fit --sku's demand from it instead of --demand"},
		&cli.StringFlag{Name: "sku", Usage: "the SKU of --history to plan"},
		&cli.StringFlag{Name: "period", Usage: "review period the history is summed into: day, week (ISO, Monday first) or month", Value: "week"},
	)
	flags = append(flags, uncertaintyFlags()...)
	return &cli.Command{
		Name:  "optimize",
		Usage: "the cheapest policy of a type, exactly where theory allows, under an optional service floor",
		UsageText: "ergostock optimize --demand SPEC --holding-cost h --shortage-cost b [--lead-time L|LAW] [--lead-time-model sequential|independent] [--review-period R] [--order-cost K] [--unit-cost c] [--unmet backorder|lost] [--policy base-stock|s-S|s-nQ] [--min-fill-rate F] [--max-stockout-probability P] [--json]\n" +
			"ergostock optimize --history FILE --sku ID [--period day|week|month] --holding-cost h --shortage-cost b [...] [--uncertainty [--resamples B] [--seed N] [--resampling iid|block|auto|parametric]] [--robust [--floor-confidence F]]",
		Description: timingHelp + "\n\n" + uncertaintyHelp,
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
			uopt, withUnc, err := uncertaintyOptions(c)
			if err != nil {
				return err
			}
			var series []int
			if c.IsSet("history") != c.IsSet("sku") {
				return usageErr("--history and --sku go together: give both to plan a SKU from its history")
			}
			if c.IsSet("history") {
				if c.IsSet("demand") && withUnc {
					return usageErr("--demand and --uncertainty: the resamples are refitted from --history, so the point model must be its fit too; leave out --demand")
				}
				h, err := reportHistory(c)
				if err != nil {
					return err
				}
				if !c.IsSet("demand") {
					if h.Fitted == nil {
						return fmt.Errorf("%s: SKU %q: no demand model could be fitted (%s); give --demand", h.File, h.SKU, strings.Join(h.Warnings, "; "))
					}
					if err := c.Set("demand", h.Fitted.String()); err != nil {
						return err
					}
				}
				series = h.Demand
			} else if withUnc {
				return usageErr("--uncertainty: needs --history FILE --sku ID, the series to resample")
			} else if !c.IsSet("demand") {
				return usageErr("--demand: required (or --history FILE --sku ID to fit it)")
			}
			sys, err := systemFromFlags(c)
			if err != nil {
				return err
			}
			if withUnc {
				uopt.Kind, uopt.Search = kind, opt
				res, err := uncertainty.Analyze(c.String("sku"), series, sys, uopt)
				if err != nil {
					return engineErr(c, fmt.Errorf("--uncertainty: %w", err))
				}
				if c.Bool("json") {
					return writeJSON(c.App.Writer, struct {
						optimumObject
						Uncertainty *uncertaintyJSON `json:"uncertainty"`
					}{optimumJSON(sys, res.Point), toUncertaintyJSON(res, uopt)})
				}
				if err := writeOptimum(c.App.Writer, sys, res.Point); err != nil {
					return err
				}
				fmt.Fprintln(c.App.Writer)
				return writeUncertainty(c.App.Writer, res, uopt, opt.MinFillRate)
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
