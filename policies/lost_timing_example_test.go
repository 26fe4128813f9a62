package policies_test

import (
	"fmt"

	"ergostock/inventory"
	"ergostock/policies"
)

// The tram depot's store of door-seal kits (invented data) sees Poisson
// demand of 0.6 kits a day; a lost sale is a kit taken from another depot.
// It is reviewed every 7 days, and the supplier takes 2 to 4 days, orders
// arriving in the order placed: an s-S policy with reorder point 4 and
// order-up-to level 9, evaluated exactly on the chain at reviews, figures
// per day.
func ExampleEvaluate_lostSalesWeeklyReview() {
	d, err := inventory.NewPoisson(0.6)
	if err != nil {
		fmt.Println(err)
		return
	}
	law, err := inventory.Parse("pmf:2=0.3,3=0.5,4=0.2")
	if err != nil {
		fmt.Println(err)
		return
	}
	sys := inventory.System{Demand: d, LeadTimeLaw: law, ReviewPeriod: 7,
		Holding: 0.2, Shortage: 15, OrderCost: 30, Mode: inventory.Lost}
	e, err := policies.Evaluate(sys, policies.Policy{Kind: policies.SS, ReorderPoint: 4, OrderUpTo: 9}, policies.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	f := e.Figures
	fmt.Printf("fill rate %.4f, stockout probability %.4f per day\n", f.FillRate, f.StockoutProbability)
	fmt.Printf("on hand %.4f, lost %.4f a day; %.4f orders a day (%.4f a review)\n", f.MeanOnHand, f.MeanLostSales, f.OrderFrequency, 7*f.OrderFrequency)
	fmt.Printf("total cost %.4f a day, %.4f a week\n", f.TotalCost, 7*f.TotalCost)
	fmt.Printf("%d states at reviews\n", e.States)
	// Output:
	// fill rate 0.8907, stockout probability 0.0502 per day
	// on hand 4.1290, lost 0.0656 a day; 0.0781 orders a day (0.5466 a review)
	// total cost 4.1522 a day, 29.0657 a week
	// 10 states at reviews
}
