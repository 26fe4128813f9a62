package policies

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"ergostock/inventory"
)

// refModel is an independent, plain computation of the backorder-mode
// costs for the tests: the pmf of D truncated where the tail is below
// 1e-16, X_{L+1} by repeated direct convolution, G(y) by direct summation
// over the pmf of X_{L+1}, and the renewal mass by its defining recursion
// over the whole support. Nothing is shared with boModel.
type refModel struct {
	h, b, k float64
	pD, pX  []float64 // D and X_{L+1}
	pXL     []float64 // X_L
	mu      float64
	m       []float64
}

func newRefModel(t testing.TB, d inventory.Distribution, L int, h, b, k float64) *refModel {
	t.Helper()
	n := d.Bound(1e-16) + 1
	pD := make([]float64, n)
	for i := range pD {
		pD[i] = d.PMF(i)
	}
	conv := func(a, c []float64) []float64 {
		out := make([]float64, len(a)+len(c)-1)
		for i, x := range a {
			for j, y := range c {
				out[i+j] += x * y
			}
		}
		return out
	}
	pXL := []float64{1}
	for range L {
		pXL = conv(pXL, pD)
	}
	r := &refModel{h: h, b: b, k: k, pD: pD, pX: conv(pXL, pD), pXL: pXL, mu: d.Mean()}
	r.m = []float64{1 / (1 - pD[0])}
	return r
}

func (r *refModel) G(y int) float64 {
	var v float64
	for k, p := range r.pX {
		if d := y - k; d > 0 {
			v += r.h * float64(d) * p
		} else {
			v += r.b * float64(-d) * p
		}
	}
	return v
}

// loss returns E[(y-X)^+] for a pmf.
func refBelow(p []float64, y int) float64 {
	var v float64
	for k, w := range p {
		if k < y {
			v += float64(y-k) * w
		}
	}
	return v
}

func (r *refModel) mass(j int) float64 {
	for len(r.m) <= j {
		i := len(r.m)
		var v float64
		for l := 1; l <= i && l < len(r.pD); l++ {
			v += r.pD[l] * r.m[i-l]
		}
		r.m = append(r.m, v/(1-r.pD[0]))
	}
	return r.m[j]
}

// grid returns the cheapest c(s, S) over lo <= s < S <= hi by brute force
// (for each S, lowering s adds one term), with service floors fl.
func (r *refModel) grid(lo, hi int, fl floors) (s, S int, cost float64) {
	g := map[int]float64{}
	G := func(y int) float64 {
		if v, ok := g[y]; ok {
			return v
		}
		v := r.G(y)
		g[y] = v
		return v
	}
	fill := func(y int) float64 { return (refBelow(r.pXL, y) - refBelow(r.pX, y)) / r.mu }
	so := func(y int) float64 {
		var v float64
		for k, p := range r.pX {
			if k > y {
				v += p
			}
		}
		return v
	}
	fc, sc := map[int]float64{}, map[int]float64{}
	cost = math.Inf(1)
	for top := lo + 1; top <= hi; top++ {
		num, den, fn, sn := r.k, 0.0, 0.0, 0.0
		for low := top - 1; low >= lo; low-- {
			j := top - low - 1 // the new position low+1 carries m(j)
			w := r.mass(j)
			y := low + 1
			num += w * G(y)
			den += w
			if !fl.none() {
				if _, ok := fc[y]; !ok {
					fc[y], sc[y] = fill(y), so(y)
				}
				fn += w * fc[y]
				sn += w * sc[y]
				if !fl.meets(fn/den, sn/den) {
					continue
				}
			}
			if c := num / den; c < cost-1e-12 {
				s, S, cost = low, top, c
			}
		}
	}
	return s, S, cost
}

func optPoisson(t testing.TB, m float64) inventory.Distribution {
	t.Helper()
	d, err := inventory.NewPoisson(m)
	if err != nil {
		t.Fatal(err)
	}
	return d
}

func optSystem(d inventory.Distribution, L int, h, b, k float64) inventory.System {
	return inventory.System{Demand: d, LeadTime: L, Holding: h, Shortage: b, OrderCost: k, Mode: inventory.Backorder}
}

func relClose(a, b, tol float64) bool {
	return math.Abs(a-b) <= tol*max(1, math.Abs(a), math.Abs(b))
}

// TestZhengFedergruenClassic checks the test problem of Zheng and Federgruen
// (1991): Poisson demand of mean 10 per period, K = 64, h = 1, b = 9, zero
// lead time, costs charged on net inventory at the end of the period (our
// convention with L = 0). The optimum s = 6, S = 40 with cost about 35.02
// is quoted from memory; the test confirms it by brute force over a wide grid
// and by the exact chain. We find c(6, 40) = 35.0215552723.
func TestZhengFedergruenClassic(t *testing.T) {
	sys := optSystem(optPoisson(t, 10), 0, 1, 9, 64)
	o, err := Optimize(sys, SS, SearchOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if o.Policy.ReorderPoint != 6 || o.Policy.OrderUpTo != 40 {
		t.Errorf("optimum %v, want s-S(s=6,S=40)", o.Policy)
	}
	if math.Abs(o.Figures.TotalCost-35.02) > 0.005 {
		t.Errorf("cost %.10f, want about 35.02", o.Figures.TotalCost)
	}
	ref := newRefModel(t, sys.Demand, 0, 1, 9, 64)
	s, S, c := ref.grid(-20, 120, floors{})
	if s != 6 || S != 40 || !relClose(c, o.Figures.TotalCost, 1e-9) {
		t.Errorf("brute force: s=%d S=%d cost %.12f; optimize: %v cost %.12f", s, S, c, o.Policy, o.Figures.TotalCost)
	}
	t.Logf("optimum %v cost %.10f, %d policies costed, bounds %v", o.Policy, o.Figures.TotalCost, o.Search.Evaluated, o.Search.Bounds)
}

// randomCase draws a seeded system: Poisson or negative binomial demand with
// mean 1-30, lead time 0-3, K 0-200 (sometimes 0), h 0.5-2, b 1-20, unit
// cost 0-2.
func randomCase(t testing.TB, rng *rand.Rand) (inventory.System, string) {
	mean := 1 + 29*rng.Float64()
	var d inventory.Distribution
	var err error
	if rng.IntN(2) == 0 {
		d, err = inventory.NewPoisson(mean)
	} else {
		d, err = inventory.NewNegBin(mean, mean*(1.2+2*rng.Float64()))
	}
	if err != nil {
		t.Fatal(err)
	}
	k := 200 * rng.Float64()
	if rng.IntN(8) == 0 {
		k = 0
	}
	sys := optSystem(d, rng.IntN(4), 0.5+1.5*rng.Float64(), 1+19*rng.Float64(), k)
	sys.UnitCost = float64(rng.IntN(3)) // 0, 1 or 2: c E[D] is policy-independent
	return sys, d.String()
}

// TestZhengFedergruenEqualsBruteForce compares the algorithm with brute
// force over a grid at least three times the optimum's width beyond its
// levels, on 60 seeded random systems, and the cost with the exact chain.
func TestZhengFedergruenEqualsBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(1991, 654))
	for i := range 60 {
		sys, name := randomCase(t, rng)
		o, err := Optimize(sys, SS, SearchOptions{})
		if err != nil {
			t.Errorf("case %d %s: %v", i, name, err)
			continue
		}
		mo, _ := newBOModel(sys)
		zf, _ := mo.zhengFedergruen()
		// c(s,S) + c E[D] against the chain's total cost.
		purchase := sys.UnitCost * sys.Demand.Mean()
		if !relClose(zf.cost+purchase, o.Figures.TotalCost, 1e-9) {
			t.Errorf("case %d %s: c(s,S) + c E[D] = %.12g, chain total cost %.12g", i, name, zf.cost+purchase, o.Figures.TotalCost)
		}
		w := o.Policy.OrderUpTo - o.Policy.ReorderPoint
		lo, hi := o.Policy.ReorderPoint-3*w-10, o.Policy.OrderUpTo+3*w+10
		ref := newRefModel(t, sys.Demand, sys.LeadTime, sys.Holding, sys.Shortage, sys.OrderCost)
		s, S, c := ref.grid(lo, hi, floors{})
		c += purchase
		if !relClose(c, o.Figures.TotalCost, 1e-9) {
			t.Errorf("case %d %s L=%d K=%.3g h=%.3g b=%.3g: brute force s=%d S=%d cost %.12g; optimize %v cost %.12g",
				i, name, sys.LeadTime, sys.OrderCost, sys.Holding, sys.Shortage, s, S, c, o.Policy, o.Figures.TotalCost)
		}
		if s == lo || S == hi {
			t.Errorf("case %d: brute-force optimum on the grid's edge", i)
		}
	}
}

// TestCostAgreesWithUnitCost checks that c(s,S) + c E[D] is the chain's
// total cost to 1e-9 with a unit cost, and that the unit cost leaves the
// backorder optimum unchanged.
func TestCostAgreesWithUnitCost(t *testing.T) {
	sys := optSystem(optPoisson(t, 10), 1, 1, 9, 64)
	a, err := Optimize(sys, SS, SearchOptions{})
	if err != nil {
		t.Fatal(err)
	}
	sys.UnitCost = 3
	b, err := Optimize(sys, SS, SearchOptions{})
	if err != nil {
		t.Fatal(err)
	}
	mo, _ := newBOModel(sys)
	want := mo.ssCost(b.Policy.ReorderPoint, b.Policy.OrderUpTo) + 3*10
	if a.Policy != b.Policy || !relClose(b.Figures.TotalCost, want, 1e-9) {
		t.Errorf("with c=3: %v cost %.12g, want %v cost %.12g", b.Policy, b.Figures.TotalCost, a.Policy, want)
	}
}

// TestBaseStockCriticalFractile checks base-stock against the critical
// fractile computed independently from gonum's Poisson CDF: with L = 0
// the smallest S with P(D <= S) >= b/(b+h) (the newsvendor solution; Arrow,
// Harris and Marschak 1951), and with lead time L, Poisson(mean (L+1)) since
// a sum of Poisson variables is Poisson.
func TestBaseStockCriticalFractile(t *testing.T) {
	for _, c := range []struct {
		mean float64
		L    int
		h, b float64
	}{
		{10, 0, 1, 9}, {4, 2, 1, 19}, {25, 1, 2, 3}, {0.7, 3, 1, 99}, {100, 0, 1, 1},
	} {
		sys := optSystem(optPoisson(t, c.mean), c.L, c.h, c.b, 0)
		o, err := Optimize(sys, BaseStock, SearchOptions{})
		if err != nil {
			t.Fatal(err)
		}
		x := distuv.Poisson{Lambda: c.mean * float64(c.L+1)}
		r := c.b / (c.b + c.h)
		want := 0 // smallest k with gonum's CDF(k) >= r
		for x.CDF(float64(want)) < r {
			want++
		}
		if o.Policy.OrderUpTo != want {
			t.Errorf("%+v: S = %d, want %d", c, o.Policy.OrderUpTo, want)
		}
		// K = 0 in s-S degenerates to the same base-stock level.
		ss, err := Optimize(sys, SS, SearchOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if ss.Policy.OrderUpTo != want || ss.Policy.ReorderPoint != want-1 || !relClose(ss.Figures.TotalCost, o.Figures.TotalCost, 1e-12) {
			t.Errorf("%+v: s-S with K = 0 gave %v, want s=%d S=%d", c, ss.Policy, want-1, want)
		}
	}
}

// TestFloorsSS checks floor-constrained s-S against brute force under the
// same floor (exact service figures from the stationary law m(S-y)/M(n)),
// and that the evaluated figures meet the floor.
func TestFloorsSS(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for i := range 30 {
		sys, name := randomCase(t, rng)
		fl := floors{minFill: 0.97 + 0.029*rng.Float64()}
		if i%3 == 1 {
			fl = floors{maxStockout: 0.01 + 0.05*rng.Float64()}
		} else if i%3 == 2 {
			fl.maxStockout = 0.05
		}
		checkFloorAgainstGrid(t, fmt.Sprintf("case %d %s", i, name), sys, fl)
	}
}

// TestFloorsBaseStock checks the smallest level meeting a floor against a
// scan of the chain.
func TestFloorsBaseStock(t *testing.T) {
	sys := optSystem(optPoisson(t, 10), 1, 1, 4, 0)
	o, err := Optimize(sys, BaseStock, SearchOptions{MinFillRate: 0.995})
	if err != nil {
		t.Fatal(err)
	}
	for S := 0; S < o.Policy.OrderUpTo; S++ {
		e, err := Evaluate(sys, Policy{Kind: BaseStock, OrderUpTo: S}, Options{})
		if err != nil {
			t.Fatal(err)
		}
		if e.Figures.FillRate >= 0.995 {
			t.Errorf("S=%d meets the floor (fill %g) below the answer %v", S, e.Figures.FillRate, o.Policy)
		}
	}
	if o.Figures.FillRate < 0.995 {
		t.Errorf("%v fill %g misses 0.995", o.Policy, o.Figures.FillRate)
	}
}

// snqBrute is the cheapest s-nQ over a grid by the chain-free formula of
// snqSearch evaluated directly (uniform positions, g = 1).
func snqBrute(r *refModel, d inventory.Distribution, sLo, sHi, qHi int, fl floors) (s, Q int, cost float64) {
	cost = math.Inf(1)
	type perY struct{ g, fr, so float64 }
	memo := map[int]perY{}
	at := func(y int) perY {
		if v, ok := memo[y]; ok {
			return v
		}
		v := perY{g: r.G(y), fr: (refBelow(r.pXL, y) - refBelow(r.pX, y)) / r.mu}
		for k, p := range r.pX {
			if k > y {
				v.so += p
			}
		}
		memo[y] = v
		return v
	}
	for q := 1; q <= qHi; q++ {
		var ord float64
		for k := 1; k <= q; k++ {
			ord += d.Tail(k)
		}
		ord /= float64(q)
		for ss := sLo; ss <= sHi; ss++ {
			var g, fr, so float64
			for y := ss + 1; y <= ss+q; y++ {
				v := at(y)
				g, fr, so = g+v.g, fr+v.fr, so+v.so
			}
			n := float64(q)
			if !fl.meets(fr/n, so/n) {
				continue
			}
			if c := r.k*ord + g/n; c < cost-1e-12 {
				s, Q, cost = ss, q, c
			}
		}
	}
	return s, Q, cost
}

// TestSNQEqualsBruteForce checks s-nQ, with and without a floor, against
// brute force, and the cost against the chain.
func TestSNQEqualsBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	for i := range 8 {
		sys, name := randomCase(t, rng)
		if sys.Demand.Mean() > 12 {
			continue // keep the brute force quick
		}
		for _, fl := range []floors{{}, {minFill: 0.98}} {
			o, err := Optimize(sys, SNQ, SearchOptions{MinFillRate: fl.minFill})
			if err != nil {
				t.Fatalf("case %d %s: %v", i, name, err)
			}
			ref := newRefModel(t, sys.Demand, sys.LeadTime, sys.Holding, sys.Shortage, sys.OrderCost)
			q := o.Policy.OrderMultiple
			s, Q, c := snqBrute(ref, sys.Demand, o.Policy.ReorderPoint-2*q-10, o.Policy.ReorderPoint+2*q+10, 3*q+10, fl)
			c += sys.UnitCost * sys.Demand.Mean()
			if !relClose(c, o.Figures.TotalCost, 1e-9) {
				t.Errorf("case %d %s %v: brute force s=%d Q=%d cost %.12g; optimize %v cost %.12g", i, name, fl, s, Q, c, o.Policy, o.Figures.TotalCost)
			}
		}
	}
}

// TestFloorRefused checks that floors outside (0, 1) are refused naming the
// field.
func TestFloorRefused(t *testing.T) {
	sys := optSystem(optPoisson(t, 5), 0, 1, 9, 10)
	for _, c := range []struct {
		opt   SearchOptions
		field string
	}{
		{SearchOptions{MinFillRate: 1}, "min_fill_rate"},
		{SearchOptions{MinFillRate: -0.1}, "min_fill_rate"},
		{SearchOptions{MinFillRate: math.NaN()}, "min_fill_rate"},
		{SearchOptions{MaxStockout: 1.5}, "max_stockout_probability"},
	} {
		_, err := Optimize(sys, SS, c.opt)
		var fe *inventory.FieldError
		if !errors.As(err, &fe) || fe.Field != c.field {
			t.Errorf("%+v: error %v, want a FieldError on %s", c.opt, err, c.field)
		}
	}
	for _, bad := range []inventory.System{
		{Demand: sys.Demand, Holding: 0, Shortage: 1, Mode: inventory.Backorder},
		{Demand: sys.Demand, Holding: 1, Shortage: 0, Mode: inventory.Backorder},
	} {
		if _, err := Optimize(bad, SS, SearchOptions{}); err == nil {
			t.Errorf("%+v: want an error", bad)
		}
	}
}

// TestLostBaseStockScan checks the lost-sales base-stock scan, run on to its
// proven bounds and with the default patience, against every level 0..40 on
// the exact chain (common practice: brute force).
func TestLostBaseStockScan(t *testing.T) {
	sys := optSystem(optPoisson(t, 6), 1, 1, 12, 0)
	sys.Mode = inventory.Lost
	sys.UnitCost = 2
	o, err := Optimize(sys, BaseStock, SearchOptions{Patience: -1})
	if err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(o.Search.Guarantee, "global") {
		t.Errorf("scan to the proven bounds: guarantee %q", o.Search.Guarantee)
	}
	quick, err := Optimize(sys, BaseStock, SearchOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if quick.Policy != o.Policy {
		t.Errorf("with the default patience: %v, want %v", quick.Policy, o.Policy)
	}
	best, bestS := math.Inf(1), -1
	for S := 0; S <= 40; S++ {
		e, err := Evaluate(sys, Policy{Kind: BaseStock, OrderUpTo: S}, Options{})
		if err != nil {
			t.Fatal(err)
		}
		if e.Figures.TotalCost < best {
			best, bestS = e.Figures.TotalCost, S
		}
	}
	if o.Policy.OrderUpTo != bestS || !relClose(o.Figures.TotalCost, best, 1e-12) {
		t.Errorf("scan gave %v cost %g; brute force S=%d cost %g", o.Policy, o.Figures.TotalCost, bestS, best)
	}
	t.Logf("%v cost %.6f after %d evaluations, bounds %v: %s", o.Policy, o.Figures.TotalCost, o.Search.Evaluated, o.Search.Bounds, o.Search.Guarantee)
}

// TestLostLocalOptimum checks that the lost-sales s-S and s-nQ searches end
// at a local optimum: no unit neighbour is cheaper on the exact chain, and
// under a floor the result meets it.
func TestLostLocalOptimum(t *testing.T) {
	sys := optSystem(optPoisson(t, 4), 1, 1, 9, 20)
	sys.Mode = inventory.Lost
	for _, c := range []struct {
		kind Kind
		opt  SearchOptions
	}{{SS, SearchOptions{}}, {SNQ, SearchOptions{}}, {SS, SearchOptions{MinFillRate: 0.99}}} {
		o, err := Optimize(sys, c.kind, c.opt)
		if err != nil {
			t.Fatal(err)
		}
		fl := floors{minFill: c.opt.MinFillRate}
		p := o.Policy
		for _, d := range [][2]int{{-1, 0}, {1, 0}, {0, -1}, {0, 1}, {-1, -1}, {1, 1}, {-1, 1}, {1, -1}} {
			q := p
			q.ReorderPoint += d[0]
			if c.kind == SS {
				q.OrderUpTo += d[1]
			} else {
				q.OrderMultiple += d[1]
			}
			if q.Validate(inventory.Lost) != nil {
				continue
			}
			e, err := Evaluate(sys, q, Options{})
			if err != nil {
				t.Fatal(err)
			}
			if fl.meets(e.Figures.FillRate, e.Figures.StockoutProbability) && e.Figures.TotalCost < o.Figures.TotalCost-1e-12 {
				t.Errorf("%v: neighbour %v is cheaper (%g < %g)", p, q, e.Figures.TotalCost, o.Figures.TotalCost)
			}
		}
		if !fl.meets(o.Figures.FillRate, o.Figures.StockoutProbability) {
			t.Errorf("%v misses %v", p, fl)
		}
		t.Logf("%v cost %.6f fill %.5f after %d evaluations: %s", p, o.Figures.TotalCost, o.Figures.FillRate, o.Search.Evaluated, o.Search.Guarantee)
	}
}

// TestLostSSAgainstGrid compares the lost-sales s-S compass search with
// brute force over s in -1..15, S in s+1..30 on the exact chain, for one
// system (Poisson mean 4, L = 1, K = 20, h = 1, b = 9). There is no
// guarantee that a local optimum is global; on this case it is, and the
// test records that as a regression check.
func TestLostSSAgainstGrid(t *testing.T) {
	sys := optSystem(optPoisson(t, 4), 1, 1, 9, 20)
	sys.Mode = inventory.Lost
	o, err := Optimize(sys, SS, SearchOptions{})
	if err != nil {
		t.Fatal(err)
	}
	best, bestP, n := math.Inf(1), Policy{}, 0
	for s := -1; s <= 15; s++ {
		for S := s + 1; S <= 30; S++ {
			n++
			p := Policy{Kind: SS, ReorderPoint: s, OrderUpTo: S}
			e, err := Evaluate(sys, p, Options{})
			if err != nil {
				t.Fatal(err)
			}
			if e.Figures.TotalCost < best {
				best, bestP = e.Figures.TotalCost, p
			}
		}
	}
	if o.Policy != bestP {
		t.Errorf("compass search %v cost %.10g; grid %v cost %.10g", o.Policy, o.Figures.TotalCost, bestP, best)
	}
	t.Logf("compass search %v cost %.10g after %d evaluations; grid of %d policies: %v cost %.10g", o.Policy, o.Figures.TotalCost, o.Search.Evaluated, n, bestP, best)
}

// TestWidthBound checks the lower bound of widthBound against the
// holding and backorder cost of every s-S policy of that width on a grid of
// reorder points (the bound's proof is in its doc comment).
func TestWidthBound(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 8))
	for range 10 {
		sys, name := randomCase(t, rng)
		sys.OrderCost = 0
		mo, err := newBOModel(sys)
		if err != nil {
			t.Fatal(err)
		}
		y, _ := mo.fractile()
		for n := 1; n <= 200; n += 1 + n/4 {
			lb := mo.widthBound(n)
			for s := y - 2*n - 20; s <= y+20; s += 3 {
				if c := mo.ssCost(s, s+n); c < lb*(1-1e-12) {
					t.Errorf("%s: c(%d,%d) = %g below the bound %g", name, s, s+n, c, lb)
				}
			}
		}
	}
}

// TestNoneMeets checks the error when no evaluated policy meets the floor:
// it names the floor and the bounds, and the cap when the cap stopped the
// search.
func TestNoneMeets(t *testing.T) {
	ls := &lostSearch{fl: floors{minFill: 0.999}, opt: SearchOptions{MaxEvaluations: 3}}
	err := ls.noneMeets(map[string][2]int{"reorder_point": {2, 5}, "order_up_to": {9, 12}}, true)
	want := "no policy within the bounds reorder_point 2..5, order_up_to 9..12 meets fill rate >= 0.999 (the cap of 3 evaluations stopped the search; raise --max-evaluations)"
	if err == nil || err.Error() != want {
		t.Errorf("got %v\nwant %s", err, want)
	}
}

// TestSNQLattice checks s-nQ on demand living on the even numbers, where
// for even Q the position only visits every other point of s+1..s+Q,
// against brute force over the exact chain (common practice).
func TestSNQLattice(t *testing.T) {
	d, err := inventory.NewPMF([]float64{0.5, 0, 0.3, 0, 0.2})
	if err != nil {
		t.Fatal(err)
	}
	sys := optSystem(d, 1, 1, 9, 5)
	o, err := Optimize(sys, SNQ, SearchOptions{})
	if err != nil {
		t.Fatal(err)
	}
	best, bestP := math.Inf(1), Policy{}
	for q := 1; q <= 20; q++ {
		for s := -10; s <= 15; s++ {
			p := Policy{Kind: SNQ, ReorderPoint: s, OrderMultiple: q}
			e, err := Evaluate(sys, p, Options{})
			if err != nil {
				t.Fatal(err)
			}
			if e.Figures.TotalCost < best-1e-12 {
				best, bestP = e.Figures.TotalCost, p
			}
		}
	}
	if !relClose(o.Figures.TotalCost, best, 1e-9) {
		t.Errorf("optimize %v cost %.12g; chain brute force %v cost %.12g", o.Policy, o.Figures.TotalCost, bestP, best)
	}
}

// TestZhengFedergruenLarge checks the benchmark case of issue 5 (Poisson
// mean 400, L = 3, K = 5000, h = 1, b = 19): the chain's cost equals
// c(s,S) to 1e-9, and no policy within 30 of the optimum in s and S is
// cheaper by the full-sum cost (a partial brute force; the exhaustive
// comparisons are in TestZhengFedergruenEqualsBruteForce).
func TestZhengFedergruenLarge(t *testing.T) {
	sys := optSystem(optPoisson(t, 400), 3, 1, 19, 5000)
	o, err := Optimize(sys, SS, SearchOptions{})
	if err != nil {
		t.Fatal(err)
	}
	mo, _ := newBOModel(sys)
	s, S := o.Policy.ReorderPoint, o.Policy.OrderUpTo
	c := mo.ssCost(s, S)
	if !relClose(c, o.Figures.TotalCost, 1e-9) {
		t.Errorf("c(%d,%d) = %.12g, chain %.12g", s, S, c, o.Figures.TotalCost)
	}
	for ds := -30; ds <= 30; ds += 3 {
		for dS := -30; dS <= 30; dS += 3 {
			if d := mo.ssCost(s+ds, S+dS); d < c*(1-1e-12) {
				t.Errorf("c(%d,%d) = %.12g below the optimum's %.12g", s+ds, S+dS, d, c)
			}
		}
	}
	t.Logf("%v cost %.10f, %d costs computed, bounds %v", o.Policy, c, o.Search.Evaluated, o.Search.Bounds)
}
