package batch_test

import (
	"context"
	"fmt"
	"strings"

	"ergostock/policies/batch"
)

// Reading an items file: good rows become items ready to plan; a bad cell
// or a repeated SKU fails only its own row, with the file and line.
func ExampleReadItems() {
	const items = `sku,lead_time,holding_cost,shortage_cost,order_cost,current_reorder_point,current_order_up_to
BRAKE-PAD-T4,1,0.8,12,,,14
CARBON-STRIP-P2,2,1.5,40,30,1,6
DOOR-SENSOR-L,1,-2,25,,,
BRAKE-PAD-T4,1,0.8,12,,,
`
	list, err := batch.ReadItems(strings.NewReader(items), "items.csv", nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, it := range list {
		if it.Err != nil {
			fmt.Printf("%d %s: %v\n", it.Index, it.SKU, it.Err)
			continue
		}
		fmt.Printf("%d %s: search %s, current %v\n", it.Index, it.SKU, batch.DefaultKind(it.System), *it.Current)
	}
	// Output:
	// 0 BRAKE-PAD-T4: search base-stock, current base-stock(S=14)
	// 1 CARBON-STRIP-P2: search s-S, current s-S(s=1,S=6)
	// 2 DOOR-SENSOR-L: items.csv:4: holding_cost "-2": want a finite cost >= 0
	// 3 BRAKE-PAD-T4: items.csv:5: sku "BRAKE-PAD-T4": want a SKU given once (it is first given on line 2)
}

// Shards 0/3, 1/3 and 2/3 split the items by position, every third.
func ExampleShard() {
	for k := range 3 {
		s := batch.Shard{K: k, N: 3}
		var in []int
		for i := range 8 {
			if s.Contains(i) {
				in = append(in, i)
			}
		}
		fmt.Println(s, in)
	}
	// Output:
	// 0/3 [0 3 6]
	// 1/3 [1 4 7]
	// 2/3 [2 5]
}

// Run hands results to emit in index order whatever the number of workers.
func ExampleRun() {
	var got []int
	batch.Run(context.Background(), 6, batch.RunOptions{Workers: 4},
		func(_ context.Context, i int) int { return i * i },
		func(i int, err error) int { return -1 }, // a panic or a timeout of item i
		func(i, v int) error {
			got = append(got, v)
			return nil
		})
	fmt.Println(got)
	// Output:
	// [0 1 4 9 16 25]
}

// An items sheet saved by a spreadsheet in a decimal-comma locale: headers
// with spaces, costs with a currency sign, a fill-rate floor as a
// percentage, the lead time in days.
func ExampleReadCatalogue() {
	const sheet = "SKU;Lead Time Days;Holding Cost;Shortage Cost;Order Cost;Min Fill Rate\n" +
		"BRAKE-PAD-T3;10;€0,41;€12,00;€35;98,5 %\n"
	c, err := batch.ReadCatalogue(strings.NewReader(sheet), "items.csv", nil,
		batch.ReadOptions{PeriodDays: 7, PeriodName: "week"})
	if err != nil {
		fmt.Println(err)
		return
	}
	it := c.Items[0]
	fmt.Println(c.Dialect)
	fmt.Println(it.SKU, it.System.LeadTime, it.System.Holding, it.System.Shortage, it.System.OrderCost, it.MinFillRate)
	fmt.Println(it.Warnings[0])
	// Output:
	// ';'-delimited, UTF-8, decimal comma (line 2: "0,41"), costs in EUR
	// BRAKE-PAD-T3 2 0.41 12 35 0.985
	// lead_time_days 10 is 1.43 weeks: rounded up to 2 (a whole number of periods)
}
