package network

import (
	"math"
	"testing"
)

// Worked by hand (derivation in the comments): demand per period is 0 or
// 1 with probability 1/2 each, L0 = 1.
func TestSerialByHand(t *testing.T) {
	for _, c := range []struct {
		name          string
		l1, S0, S1    int
		store, centre [4]float64 // fill, stockout, on hand, backorders
		total         float64
	}{
		// S0 = S1 = 1, L1 = 0. The store's position less what is owed is
		// Y = min(1, 1 - X) = 1 - X, 1 or 0 with probability 1/2; its net
		// stock Y - D is 1, 0, 0, -1 with probability 1/4 each; it serves
		// D in full when Y = 1: fill (1/2 x 1/2)/(1/2) = 1/2. The centre's
		// installation level is 0: it owes X (mean 1/2) and never ships in
		// the period of the order.
		{"S0=1 S1=1 L1=0", 0, 1, 1, [4]float64{0.5, 0.25, 0.25, 0.25}, [4]float64{0, 0.5, 0, 0.5}, 2*0.25 + 10*0.25},
		// S0 = 2, S1 = 1, L1 = 1. Y = min(1, 2 - X) = 1 always; net stock
		// 1 - (D1 + D2): 1, 0, -1 with probability 1/4, 1/2, 1/4; stock
		// before demand (1 - D1)^+ serves D2 in full when D1 = 0: fill
		// 1/2. The centre holds (1 - X)^+, mean 1/2, owes nothing, and
		// ships every order at once.
		{"S0=2 S1=1 L1=1", 1, 2, 1, [4]float64{0.5, 0.25, 0.25, 0.25}, [4]float64{1, 0, 0.5, 0}, 1*0.5 + 2*0.25 + 10*0.25},
	} {
		n := serial(t, "pmf:0=0.5,1=0.5", 1, c.l1, 1, 2, 10, c.S0, c.S1)
		res, err := Evaluate(n)
		if err != nil {
			t.Fatal(err)
		}
		for j, want := range [][4]float64{c.centre, c.store} {
			l := res.Locations[j]
			got := [4]float64{l.FillRate, l.StockoutProbability, l.MeanOnHand, l.MeanBackorders}
			for k := range got {
				if math.Abs(got[k]-want[k]) > 1e-15 {
					t.Errorf("%s %s: figures %v, by hand %v", c.name, l.Location, got, want)
					break
				}
			}
		}
		if math.Abs(res.TotalCost-c.total) > 1e-14 {
			t.Errorf("%s: total cost %g, by hand %g", c.name, res.TotalCost, c.total)
		}
	}
}

// The recursion's levels against brute force over every pair of levels
// (the exact evaluation as the cost), and against the scan that the
// search with floors uses.
func TestClarkScarfAgainstBruteForce(t *testing.T) {
	for _, c := range []struct {
		demand    string
		l0, l1    int
		h0, h1, b float64
	}{
		{"poisson:mean=3", 2, 1, 0.5, 1, 9},
		{"poisson:mean=3", 0, 2, 0.5, 1, 9},
		{"poisson:mean=2", 3, 0, 1, 1.5, 20},
		{"negbin:mean=2,var=5", 1, 2, 0.2, 1, 4},
		{"pmf:0=0.5,1=0.2,4=0.3", 2, 1, 0.8, 1, 12},
		{"poisson:mean=3", 2, 1, 1.5, 1, 9}, // store holding cheaper: nothing at the centre
	} {
		n := serial(t, c.demand, c.l0, c.l1, c.h0, c.h1, c.b, 0, 0)
		plan, err := Optimize(n)
		if err != nil {
			t.Fatal(err)
		}
		m, err := newModel(n)
		if err != nil {
			t.Fatal(err)
		}
		best := math.Inf(1)
		var bs0, bs1 int
		for s0 := 0; s0 <= m.x0Bound; s0++ {
			for s1 := -2; s1 <= 40; s1++ {
				r, err := m.evaluate(s0, []int{s1})
				if err != nil {
					t.Fatal(err)
				}
				if r.TotalCost < best-1e-12 {
					best, bs0, bs1 = r.TotalCost, s0, s1
				}
			}
		}
		if got := plan.Result.TotalCost; got > best+1e-9*best {
			t.Errorf("%+v: recursion cost %.12g at %v, brute force %.12g at s0=%d s1=%d", c, got, plan.Network.Stores[0].BaseStock, best, bs0, bs1)
		}
		s0, s, err := m.scanCentre()
		if err != nil {
			t.Fatal(err)
		}
		r, err := m.evaluate(s0, s)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(r.TotalCost-best) > 1e-9*best {
			t.Errorf("%+v: scan cost %.12g, brute force %.12g", c, r.TotalCost, best)
		}
	}
}

// Planning each location alone never beats the network optimum, and on
// the demo-like serial system it costs more; its stores get less than
// their single-location plans promise when the centre runs short.
func TestAloneCostsMore(t *testing.T) {
	n := serial(t, "poisson:mean=3.2", 5, 1, 0.2, 0.32, 18, 0, 0)
	opt, err := Optimize(n)
	if err != nil {
		t.Fatal(err)
	}
	al, err := Alone(n)
	if err != nil {
		t.Fatal(err)
	}
	if al.Result.TotalCost < opt.Result.TotalCost-1e-12 {
		t.Errorf("alone %g cheaper than the optimum %g", al.Result.TotalCost, opt.Result.TotalCost)
	}
	if got := al.Result.Locations[1].FillRate; got > al.Expected[0]+1e-12 {
		t.Errorf("store gets %g in the network, more than the %g its plan promised", got, al.Expected[0])
	}
	t.Logf("network %g, alone %g (store promised %.4f, gets %.4f)", opt.Result.TotalCost, al.Result.TotalCost, al.Expected[0], al.Result.Locations[1].FillRate)
}
