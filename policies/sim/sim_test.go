package sim

import (
	"errors"
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"ergostock/inventory"
	"ergostock/policies"
)

func mustParse(t testing.TB, spec string) inventory.Distribution {
	t.Helper()
	d, err := inventory.Parse(spec)
	if err != nil {
		t.Fatalf("parse %q: %v", spec, err)
	}
	return d
}

// baseStockBackorder returns the figures of a base-stock policy with level
// S in backorder mode under Poisson(lambda) demand and lead time L, from the
// classical closed forms (E. L. Porteus, Foundations of Stochastic Inventory
// Theory, 2002, chapter 1; P. H. Zipkin, Foundations of Inventory
// Management, 2000, chapter 6; both cited from memory): the position after
// review is always S, so with X the demand over L+1 periods
// (Poisson((L+1) lambda)) the net inventory at the end of a period is S - X,
// the stock before the demand is (S - X_L)^+, and the order of a period
// replaces the previous period's demand. Probabilities come from gonum's
// distuv.Poisson.
func baseStockBackorder(lambda float64, S, L int) inventory.Figures {
	x := distuv.Poisson{Lambda: float64(L+1) * lambda}
	xl := distuv.Poisson{Lambda: float64(L) * lambda}
	d := distuv.Poisson{Lambda: lambda}
	var f inventory.Figures
	for k := 0; k < S; k++ {
		f.MeanOnHand += float64(S-k) * x.Prob(float64(k))
	}
	f.MeanBackorders = x.Mean() - float64(S) + f.MeanOnHand
	f.StockoutProbability = x.Survival(float64(S))
	// E[min(D, (S - X_L)^+)], D independent of X_L.
	var served float64
	for j := 0; j < S; j++ {
		pj := 1.0
		if L > 0 {
			pj = xl.Prob(float64(j))
		}
		stock := S - j
		var m float64 // E[min(D, stock)] = sum_{k=0}^{stock-1} P(D > k)
		for k := 0; k < stock; k++ {
			m += d.Survival(float64(k))
		}
		served += pj * m
		if L == 0 {
			break
		}
	}
	f.FillRate = served / lambda
	f.OrderFrequency = 1 - math.Exp(-lambda)
	f.MeanOrderQuantity = lambda / f.OrderFrequency
	return f
}

func TestBaseStockClosedForm(t *testing.T) {
	// Every figure of a backorder base-stock system against the closed
	// forms, lead times 0 to 3; a 99.9% interval for each figure, so that
	// the 4 x 6 checks all pass with probability about 0.98 under a correct
	// simulator (the seed is fixed, so the test is deterministic).
	const lambda = 4
	for L := 0; L <= 3; L++ {
		S := 4*(L+1) + 3
		sys := inventory.System{Demand: mustParse(t, "poisson:mean=4"), LeadTime: L, Holding: 1, Shortage: 9, Mode: inventory.Backorder}
		p := policies.Policy{Kind: policies.BaseStock, OrderUpTo: S}
		res, err := Run(sys, p, Options{Periods: 40_000, Warmup: 1000, Replications: 10, Seed: 3, Level: 0.999})
		if err != nil {
			t.Fatal(err)
		}
		want := baseStockBackorder(lambda, S, L)
		wf, mf, hf := want.Fields(), res.Mean.Fields(), res.HalfWidth.Fields()
		for _, name := range []string{"fill_rate", "stockout_probability", "mean_on_hand", "mean_backorders", "order_frequency", "mean_order_quantity"} {
			j := fieldIndex(name)
			if d := math.Abs(mf[j].Value - wf[j].Value); !(d <= hf[j].Value) {
				t.Errorf("L=%d S=%d %s: simulated %.5f ± %.5f, closed form %.5f", L, S, name, mf[j].Value, hf[j].Value, wf[j].Value)
			}
		}
		if res.Mean.MeanLostSales != 0 || res.HalfWidth.MeanLostSales != 0 {
			t.Errorf("L=%d: lost sales %v in backorder mode", L, res.Mean.MeanLostSales)
		}
	}
}

func TestLostSalesZeroLeadClosedForm(t *testing.T) {
	// Lost sales, L = 0, base-stock S: the order arrives before demand, so
	// every period starts with S on hand; lost = (D - S)^+, on hand at the
	// end (S - D)^+, and an order is placed after every period with demand
	// (common practice; probabilities from gonum's distuv.Poisson).
	const S = 6
	d := distuv.Poisson{Lambda: 4}
	var onHand, lost float64
	for k := 0; k < 60; k++ {
		pk := d.Prob(float64(k))
		onHand += pk * float64(max(S-k, 0))
		lost += pk * float64(max(k-S, 0))
	}
	want := map[string]float64{
		"fill_rate":            1 - lost/4,
		"stockout_probability": d.Survival(S),
		"mean_on_hand":         onHand,
		"mean_lost_sales":      lost,
		"order_frequency":      1 - d.Prob(0),
	}
	sys := inventory.System{Demand: mustParse(t, "poisson:mean=4"), Holding: 1, Shortage: 9, Mode: inventory.Lost}
	res, err := Run(sys, policies.Policy{Kind: policies.BaseStock, OrderUpTo: S}, Options{Periods: 40_000, Warmup: 1000, Replications: 10, Seed: 5, Level: 0.999})
	if err != nil {
		t.Fatal(err)
	}
	mf, hf := res.Mean.Fields(), res.HalfWidth.Fields()
	for name, w := range want {
		j := fieldIndex(name)
		if d := math.Abs(mf[j].Value - w); !(d <= hf[j].Value) {
			t.Errorf("%s: simulated %.5f ± %.5f, closed form %.5f", name, mf[j].Value, hf[j].Value, w)
		}
	}
	if res.Mean.MeanBackorders != 0 {
		t.Errorf("backorders %v in lost mode", res.Mean.MeanBackorders)
	}
}

func fieldIndex(name string) int {
	for i, f := range (inventory.Figures{}).Fields() {
		if f.Name == name {
			return i
		}
	}
	panic("no figure " + name)
}

func TestCostsFromFigures(t *testing.T) {
	// Costs are the SPEC section 2 combinations of the figures in every
	// replication, hence also in the means (linearity).
	sys := inventory.System{Demand: mustParse(t, "poisson:mean=4"), LeadTime: 1, Holding: 1.5, Shortage: 7, OrderCost: 30, UnitCost: 2, Mode: inventory.Backorder}
	p := policies.Policy{Kind: policies.SS, ReorderPoint: 6, OrderUpTo: 20}
	res, err := Run(sys, p, Options{Periods: 5000, Warmup: 500, Replications: 4, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	for i, f := range res.PerReplication {
		purchase := sys.UnitCost * f.OrderFrequency * f.MeanOrderQuantity
		checks := []struct {
			name      string
			got, want float64
		}{
			{"holding", f.HoldingCost, sys.Holding * f.MeanOnHand},
			{"shortage", f.ShortageCost, sys.Shortage * f.MeanBackorders},
			{"ordering", f.OrderingCost, sys.OrderCost * f.OrderFrequency},
			{"purchase", f.PurchaseCost, purchase},
			{"total", f.TotalCost, f.HoldingCost + f.ShortageCost + f.OrderingCost + f.PurchaseCost},
		}
		for _, c := range checks {
			if math.Abs(c.got-c.want) > 1e-12*math.Max(1, math.Abs(c.want)) {
				t.Errorf("replication %d %s cost %.15g, want %.15g", i, c.name, c.got, c.want)
			}
		}
	}
	// In the long run, units ordered equal units demanded (backorder mode):
	// purchase cost -> c E[D] = 8.
	if d := math.Abs(res.Mean.PurchaseCost - 8); d > res.HalfWidth.PurchaseCost+0.05 {
		t.Errorf("purchase cost %.4f ± %.4f, want about 8", res.Mean.PurchaseCost, res.HalfWidth.PurchaseCost)
	}
}

func TestDeterministicAcrossWorkers(t *testing.T) {
	sys := inventory.System{Demand: mustParse(t, "negbin:mean=4,var=10"), LeadTime: 2, Holding: 1, Shortage: 9, OrderCost: 20, Mode: inventory.Lost}
	p := policies.Policy{Kind: policies.SNQ, ReorderPoint: 9, OrderMultiple: 6}
	var first string
	for _, w := range []int{1, 4, 0, 3} {
		res, err := Run(sys, p, Options{Periods: 3000, Warmup: 300, Replications: 7, Seed: 11, Workers: w})
		if err != nil {
			t.Fatal(err)
		}
		got := fmt.Sprintf("%#v", *res)
		if first == "" {
			first = got
		} else if got != first {
			t.Fatalf("workers=%d gives a different result:\n%s\nwant\n%s", w, got, first)
		}
	}
	// A different seed gives different streams.
	a, _ := Run(sys, p, Options{Periods: 3000, Replications: 2, Seed: 1})
	b, _ := Run(sys, p, Options{Periods: 3000, Replications: 2, Seed: 2})
	if a.Mean == b.Mean {
		t.Error("seeds 1 and 2 gave identical means")
	}
	if a.PerReplication[0] == a.PerReplication[1] {
		t.Error("replications 0 and 1 gave identical figures")
	}
}

func TestOptionErrors(t *testing.T) {
	sys := inventory.System{Demand: mustParse(t, "poisson:mean=4"), Holding: 1, Shortage: 9, Mode: inventory.Backorder}
	p := policies.Policy{Kind: policies.BaseStock, OrderUpTo: 6}
	for _, c := range []struct {
		opt   Options
		field string
	}{
		{Options{Periods: 0, Replications: 5}, "periods"},
		{Options{Periods: 100, Warmup: 100, Replications: 5}, "periods"},
		{Options{Periods: 100, Warmup: -1, Replications: 5}, "warmup"},
		{Options{Periods: 100, Replications: 1}, "replications"},
		{Options{Periods: 100, Replications: 2, Workers: -1}, "workers"},
		{Options{Periods: 100, Replications: 2, Level: 1}, "level"},
	} {
		_, err := Run(sys, p, c.opt)
		var fe *inventory.FieldError
		if !errors.As(err, &fe) || fe.Field != c.field {
			t.Errorf("%+v: error %v, want one naming %s", c.opt, err, c.field)
		}
	}
	if _, err := Run(sys, policies.Policy{Kind: policies.SS, ReorderPoint: 5, OrderUpTo: 5}, Options{Periods: 100, Replications: 2}); err == nil {
		t.Error("s-S with s = S accepted")
	}
	long := sys
	long.LeadTime = inventory.MaxLeadTime // pipelines of 8 GB
	var le *LimitError
	if _, err := Run(long, p, Options{Periods: 100, Replications: 2}); !errors.As(err, &le) || le.Field != "lead_time" {
		t.Errorf("lead time 1e9: error %v, want a LimitError naming lead_time", err)
	}
	if _, err := Run(inventory.System{Holding: 1, Mode: inventory.Backorder}, p, Options{Periods: 100, Replications: 2}); err == nil {
		t.Error("system without demand accepted")
	}
}

func TestStartAtNegativeLevel(t *testing.T) {
	// Backorder mode allows a negative base-stock level: the system starts
	// with backorders and stays short in every period.
	sys := inventory.System{Demand: mustParse(t, "poisson:mean=2"), Holding: 1, Shortage: 9, Mode: inventory.Backorder}
	res, err := Run(sys, policies.Policy{Kind: policies.BaseStock, OrderUpTo: -3}, Options{Periods: 1000, Replications: 2})
	if err != nil {
		t.Fatal(err)
	}
	if res.Mean.StockoutProbability != 1 || res.Mean.FillRate != 0 || res.Mean.MeanOnHand != 0 {
		t.Errorf("S=-3: %+v", res.Mean)
	}
}
