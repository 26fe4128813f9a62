package batch

import (
	"strings"
	"testing"

	"ergostock/inventory"
)

// The lead_time column takes a law in the demand grammar as --lead-time
// does (inventory.ParseLeadTime), quoted where it holds commas; a
// one-point law is the fixed lead time; the lead_time_model column picks
// the model. Errors are one line naming the file, line and column.
func TestItemsLeadTimeLaw(t *testing.T) {
	text := "sku,lead_time,holding_cost,shortage_cost,demand,lead_time_model\n" +
		"A,\"pmf:2=0.2,3=0.5,4=0.3\",1,9,poisson:mean=3,\n" +
		"B,pmf:4=1,1,9,poisson:mean=3,\n" +
		"C,poisson:mean=2,1,9,poisson:mean=3,independent\n" +
		"D,\"pmf:1=0.5,3=0.5\",1,9,poisson:mean=3,\n" +
		"E,\"pmf:1=0.5,3=0.5\",1,9,poisson:mean=3,Independent\n" +
		"F,pmf:2=oops,1,9,poisson:mean=3,\n" +
		"G,2,1,9,poisson:mean=3,crossing\n" +
		"H,weekly,1,9,poisson:mean=3,\n" +
		"I,3,1,9,poisson:mean=3,sequential\n"
	items, err := ReadItems(strings.NewReader(text), "items.csv", nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		sku   string
		fixed int
		law   string // the law's text, "" for a fixed lead time
		model inventory.LeadTimeModel
		want  string // prefix of the error text, "" for none
	}{
		{"A", 0, "pmf:2=0.2,3=0.5,4=0.3", inventory.Sequential, ""},
		{"B", 4, "", inventory.Sequential, ""},
		{"C", 0, "poisson:mean=2", inventory.Independent, ""},
		{"D", 0, "", "", `items.csv:5: lead_time "pmf:1=0.5,3=0.5": want a law that sequential deliveries (Kaplan 1970) can realise`},
		{"E", 0, "pmf:1=0.5,3=0.5", inventory.Independent, ""},
		{"F", 0, "", "", `items.csv:7: lead_time "pmf:2=oops": want a lead-time law in the demand grammar`},
		{"G", 0, "", "", `items.csv:8: lead_time_model "crossing": want sequential or independent`},
		{"H", 0, "", "", `items.csv:9: lead_time "weekly": want a whole number of periods >= 0`},
		{"I", 3, "", inventory.Sequential, ""},
	} {
		it := findItem(t, items, c.sku)
		if c.want != "" {
			if it.Err == nil || !strings.HasPrefix(it.Err.Error(), c.want) || strings.Contains(it.Err.Error(), "\n") {
				t.Errorf("%s: error %v, want one line starting %q", c.sku, it.Err, c.want)
			}
			continue
		}
		if it.Err != nil {
			t.Errorf("%s: %v", c.sku, it.Err)
			continue
		}
		law := ""
		if it.System.LeadTimeLaw != nil {
			law = it.System.LeadTimeLaw.String()
		}
		if law != c.law || (law == "" && it.System.LeadTime != c.fixed) || it.System.Model() != c.model {
			t.Errorf("%s: lead time %d law %q model %s, want %d %q %s", c.sku, it.System.LeadTime, law, it.System.Model(), c.fixed, c.law, c.model)
		}
	}
	// The refusal of a law the model cannot realise names the nearest law
	// it admits and the column that would admit crossing.
	d := findItem(t, items, "D")
	if msg := d.Err.Error(); !strings.Contains(msg, "the nearest law it admits") || !strings.Contains(msg, "or lead_time_model independent") {
		t.Errorf("D: %s", msg)
	}
}

// In a ;-delimited file with decimal commas the law keeps the grammar's
// decimal point (it needs no quotes there), the whole-number lead times
// and the costs keep the file's decimal comma, and a law's cells do not
// sway the decision of the decimal mark.
func TestItemsLeadTimeLawSemicolon(t *testing.T) {
	text := "sku;lead_time;holding_cost;shortage_cost;demand\n" +
		"A;pmf:1=0.25,2=0.75;1,5;9;poisson:mean=3\n" +
		"B;\"pmf:2=0.2,3=0.8\";0,5;9;poisson:mean=3\n" +
		"C;2,0;2,25;9;poisson:mean=3\n"
	cat, err := ReadCatalogue(strings.NewReader(text), "items.csv", nil, ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	a, b, c := findItem(t, cat.Items, "A"), findItem(t, cat.Items, "B"), findItem(t, cat.Items, "C")
	for _, it := range []*Item{a, b, c} {
		if it.Err != nil {
			t.Fatalf("%s: %v", it.SKU, it.Err)
		}
	}
	if a.System.LeadTimeLaw == nil || a.System.LeadTimeLaw.String() != "pmf:1=0.25,2=0.75" || a.System.Holding != 1.5 {
		t.Errorf("A: law %v holding %g", a.System.LeadTimeLaw, a.System.Holding)
	}
	if b.System.LeadTimeLaw == nil || b.System.LeadTimeLaw.String() != "pmf:2=0.2,3=0.8" || b.System.Holding != 0.5 {
		t.Errorf("B: law %v holding %g", b.System.LeadTimeLaw, b.System.Holding)
	}
	if c.System.LeadTimeLaw != nil || c.System.LeadTime != 2 || c.System.Holding != 2.25 {
		t.Errorf("C: lead time %d law %v holding %g", c.System.LeadTime, c.System.LeadTimeLaw, c.System.Holding)
	}
	if !strings.Contains(cat.Dialect, "decimal comma") {
		t.Errorf("dialect %q, want a decimal comma", cat.Dialect)
	}
}

// ReadOptions.ReviewPeriod and LeadTimeModel (batch --review-period,
// --lead-time-model) are the defaults of rows whose cells are empty or
// absent; a cell overrides them.
func TestItemsTimingDefaults(t *testing.T) {
	text := "sku,lead_time,holding_cost,shortage_cost,demand,review_period,lead_time_model\n" +
		"A,2,1,9,poisson:mean=3,,\n" +
		"B,2,1,9,poisson:mean=3,3,sequential\n"
	cat, err := ReadCatalogue(strings.NewReader(text), "items.csv", nil,
		ReadOptions{ReviewPeriod: 7, LeadTimeModel: inventory.Independent})
	if err != nil {
		t.Fatal(err)
	}
	a, b := findItem(t, cat.Items, "A"), findItem(t, cat.Items, "B")
	if a.Err != nil || a.System.Review() != 7 || a.System.Model() != inventory.Independent {
		t.Errorf("A: %v review %d model %s, want 7 independent", a.Err, a.System.Review(), a.System.Model())
	}
	if b.Err != nil || b.System.Review() != 3 || b.System.Model() != inventory.Sequential {
		t.Errorf("B: %v review %d model %s, want 3 sequential", b.Err, b.System.Review(), b.System.Model())
	}
}

// An independent law on a policy type the engine cannot evaluate exactly
// fails that item alone, with the engine's one-line reason; base-stock
// under the same law is planned.
func TestPlanIndependentLaw(t *testing.T) {
	text := "sku,lead_time,holding_cost,shortage_cost,order_cost,demand,lead_time_model,policy\n" +
		"A,\"pmf:1=0.5,3=0.5\",1,9,20,poisson:mean=3,independent,\n" +
		"B,\"pmf:1=0.5,3=0.5\",1,9,0,poisson:mean=3,independent,base-stock\n" +
		"C,2,1,9,20,poisson:mean=3,,\n"
	items, err := ReadItems(strings.NewReader(text), "items.csv", nil)
	if err != nil {
		t.Fatal(err)
	}
	var p Planner
	a := p.Plan(*findItem(t, items, "A"))
	if a.Err == nil || strings.Contains(a.Err.Error(), "\n") || !strings.Contains(a.Err.Error(), "independent lead times") {
		t.Errorf("A: error %v, want the engine's one-line refusal", a.Err)
	}
	for _, sku := range []string{"B", "C"} {
		if r := p.Plan(*findItem(t, items, sku)); r.Err != nil {
			t.Errorf("%s: %v", sku, r.Err)
		}
	}
}

func findItem(t *testing.T, items []Item, sku string) *Item {
	t.Helper()
	for i := range items {
		if items[i].SKU == sku {
			return &items[i]
		}
	}
	t.Fatalf("no item %s", sku)
	return nil
}

// The timing defaults of a run are recorded in the header record only
// when set, read back, and change the run digest; a plain record is as it
// was.
func TestMetaTiming(t *testing.T) {
	plain := Meta{Format: MetaFormat, Period: "day", Items: "0123456789abcdef", History: "none", Shard: Shard{K: 0, N: 1}, Version: "t"}
	plain.Run = plain.RunDigest()
	timed := plain
	timed.ReviewPeriod, timed.LeadTimeModel = 7, "independent"
	timed.Run = timed.RunDigest()
	if strings.Contains(plain.String(), "review_period") || strings.Contains(plain.String(), "lead_time_model") {
		t.Errorf("plain record %q names timing keys", plain.String())
	}
	if !strings.Contains(timed.String(), "; review_period=7; lead_time_model=independent;") {
		t.Errorf("record %q lacks the timing keys", timed.String())
	}
	if timed.Run == plain.Run {
		t.Error("the timing defaults leave the run digest unchanged")
	}
	weekly := plain
	weekly.ReviewPeriod = 7
	if weekly.RunDigest() == plain.Run || weekly.RunDigest() == timed.Run {
		t.Error("review_period alone does not make its own run digest")
	}
	back, err := ParseMeta(timed.String(), "r.csv", 1)
	if err != nil {
		t.Fatal(err)
	}
	if back.ReviewPeriod != 7 || back.LeadTimeModel != "independent" || back.RunDigest() != timed.Run {
		t.Errorf("read back %+v", back)
	}
}

// A policy in use that the engine does not evaluate exactly under crossing
// orders (s-S) leaves the exact base-stock recommendation standing, with a
// warning and empty current figures.
func TestPlanIndependentCurrent(t *testing.T) {
	text := "sku,lead_time,holding_cost,shortage_cost,demand,lead_time_model,policy,current_reorder_point,current_order_up_to\n" +
		"A,\"pmf:1=0.5,3=0.5\",1,9,poisson:mean=3,independent,base-stock,5,20\n"
	items, err := ReadItems(strings.NewReader(text), "items.csv", nil)
	if err != nil {
		t.Fatal(err)
	}
	var p Planner
	r := p.Plan(items[0])
	if r.Err != nil || r.Policy == nil || r.CurrentTotalCost != nil || len(r.Warnings) != 1 ||
		!strings.HasPrefix(r.Warnings[0], "current policy s-S(s=5,S=20) not evaluated") || strings.Contains(r.Warnings[0], "\n") {
		t.Errorf("row: err %v policy %v current cost %v warnings %q", r.Err, r.Policy, r.CurrentTotalCost, r.Warnings)
	}
}
