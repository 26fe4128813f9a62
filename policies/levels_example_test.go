package policies_test

import (
	"fmt"

	"ergostock/inventory"
	"ergostock/policies"
)

// The pantograph carbon strips of Brackwater Valley Tramways (an invented
// operator): Poisson demand of 3 strips a week, one week's lead time,
// base-stock level 10, lost sales. The distribution of the stock left on
// the shelf at the end of a week, with the figures it must reproduce.
func ExampleLevelDistribution() {
	d, err := inventory.NewPoisson(3)
	if err != nil {
		fmt.Println(err)
		return
	}
	sys := inventory.System{Demand: d, LeadTime: 1, Holding: 0.8, Shortage: 30, Mode: inventory.Lost}
	e, err := policies.Evaluate(sys, policies.Policy{Kind: policies.BaseStock, OrderUpTo: 10}, policies.Options{Levels: true})
	if err != nil {
		fmt.Println(err)
		return
	}
	lv := e.Levels
	var mean float64
	for k := lv.Min; k <= lv.Max(); k++ {
		fmt.Printf("P(%s = %2d) = %.4f\n", lv.Of, k, lv.At(k))
		mean += float64(k) * lv.At(k)
	}
	fmt.Printf("mean %.6f, mean on hand %.6f\n", mean, e.Figures.MeanOnHand)
	// Output:
	// P(on hand =  0) = 0.0751
	// P(on hand =  1) = 0.0675
	// P(on hand =  2) = 0.1035
	// P(on hand =  3) = 0.1396
	// P(on hand =  4) = 0.1634
	// P(on hand =  5) = 0.1632
	// P(on hand =  6) = 0.1355
	// P(on hand =  7) = 0.0900
	// P(on hand =  8) = 0.0448
	// P(on hand =  9) = 0.0149
	// P(on hand = 10) = 0.0025
	// mean 4.122920, mean on hand 4.122920
}
