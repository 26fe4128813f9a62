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
