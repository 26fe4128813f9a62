package batch

import (
	"bufio"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// FuzzReadItems reads arbitrary bytes as an items file and checks that
// nothing panics, that every error is one line naming the file and a line,
// and that the items keep their positions. Run it with
//
//	go test -run '^$' -fuzz '^FuzzReadItems$' -fuzztime 20s ./policies/batch/
func FuzzReadItems(f *testing.F) {
	if fh, err := os.Open(filepath.Join("..", "..", "data", "items.csv")); err == nil {
		var b strings.Builder
		sc := bufio.NewScanner(fh)
		for i := 0; i < 25 && sc.Scan(); i++ {
			b.WriteString(sc.Text() + "\n")
		}
		fh.Close()
		f.Add(b.String())
		f.Add(b.String()[:len(b.String())/2])
	}
	const head = "sku,lead_time,holding_cost,shortage_cost,order_cost,unit_cost,unmet,policy,min_fill_rate,demand,current_reorder_point,current_order_up_to,current_order_multiple\n"
	for _, s := range []string{
		head + "WIPE-CAB-100,2,0.0218,6.87,62.43,4.54,lost,,,,38,88,\n,1,1,2,,,,,,,,,\n",
		head + "\"A\nB\",1,1,2,,,,,,,,,\n\"C\r\nD\",1,1,2,,,,,,,,,\nE,1,1,2,,,,,,\"poisson:mean=3\n\",,,\n",
		head + "A,1e20,1e308,1e400,0x10,1_000,LOST,S-NQ,nan,poisson:mean=9_000,9223372036854775807,,1e3\n",
		head + "A,9223372036854775807,inf,-0,+1,.5,Backorder,base-stock,0.999999,negbin:mean=1,var=1e18,-1,2000000000,\n",
		"\ufeffSKU , Lead_Time,Holding_Cost,Shortage_Cost\r\nA,1,1,2\r\nA,1,1,2\r\n",
		"sku;lead_time;holding_cost;shortage_cost\nA;1;1;2\n", "sku\tlead_time\tholding_cost\tshortage_cost\n",
		"sku|lead_time|holding_cost|shortage_cost\n", "sku,lead_time,holding_cost,shortage_cost,SKU\n",
		"sku,lead_time,holding_cost,shortage_cost\nA,1,2,3\n\"B,1,2,3\n", "sku,lead_time,holding_cost,shortage_cost\nA,1,2\"x,3\n",
		"sku,lead_time,holding_cost,shortage_cost\nA,1\n\nB,1,2,3,4\n", "", "\n", "sku\n",
		"\ufeffSKU;Lead Time Days;Holding Cost;Shortage Cost;Min Fill Rate;Location\r\nA;14;€0,25;12,50 EUR;98,5 %;north\r\nA;3;$1;2;95%;north\r\n",
		"Title\nsku|lead_time|holding_cost|shortage_cost|Order Csot\nA|1|1.200,5|3|4\n",
		"sku;lead_time;holding_cost;shortage_cost\nA;1;0,5;3\nB;1;1.200;3\n;1;€2;$3\n",
		"sku,lead_time,holding_cost,shortage_cost,lead_time_model,review_period\nA,\"pmf:1=0.5,3=0.5\",1,2,independent,7\nB,\"pmf:2=0.2,3=0.5,5=0.3\",1,2,,\nC,poisson:mean=1e6,1,2,crossing,\nD,pmf:4=1,1,2,,\n",
		"sku;lead_time;holding_cost;shortage_cost\nA;pmf:1=0.25,2=0.75;0,5;3\nB;negbin:mean=4,var=NaN;1;2\n",
	} {
		f.Add(s)
	}
	lineRef := regexp.MustCompile(`^items\.csv:\d+:`)
	f.Fuzz(func(t *testing.T, data string) {
		items, err := ReadItems(strings.NewReader(data), "items.csv", nil)
		oneLine := func(msg string) {
			if strings.ContainsAny(msg, "\r\n") || !lineRef.MatchString(msg) {
				t.Fatalf("error is not one line naming items.csv and a line: %q", msg)
			}
		}
		if err != nil {
			oneLine(err.Error())
			return
		}
		line := 1
		for i, it := range items {
			if it.Index != i || it.Line <= line || it.File != "items.csv" {
				t.Fatalf("item %d: index %d, line %d after line %d", i, it.Index, it.Line, line)
			}
			line = it.Line
			if it.Err != nil {
				oneLine(it.Err.Error())
				continue
			}
			if it.SKU == "" || strings.ContainsAny(it.SKU, "\r\n") {
				t.Fatalf("item %d: SKU %q accepted", i, it.SKU)
			}
			sys := it.System
			if sys.Demand == nil {
				sys.Demand = placeholderDemand{}
			}
			if err := sys.Validate(); err != nil {
				t.Fatalf("item %d accepted with an invalid system: %v", i, err)
			}
			if !(it.MinFillRate >= 0 && it.MinFillRate < 1) {
				t.Fatalf("item %d: min fill rate %v", i, it.MinFillRate)
			}
		}
		// A shard sees the same items at the same positions.
		half, err := ReadItems(strings.NewReader(data), "items.csv", func(i int) bool { return i%2 == 1 })
		if err != nil {
			t.Fatalf("second read failed: %v", err)
		}
		for _, it := range half {
			if it.Index >= len(items) || items[it.Index].Line != it.Line || errorText(items[it.Index].Err) != errorText(it.Err) {
				t.Fatalf("shard item %d differs", it.Index)
			}
		}
	})
}

func errorText(err error) string {
	if err == nil {
		return ""
	}
	return err.Error()
}
