package network_test

import (
	"fmt"
	"strings"

	"ergostock/inventory/tabular"
	"ergostock/policies/network"
)

// A central store feeding one local store: the exact figures of the
// levels in the file, then the cheapest echelon levels.
func ExampleEvaluate() {
	file := `location,parent,lead_time,demand,holding_cost,shortage_cost,base_stock
central-stores,,5,,0.20,,28
harrow-lane,central-stores,1,poisson:mean=3.2,0.32,18,9
`
	n, err := network.Read(strings.NewReader(file), "network.csv", network.Echelon, tabular.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	res, err := network.Evaluate(n)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, l := range res.Locations {
		fmt.Printf("%-14s level %2d (echelon %2d): fill rate %.4f, on hand %.3f, backorders %.3f\n",
			l.Location, l.InstallationLevel, l.EchelonLevel, l.FillRate, l.MeanOnHand, l.MeanBackorders)
	}
	fmt.Printf("total cost %.4f per period, exact %v\n", res.TotalCost, res.Exact)
	plan, err := network.Optimize(n)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("cheapest echelon levels: centre %d, store %d; total cost %.4f\n",
		plan.Network.Centre.BaseStock, plan.Network.Stores[0].BaseStock, plan.Result.TotalCost)
	// Output:
	// central-stores level 19 (echelon 28): fill rate 0.8527, on hand 3.555, backorders 0.555
	// harrow-lane    level  9 (echelon  9): fill rate 0.8730, on hand 2.507, backorders 0.462
	// total cost 9.8284 per period, exact true
	// cheapest echelon levels: centre 34, store 13; total cost 3.6008
}

// The two-store demo network: the cheapest levels meeting each store's
// fill-rate floor, an approximation; and the same network planned one
// location at a time.
func ExampleOptimize() {
	file := `location,parent,lead_time,demand,holding_cost,shortage_cost,base_stock,min_fill_rate
central-stores,,5,,0.20,,,
harrow-lane,central-stores,1,poisson:mean=3.2,0.32,18,,0.97
millbeck,central-stores,2,poisson:mean=2.1,0.32,18,,0.97
`
	n, err := network.Read(strings.NewReader(file), "network.csv", network.Echelon, tabular.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	plan, err := network.Optimize(n)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, l := range plan.Result.Locations {
		fmt.Printf("%-14s level %2d: fill rate %.4f\n", l.Location, l.InstallationLevel, l.FillRate)
	}
	fmt.Printf("total cost %.4f, exact %v\n", plan.Result.TotalCost, plan.Result.Exact)
	alone, err := network.Alone(n)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("each location alone: total cost %.4f\n", alone.Result.TotalCost)
	// Output:
	// central-stores level 30: fill rate 0.8638
	// harrow-lane    level 14: fill rate 0.9929
	// millbeck       level 13: fill rate 0.9906
	// total cost 6.0104, exact false
	// each location alone: total cost 6.9899
}

// A seeded simulation of a serial network beside its exact figures.
func ExampleSimulate() {
	file := `location,parent,lead_time,demand,holding_cost,shortage_cost,base_stock
central-stores,,5,,0.20,,28
harrow-lane,central-stores,1,poisson:mean=3.2,0.32,18,9
`
	n, err := network.Read(strings.NewReader(file), "network.csv", network.Echelon, tabular.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	exact, err := network.Evaluate(n)
	if err != nil {
		fmt.Println(err)
		return
	}
	sim, err := network.Simulate(n, network.SimOptions{Periods: 20000, Warmup: 1000, Replications: 10, Seed: 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	for i, l := range sim.Locations {
		fmt.Printf("%-14s fill rate %.3f +- %.3f (exact %.3f)\n", l.Location, l.FillRate.Mean, l.FillRate.CI95, exact.Locations[i].FillRate)
	}
	// Output:
	// central-stores fill rate 0.851 +- 0.003 (exact 0.853)
	// harrow-lane    fill rate 0.871 +- 0.003 (exact 0.873)
}
