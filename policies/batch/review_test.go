package batch

import (
	"strings"
	"testing"
)

// The optional review_period column: reviews every R periods; empty means
// every period; anything but a whole number >= 1 (within the system's
// limit) is the row's one-line error naming the file, line and column.
func TestItemsReviewPeriod(t *testing.T) {
	text := "sku,lead_time,holding_cost,shortage_cost,demand,review_period,unmet\n" +
		"A,2,1,9,poisson:mean=3,7,\n" +
		"B,2,1,9,poisson:mean=3,,\n" +
		"C,2,1,9,poisson:mean=3,0,\n" +
		"D,2,1,9,poisson:mean=3,2.5,\n" +
		"E,2,1,9,poisson:mean=3,weekly,\n" +
		"F,2,1,9,poisson:mean=3,1000000,\n" +
		"G,1,1,9,poisson:mean=2,3,lost\n"
	items, err := ReadItems(strings.NewReader(text), "items.csv", nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		sku  string
		r    int
		want string // error text wanted, "" for none
	}{
		{"A", 7, ""},
		{"B", 0, ""},
		{"C", 0, `items.csv:4: review_period "0": want a whole number of periods >= 1 between reviews`},
		{"D", 0, `items.csv:5: review_period "2.5": want`},
		{"E", 0, `items.csv:6: review_period "weekly": want`},
		{"F", 0, `items.csv:7: review_period "1000000": want`},
		{"G", 3, ""},
	} {
		var it *Item
		for i := range items {
			if items[i].SKU == c.sku {
				it = &items[i]
			}
		}
		switch {
		case c.want == "" && it.Err != nil:
			t.Errorf("%s: %v", c.sku, it.Err)
		case c.want == "" && it.System.ReviewPeriod != c.r:
			t.Errorf("%s: review period %d, want %d", c.sku, it.System.ReviewPeriod, c.r)
		case c.want != "" && (it.Err == nil || !strings.HasPrefix(it.Err.Error(), c.want) || strings.Contains(it.Err.Error(), "\n")):
			t.Errorf("%s: error %v, want %q...", c.sku, it.Err, c.want)
		}
	}
	// The rows with a review period are planned under it (the lost-sales
	// one by the chain at reviews).
	var p Planner
	for _, sku := range []string{"A", "G"} {
		for _, it := range items {
			if it.SKU != sku {
				continue
			}
			row := p.Plan(it)
			if row.Err != nil {
				t.Fatalf("%s: %v", sku, row.Err)
			}
			if !(row.Figures.FillRate > 0 && row.Figures.FillRate < 1) {
				t.Errorf("%s: fill rate %g", sku, row.Figures.FillRate)
			}
		}
	}
}
