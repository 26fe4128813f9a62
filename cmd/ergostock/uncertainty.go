package main

import (
	"fmt"
	"io"
	"math"
	"slices"

	"github.com/urfave/cli/v2"

	"ergostock/policies"
	"ergostock/policies/uncertainty"
)

// uncertaintyHelp is the --help text of the uncertainty flags.
const uncertaintyHelp = `With --uncertainty, the SKU's history is resampled --resamples times
(bootstrap; --resampling iid, block, auto or parametric; seeded by --seed),
each resample refitted as fit does and optimised exactly: the output adds the
5th/50th/95th percentiles of the optimal levels over the resampled models, the
fill rate, stockout probability and cost that the recommended policy would
have under them (what to expect, not only the point model's figures), and its
regret (extra cost over each resampled model's own optimum). --robust adds the
policy of least mean cost over the resampled models that meets --min-fill-rate
in at least --floor-confidence of them. The bootstrap sees only what the
history holds (no season or trend beyond it); for critical items use the
bands as an aid to judgement beside local practice and regulation.`

// uncertaintyFlags are the flags of the resampling analysis (optimize,
// batch, and report without its own --seed), less those named in except.
func uncertaintyFlags(except ...string) []cli.Flag {
	var out []cli.Flag
	for _, f := range allUncertaintyFlags() {
		if !slices.Contains(except, f.Names()[0]) {
			out = append(out, f)
		}
	}
	return out
}

func allUncertaintyFlags() []cli.Flag {
	return []cli.Flag{
		&cli.BoolFlag{Name: "uncertainty", Usage: "resample the history and report bands on the levels, the figures to expect and the regret"},
		intFlag("resamples", "number of resampled models B (with --uncertainty)", uncertainty.DefaultResamples),
		intFlag("seed", "seed of the resampling (with --uncertainty); the results depend on it and on nothing else", 1),
		&cli.StringFlag{Name: "resampling", Usage: "iid (periods drawn with replacement), block (moving blocks, length by Politis & White 2004), auto (block where the lag-1 autocorrelation is significant) or parametric (from the fitted model)", Value: string(uncertainty.IID)},
		&cli.BoolFlag{Name: "robust", Usage: "also find the policy of least mean cost over the resampled models that meets --min-fill-rate in --floor-confidence of them (implies --uncertainty)"},
		floatFlag("floor-confidence", "share of resampled models in which --robust must meet --min-fill-rate", false),
	}
}

// uncertaintyOptions reads the flags; ok is false when no analysis is
// asked for. Flags named in shared belong to other options of the command
// too (report's --seed also seeds --simulate) and may be given alone.
func uncertaintyOptions(c *cli.Context, shared ...string) (opt uncertainty.Options, ok bool, err error) {
	ok = c.Bool("uncertainty") || c.Bool("robust")
	if !ok {
		for _, f := range []string{"resamples", "seed", "resampling", "floor-confidence"} {
			if c.IsSet(f) && !slices.Contains(shared, f) {
				return opt, false, usageErr("--%s: goes with --uncertainty or --robust", f)
			}
		}
		return opt, false, nil
	}
	b := c.Int("resamples")
	if b < 2 || b > uncertainty.MaxResamples {
		return opt, false, usageErr("--resamples %s: want a count from 2 to %d", typed(c, "resamples"), uncertainty.MaxResamples)
	}
	seed := c.Int("seed")
	if seed < 0 {
		return opt, false, usageErr("--seed %s: want a whole number >= 0", typed(c, "seed"))
	}
	sc, err := uncertainty.ParseScheme(c.String("resampling"))
	if err != nil {
		return opt, false, usageErr("--resampling %s: want iid, block, auto or parametric", c.String("resampling"))
	}
	opt = uncertainty.Options{Resamples: b, Seed: uint64(seed), Scheme: sc, Robust: c.Bool("robust")}
	if c.IsSet("floor-confidence") {
		v := c.Float64("floor-confidence")
		if !(v > 0 && v <= 1) || math.IsNaN(v) {
			return opt, false, usageErr("--floor-confidence %s: want a share in (0, 1]", typed(c, "floor-confidence"))
		}
		if !c.Bool("robust") {
			return opt, false, usageErr("--floor-confidence: goes with --robust")
		}
		opt.FloorConfidence = v
	}
	return opt, true, nil
}

// bandJSON and spreadJSON are the JSON forms of the bands.
type bandJSON struct {
	P05 float64 `json:"p05"`
	P50 float64 `json:"p50"`
	P95 float64 `json:"p95"`
}

type spreadJSON struct {
	Mean float64 `json:"mean"`
	P05  float64 `json:"p05"`
	P50  float64 `json:"p50"`
	P95  float64 `json:"p95"`
}

func toBand(b uncertainty.Band) *bandJSON { return &bandJSON{b.P05, b.P50, b.P95} }
func toSpread(s uncertainty.Spread) spreadJSON {
	return spreadJSON{s.Mean, s.P05, s.P50, s.P95}
}

type robustJSON struct {
	Policy           policies.Policy `json:"policy"`
	MeanCost         float64         `json:"mean_total_cost"`
	FillRate         spreadJSON      `json:"fill_rate"`
	FloorShare       float64         `json:"share_meeting_floor"`
	PointTotalCost   float64         `json:"total_cost_point_model"`
	PointFillRate    float64         `json:"fill_rate_point_model"`
	PlugInMeanCost   float64         `json:"plug_in_mean_total_cost"`
	PlugInFloorShare float64         `json:"plug_in_share_meeting_floor"`
	ExtraCost        float64         `json:"extra_cost"`
	Candidates       int             `json:"candidates"`
	Evaluations      int             `json:"evaluations"`
	Guarantee        string          `json:"guarantee"`
}

type uncertaintyJSON struct {
	Resamples     int         `json:"resamples"`
	Used          int         `json:"resamples_used"`
	Seed          uint64      `json:"seed"`
	Resampling    string      `json:"resampling"`
	BlockLength   int         `json:"block_length"`
	Periods       int         `json:"periods"`
	Lag1          float64     `json:"lag1_autocorrelation"`
	ReorderPoint  *bandJSON   `json:"reorder_point,omitempty"`
	OrderUpTo     *bandJSON   `json:"order_up_to,omitempty"`
	OrderMultiple *bandJSON   `json:"order_multiple,omitempty"`
	FillRate      spreadJSON  `json:"fill_rate"`
	Stockout      spreadJSON  `json:"stockout_probability"`
	TotalCost     spreadJSON  `json:"total_cost"`
	Regret        spreadJSON  `json:"regret"`
	FloorShare    float64     `json:"share_meeting_floor"`
	Warnings      []string    `json:"warnings"`
	Robust        *robustJSON `json:"robust,omitempty"`
}

func toUncertaintyJSON(res *uncertainty.Result, opt uncertainty.Options) *uncertaintyJSON {
	u := &uncertaintyJSON{Resamples: len(res.Resamples), Used: res.Used, Seed: opt.Seed, Resampling: string(res.Scheme),
		BlockLength: res.BlockLength, Periods: res.Periods, Lag1: res.Lag1,
		FillRate: toSpread(res.FillRate), Stockout: toSpread(res.StockoutProbability), TotalCost: toSpread(res.TotalCost),
		Regret: toSpread(res.Regret), FloorShare: res.FloorShare, Warnings: res.Warnings}
	if u.Warnings == nil {
		u.Warnings = []string{}
	}
	switch res.Point.Policy.Kind {
	case policies.BaseStock:
		u.OrderUpTo = toBand(res.OrderUpTo)
	case policies.SS:
		u.ReorderPoint, u.OrderUpTo = toBand(res.ReorderPoint), toBand(res.OrderUpTo)
	case policies.SNQ:
		u.ReorderPoint, u.OrderMultiple = toBand(res.ReorderPoint), toBand(res.OrderMultiple)
	}
	if rb := res.Robust; rb != nil {
		u.Robust = &robustJSON{Policy: rb.Policy, MeanCost: rb.MeanCost, FillRate: toSpread(rb.FillRate), FloorShare: rb.FloorShare,
			PointTotalCost: rb.Point.TotalCost, PointFillRate: rb.Point.FillRate, PlugInMeanCost: rb.PlugInMeanCost,
			PlugInFloorShare: rb.PlugInFloorShare, ExtraCost: rb.ExtraCost, Candidates: rb.Candidates,
			Evaluations: rb.Evaluations, Guarantee: rb.Guarantee}
	}
	return u
}

// writeUncertainty prints the analysis as a table after the optimum's.
func writeUncertainty(w io.Writer, res *uncertainty.Result, opt uncertainty.Options, floor float64) error {
	tw := newTable(w)
	fmt.Fprintf(tw, "resampled models\t%d of %d\t%s bootstrap, seed %d", res.Used, len(res.Resamples), res.Scheme, opt.Seed)
	if res.Scheme == uncertainty.Block {
		fmt.Fprintf(tw, ", blocks of %d periods", res.BlockLength)
	}
	fmt.Fprintf(tw, "\n")
	fmt.Fprintf(tw, "history\t%d periods\tlag-1 autocorrelation %.3f\n", res.Periods, res.Lag1)
	fmt.Fprintf(tw, "\t5%%\tmedian\t95%%\tmean\n")
	lvl := func(name string, b uncertainty.Band) {
		fmt.Fprintf(tw, "optimal %s\t%g\t%g\t%g\t\n", name, b.P05, b.P50, b.P95)
	}
	switch res.Point.Policy.Kind {
	case policies.BaseStock:
		lvl("order-up-to level", res.OrderUpTo)
	case policies.SS:
		lvl("reorder point", res.ReorderPoint)
		lvl("order-up-to level", res.OrderUpTo)
	case policies.SNQ:
		lvl("reorder point", res.ReorderPoint)
		lvl("order multiple", res.OrderMultiple)
	}
	fig := func(name string, s uncertainty.Spread) {
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\n", name, num(s.P05), num(s.P50), num(s.P95), num(s.Mean))
	}
	fmt.Fprintf(tw, "%v under the resampled models:\t\t\t\t\n", res.Point.Policy)
	fig("  fill rate", res.FillRate)
	fig("  stockout probability", res.StockoutProbability)
	fig("  total cost", res.TotalCost)
	fig("  regret", res.Regret)
	if floor > 0 {
		fmt.Fprintf(tw, "share meeting min fill rate %g\t%.1f%%\t\t\t\n", floor, 100*res.FloorShare)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	for _, m := range res.Warnings {
		fmt.Fprintf(w, "warning: %s\n", m)
	}
	rb := res.Robust
	if rb == nil {
		return nil
	}
	fmt.Fprintln(w)
	tw = newTable(w)
	fmt.Fprintf(tw, "\trobust\tplug-in\n")
	fmt.Fprintf(tw, "policy\t%v\t%v\n", rb.Policy, res.Point.Policy)
	fmt.Fprintf(tw, "mean total cost over the models\t%s\t%s\n", num(rb.MeanCost), num(rb.PlugInMeanCost))
	fmt.Fprintf(tw, "mean fill rate over the models\t%s\t%s\n", num(rb.FillRate.Mean), num(res.FillRate.Mean))
	fmt.Fprintf(tw, "5%% fill rate over the models\t%s\t%s\n", num(rb.FillRate.P05), num(res.FillRate.P05))
	if floor > 0 {
		fmt.Fprintf(tw, "share meeting min fill rate %g\t%.1f%%\t%.1f%%\n", floor, 100*rb.FloorShare, 100*rb.PlugInFloorShare)
	}
	fmt.Fprintf(tw, "on the point model: total cost\t%s\t%s\n", num(rb.Point.TotalCost), num(res.Point.Figures.TotalCost))
	fmt.Fprintf(tw, "on the point model: fill rate\t%s\t%s\n", num(rb.Point.FillRate), num(res.Point.Figures.FillRate))
	if err := tw.Flush(); err != nil {
		return err
	}
	_, err := fmt.Fprintf(w, "the robust policy costs %s per period more on average over the models (negative: less)\n"+
		"%d candidates considered (%d exact evaluations; a candidate is given up once it provably cannot be the best); %s\n",
		num(rb.ExtraCost), rb.Candidates, rb.Evaluations, rb.Guarantee)
	return err
}
