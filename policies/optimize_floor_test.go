package policies

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"ergostock/inventory"
	"ergostock/policies/internal/cputime"
)

// latticePMF returns demand on the multiples of step with the given
// weights (normalised): P(D = i step) proportional to w[i].
func latticePMF(t testing.TB, step int, w ...float64) inventory.Distribution {
	t.Helper()
	var z float64
	for _, x := range w {
		z += x
	}
	p := make([]float64, step*(len(w)-1)+1)
	for i, x := range w {
		p[i*step] = x / z
	}
	d, err := inventory.NewPMF(p)
	if err != nil {
		t.Fatal(err)
	}
	return d
}

func optNegBin(t testing.TB, mean, variance float64) inventory.Distribution {
	t.Helper()
	d, err := inventory.NewNegBin(mean, variance)
	if err != nil {
		t.Fatal(err)
	}
	return d
}

// checkFloorAgainstGrid runs Optimize under the floors fl and compares the
// result with brute force over every s < S on a grid reaching three widths
// beyond the optimum (refModel: direct convolution and direct sums, nothing
// shared with boModel), and the evaluated figures with the floors.
//
// It reports whether the floor binds (the unconstrained optimum misses it,
// so that the sweep ran).
func checkFloorAgainstGrid(t *testing.T, name string, sys inventory.System, fl floors) (binds bool) {
	t.Helper()
	o, err := Optimize(sys, SS, SearchOptions{MinFillRate: fl.minFill, MaxStockout: fl.maxStockout})
	if err != nil {
		t.Errorf("%s %v: %v", name, fl, err)
		return false
	}
	if mo, err := newBOModel(sys); err == nil {
		if r, err := mo.zhengFedergruen(); err == nil {
			_, fill, so := mo.ssService(r.s, r.S)
			binds = !fl.meets(fill, so)
		}
	}
	f := o.Figures
	if !fl.meets(f.FillRate, f.StockoutProbability) {
		t.Errorf("%s: %v fill %.15g stockout %.15g misses %v", name, o.Policy, f.FillRate, f.StockoutProbability, fl)
	}
	w := o.Policy.OrderUpTo - o.Policy.ReorderPoint
	lo, hi := o.Policy.ReorderPoint-3*w-10, o.Policy.OrderUpTo+3*w+10
	ref := newRefModel(t, sys.Demand, sys.LeadTime, sys.Holding, sys.Shortage, sys.OrderCost)
	s, S, c := ref.grid(lo, hi, fl)
	c += sys.UnitCost * sys.Demand.Mean()
	if !relClose(c, f.TotalCost, 1e-9) {
		t.Errorf("%s L=%d K=%g %v: brute force s=%d S=%d cost %.12g; optimize %v cost %.12g",
			name, sys.LeadTime, sys.OrderCost, fl, s, S, c, o.Policy, f.TotalCost)
	}
	if s == lo || S == hi {
		t.Errorf("%s %v: brute-force optimum on the grid's edge", name, fl)
	}
	return binds
}

// TestFloorsSSCases checks the order-up-to sweep against brute force on
// demand the random cases do not cover: a lattice law (every demand a
// multiple of 10, so the inventory position visits one residue class and
// the renewal mass m vanishes off the lattice), over-dispersed negative
// binomial demand, high floors (0.999 fill rate, 0.001 stockout), K = 0
// (where an s-S policy can beat every base-stock level under a floor) and
// very small demand. The references are brute force (checkFloorAgainstGrid).
func TestFloorsSSCases(t *testing.T) {
	lattice := latticePMF(t, 10, 0.2, 0.3, 0.3, 0.2)
	lumpy := latticePMF(t, 10, 0.5, 0.1, 0.2, 0, 0.1, 0, 0, 0.1)
	cases := []struct {
		name string
		sys  inventory.System
		fl   []floors
	}{
		{"lattice 10", optSystem(lattice, 1, 1, 9, 50), []floors{{minFill: 0.98}, {minFill: 0.99}, {minFill: 0.999}, {maxStockout: 0.01}}},
		{"lattice 10, L=0", optSystem(lattice, 0, 1, 4, 120), []floors{{minFill: 0.999}, {minFill: 0.99, maxStockout: 0.02}}},
		{"lumpy lattice 10", optSystem(lumpy, 2, 0.5, 5, 80), []floors{{minFill: 0.99}, {minFill: 0.999}}},
		{"negbin 5/20", optSystem(optNegBin(t, 5, 20), 1, 1, 9, 64), []floors{{minFill: 0.99}, {minFill: 0.999}, {maxStockout: 0.001}}},
		{"negbin 12/150", optSystem(optNegBin(t, 12, 150), 2, 1, 19, 200), []floors{{minFill: 0.999}, {maxStockout: 0.005}}},
		{"poisson 10, classic", optSystem(optPoisson(t, 10), 0, 1, 9, 64), []floors{{minFill: 0.99}, {minFill: 0.999}, {maxStockout: 0.001}}},
		{"poisson 10, K=0", optSystem(optPoisson(t, 10), 0, 1, 9, 0), []floors{{minFill: 0.9999}, {maxStockout: 0.0005}}},
		{"poisson 0.3", optSystem(optPoisson(t, 0.3), 2, 1, 49, 30), []floors{{minFill: 0.999}}},
	}
	for _, c := range cases {
		for _, fl := range c.fl {
			if !checkFloorAgainstGrid(t, c.name, c.sys, fl) {
				t.Errorf("%s %v: the floor does not bind; the case tests nothing", c.name, fl)
			}
		}
	}
}

// TestFloorsSSRandom checks the sweep against brute force on 30 seeded
// random systems, a third of them with lattice demand (multiples of 2 to
// 10), under fill-rate floors up to 0.999 and stockout ceilings.
func TestFloorsSSRandom(t *testing.T) {
	rng := rand.New(rand.NewPCG(2026, 12))
	binding := 0
	for i := range 30 {
		sys, name := randomCase(t, rng)
		if i%3 == 0 {
			w := make([]float64, 2+rng.IntN(6))
			for j := range w {
				w[j] = rng.Float64()
			}
			sys.Demand = latticePMF(t, 2+rng.IntN(9), w...)
			name = sys.Demand.String()
		}
		fl := floors{minFill: 0.99 + 0.009*rng.Float64()}
		switch i % 4 {
		case 1:
			fl = floors{maxStockout: 0.001 + 0.02*rng.Float64()}
		case 2:
			fl = floors{minFill: 0.999}
		case 3:
			fl.maxStockout = 0.01
		}
		if checkFloorAgainstGrid(t, name, sys, fl) {
			binding++
		}
	}
	if binding < 25 {
		t.Errorf("the floor binds in only %d of 30 cases", binding)
	}
	t.Logf("the floor binds in %d of 30 cases", binding)
}

// TestFloorPerLevelStructure checks, with direct sums, the two facts the
// sweep rests on for a fixed order-up-to level S (doc of ssConstrained):
// c(., S) is non-increasing from S-1 down to s_u(S) = max{s <= min(y*, S-1):
// G(s) >= c(s, S)} and non-decreasing below it (Zheng and Federgruen 1991),
// and the fill rate is non-decreasing and the stockout probability
// non-increasing in s (our argument).
func TestFloorPerLevelStructure(t *testing.T) {
	for _, sys := range []inventory.System{
		optSystem(latticePMF(t, 10, 0.2, 0.3, 0.3, 0.2), 1, 1, 9, 50),
		optSystem(optNegBin(t, 5, 20), 1, 1, 9, 64),
		optSystem(optPoisson(t, 10), 0, 1, 9, 0),
	} {
		mo, err := newBOModel(sys)
		if err != nil {
			t.Fatal(err)
		}
		ystar, _ := mo.fractile()
		for S := ystar; S < ystar+120; S += 7 {
			su := S - 1
			for !(su <= ystar && mo.G(su) >= mo.ssCost(su, S)) {
				su--
			}
			const tol = 1e-12
			prev, pf, ps := mo.ssService(S-1, S)
			for s := S - 2; s >= su-150; s-- {
				c, f, so := mo.ssService(s, S)
				if s >= su && c > prev*(1+tol) {
					t.Errorf("%v S=%d: c(%d) = %.15g > c(%d) = %.15g above s_u = %d", sys.Demand, S, s, c, s+1, prev, su)
				}
				if s < su && c < prev*(1-tol) {
					t.Errorf("%v S=%d: c(%d) = %.15g < c(%d) = %.15g below s_u = %d", sys.Demand, S, s, c, s+1, prev, su)
				}
				if f > pf+tol || so < ps-tol {
					t.Errorf("%v S=%d: service not monotone at s=%d", sys.Demand, S, s)
				}
				prev, pf, ps = c, f, so
			}
		}
	}
}

// TestFloorRecursionBound checks, with direct sums, the inequality behind
// the sweep's stopping rule (doc of ssConstrained; our argument):
// c(s, S) >= min(G(S), min_{1 <= i <= w, i < S-s} c(s, S-i)), on lattice and
// negative binomial demand.
func TestFloorRecursionBound(t *testing.T) {
	for _, sys := range []inventory.System{
		optSystem(latticePMF(t, 10, 0.5, 0.1, 0.2, 0, 0.1), 1, 1, 9, 50),
		optSystem(optNegBin(t, 5, 20), 2, 1, 9, 64),
	} {
		mo, err := newBOModel(sys)
		if err != nil {
			t.Fatal(err)
		}
		k := mo.sparseKernel()
		ystar, _ := mo.fractile()
		for S := ystar - 20; S < ystar+150; S += 3 {
			for s := S - 1; s > S-160; s -= 5 {
				lb := mo.G(S)
				for _, i := range k.at {
					if i < S-s {
						lb = min(lb, mo.ssCost(s, S-i))
					}
				}
				if c := mo.ssCost(s, S); c < lb*(1-1e-12) {
					t.Errorf("%v: c(%d,%d) = %.15g below the bound %.15g", sys.Demand, s, S, c, lb)
				}
			}
		}
	}
}

// TestFloorTrailSums checks the cursors' running sums against direct sums
// after a seeded random walk of pushes and moves (both ways, short and long
// enough to trigger rebuilds), on lattice and Poisson demand.
func TestFloorTrailSums(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 14))
	for _, sys := range []inventory.System{
		optSystem(latticePMF(t, 10, 0.2, 0.3, 0.3, 0.2), 1, 1, 9, 50),
		optSystem(optPoisson(t, 40), 2, 1, 9, 500),
	} {
		mo, err := newBOModel(sys)
		if err != nil {
			t.Fatal(err)
		}
		var work int
		tr := &trail{mo: mo, k: mo.sparseKernel(), nf: 3, work: &work}
		tr.reset(5, 40)
		for step := range 3000 {
			tr.push()
			if step%5 == 0 {
				lo := tr.S - 400
				tr.moveTo(min(tr.S-1, max(lo, tr.s+rng.IntN(61)-30)))
			}
			if step%97 != 0 {
				continue
			}
			c, f, so := mo.ssService(tr.s, tr.S)
			n := mo.cm[tr.S-tr.s]
			got := [3]float64{(mo.k + tr.top(0)) / n, tr.top(1) / n, tr.top(2) / n}
			for i, want := range [3]float64{c, f, so} {
				if !relClose(got[i], want, 1e-11) {
					t.Errorf("%v s=%d S=%d: running sum %d = %.15g, direct %.15g", sys.Demand, tr.s, tr.S, i, got[i], want)
				}
			}
		}
	}
}

// TestFloorsSSLarge checks the benchmark case of issue 5 under a fill-rate
// floor of 0.999 (Poisson mean 400, L = 3, K = 5000, h = 1, b = 19): the
// result meets the floor, equals the result found by the width-by-width
// search that preceded the sweep (s = 1574, S = 3278, cost 1887.95), and no
// policy within 40 of it in s and S is both feasible and cheaper (a partial
// brute force with boModel's direct sums).
func TestFloorsSSLarge(t *testing.T) {
	sys := optSystem(optPoisson(t, 400), 3, 1, 19, 5000)
	fl := floors{minFill: 0.999}
	o, err := Optimize(sys, SS, SearchOptions{MinFillRate: fl.minFill})
	if err != nil {
		t.Fatal(err)
	}
	s, S := o.Policy.ReorderPoint, o.Policy.OrderUpTo
	if s != 1574 || S != 3278 || math.Abs(o.Figures.TotalCost-1887.95) > 0.005 {
		t.Errorf("optimum %v cost %.10f, want s=1574 S=3278 cost about 1887.95", o.Policy, o.Figures.TotalCost)
	}
	mo, _ := newBOModel(sys)
	c := mo.ssCost(s, S)
	for ds := -40; ds <= 40; ds += 4 {
		for dS := -40; dS <= 40; dS += 4 {
			d, fill, so := mo.ssService(s+ds, S+dS)
			if fl.meets(fill, so) && d < c*(1-1e-12) {
				t.Errorf("c(%d,%d) = %.12g, feasible, below the optimum's %.12g", s+ds, S+dS, d, c)
			}
		}
	}
}

// TestFloorExtreme checks that the sweep ends, meeting the floor, for the
// finest floors accepted (fill rate 1 - 1e-12, stockout ceiling 1e-12), and
// that finer ones (the largest float64 below 1, a ceiling of 1e-15 or
// 1e-16) are refused with ErrLimit: the figures that would confirm them
// carry errors of order floorTol = 1e-12, so a policy claimed to meet them
// could miss them.
func TestFloorExtreme(t *testing.T) {
	sys := optSystem(optPoisson(t, 10), 0, 1, 9, 64)
	for _, fl := range []floors{{minFill: math.Nextafter(1, 0)}, {maxStockout: 1e-15}, {maxStockout: 1e-16}} {
		_, err := Optimize(sys, SS, SearchOptions{MinFillRate: fl.minFill, MaxStockout: fl.maxStockout})
		if !errors.Is(err, ErrLimit) {
			t.Errorf("%v: err = %v, want ErrLimit", fl, err)
		}
	}
	for _, fl := range []floors{{minFill: 1 - 1e-12}, {maxStockout: 1e-12}} {
		o, err := Optimize(sys, SS, SearchOptions{MinFillRate: fl.minFill, MaxStockout: fl.maxStockout})
		if err != nil {
			t.Errorf("%v: %v", fl, err)
			continue
		}
		if f := o.Figures; fl.violation(f.FillRate, f.StockoutProbability) > floorTol {
			t.Errorf("%v: %v misses it: fill %.17g stockout %.3g", fl, o.Policy, f.FillRate, f.StockoutProbability)
		}
		t.Logf("%v: %v cost %.6f, %d costed", fl, o.Policy, o.Figures.TotalCost, o.Search.Evaluated)
	}
}

// benchFloor runs Optimize for s-S under a fill-rate floor.
func benchFloor(b *testing.B, sys inventory.System, fill float64) {
	b.ReportAllocs()
	defer cputime.Report(b, cputime.Process())

	for b.Loop() {
		o, err := Optimize(sys, SS, SearchOptions{MinFillRate: fill})
		if err != nil {
			b.Fatal(err)
		}
		b.ReportMetric(float64(o.Search.Evaluated), "costed")
	}
}

// BenchmarkOptimizeSSFloorPoisson400 times Optimize for the benchmark case
// of issue 5 (Poisson mean 400, L = 3, K = 5000, h = 1, b = 19) under a
// fill-rate floor of 0.999: Zheng-Federgruen, the order-up-to sweep, and
// Evaluate of the optimum (compare BenchmarkEvaluateSSOptimumPoisson400).
func BenchmarkOptimizeSSFloorPoisson400(b *testing.B) {
	benchFloor(b, optSystem(optPoisson(b, 400), 3, 1, 19, 5000), 0.999)
}

// rivetSystem is the demo item RIVET-6.4X16 (sold in packs of 10): its
// lead time and costs from data/items.csv and the demand law fitted from
// data/history.csv (`ergostock fit --period week`), a pmf on the multiples
// of 10.
func rivetSystem(b testing.TB) inventory.System {
	d, err := inventory.Parse("pmf:0=0.019230769230769232,10=0.038461538461538464,20=0.10576923076923077,30=0.057692307692307696,40=0.04807692307692308,50=0.08653846153846154,60=0.10576923076923077,70=0.08653846153846154,80=0.07692307692307693,90=0.057692307692307696,100=0.038461538461538464,110=0.038461538461538464,120=0.038461538461538464,130=0.028846153846153848,140=0.028846153846153848,150=0.028846153846153848,160=0.009615384615384616,190=0.009615384615384616,220=0.009615384615384616,240=0.009615384615384616,250=0.009615384615384616,280=0.019230769230769232,310=0.009615384615384616,360=0.009615384615384616,400=0.009615384615384616,470=0.009615384615384616,610=0.009615384615384616")
	if err != nil {
		b.Fatal(err)
	}
	sys := optSystem(d, 3, 0.0007, 0.05, 89.28)
	sys.UnitCost = 0.15
	return sys
}

// BenchmarkOptimizeSSFloorLattice times Optimize for the demo item
// RIVET-6.4X16 (lattice demand in packs of 10) under a fill-rate floor of
// 0.999, the slowest case of the demo batch report before the sweep.
func BenchmarkOptimizeSSFloorLattice(b *testing.B) {
	benchFloor(b, rivetSystem(b), 0.999)
}

// BenchmarkFloorSweepLattice times the constrained search alone (tables,
// Zheng-Federgruen, the sweep; no Evaluate) for the lattice demo item.
func BenchmarkFloorSweepLattice(b *testing.B) {
	sys := rivetSystem(b)
	defer cputime.Report(b, cputime.Process())

	for b.Loop() {
		mo, err := newBOModel(sys)
		if err != nil {
			b.Fatal(err)
		}
		r, err := mo.zhengFedergruen()
		if err != nil {
			b.Fatal(err)
		}
		if _, err := mo.ssConstrained(floors{minFill: 0.999}, r); err != nil {
			b.Fatal(err)
		}
	}
}
