package uncertainty_test

import (
	"fmt"

	"ergostock/inventory"
	"ergostock/policies"
	"ergostock/policies/uncertainty"
)

// Twenty weeks of issues of a pantograph carbon strip at the Brackwater
// Valley Tramways stores (an invented operator): how far may the
// recommended levels be off, and what holds up?
func ExampleAnalyze() {
	weeks := []int{3, 0, 5, 2, 4, 1, 6, 2, 3, 3, 0, 4, 2, 5, 1, 3, 7, 2, 4, 3}
	sys := inventory.System{LeadTime: 2, Holding: 0.4, Shortage: 9, OrderCost: 25, Mode: inventory.Backorder}
	res, err := uncertainty.Analyze("PANTO-CARBON", weeks, sys, uncertainty.Options{
		Resamples: 100, Seed: 7, Kind: policies.SS,
		Search: policies.SearchOptions{MinFillRate: 0.95},
		Robust: true,
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("recommended %v, fill rate %.3f on the point model\n", res.Point.Policy, res.Point.Figures.FillRate)
	fmt.Printf("reorder point band %g..%g (median %g), order-up-to band %g..%g\n",
		res.ReorderPoint.P05, res.ReorderPoint.P95, res.ReorderPoint.P50, res.OrderUpTo.P05, res.OrderUpTo.P95)
	fmt.Printf("fill rate to expect %.3f (5%%: %.3f), meets the floor in %.0f%% of models\n",
		res.FillRate.Mean, res.FillRate.P05, 100*res.FloorShare)
	fmt.Printf("regret %.2f on average, %.2f at the 95th percentile\n", res.Regret.Mean, res.Regret.P95)
	rb := res.Robust
	fmt.Printf("robust %v: meets the floor in %.0f%% of models for %+.2f a week\n", rb.Policy, 100*rb.FloorShare, rb.ExtraCost)
	// Output:
	// recommended s-S(s=9,S=29), fill rate 0.973 on the point model
	// reorder point band 7..11 (median 9), order-up-to band 24..33
	// fill rate to expect 0.969 (5%: 0.933), meets the floor in 86% of models
	// regret 0.19 on average, 0.77 at the 95th percentile
	// robust s-S(s=10,S=29): meets the floor in 96% of models for +0.01 a week
}
