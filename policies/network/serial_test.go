package network

import (
	"math"
	"reflect"
	"testing"

	"ergostock/inventory"
	"ergostock/policies"
)

func mustParse(t testing.TB, spec string) inventory.Distribution {
	t.Helper()
	d, err := inventory.Parse(spec)
	if err != nil {
		t.Fatal(err)
	}
	return d
}

// serial builds a centre feeding one store, echelon levels.
func serial(t testing.TB, demand string, l0, l1 int, h0, h1, b float64, s0, s1 int) *Network {
	return &Network{
		Centre: Location{Name: "depot", LeadTime: l0, Holding: h0, BaseStock: s0, HasLevel: true},
		Stores: []Location{{Name: "shop", Parent: "depot", LeadTime: l1, Demand: mustParse(t, demand),
			Holding: h1, Shortage: b, BaseStock: s1, HasLevel: true}},
	}
}

// With no lead time to the centre, the store is the single-location
// base-stock system with level min(S1, S0) (the decomposition's identity
// Y = min(S1, S0 - X_0)), checked against policies.Evaluate, the project's
// exact single-stage engine, to 1e-12.
func TestSerialNoCentreLeadTimeIsSingleStage(t *testing.T) {
	for _, c := range []struct {
		demand     string
		l1, s0, s1 int
		h0, h1, b  float64
	}{
		{"poisson:mean=4", 2, 20, 15, 0.5, 1, 9},
		{"poisson:mean=4", 0, 12, 15, 0.5, 1, 9},
		{"negbin:mean=6,var=15", 3, 40, 30, 0.2, 1, 19},
		{"pmf:0=0.3,1=0.4,3=0.3", 1, 5, 5, 1, 2, 4},
		{"normal:mean=20,sd=6", 1, 60, 55, 0.1, 1, 30},
		{"gamma:mean=3,sd=4", 4, 10, 25, 0.3, 1, 5},
	} {
		n := serial(t, c.demand, 0, c.l1, c.h0, c.h1, c.b, c.s0, c.s1)
		res, err := Evaluate(n)
		if err != nil {
			t.Fatal(err)
		}
		level := min(c.s0, c.s1)
		sys := inventory.System{Demand: n.Stores[0].Demand, LeadTime: c.l1, Holding: c.h1, Shortage: c.b, Mode: inventory.Backorder}
		ev, err := policies.Evaluate(sys, policies.Policy{Kind: policies.BaseStock, OrderUpTo: level}, policies.Options{})
		if err != nil {
			t.Fatal(err)
		}
		st := res.Locations[1]
		want := ev.Figures
		for _, f := range []struct {
			name      string
			got, want float64
			rate      float64 // costs: the figure times this rate
		}{
			{"fill_rate", st.FillRate, want.FillRate, 1},
			{"stockout_probability", st.StockoutProbability, want.StockoutProbability, 1},
			{"mean_on_hand", st.MeanOnHand, want.MeanOnHand, 1},
			{"mean_backorders", st.MeanBackorders, want.MeanBackorders, 1},
			{"holding_cost", st.HoldingCost, want.HoldingCost, c.h1},
			{"shortage_cost", st.ShortageCost, want.ShortageCost, c.b},
		} {
			if math.Abs(f.got-f.want) > 1e-12*math.Max(1, f.rate) {
				t.Errorf("%s L1=%d S0=%d S1=%d: %s = %.15g, single stage %.15g", c.demand, c.l1, c.s0, c.s1, f.name, f.got, f.want)
			}
		}
		// The centre holds S0 - S1 when that is positive and owes nothing.
		ce := res.Locations[0]
		if ce.MeanOnHand != float64(max(c.s0-c.s1, 0)) || ce.MeanBackorders != float64(max(c.s1-c.s0, 0)) {
			t.Errorf("%s: centre on hand %g backorders %g, want %d and %d", c.demand, ce.MeanOnHand, ce.MeanBackorders, max(c.s0-c.s1, 0), max(c.s1-c.s0, 0))
		}
		if !res.Exact || res.Method != MethodSerial {
			t.Errorf("one store: exact %v method %q", res.Exact, res.Method)
		}
	}
}

// The two readings of the centre's level describe the same policy:
// installation level = echelon level - the sum of the store levels.
func TestEchelonInstallationSame(t *testing.T) {
	e := serial(t, "poisson:mean=4", 2, 1, 0.5, 1, 9, 22, 10)
	i := serial(t, "poisson:mean=4", 2, 1, 0.5, 1, 9, 12, 10)
	i.Levels = Installation
	re, err := Evaluate(e)
	if err != nil {
		t.Fatal(err)
	}
	ri, err := Evaluate(i)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(re, ri) {
		t.Errorf("echelon 22 and installation 12 differ:\n%+v\n%+v", re, ri)
	}
	pe, err := Optimize(e)
	if err != nil {
		t.Fatal(err)
	}
	pi, err := Optimize(i)
	if err != nil {
		t.Fatal(err)
	}
	if pe.Network.Centre.BaseStock-pe.Network.Stores[0].BaseStock != pi.Network.Centre.BaseStock || pe.Result.TotalCost != pi.Result.TotalCost {
		t.Errorf("optimum: echelon %d/%d, installation %d/%d", pe.Network.Centre.BaseStock, pe.Network.Stores[0].BaseStock, pi.Network.Centre.BaseStock, pi.Network.Stores[0].BaseStock)
	}
}

// With no lead time to the centre, the cheapest network is the single
// stage's cheapest base-stock level at the store and nothing at the
// centre, with or without a fill-rate floor (policies.Optimize, the
// project's exact single-stage search, as the reference).
func TestSerialNoCentreLeadTimeOptimum(t *testing.T) {
	for _, c := range []struct {
		demand string
		l1     int
		floor  float64
	}{
		{"poisson:mean=4", 2, 0},
		{"negbin:mean=6,var=15", 3, 0},
		{"poisson:mean=4", 1, 0.995},
		{"pmf:0=0.3,1=0.4,3=0.3", 0, 0.9},
	} {
		n := serial(t, c.demand, 0, c.l1, 0.5, 1, 9, 0, 0)
		n.Stores[0].MinFillRate = c.floor
		plan, err := Optimize(n)
		if err != nil {
			t.Fatal(err)
		}
		sys := inventory.System{Demand: n.Stores[0].Demand, LeadTime: c.l1, Holding: 1, Shortage: 9, Mode: inventory.Backorder}
		opt, err := policies.Optimize(sys, policies.BaseStock, policies.SearchOptions{MinFillRate: c.floor})
		if err != nil {
			t.Fatal(err)
		}
		got := plan.Result
		if s := got.Locations[1].InstallationLevel; s != opt.Policy.OrderUpTo || got.Locations[0].InstallationLevel != 0 {
			t.Errorf("%+v: levels centre %d store %d, single stage %d", c, got.Locations[0].InstallationLevel, s, opt.Policy.OrderUpTo)
		}
		if math.Abs(got.TotalCost-opt.Figures.TotalCost) > 1e-12*math.Max(1, opt.Figures.TotalCost) {
			t.Errorf("%+v: cost %.15g, single stage %.15g", c, got.TotalCost, opt.Figures.TotalCost)
		}
	}
}
