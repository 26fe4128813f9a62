package policies_test

import (
	"fmt"

	"ergostock/inventory"
	"ergostock/policies"
)

// The brake-pad store of Brackwater Valley Tramways (an invented operator)
// sees Poisson demand of 4 sets a week, waits 2 weeks for a delivery and
// reviews weekly: reorder point 10, order-up-to level 24, backorders.
func ExampleEvaluate() {
	d, err := inventory.NewPoisson(4)
	if err != nil {
		fmt.Println(err)
		return
	}
	sys := inventory.System{Demand: d, LeadTime: 2, Holding: 0.5, Shortage: 12, OrderCost: 40, Mode: inventory.Backorder}
	e, err := policies.Evaluate(sys, policies.Policy{Kind: policies.SS, ReorderPoint: 10, OrderUpTo: 24}, policies.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, f := range e.Figures.Fields() {
		fmt.Printf("%-21s %8.4f %s\n", f.Label, f.Value, f.Unit)
	}
	fmt.Printf("%d states, solved by %s, balance below 1e-15: %v\n", e.States, e.Diagnostics.Method, e.Diagnostics.Balance < 1e-15)
	// Output:
	// fill rate               0.9167 fraction of demand
	// stockout probability    0.1194 per period
	// mean on hand            6.7600 units
	// mean backorders         0.3642 units
	// mean lost sales         0.0000 units/period
	// order frequency         0.2500 orders/period
	// mean order quantity    16.0002 units/order
	// holding cost            3.3800 cost/period
	// shortage cost           4.3709 cost/period
	// ordering cost           9.9999 cost/period
	// purchase cost           0.0000 cost/period
	// total cost             17.7508 cost/period
	// 14 states, solved by forward, balance below 1e-15: true
}
