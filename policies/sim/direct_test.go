package sim

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"ergostock/inventory"
	"ergostock/policies"
)

// binnedChiSquare draws n values and returns Pearson's statistic over
// classes of the support cut at the given edges (class i holds
// edges[i-1] <= D < edges[i], with -inf and +inf at the ends), each
// expected count computed from the law's CDF, and the degrees of freedom.
func binnedChiSquare(t *testing.T, s *sampler, cdf func(int) float64, edges []int, n int, seed uint64) (float64, int) {
	t.Helper()
	rng := rand.NewPCG(seed, 11)
	count := make([]int, len(edges)+1)
	for range n {
		v := s.draw(rng)
		if v < 0 {
			t.Fatalf("negative draw %d", v)
		}
		i := 0
		for i < len(edges) && v >= int64(edges[i]) {
			i++
		}
		count[i]++
	}
	var stat float64
	prev := 0.0
	for i := range count {
		c := 1.0
		if i < len(edges) {
			c = cdf(edges[i] - 1)
		}
		e := float64(n) * (c - prev)
		prev = c
		if e < 5 {
			t.Fatalf("class %d: expected count %.2f < 5; widen the classes", i, e)
		}
		d := float64(count[i]) - e
		stat += d * d / e
	}
	return stat, len(count) - 1
}

// quantileEdges returns the class edges at the quantiles j/m of d, found
// from its CDF by bisection, so that every class holds about 1/m of the
// mass; duplicates are dropped. When P(D = 0) > 1/2, 0 is a class of its
// own and the quantiles are those of the rest.
func quantileEdges(d inventory.Distribution, m int) []int {
	var edges []int
	c0 := 0.0
	if p0 := d.CDF(0); p0 > 0.5 {
		c0, edges = p0, []int{1}
	}
	for j := 1; j < m; j++ {
		q := c0 + (1-c0)*float64(j)/float64(m)
		lo, hi := -1, 1
		for d.CDF(hi) < q {
			hi *= 2
		}
		for hi-lo > 1 {
			mid := lo + (hi-lo)/2
			if d.CDF(mid) >= q {
				hi = mid
			} else {
				lo = mid
			}
		}
		if len(edges) == 0 || hi+1 > edges[len(edges)-1] {
			edges = append(edges, hi+1)
		}
	}
	return edges
}

// TestDirectSamplersLaw checks each direct sampler against the pmf of its
// law by Pearson's chi-square test over 40 equiprobable classes (K.
// Pearson, "On the criterion that a given system of deviations ...",
// Philosophical Magazine 50, 1900; classes of equal probability as
// recommended by H. B. Mann and A. Wald, Ann. Math. Statist. 13, 1942),
// 200,000 seeded draws, critical value at the 0.1% level from gonum's
// distuv.ChiSquared. The expected counts come from the inventory package's
// CDF, the closed forms of the SPEC (incomplete gamma and beta, the normal
// CDF at k + 1/2).
func TestDirectSamplersLaw(t *testing.T) {
	for _, spec := range []string{
		"poisson:mean=1e7", "poisson:mean=1e9",
		"negbin:mean=1e7,var=1e14", "negbin:mean=1e3,var=1e9", // size 1e-3: 98.6% of the mass at 0, Poisson with small means
		"normal:mean=1e9,sd=1e7", "normal:mean=100,sd=1e6", // most mass rounded to 0
		"gamma:mean=1e9,sd=1e8", "gamma:mean=1e6,sd=1e7", // shape 0.01: the boosted gamma
	} {
		t.Run(spec, func(t *testing.T) {
			d, err := inventory.Parse(spec)
			if err != nil {
				t.Fatal(err)
			}
			s := newSampler(d)
			if s.by == byAlias {
				t.Fatalf("alias table of %d cells, want a direct sampler", len(s.cells))
			}
			edges := quantileEdges(d, 40)
			stat, df := binnedChiSquare(t, s, d.CDF, edges, 200_000, 5)
			if crit := (distuv.ChiSquared{K: float64(df)}).Quantile(0.999); stat > crit {
				t.Errorf("chi-square %.1f > %.1f (df %d, 0.1%% level)", stat, crit, df)
			}
		})
	}
}

// TestPoissonExactPMF checks the small-mean inversion and PTRS at means
// where each value's probability can be counted: Pearson's test over the
// single values holding at least 5 expected draws, the rest lumped,
// against gonum's distuv.Poisson pmf (an outside reference).
func TestPoissonExactPMF(t *testing.T) {
	for _, mu := range []float64{0.3, 4, 9.99, 10, 35, 400} {
		ref := distuv.Poisson{Lambda: mu}
		const n = 200_000
		rng := rand.NewPCG(3, uint64(mu*100))
		count := map[int]int{}
		for range n {
			count[int(poisson(rng, mu))]++
		}
		var stat float64
		df := -1
		lumpE, lumpC := float64(n), n
		for k := 0; k < int(mu+20*math.Sqrt(mu)+20); k++ {
			e := n * ref.Prob(float64(k))
			if e < 5 {
				continue
			}
			d := float64(count[k]) - e
			stat += d * d / e
			df++
			lumpE -= e
			lumpC -= count[k]
		}
		if lumpE >= 5 {
			d := float64(lumpC) - lumpE
			stat += d * d / lumpE
			df++
		}
		if crit := (distuv.ChiSquared{K: float64(df)}).Quantile(0.999); stat > crit {
			t.Errorf("mean %g: chi-square %.1f > %.1f (df %d)", mu, stat, crit, df)
		}
	}
}

// TestDirectSamplerMoments checks the sample mean of 100,000 draws against
// the law's exact mean within 5 standard errors (the central limit
// theorem), for the laws whose chi-square classes cannot see the far tail.
func TestDirectSamplerMoments(t *testing.T) {
	for _, spec := range []string{"poisson:mean=1e9", "negbin:mean=1e8,var=1e12", "normal:mean=1e9,sd=1e8", "gamma:mean=5e8,sd=5e8"} {
		d, err := inventory.Parse(spec)
		if err != nil {
			t.Fatal(err)
		}
		s := newSampler(d)
		rng := rand.NewPCG(9, 9)
		const n = 100_000
		var sum inventory.CompensatedSum
		for range n {
			sum.Add(float64(s.draw(rng)))
		}
		mean := sum.Value() / n
		se := math.Sqrt(d.Variance() / n)
		if math.Abs(mean-d.Mean()) > 5*se {
			t.Errorf("%s: sample mean %.6g, want %.6g ± %.3g", spec, mean, d.Mean(), 5*se)
		}
	}
}

// TestDirectSamplerDeterministic: the same stream gives the same draws.
func TestDirectSamplerDeterministic(t *testing.T) {
	d, _ := inventory.Parse("negbin:mean=1e7,var=1e14")
	s := newSampler(d)
	a, b := rand.NewPCG(1, 2), rand.NewPCG(1, 2)
	for range 1000 {
		if x, y := s.draw(a), s.draw(b); x != y {
			t.Fatalf("draws %d and %d from one stream", x, y)
		}
	}
}

// TestRoundDemand pins the SPEC's discretisation: D = k exactly when
// k - 1/2 < X <= k + 1/2, D = 0 when X <= 1/2.
func TestRoundDemand(t *testing.T) {
	for _, c := range []struct{ x, want float64 }{
		{-3, 0}, {0, 0}, {0.5, 0}, {math.Nextafter(0.5, 1), 1}, {1.5, 1}, {1.5000001, 2}, {7.2, 7}, {7.5, 7}, {7.6, 8},
	} {
		if got := roundDemand(c.x); got != c.want {
			t.Errorf("roundDemand(%g) = %g, want %g", c.x, got, c.want)
		}
	}
}

// TestRunWideLawAcrossWorkers: with a direct sampler the figures of every
// replication are identical on any number of workers.
func TestRunWideLawAcrossWorkers(t *testing.T) {
	d, _ := inventory.Parse("negbin:mean=1e7,var=1e14")
	sys := inventory.System{Demand: d, LeadTime: 1, Holding: 1, Shortage: 9, OrderCost: 50, Mode: inventory.Backorder}
	p := policies.Policy{Kind: policies.SS, ReorderPoint: 30_000_000, OrderUpTo: 60_000_000}
	var first *Result
	for _, w := range []int{1, 3, 7} {
		res, err := Run(sys, p, Options{Periods: 5000, Warmup: 500, Replications: 7, Seed: 3, Workers: w})
		if err != nil {
			t.Fatal(err)
		}
		if res.TableMax != -1 {
			t.Errorf("TableMax %d, want -1 (drawn directly)", res.TableMax)
		}
		if first == nil {
			first = res
			continue
		}
		for r := range res.PerReplication {
			if res.PerReplication[r] != first.PerReplication[r] {
				t.Errorf("workers %d, replication %d: %+v, want %+v", w, r, res.PerReplication[r], first.PerReplication[r])
			}
		}
	}
}

// TestLimits: each input over a limit is refused before allocation with a
// *LimitError naming it.
func TestLimits(t *testing.T) {
	pois, _ := inventory.Parse("poisson:mean=9")
	sys := inventory.System{Demand: pois, Holding: 1, Shortage: 9, Mode: inventory.Backorder}
	bs := policies.Policy{Kind: policies.BaseStock, OrderUpTo: 20}
	ok := Options{Periods: 1000, Replications: 4}
	for _, c := range []struct {
		name  string
		lead  int
		p     policies.Policy
		opt   Options
		field string
	}{
		{"replications", 0, bs, Options{Periods: 1, Replications: 1 << 30}, "replications"},
		{"workers", 0, bs, Options{Periods: 1000, Replications: 4, Workers: MaxWorkers + 1}, "workers"},
		{"budget", 0, bs, Options{Periods: 1000, Replications: 4, PeriodBudget: 3999}, "periods"},
		{"pipelines", 1 << 28, bs, Options{Periods: 1000, Replications: 4, Workers: 4}, "lead_time"},
		{"memory limit", 1 << 20, bs, Options{Periods: 1000, Replications: 4, Workers: 4, MaxBytes: 1 << 20}, "lead_time"},
		{"level", 0, policies.Policy{Kind: policies.BaseStock, OrderUpTo: 1 << 61}, ok, "order_up_to"},
		{"order multiple", 0, policies.Policy{Kind: policies.SNQ, ReorderPoint: 0, OrderMultiple: 1 << 61}, ok, "order_multiple"},
		{"sums", 0, policies.Policy{Kind: policies.BaseStock, OrderUpTo: 1 << 59}, Options{Periods: 100, Replications: 2}, "periods"},
	} {
		s := sys
		s.LeadTime = c.lead
		err := Check(s, c.p, c.opt)
		var le *LimitError
		if !errors.As(err, &le) || le.Field != c.field {
			t.Errorf("%s: error %v, want a LimitError naming %s", c.name, err, c.field)
		}
	}
}

// TestRangeStop: a draw beyond the bound the sums can hold stops the
// replication with a *RangeError rather than wrap.
func TestRangeStop(t *testing.T) {
	pois, _ := inventory.Parse("poisson:mean=9")
	sys := inventory.System{Demand: pois, Holding: 1, Shortage: 9, Mode: inventory.Backorder}
	_, err := replicate(sys, policies.Policy{Kind: policies.BaseStock, OrderUpTo: 20}, newSampler(pois), nil, Options{Periods: 1000, Replications: 2}, 0, 5)
	if err == nil || err.Demand <= 5 || err.Limit != 5 {
		t.Errorf("error %v, want a RangeError over 5", err)
	}
}

// TestIntervalLargeFigures: the interval of figures near the float64 limit
// is finite (the squares are scaled).
func TestIntervalLargeFigures(t *testing.T) {
	m, h := interval([]float64{1e307, 3e307, 5e307}, 0.95)
	if math.IsInf(m, 0) || math.IsInf(h, 0) || math.IsNaN(h) || math.Abs(m-3e307) > 1e293 {
		t.Errorf("mean %g, half-width %g", m, h)
	}
}
