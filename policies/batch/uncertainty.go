package batch

import (
	"context"
	"errors"
	"fmt"
	"strconv"
	"time"

	"ergostock/inventory"
	"ergostock/policies"
	"ergostock/policies/uncertainty"
)

// UncertaintyCells are the resampling figures of one item (see
// policies/uncertainty): bands of the optimal levels over the resampled
// models, the recommended policy's figures to expect under them, its
// regret, and with the robust search the robust policy.
type UncertaintyCells struct {
	Result *uncertainty.Result
}

// UncertaintyHeader returns the columns a run with --uncertainty appends
// to Header, and with robust those of the robust policy after them:
//
//	resampling, resamples_used      the scheme used and the resamples with an answer
//	LEVEL_p05, LEVEL_p50, LEVEL_p95 percentiles of the resampled optima, for LEVEL
//	                                reorder_point, order_up_to, order_multiple
//	                                (empty where the policy type has no such level)
//	expected_fill_rate, fill_rate_p05, fill_rate_p95
//	expected_stockout_probability, expected_total_cost, total_cost_p95
//	                                the recommended policy held fixed, over the models
//	regret_mean, regret_p95         its extra cost over each model's own optimum
//	share_meeting_min_fill_rate     share of models where it meets min_fill_rate
//	robust_policy, robust_reorder_point, robust_order_up_to, robust_order_multiple,
//	robust_mean_total_cost, robust_share_meeting_min_fill_rate,
//	plug_in_mean_total_cost, robust_extra_cost
func UncertaintyHeader(robust bool) []string {
	h := []string{"resampling", "resamples_used"}
	for _, l := range []string{"reorder_point", "order_up_to", "order_multiple"} {
		h = append(h, l+"_p05", l+"_p50", l+"_p95")
	}
	h = append(h, "expected_fill_rate", "fill_rate_p05", "fill_rate_p95",
		"expected_stockout_probability", "expected_total_cost", "total_cost_p95",
		"regret_mean", "regret_p95", "share_meeting_min_fill_rate")
	if robust {
		h = append(h, "robust_policy", "robust_reorder_point", "robust_order_up_to", "robust_order_multiple",
			"robust_mean_total_cost", "robust_share_meeting_min_fill_rate", "plug_in_mean_total_cost", "robust_extra_cost")
	}
	return h
}

// appendCells appends the cells of UncertaintyHeader(robust); a nil c
// gives empty cells.
func (c *UncertaintyCells) appendCells(rec []string, robust bool) []string {
	n := len(UncertaintyHeader(robust))
	if c == nil || c.Result == nil {
		for range n {
			rec = append(rec, "")
		}
		return rec
	}
	r := c.Result
	rec = append(rec, string(r.Scheme), strconv.Itoa(r.Used))
	kind := r.Point.Policy.Kind
	has := map[string]bool{
		"reorder_point":  kind == policies.SS || kind == policies.SNQ,
		"order_up_to":    kind == policies.SS || kind == policies.BaseStock,
		"order_multiple": kind == policies.SNQ,
	}
	for _, l := range []struct {
		name string
		b    uncertainty.Band
	}{{"reorder_point", r.ReorderPoint}, {"order_up_to", r.OrderUpTo}, {"order_multiple", r.OrderMultiple}} {
		if has[l.name] {
			rec = append(rec, formatFloat(l.b.P05), formatFloat(l.b.P50), formatFloat(l.b.P95))
		} else {
			rec = append(rec, "", "", "")
		}
	}
	rec = append(rec, formatFloat(r.FillRate.Mean), formatFloat(r.FillRate.P05), formatFloat(r.FillRate.P95),
		formatFloat(r.StockoutProbability.Mean), formatFloat(r.TotalCost.Mean), formatFloat(r.TotalCost.P95),
		formatFloat(r.Regret.Mean), formatFloat(r.Regret.P95), formatFloat(r.FloorShare))
	if !robust {
		return rec
	}
	rb := r.Robust
	if rb == nil {
		for range 8 {
			rec = append(rec, "")
		}
		return rec
	}
	s, S, Q := "", "", ""
	switch rb.Policy.Kind {
	case policies.BaseStock:
		S = strconv.Itoa(rb.Policy.OrderUpTo)
	case policies.SS:
		s, S = strconv.Itoa(rb.Policy.ReorderPoint), strconv.Itoa(rb.Policy.OrderUpTo)
	case policies.SNQ:
		s, Q = strconv.Itoa(rb.Policy.ReorderPoint), strconv.Itoa(rb.Policy.OrderMultiple)
	}
	return append(rec, string(rb.Policy.Kind), s, S, Q, formatFloat(rb.MeanCost), formatFloat(rb.FloorShare),
		formatFloat(rb.PlugInMeanCost), formatFloat(rb.ExtraCost))
}

// UncertaintyStep returns the Planner.Uncertainty step that resamples an
// item's history with opt (its Kind, Search and Context are set per item:
// the item's policy type and fill-rate floor, eval for the evaluations,
// the item's context). An item whose demand column replaced the fit gets a
// warning and empty cells; so does an item whose analysis fails (the plan
// itself stands; the analysis gets nine tenths of the item's remaining
// time budget, so that running out of it costs the cells, not the plan).
// Each item runs its resamples on one goroutine unless
// opt.Workers says otherwise: the batch already plans items in parallel.
func UncertaintyStep(opt uncertainty.Options, eval policies.Options) func(ctx context.Context, it Item, sys inventory.System, fitted *Fitted, row *Row) {
	return func(ctx context.Context, it Item, sys inventory.System, fitted *Fitted, row *Row) {
		if fitted == nil || len(fitted.Series) == 0 {
			row.Warnings = append(row.Warnings, "no uncertainty figures: the demand column replaces the history")
			return
		}
		// Leave a tenth of the item's remaining budget: an analysis that
		// runs out of time costs its cells (with a warning), not the plan.
		if dl, ok := ctx.Deadline(); ok {
			var cancel context.CancelFunc
			ctx, cancel = context.WithDeadline(ctx, time.Now().Add(time.Until(dl)*9/10))
			defer cancel()
		}
		o := opt
		if o.Workers == 0 {
			o.Workers = 1
		}
		o.Kind = row.Policy.Kind
		o.Search = policies.SearchOptions{MinFillRate: it.MinFillRate, Eval: eval}
		o.Search.Eval.Context = ctx
		o.Context = ctx
		res, err := uncertainty.Analyze(it.SKU, fitted.Series, sys, o)
		if err != nil {
			if errors.Is(err, context.DeadlineExceeded) {
				err = fmt.Errorf("the resampling ran out of the item's time budget (raise --item-timeout or lower --resamples): %w", err)
			}
			row.Warnings = append(row.Warnings, "no uncertainty figures: "+oneLine(err.Error()))
			return
		}
		if res.Point.Policy != *row.Policy {
			row.Warnings = append(row.Warnings, fmt.Sprintf("uncertainty: the resampling's point optimum %v differs from the plan's %v", res.Point.Policy, *row.Policy))
		}
		for _, w := range res.Warnings {
			row.Warnings = append(row.Warnings, "uncertainty: "+w)
		}
		res.Resamples = nil // the row keeps the summary only
		row.Uncertainty = &UncertaintyCells{Result: res}
	}
}
