package sim

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// geometric is a test distribution with closed forms everywhere:
// P(D = k) = p (1-p)^k, P(D >= k) = (1-p)^k.
type geometric struct{ p float64 }

func (g geometric) PMF(k int) float64 {
	if k < 0 {
		return 0
	}
	return g.p * math.Pow(1-g.p, float64(k))
}
func (g geometric) CDF(k int) float64 { return 1 - g.Tail(k+1) }
func (g geometric) Tail(k int) float64 {
	if k <= 0 {
		return 1
	}
	return math.Pow(1-g.p, float64(k))
}
func (g geometric) Mean() float64     { return (1 - g.p) / g.p }
func (g geometric) Variance() float64 { return (1 - g.p) / (g.p * g.p) }
func (g geometric) Bound(eps float64) int {
	k := 0
	for g.Tail(k+1) > eps {
		k++
	}
	return k
}
func (g geometric) String() string { return "geometric" }

// chiSquare draws n values and returns the Pearson statistic over the
// classes 0..m-1 and ">= m", with its degrees of freedom.
func chiSquare(t *testing.T, s *sampler, pmf func(int) float64, tail func(int) float64, m, n int, seed uint64) (stat float64, df int) {
	t.Helper()
	rng := rand.NewPCG(seed, 7)
	count := make([]int, m+1)
	for range n {
		v := s.draw(rng)
		if v < 0 {
			t.Fatalf("negative draw %d", v)
		}
		count[min(int(v), m)]++
	}
	for k := 0; k <= m; k++ {
		e := float64(n) * tail(m)
		if k < m {
			e = float64(n) * pmf(k)
		}
		d := float64(count[k]) - e
		stat += d * d / e
	}
	return stat, m
}

func TestSamplerGoodnessOfFit(t *testing.T) {
	// Pearson's chi-square test of the draws against the pmf (K. Pearson,
	// 1900); critical value from gonum's distuv.ChiSquared at 0.1%.
	pois := distuv.Poisson{Lambda: 4}
	geo := geometric{p: 0.3}
	for _, c := range []struct {
		name string
		s    *sampler
		pmf  func(int) float64
		tail func(int) float64
		m    int
	}{
		{"poisson(4) via gonum pmf", newSampler(poissonRef{pois}), func(k int) float64 { return pois.Prob(float64(k)) }, func(k int) float64 { return pois.Survival(float64(k) - 1) }, 12},
		{"geometric(0.3), full table", newSampler(geo), geo.PMF, geo.Tail, 15},
		// A table over 0..1 only: P(D > 1) = 0.49 goes through the tail inversion.
		{"geometric(0.3), table 0..1", newSamplerEps(geo, 0.5), geo.PMF, geo.Tail, 15},
	} {
		t.Run(c.name, func(t *testing.T) {
			stat, df := chiSquare(t, c.s, c.pmf, c.tail, c.m, 200_000, 42)
			crit := distuv.ChiSquared{K: float64(df)}.Quantile(0.999)
			if stat > crit {
				t.Errorf("chi-square %.1f > %.1f (df %d, 0.1%% level)", stat, crit, df)
			}
		})
	}
}

func TestSamplerTailTable(t *testing.T) {
	geo := geometric{p: 0.3}
	s := newSamplerEps(geo, 0.5)
	if s.k != 1 { // P(D > 1) = 0.49 <= 0.5 < P(D > 0)
		t.Fatalf("table max %d, want 1", s.k)
	}
	if got, want := s.tail, geo.Tail(2); got != want {
		t.Errorf("tail %g, want %g", got, want)
	}
	// Conditional on D > 1 the geometric law is memoryless: D - 2 is again
	// geometric(0.3). Check the mean of far draws: (1-p)/p + 2.
	rng := rand.NewPCG(1, 2)
	var sum float64
	const n = 100_000
	for range n {
		v := s.far(rng)
		if v <= s.k {
			t.Fatalf("far draw %d not beyond the table", v)
		}
		sum += float64(v)
	}
	mean, want := sum/n, geo.Mean()+2
	se := math.Sqrt(geo.Variance() / n)
	if math.Abs(mean-want) > 4*se {
		t.Errorf("mean of far draws %.4f, want %.4f ± %.4f", mean, want, 4*se)
	}
}

func TestAliasTableExact(t *testing.T) {
	// The alias table reproduces each probability: column i keeps itself
	// with thr_i/2^64 and donates to its alias otherwise; summing over
	// columns, each value's share times n must equal its scaled weight.
	p := []float64{0.1, 0, 0.45, 0.05, 0.4}
	s := &sampler{cells: make([]cell, len(p)), n: uint64(len(p))}
	s.build(p, 1)
	got := make([]float64, len(p))
	for i, c := range s.cells {
		keep := float64(c.thr) / (1 << 64)
		got[i] += keep / float64(len(p))
		got[c.alias] += (1 - keep) / float64(len(p))
	}
	for i := range p {
		if math.Abs(got[i]-p[i]) > 1e-15 {
			t.Errorf("value %d: table gives %.17g, want %g", i, got[i], p[i])
		}
	}
}

// poissonRef adapts gonum's Poisson to the Distribution interface, as an
// outside reference.
type poissonRef struct{ d distuv.Poisson }

func (p poissonRef) PMF(k int) float64 {
	if k < 0 {
		return 0
	}
	return p.d.Prob(float64(k))
}
func (p poissonRef) CDF(k int) float64 {
	if k < 0 {
		return 0
	}
	return p.d.CDF(float64(k))
}
func (p poissonRef) Tail(k int) float64 {
	if k <= 0 {
		return 1
	}
	return p.d.Survival(float64(k - 1))
}
func (p poissonRef) Mean() float64     { return p.d.Lambda }
func (p poissonRef) Variance() float64 { return p.d.Lambda }
func (p poissonRef) Bound(eps float64) int {
	k := 0
	for p.Tail(k+1) > eps {
		k++
	}
	return k
}
func (p poissonRef) String() string { return "poisson(gonum)" }
