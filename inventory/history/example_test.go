package history_test

import (
	"fmt"
	"strings"

	"ergostock/inventory/history"
)

// A spreadsheet export: ';'-delimited with a title line, headers of its
// own, dates as DD.MM.YYYY, a decimal comma in one quantity (planned in
// tenths) and a return. The invented stores of the demo.
func ExampleReadWith() {
	const export = "Brackwater stores, issues by week\n" +
		"Item No;Posting Date;Qty\n" +
		"BRAKE-PAD-T3;05.01.2026;2\n" +
		"BRAKE-PAD-T3;14.01.2026;1,5\n" +
		"BRAKE-PAD-T3;15.01.2026;-1\n" +
		"BRAKE-PAD-T3;19.01.2026;3\n"
	h, err := history.ReadWith(strings.NewReader(export), "issues.csv", history.Week, history.Options{
		Columns: map[string]string{"sku": "Item No", "date": "Posting Date", "quantity": "Qty"},
		Scale:   10,
		Returns: history.ReturnsNet,
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(h.Dialect)
	k := h.SKUs[0]
	fmt.Println(k.SKU, h.Label(k.Start), k.Demand, history.UnitNote(h.Scale))
	// Output:
	// ';'-delimited, UTF-8, 1 title line(s) skipped, decimal comma (line 4: "1,5"), dates DD.MM.YYYY (found)
	// BRAKE-PAD-T3 2026-W02 [20 5 30] quantities in units of 0.1
}
