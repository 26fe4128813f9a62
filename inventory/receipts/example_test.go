package receipts_test

import (
	"fmt"
	"strings"

	"ergostock/inventory/history"
	"ergostock/inventory/receipts"
)

// Receipts of two parts from one invented supplier, planned in ISO weeks:
// the door rollers have six orders of their own, the horn only two, so its
// law pools the supplier's orders.
func Example() {
	const file = `sku;supplier;order_date;receipt_date;quantity
DOOR-ROLLER-T3;Kelbrook Castings;03.03.2025;12.03.2025;20
DOOR-ROLLER-T3;Kelbrook Castings;17.03.2025;26.03.2025;20
DOOR-ROLLER-T3;Kelbrook Castings;31.03.2025;16.04.2025;20
DOOR-ROLLER-T3;Kelbrook Castings;14.04.2025;23.04.2025;20
DOOR-ROLLER-T3;Kelbrook Castings;28.04.2025;07.05.2025;12
DOOR-ROLLER-T3;Kelbrook Castings;28.04.2025;14.05.2025;8
DOOR-ROLLER-T3;Kelbrook Castings;12.05.2025;21.05.2025;20
HORN-ASSY-T3;Kelbrook Castings;03.03.2025;19.03.2025;2
HORN-ASSY-T3;Kelbrook Castings;07.04.2025;16.04.2025;1
`
	f, err := receipts.Read(strings.NewReader(file), "receipts.csv", receipts.Options{Period: history.Week})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, l := range f.Laws() {
		fmt.Printf("%s: %s from %d orders (%s)\n", l.SKU, l.Admissible, l.Basis, l.Source)
		for _, w := range l.Warnings {
			fmt.Println("  warning:", w)
		}
	}
	// Output:
	// DOOR-ROLLER-T3: pmf:1=0.6666666666666666,2=0.3333333333333333 from 6 orders (own)
	//   warning: 1 of 6 orders delivered in parts: each counted once, at its last receipt
	// HORN-ASSY-T3: pmf:1=0.625,2=0.375 from 8 orders (supplier)
	//   warning: only 2 orders of its own (fewer than 5): the law pools supplier "Kelbrook Castings", 8 orders over 2 SKUs
}
