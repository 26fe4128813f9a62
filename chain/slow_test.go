package chain

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"testing"
	"time"
)

// ncdNoGap returns a seeded chain of k blocks of m states, each block a
// ring plus r-1 random targets inside it, and every state sending mass eps
// to a random state of another block. The entries inside a block lie in
// about [0.01, 0.5], so there is no gap of three decades between them and
// eps = 1e-4, and the NCD detection does not fire: nearly completely
// decomposable without a visible gap (Courtois, Decomposability, 1977).
func ncdNoGap(k, m, r int, eps float64, seed uint64) *CSR {
	rng := rand.New(rand.NewPCG(seed, 13))
	n := k * m
	b := NewBuilder(n)
	w := make([]float64, r)
	for i := 0; i < n; i++ {
		blk, l := i/m, i%m
		var s float64
		for t := range w {
			w[t] = rng.Float64() + 0.05
			s += w[t]
		}
		for t := range w {
			w[t] *= (1 - eps) / s
		}
		b.Add(i, blk*m+(l+1)%m, w[0])
		for t := 1; t < r; t++ {
			b.Add(i, blk*m+rng.IntN(m), w[t])
		}
		other := (blk + 1 + rng.IntN(k-1)) % k
		b.Add(i, other*m+rng.IntN(m), eps)
	}
	c, err := b.Build()
	if err != nil {
		panic(err)
	}
	return c
}

// lostSales returns the base-stock lost-sales chain with lead time 2 and
// order-up-to level S under Poisson(mu) demand, its state (x, o) the on
// hand after demand and the order in the pipeline: the order S - x - o
// placed now arrives in two periods, o arrives at the start of the next,
// and demand beyond the stock is lost (the model of Karlin & Scarf, 1958;
// common practice).
func lostSales(S int, pmf []float64) *CSR {
	id := func(x, o int) int { return x*(S+1) - x*(x-1)/2 + o } // x+o <= S
	n := id(S, 0) + 1
	b := NewBuilder(n)
	for x := 0; x <= S; x++ {
		for o := 0; x+o <= S; o++ {
			i := id(x, o)
			q := S - x - o
			a := x + o
			var s float64
			for d := 0; d < a; d++ {
				b.Add(i, id(a-d, q), pmf[d])
				s += pmf[d]
			}
			b.Add(i, id(0, q), max(1-s, 0)) // D >= a: nothing left
		}
	}
	c, err := b.Build()
	if err != nil {
		panic(err)
	}
	return c
}

// Slowly mixing chains on which plain Gauss-Seidel needs more than 20,000
// sweeps (checked once when this test was written: residuals 6.7e-8 and
// 9.4e-7 after 20,000 sweeps): the automatic choice switches to GMRES and
// meets the tolerance, with residual and balance checked.
func TestAutoSwitchesFromCrawlingGaussSeidel(t *testing.T) {
	for _, tc := range []struct {
		name string
		m    *CSR
	}{
		{"nearly decomposable, no gap, 10000 states", ncdNoGap(100, 100, 5, 1e-4, 1)},
		{"lost sales, heavy losses, normal(100, 8), S = 140, L = 2", lostSales(140, normalPMF(100, 8, 140))},
	} {
		r := mustSolve(t, tc.m, Options{})
		d := r.Diagnostics
		if d.Method != MethodGaussSeidel+"->"+MethodGMRES || d.Fallback == "" {
			t.Errorf("%s: method %q (fallback %q), want gauss-seidel->gmres", tc.name, d.Method, d.Fallback)
		}
		if d.Residual > DefaultTol || d.Balance > 1e-14 || d.Iterations > 1000 {
			t.Errorf("%s: residual %.3g, balance %.3g, %d iterations", tc.name, d.Residual, d.Balance, d.Iterations)
		}
		if k := badEntry(r.Pi); k >= 0 {
			t.Errorf("%s: pi[%d] = %v", tc.name, k, r.Pi[k])
		}
		// The same chain with an explicit gauss-seidel and Fallback.
		r2 := mustSolve(t, tc.m, Options{Method: MethodGaussSeidel, Fallback: true})
		if r2.Diagnostics.Method != d.Method {
			t.Errorf("%s: with Fallback, method %q", tc.name, r2.Diagnostics.Method)
		}
	}
}

// GMRES agrees componentwise with GTH (componentwise accurate: Grassmann,
// Taksar & Heyman 1985; O'Cinneide 1993) on slowly mixing chains small
// enough for dense GTH, and a drifting birth-death chain given to
// gauss-seidel with Fallback switches to banded GTH.
func TestGMRESAgreesWithGTH(t *testing.T) {
	for _, tc := range []struct {
		name string
		m    *CSR
		rel  float64
	}{
		{"nearly decomposable", ncdNoGap(20, 100, 5, 1e-4, 2), 1e-8},
		{"lost sales heavy", lostSales(60, normalPMF(40, 4, 60)), 1e-8},
		{"lost sales poisson", lostSales(60, poissonPMF(12, 60)), 1e-9},
		{"random sparse", randomSparse(1500, 4, 9), 1e-10},
		// Blocks coupled in a cycle: GMRES(50) stagnates at residual 5e-8
		// and needs the restart length to grow.
		{"cyclic blocks", cyclicNCD(25, 100, 1e-4), 1e-8},
	} {
		g := mustSolve(t, tc.m, Options{Method: MethodGTH})
		r, err := Solve(tc.m, Options{Method: MethodGMRES})
		if err != nil {
			t.Errorf("%s: %v", tc.name, err)
			continue
		}
		if r.Diagnostics.Method != MethodGMRES || r.Diagnostics.Residual > DefaultTol {
			t.Errorf("%s: %+v", tc.name, r.Diagnostics)
		}
		// Relative error where pi is not tiny; absolute below.
		var worst float64
		for i, w := range g.Pi {
			worst = max(worst, math.Abs(r.Pi[i]-w)/max(w, 1e-6))
		}
		if worst > tc.rel {
			t.Errorf("%s: gmres vs gth: worst error %.3g, want <= %g", tc.name, worst, tc.rel)
		}
	}
	bd := birthDeath(20000, 0.3, 0.31)
	r := mustSolve(t, bd, Options{Method: MethodGaussSeidel, Fallback: true})
	if r.Diagnostics.Method != MethodGaussSeidel+"->"+MethodGTH {
		t.Errorf("birth-death: method %q, want gauss-seidel->gth", r.Diagnostics.Method)
	}
}

// birthDeath returns the chain on 0..n-1 that moves up with probability
// up, down with down, and otherwise stays (reflecting ends: the move out
// of range stays).
func birthDeath(n int, up, down float64) *CSR {
	b := NewBuilder(n)
	for i := 0; i < n; i++ {
		stay := 1.0
		if i < n-1 {
			b.Add(i, i+1, up)
			stay -= up
		}
		if i > 0 {
			b.Add(i, i-1, down)
			stay -= down
		}
		b.Add(i, i, stay)
	}
	c, err := b.Build()
	if err != nil {
		panic(err)
	}
	return c
}

// BenchmarkSlowMixing10k: 10,000-state chains on which Gauss-Seidel needs
// more than 20,000 sweeps, solved by auto (Gauss-Seidel, then GMRES).
// Target (issue 14): well under a second.
func BenchmarkSlowMixing10k(b *testing.B) {
	for _, tc := range []struct {
		name string
		m    *CSR
	}{
		{"ncd", ncdNoGap(100, 100, 5, 1e-4, 1)},
		{"lost-heavy", lostSales(140, normalPMF(100, 8, 140))},
	} {
		b.Run(tc.name, func(b *testing.B) {
			var r Result
			for b.Loop() {
				var err error
				if r, err = Solve(tc.m, Options{}); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(r.Diagnostics.Iterations), "steps")
			b.ReportMetric(r.Diagnostics.Residual*1e15, "residual-1e-15")
		})
	}
}

// poissonPMF returns P(D = d), d = 0..k, for Poisson(mu) demand.
func poissonPMF(mu float64, k int) []float64 {
	pmf := make([]float64, k+1)
	pmf[0] = math.Exp(-mu)
	for d := 1; d <= k; d++ {
		pmf[d] = pmf[d-1] * mu / float64(d)
	}
	return pmf
}

// normalPMF returns the normal(mu, sd) law rounded to integers and cut at
// 0 (the mass below -0.5 joins 0), d = 0..k.
func normalPMF(mu, sd float64, k int) []float64 {
	cdf := func(x float64) float64 { return 0.5 * math.Erfc(-(x-mu)/(sd*math.Sqrt2)) }
	pmf := make([]float64, k+1)
	for d := 0; d <= k; d++ {
		pmf[d] = cdf(float64(d)+0.5) - cdf(float64(d)-0.5)
	}
	pmf[0] = cdf(0.5)
	return pmf
}

// A caller's context stops every iterative method between sweeps, and
// the error wraps the context's.
func TestContextStopsIterativeMethods(t *testing.T) {
	ncd := ncdNoGap(20, 50, 4, 1e-4, 3)
	gap := randomNCD(20, 50, 4, 1e-10, 5)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	for _, tc := range []struct {
		m    Method
		c    *CSR
		auto bool
	}{
		{MethodGaussSeidel, ncd, false}, {MethodPower, ncd, false}, {MethodGMRES, ncd, false},
		{MethodIAD, gap, false}, {MethodGaussSeidel, ncd, true},
	} {
		_, err := Solve(tc.c, Options{Method: tc.m, Context: ctx, Fallback: tc.auto})
		if !errors.Is(err, context.Canceled) {
			t.Errorf("%s (fallback %v): err = %v, want one wrapping context.Canceled", tc.m, tc.auto, err)
		}
	}
	dl, cancel2 := context.WithTimeout(context.Background(), 20*time.Millisecond)
	defer cancel2()
	_, err := Solve(ncdNoGap(100, 100, 5, 1e-4, 1), Options{Method: MethodGaussSeidel, MaxIter: 1 << 30, Context: dl})
	if !errors.Is(err, context.DeadlineExceeded) {
		t.Errorf("deadline: err = %v", err)
	}
}

// cyclicNCD returns blocks of size states, each a ring with two chords of
// uneven weights (down to 0.01, so no magnitude gap), every state sending
// eps to the same position in the next block: the blocks form a cycle.
func cyclicNCD(blocks, size int, eps float64) *CSR {
	b := NewBuilder(blocks * size)
	for i := 0; i < blocks*size; i++ {
		blk, l := i/size, i%size
		w := 0.2 + 0.06*float64(l*7%10)
		b.Add(i, blk*size+(l+1)%size, w*(1-eps))
		b.Add(i, blk*size+(l+37)%size, (0.99-w)*(1-eps))
		b.Add(i, blk*size+(l+61)%size, 0.01*(1-eps))
		b.Add(i, ((blk+1)%blocks)*size+l, eps)
	}
	c, err := b.Build()
	if err != nil {
		panic(err)
	}
	return c
}
