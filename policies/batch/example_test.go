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

// Writing results for a spreadsheet in a decimal-comma locale: semicolons
// between cells, decimal commas in the figures, three significant digits.
// The header record says decimal=comma and digits=3, so readers need not
// guess; text cells such as the demand model keep their points.
func ExampleNewFormatWriter() {
	var b strings.Builder
	w, err := batch.NewFormatWriter(&b, batch.Format{Delimiter: ';', Decimal: ',', Digits: 3})
	if err != nil {
		fmt.Println(err)
		return
	}
	m := batch.Meta{Format: batch.MetaFormat, Period: "week", Items: "0123456789abcdef", History: "none", Shard: batch.Shard{K: 0, N: 1}, Version: "demo"}
	m.Run = m.RunDigest()
	w.WriteMeta(m)
	w.WriteHeader()
	w.Write(&batch.Row{Item: 0, SKU: "PANTO-STRIP-2", Demand: "poisson:mean=2.5", DemandMean: 2.5, DemandVariance: 2.5})
	w.Flush()
	lines := strings.Split(strings.TrimPrefix(b.String(), "\ufeff"), "\n")
	fmt.Println(lines[0][strings.Index(lines[0], "costs="):])
	fmt.Println(strings.Join(strings.Split(lines[1], ";")[:4], ";"))
	fmt.Println(strings.Join(strings.Split(lines[2], ";")[:4], ";"))
	_, err = batch.NewFormatWriter(&b, batch.Format{Delimiter: ',', Decimal: ','})
	fmt.Println(err)
	// Output:
	// costs=per week; decimal=comma; digits=3
	// sku;demand;demand_mean;demand_variance
	// PANTO-STRIP-2;poisson:mean=2.5;2,5;2,5
	// --out-delimiter , with --out-decimal ,: a comma cannot be both; use --out-delimiter ';' (or tab) for decimal commas
}

// Merging the parts of a run split in two shards: the parts are checked
// (one run digest, shards 0/2 and 1/2, positions 0..n-1 once each) and the
// rows come back in item order under one header record.
func ExampleMerge() {
	part := func(sh batch.Shard) string {
		var b strings.Builder
		w := batch.NewWriter(&b)
		m := batch.Meta{Format: batch.MetaFormat, Period: "month", Items: "0123456789abcdef", History: "none", Shard: sh, Version: "demo", ItemCount: 3}
		m.Run = m.RunDigest()
		w.WriteMeta(m)
		w.WriteHeader()
		for i, sku := range []string{"AXLE-BOX-1", "BOGIE-PIN-2", "COIL-SPRING-3"} {
			if sh.Contains(i) {
				w.Write(&batch.Row{Item: i, SKU: sku, Err: fmt.Errorf("not planned in this example")})
			}
		}
		w.Flush()
		return b.String()
	}
	var out strings.Builder
	sum, err := batch.Merge(&out, []batch.Part{
		{Name: "part-1.csv", R: strings.NewReader(part(batch.Shard{K: 1, N: 2}))},
		{Name: "part-0.csv", R: strings.NewReader(part(batch.Shard{K: 0, N: 2}))},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(sum.Items, "items, shard", sum.Meta.Shard)
	for _, l := range strings.Split(strings.TrimSpace(out.String()), "\n")[2:] {
		fmt.Println(strings.SplitN(l, ",", 2)[0])
	}
	_, err = batch.Merge(&out, []batch.Part{{Name: "part-0.csv", R: strings.NewReader(part(batch.Shard{K: 0, N: 2}))}})
	fmt.Println(err)
	// Output:
	// 3 items, shard 0/1
	// AXLE-BOX-1
	// BOGIE-PIN-2
	// COIL-SPRING-3
	// shard 1/2 is missing: the 1 parts given are 0/2 (part-0.csv); want all 2
}
