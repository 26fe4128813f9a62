package policies_test

import (
	"fmt"

	"ergostock/inventory"
	"ergostock/policies"
)

// Brake pads at the Brackwater Valley Tramways depot (the demo scenario):
// Poisson demand of 10 sets a week, a fixed cost of 64 per order, holding 1
// and backorder penalty 9 per set per week, delivered at once (the test
// problem of Zheng and Federgruen 1991).
func ExampleOptimize() {
	d, err := inventory.NewPoisson(10)
	if err != nil {
		panic(err)
	}
	sys := inventory.System{Demand: d, Holding: 1, Shortage: 9, OrderCost: 64, Mode: inventory.Backorder}
	o, err := policies.Optimize(sys, policies.SS, policies.SearchOptions{})
	if err != nil {
		panic(err)
	}
	fmt.Printf("%v: cost %.4f per week, fill rate %.4f\n", o.Policy, o.Figures.TotalCost, o.Figures.FillRate)

	// The cheapest policy that serves at least 99% of demand from stock.
	o, err = policies.Optimize(sys, policies.SS, policies.SearchOptions{MinFillRate: 0.99})
	if err != nil {
		panic(err)
	}
	fmt.Printf("%v: cost %.4f per week, fill rate %.4f\n", o.Policy, o.Figures.TotalCost, o.Figures.FillRate)
	// Output:
	// s-S(s=6,S=40): cost 35.0216 per week, fill rate 0.9722
	// s-S(s=9,S=41): cost 36.0293 per week, fill rate 0.9910
}
