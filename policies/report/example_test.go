package report_test

import (
	"fmt"
	"strings"

	"ergostock/policies/report"
)

// Reading the results file of `ergostock batch`: columns are found by name,
// a failed item has no policy, and a file of another kind is refused with a
// one-line error naming the file and the missing columns.
func ExampleReadResults() {
	const results = `sku,demand,demand_mean,demand_variance,pattern,policy,reorder_point,order_up_to,order_multiple,fill_rate,stockout_probability,mean_on_hand,mean_backorders,mean_lost_sales,order_frequency,mean_order_quantity,holding_cost,shortage_cost,ordering_cost,purchase_cost,total_cost,current_total_cost,saving,warnings,error
BRAKE-PAD-07,poisson:mean=6,6,6,smooth,s-S,12,38,,0.985,0.033,15.0,0.088,0,0.207,29.0,6.0,0.79,5.17,108,119.96,125.37,5.41,,
COUPLER-PIN-3,,,,,,,,,,,,,,,,,,,,,,,,"items.csv:7: holding_cost ""-1"": want a finite cost >= 0"
`
	rows, err := report.ReadResults(strings.NewReader(results), "results.csv")
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, r := range rows {
		if r.Policy == nil {
			fmt.Printf("%s failed: %s\n", r.SKU, r.Err)
			continue
		}
		fmt.Printf("%s %v fill rate %.3f saving %.2f\n", r.SKU, *r.Policy, r.Figures.FillRate, *r.Saving)
	}
	_, err = report.ReadResults(strings.NewReader("date,sku,quantity\n2026-01-05,BRAKE-PAD-07,4\n"), "history.csv")
	fmt.Println(err)
	// Output:
	// BRAKE-PAD-07 s-S(s=12,S=38) fill rate 0.985 saving 5.41
	// COUPLER-PIN-3 failed: items.csv:7: holding_cost "-1": want a finite cost >= 0
	// history.csv:1: missing columns demand, demand_mean, demand_variance and 21 more: not a results file of ergostock batch (want its header: sku, demand, ..., error)
}
