package batch

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"ergostock/inventory"
	"ergostock/inventory/history"
	"ergostock/policies"
)

// pointMass is a test stand-in for a demand distribution: D = n surely.
type pointMass int

func (d pointMass) PMF(k int) float64 {
	if k == int(d) {
		return 1
	}
	return 0
}
func (d pointMass) CDF(k int) float64 {
	if k >= int(d) {
		return 1
	}
	return 0
}
func (d pointMass) Tail(k int) float64 {
	if k <= int(d) {
		return 1
	}
	return 0
}
func (d pointMass) Mean() float64     { return float64(d) }
func (d pointMass) Variance() float64 { return 0 }
func (d pointMass) Bound(float64) int { return int(d) }
func (d pointMass) String() string    { return fmt.Sprintf("pmf:%d=1", int(d)) }

// With demand fixed at d per period and lead time L, a base-stock level of
// S = d(L+1) meets every demand with no stock left at the end of a period
// (common practice: deterministic demand needs no safety stock). The fake
// optimiser and evaluator below use that closed form, so that the runner
// can be tested without the engine.
func fakeOptimize(sys inventory.System, kind policies.Kind, opt policies.SearchOptions) (*policies.Optimum, error) {
	d := int(sys.Demand.Mean())
	if d == 13 {
		return nil, errors.New("unlucky demand")
	}
	if d == 17 {
		panic("bug in the engine")
	}
	p := policies.Policy{Kind: kind, OrderUpTo: d * (sys.LeadTime + 1)}
	switch kind {
	case policies.SS:
		p.ReorderPoint = p.OrderUpTo - 1
	case policies.SNQ:
		p.ReorderPoint, p.OrderMultiple, p.OrderUpTo = p.OrderUpTo-1, d, 0
	}
	ev, _ := fakeEvaluate(sys, p, opt.Eval)
	return &policies.Optimum{Evaluation: *ev, Search: policies.Search{Evaluated: 7}}, nil
}

func fakeEvaluate(sys inventory.System, p policies.Policy, opt policies.Options) (*policies.Evaluation, error) {
	d := sys.Demand.Mean()
	_, top := p.Levels()
	onHand := math.Max(0, float64(top)-d*float64(sys.LeadTime+1))
	f := inventory.Figures{FillRate: 1, MeanOnHand: onHand, OrderFrequency: 1, MeanOrderQuantity: d,
		HoldingCost: sys.Holding * onHand, OrderingCost: sys.OrderCost, PurchaseCost: sys.UnitCost * d}
	f.TotalCost = f.HoldingCost + f.OrderingCost + f.PurchaseCost
	return &policies.Evaluation{Policy: p, Figures: f, States: top + 1}, nil
}

// fakeFit looks demand up in a map of SKU -> per-period demand.
func fakeFit(demand map[string]int) func(string) (*Fitted, error) {
	return func(sku string) (*Fitted, error) {
		d, ok := demand[sku]
		if !ok {
			return nil, fmt.Errorf("no history for sku %q in history.csv", sku)
		}
		return &Fitted{Demand: pointMass(d), Pattern: "smooth"}, nil
	}
}

func failInt(i int, err error) int { panic(fmt.Sprintf("item %d failed: %v", i, err)) }

func readItems(t *testing.T, text string) []Item {
	t.Helper()
	items, err := ReadItems(strings.NewReader(text), "items.csv", nil)
	if err != nil {
		t.Fatalf("ReadItems: %v", err)
	}
	return items
}

func errText(err error) string {
	if err == nil {
		return ""
	}
	return err.Error()
}

func TestShard(t *testing.T) {
	for _, tt := range []struct {
		in   string
		want Shard
		err  bool
	}{
		{"0/1", Shard{0, 1}, false}, {"2/3", Shard{2, 3}, false}, {" 1 / 4 ", Shard{1, 4}, false},
		{"3/3", Shard{}, true}, {"-1/3", Shard{}, true}, {"1", Shard{}, true}, {"0/0", Shard{}, true}, {"a/b", Shard{}, true},
	} {
		got, err := ParseShard(tt.in)
		if (err != nil) != tt.err || got != tt.want {
			t.Errorf("ParseShard(%q) = %v, %v", tt.in, got, err)
		}
	}
	// The shards of N partition the positions.
	const n = 3
	for i := range 20 {
		c := 0
		for k := range n {
			if (Shard{k, n}).Contains(i) {
				c++
			}
		}
		if c != 1 {
			t.Errorf("position %d is in %d shards of %d", i, c, n)
		}
	}
}

func TestRunOrder(t *testing.T) {
	const n = 1000
	for _, workers := range []int{1, 2, 7, 64, 2000} {
		var got []int
		err := Run(context.Background(), n, RunOptions{Workers: workers}, func(_ context.Context, i int) int {
			// Uneven work, so that results finish out of order.
			s := 0
			for j := range (i * 7919) % 5000 {
				s += j
			}
			_ = s
			return i * i
		}, failInt, func(i int, v int) error {
			if v != i*i {
				return fmt.Errorf("result %d for index %d", v, i)
			}
			got = append(got, i)
			return nil
		})
		if err != nil {
			t.Fatalf("workers %d: %v", workers, err)
		}
		if len(got) != n {
			t.Fatalf("workers %d: %d results", workers, len(got))
		}
		for i, v := range got {
			if v != i {
				t.Fatalf("workers %d: result %d at position %d", workers, v, i)
			}
		}
	}
	stop := errors.New("disk full")
	calls := 0
	err := Run(context.Background(), 10000, RunOptions{Workers: 4}, func(_ context.Context, i int) int { return i }, failInt, func(i, v int) error {
		calls++
		if i == 10 {
			return stop
		}
		return nil
	})
	if err != stop || calls != 11 {
		t.Errorf("emit error: got %v after %d calls, want %v after 11", err, calls, stop)
	}
}

func TestPlanAndWrite(t *testing.T) {
	items := readItems(t, "sku,lead_time,holding_cost,shortage_cost,order_cost,demand,current_order_up_to,current_reorder_point,policy\n"+
		"BP-1,1,0.5,9,,,10,,\n"+ // base-stock 8 is best; current S=10 holds 2 more
		"CS-2,0,2,9,25,,,,\n"+ // s-S by default
		"DS-3,1,1,9,,pmf:2=1,,,s-nQ\n"+ // demand column, no history needed
		"NO-4,1,1,9,,,,,\n"+ // no history
		"UN-5,1,1,9,,,,,\n"+ // the search fails
		"PA-6,1,1,9,,,,,\n"+ // the search panics
		"BP-1,1,1,9,,,,,\n"+ // duplicate
		"BAD-8,1,-1,9,,,,,\n") // bad cell
	pl := &Planner{
		Fit:      fakeFit(map[string]int{"BP-1": 4, "CS-2": 3, "UN-5": 13, "PA-6": 17, "BAD-8": 1}),
		Optimize: fakeOptimize,
		Evaluate: fakeEvaluate,
	}
	var buf bytes.Buffer
	w := NewWriter(&buf)
	if err := w.WriteHeader(); err != nil {
		t.Fatal(err)
	}
	err := pl.PlanAll(context.Background(), items, RunOptions{Workers: 3}, w.Write)
	if err != nil {
		t.Fatal(err)
	}
	if err := w.Flush(); err != nil {
		t.Fatal(err)
	}
	want := `sku,demand,demand_mean,demand_variance,pattern,policy,reorder_point,order_up_to,order_multiple,lead_time,lead_time_model,review_period,fill_rate,stockout_probability,mean_on_hand,mean_backorders,mean_lost_sales,order_frequency,mean_order_quantity,holding_cost,shortage_cost,ordering_cost,purchase_cost,total_cost,current_total_cost,saving,warnings,error,states,residual,balance,neglected,policies_evaluated,item,current_policy,current_reorder_point,current_order_up_to,current_order_multiple,current_fill_rate
BP-1,pmf:4=1,4,0,smooth,base-stock,,8,,1,sequential,1,1,0,0,0,0,1,4,0,0,0,0,0,1,1,,,9,0,0,0,7,0,base-stock,,10,,1
CS-2,pmf:3=1,3,0,smooth,s-S,2,3,,0,sequential,1,1,0,0,0,0,1,3,0,0,25,0,25,,,,,4,0,0,0,7,1,,,,,
DS-3,pmf:2=1,2,0,,s-nQ,3,,2,1,sequential,1,1,0,1,0,0,1,2,1,0,0,0,1,,,,,6,0,0,0,7,2,,,,,
NO-4,,,,,,,,,1,sequential,1,,,,,,,,,,,,,,,,"no history for sku ""NO-4"" in history.csv",,,,,,3,,,,,
UN-5,pmf:13=1,13,0,smooth,,,,,1,sequential,1,,,,,,,,,,,,,,,,optimize base-stock: unlucky demand,,,,,,4,,,,,
PA-6,pmf:17=1,17,0,smooth,,,,,1,sequential,1,,,,,,,,,,,,,,,,internal error: bug in the engine,,,,,,5,,,,,
BP-1,,,,,,,,,,,,,,,,,,,,,,,,,,,"items.csv:8: sku ""BP-1"": want a SKU given once (it is first given on line 2)",,,,,,6,,,,,
BAD-8,,,,,,,,,,,,,,,,,,,,,,,,,,,"items.csv:9: holding_cost ""-1"": want a finite cost >= 0",,,,,,7,,,,,
`
	if got := buf.String(); got != want {
		t.Errorf("results:\n%s\nwant:\n%s", got, want)
	}
}

func TestPlanFittedDemandInvalid(t *testing.T) {
	items := readItems(t, "sku,lead_time,holding_cost,shortage_cost\nZ,1,1,2\n")
	pl := &Planner{Fit: fakeFit(map[string]int{"Z": 0}), Optimize: fakeOptimize, Evaluate: fakeEvaluate}
	r := pl.Plan(items[0])
	if got, want := errText(r.Err), `fitted demand "pmf:0=1": want a distribution with a positive, finite mean`; got != want {
		t.Errorf("got %s, want %s", got, want)
	}
}

func TestWriteFileAtomic(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "results.csv")
	if err := os.WriteFile(path, []byte("old\n"), 0o640); err != nil {
		t.Fatal(err)
	}
	boom := errors.New("boom")
	err := WriteFileAtomic(path, func(w io.Writer) error {
		io.WriteString(w, "half a file")
		return boom
	})
	if err != boom {
		t.Fatalf("got %v, want %v", err, boom)
	}
	if b, _ := os.ReadFile(path); string(b) != "old\n" {
		t.Errorf("failed write changed the file to %q", b)
	}
	if err := WriteFileAtomic(path, func(w io.Writer) error { _, err := io.WriteString(w, "new\n"); return err }); err != nil {
		t.Fatal(err)
	}
	if b, _ := os.ReadFile(path); string(b) != "new\n" {
		t.Errorf("file holds %q, want %q", b, "new\n")
	}
	if fi, _ := os.Stat(path); fi.Mode().Perm() != 0o640 {
		t.Errorf("mode %v, want the old file's 0640", fi.Mode().Perm())
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 1 {
		t.Errorf("directory holds %d entries, want only results.csv", len(ents))
	}
}

func TestHistoryFitErrors(t *testing.T) {
	const text = "sku,period,quantity\nA,1,3\nA,2,x\nA,3,-1\nZ,1,0\nZ,2,0\nB,1,2\nB,2,5\n"
	h, err := history.Read(strings.NewReader(text), "history.csv", history.Week)
	if err != nil {
		t.Fatal(err)
	}
	fit, pattern := HistoryFit(h, func(sku string) bool { return sku != "B" })
	for _, tt := range []struct{ sku, want string }{
		{"A", `bad history: history.csv:3: quantity "x": want a whole number >= 0 (and 1 more bad rows for this sku)`},
		{"Z", `history.csv: sku "Z": no demand in 2 periods: no model to fit`},
		{"B", `no history for sku "B" in history.csv`}, // not needed: dropped
		{"C", `no history for sku "C" in history.csv`},
	} {
		_, err := fit(tt.sku)
		if got := errText(err); got != tt.want {
			t.Errorf("%s:\n got %s\nwant %s", tt.sku, got, tt.want)
		}
	}
	if p := pattern("A"); p != "" {
		t.Errorf("pattern of a history with bad rows: %q, want none", p)
	}
}
