package policies

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"ergostock/inventory"
)

// levelMoments returns sum P(k) k^+, sum P(k) k^-, P(level < 0) and the
// total mass (listed entries plus both tails) of d.
func levelMoments(d *LevelDistribution) (pos, neg, short, total float64) {
	var kp, kn, ks, kt inventory.CompensatedSum
	for i, v := range d.P {
		k := d.Min + i
		kp.Add(v * float64(max(k, 0)))
		kn.Add(v * float64(max(-k, 0)))
		if k < 0 {
			ks.Add(v)
		}
		kt.Add(v)
	}
	if d.Min <= 0 {
		ks.Add(d.Below)
	}
	kt.Add(d.Below)
	kt.Add(d.Above)
	return kp.Value(), kn.Value(), ks.Value(), kt.Value()
}

// TestLevelsAgreeWithFigures: on every family, mode, lead time and policy
// shape of TestEveryFamily, the level distribution is a distribution
// (entries >= 0, total 1, tails within LevelTail) whose moments are the
// figures computed by the independent path of Evaluate (the loss tables):
// backorder mode sum k^+ P = mean_on_hand, sum k^- P = mean_backorders,
// P(NI < 0) = stockout_probability; lost mode sum k P = mean_on_hand and
// levels within 0..top. The two paths share only the stationary law, so
// agreement checks the convolution (common practice: NI = Y - X_{L+1}).
func TestLevelsAgreeWithFigures(t *testing.T) {
	nb, _ := inventory.NewNegBin(3.0903266006852284, 8.081241599857611)
	nrm, _ := inventory.NewNormal(6, 2.5)
	gam, _ := inventory.NewGamma(4, 3)
	dists := []inventory.Distribution{poisson(t, 3.3), nb, nrm, gam, pmf(t, 0.1, 0.2, 0.3, 0.4), poisson(t, 400)}
	pols := []Policy{
		{Kind: BaseStock, OrderUpTo: 5}, {Kind: SS, ReorderPoint: 4, OrderUpTo: 5}, {Kind: SS, ReorderPoint: 2, OrderUpTo: 14},
		{Kind: SNQ, ReorderPoint: 3, OrderMultiple: 1}, {Kind: SNQ, ReorderPoint: 3, OrderMultiple: 7},
		{Kind: SS, ReorderPoint: -4, OrderUpTo: 9},
	}
	for _, d := range dists {
		for _, mode := range []inventory.Mode{inventory.Backorder, inventory.Lost} {
			for _, L := range []int{0, 2} {
				for _, p := range pols {
					if mode == inventory.Lost && p.ReorderPoint < -1 {
						continue
					}
					sys := inventory.System{Demand: d, LeadTime: L, Holding: 1, Shortage: 9, OrderCost: 5, UnitCost: 1, Mode: mode}
					e, err := Evaluate(sys, p, Options{Levels: true})
					if err != nil {
						t.Errorf("%v %s L=%d %v: %v", d, mode, L, p, err)
						continue
					}
					lv := e.Levels
					if lv == nil {
						t.Fatalf("%v %s L=%d %v: no levels", d, mode, L, p)
					}
					name := func() string { return d.String() + " " + string(mode) + " " + p.String() }
					for _, v := range lv.P {
						if v < 0 || math.IsNaN(v) {
							t.Fatalf("%s L=%d: entry %v", name(), L, v)
						}
					}
					pos, neg, short, total := levelMoments(lv)
					f := e.Figures
					scale := 1 + math.Abs(f.MeanOnHand) + math.Abs(float64(lv.Min))
					if math.Abs(total-1) > 1e-12 || lv.Below > LevelTail || lv.Above > LevelTail ||
						math.Abs(pos-f.MeanOnHand) > 1e-11*scale {
						t.Errorf("%s L=%d: total %v, tails %g %g, sum k^+ P = %.15g, mean on-hand %.15g", name(), L, total, lv.Below, lv.Above, pos, f.MeanOnHand)
					}
					_, top := p.Levels()
					switch mode {
					case inventory.Backorder:
						if lv.Of != NetInventory || lv.Max() > top || math.Abs(neg-f.MeanBackorders) > 1e-11*scale || math.Abs(short-f.StockoutProbability) > 1e-12 {
							t.Errorf("%s L=%d: of %q, max %d (top %d), sum k^- P = %.15g vs backorders %.15g, P(NI<0) = %.15g vs stockout %.15g",
								name(), L, lv.Of, lv.Max(), top, neg, f.MeanBackorders, short, f.StockoutProbability)
						}
					case inventory.Lost:
						if lv.Of != OnHand || lv.Min < 0 || lv.Max() > max(top, 0) || neg != 0 {
							t.Errorf("%s L=%d: of %q, levels %d..%d (top %d)", name(), L, lv.Of, lv.Min, lv.Max(), top)
						}
					}
				}
			}
		}
	}
	// Off by default.
	e, err := Evaluate(inventory.System{Demand: poisson(t, 3), Holding: 1, Shortage: 9, Mode: inventory.Backorder}, Policy{Kind: BaseStock, OrderUpTo: 5}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if e.Levels != nil {
		t.Errorf("levels without Options.Levels: %+v", e.Levels)
	}
}

// TestLevelsBaseStockPoisson: base-stock S in backorder mode keeps the
// position at S, so NI = S - X_{L+1} with X_{L+1} ~ Poisson((L+1) m) and
// P(NI = k) = P(X_{L+1} = S - k), computed with gonum's distuv.Poisson
// (the identity of Hadley & Whitin 1963, Analysis of Inventory Systems,
// ch. 4, from memory).
func TestLevelsBaseStockPoisson(t *testing.T) {
	for _, c := range []struct {
		m    float64
		L, S int
	}{{4, 0, 6}, {2.5, 3, 12}, {30, 1, 70}, {30, 1, 40}} {
		sys := inventory.System{Demand: poisson(t, c.m), LeadTime: c.L, Holding: 1, Shortage: 9, Mode: inventory.Backorder}
		e, err := Evaluate(sys, Policy{Kind: BaseStock, OrderUpTo: c.S}, Options{Levels: true})
		if err != nil {
			t.Fatal(err)
		}
		X := distuv.Poisson{Lambda: float64(c.L+1) * c.m}
		lv := e.Levels
		// The top levels are left out when P(X < S - Max) <= LevelTail.
		if want := X.CDF(float64(c.S - lv.Max() - 1)); lv.Max() > c.S || math.Abs(lv.Above-want) > 1e-15 || (lv.Max() < c.S && X.CDF(float64(c.S-lv.Max())) <= LevelTail) {
			t.Errorf("%+v: top level %d, above %g, want top <= %d with P(X < S - top) = %g", c, lv.Max(), lv.Above, c.S, want)
		}
		for k := lv.Min; k <= lv.Max(); k++ {
			want := X.Prob(float64(c.S - k))
			if got := lv.At(k); math.Abs(got-want) > 1e-14+1e-12*want {
				t.Errorf("%+v: P(NI = %d) = %.17g, want %.17g", c, k, got, want)
			}
		}
		if want := 1 - X.CDF(float64(c.S-lv.Min)); math.Abs(lv.Below-want) > 1e-15 {
			t.Errorf("%+v: below %g, want P(X > S - Min) = %g", c, lv.Below, want)
		}
	}
}

// TestLevelsLostZeroLeadHand: lost mode, L = 0, base-stock S = 1, D = 0 or
// 2 with probability 1/2 (the first case of TestLostZeroLeadHand): a = 1
// always, so on-hand at the end is 1 (D = 0) or 0 (D = 2), each 1/2; and
// s = 0, S = 2 with D in {0, 1}: a = 2 or 1 with probability 1/2 each, so
// on-hand is 2 w.p. 1/4, 1 w.p. 1/2 (1/4 + 1/4), 0 w.p. 1/4. Derived by
// hand.
func TestLevelsLostZeroLeadHand(t *testing.T) {
	for _, c := range []struct {
		d    inventory.Distribution
		p    Policy
		want []float64
	}{
		{pmf(t, 0.5, 0, 0.5), Policy{Kind: BaseStock, OrderUpTo: 1}, []float64{0.5, 0.5}},
		{pmf(t, 0.5, 0.5), Policy{Kind: SS, ReorderPoint: 0, OrderUpTo: 2}, []float64{0.25, 0.5, 0.25}},
	} {
		sys := inventory.System{Demand: c.d, Holding: 1, Shortage: 4, Mode: inventory.Lost}
		e, err := Evaluate(sys, c.p, Options{Levels: true})
		if err != nil {
			t.Fatal(err)
		}
		lv := e.Levels
		if lv.Min != 0 || len(lv.P) != len(c.want) || lv.Below != 0 || lv.Above != 0 {
			t.Fatalf("%v: %+v, want %v from 0", c.p, lv, c.want)
		}
		for k, w := range c.want {
			if math.Abs(lv.P[k]-w) > 1e-15 {
				t.Errorf("%v: P(OH = %d) = %v, want %v", c.p, k, lv.P[k], w)
			}
		}
	}
}
