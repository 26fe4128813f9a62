package chain

import (
	"errors"
	"fmt"

	"math/rand/v2"
	"testing"
)

// ncdChain builds a nearly completely decomposable chain of k blocks of m
// states with a known stationary distribution, the states numbered in a
// random order (so the chain is neither banded nor blocked by index).
//
// Block I carries B_I = sum_t w_t Q_t, a convex combination of r
// permutation matrices (Q_0 the cyclic shift, so B_I is irreducible; the
// others random): B_I is doubly stochastic (Birkhoff). State l of block I
// moves within the block by (1 - c_I) B_I(l, .) and to state sigma_I(l) of
// block I+1 (mod k) with probability c_I = coupling * (1 + I mod 7),
// sigma_I a random permutation.
//
// Closed form (derived here): try pi(I,l) = a_I / m. The flow into state
// j of block J is (a_J/m)(1 - c_J) sum_l B_J(l,j) + (a_{J-1}/m) c_{J-1}
// = (a_J/m)(1 - c_J) + (a_{J-1}/m) c_{J-1}, which equals pi(J,j) = a_J/m
// iff a_J c_J = a_{J-1} c_{J-1} for every J: the aggregated chain is a
// one-way cycle, with constant flow around it, so a_I = (1/c_I) /
// sum_K (1/c_K). The chain is irreducible, so this is the unique answer
// (Kemeny & Snell, Finite Markov Chains, 1960).
func ncdChain(k, m, r int, coupling float64, seed uint64) (*CSR, []float64) {
	rng := rand.New(rand.NewPCG(seed, 23))
	n := k * m
	lab := rng.Perm(n) // lab[I*m+l] is the state of (I, l)
	c := make([]float64, k)
	var inv float64
	for I := range c {
		c[I] = coupling * float64(1+I%7)
		inv += 1 / c[I]
	}
	pi := make([]float64, n)
	b := NewBuilder(n)
	b.Grow(n * (r + 1))
	w := make([]float64, r)
	for I := 0; I < k; I++ {
		perms := make([][]int, r)
		perms[0] = make([]int, m)
		for l := range perms[0] {
			perms[0][l] = (l + 1) % m
		}
		for t := 1; t < r; t++ {
			perms[t] = rng.Perm(m)
		}
		var s float64
		for t := range w {
			w[t] = 0.2 + rng.Float64()
			s += w[t]
		}
		sigma := rng.Perm(m)
		next := (I + 1) % k
		for l := 0; l < m; l++ {
			from := lab[I*m+l]
			for t := range w {
				b.Add(from, lab[I*m+perms[t][l]], (1-c[I])*w[t]/s)
			}
			b.Add(from, lab[next*m+sigma[l]], c[I])
			pi[from] = (1 / c[I]) / inv / float64(m)
		}
	}
	p, err := b.Build()
	if err != nil {
		panic(err)
	}
	return p, pi
}

// TestIADNearlyDecomposable: auto must pick IAD on a large non-banded NCD
// chain with coupling 1e-10 and match the closed form of ncdChain
// componentwise; plain Gauss-Seidel from the same (uniform) start does not
// get there: its residual, of the order of coupling x aggregate error,
// shrinks by about (1 - coupling) per sweep (Stewart 1994, sec. 6.1).
func TestIADNearlyDecomposable(t *testing.T) {
	for _, tc := range []struct {
		k, m, r int
		seed    uint64
		init    bool
	}{
		{30, 100, 3, 1, false},
		{50, 100, 4, 2, false},
		{60, 80, 2, 3, false},
		{30, 100, 3, 1, true},
		{50, 100, 4, 2, true},
		{60, 80, 2, 3, true},
		// Blocks above IADDirectBlock: inner point sweeps, not GTH.
		{4, 600, 3, 6, false},
		{4, 600, 3, 6, true},
	} {
		t.Run(fmt.Sprintf("%dx%d/init=%t", tc.k, tc.m, tc.init), func(t *testing.T) {
			p, want := ncdChain(tc.k, tc.m, tc.r, 1e-10, tc.seed)
			// From the uniform start the conditional vectors within the
			// blocks are already exact (the blocks are doubly stochastic),
			// so one IAD step ends it; a random start makes it iterate.
			var init []float64
			if tc.init {
				rng := rand.New(rand.NewPCG(tc.seed, 99))
				init = make([]float64, p.Len())
				for i := range init {
					init[i] = 0.01 + rng.Float64()
				}
			}
			res, err := Solve(p, Options{Init: init})
			if err != nil {
				t.Fatal(err)
			}
			d := res.Diagnostics
			if d.Method != MethodIAD {
				t.Fatalf("auto chose %s, want iad", d.Method)
			}
			if e := maxRelErr(res.Pi, want); e > 1e-12 {
				t.Errorf("max relative error %.3g vs closed form, want <= 1e-12", e)
			}
			if d.Residual > DefaultTol || d.Iterations > 10 {
				t.Errorf("residual %.3g after %d iterations", d.Residual, d.Iterations)
			}
			t.Logf("iad: %d iterations, residual %.3g, max rel err %.3g", d.Iterations, d.Residual, maxRelErr(res.Pi, want))
			gs, err := Solve(p, Options{Method: MethodGaussSeidel, MaxIter: 2000, Init: init})
			t.Logf("gauss-seidel: %v", err)
			if err == nil {
				t.Logf("gauss-seidel: %d sweeps, residual %.3g, max rel err %.3g", gs.Diagnostics.Iterations, gs.Diagnostics.Residual, maxRelErr(gs.Pi, want))
				if e := maxRelErr(gs.Pi, want); e < 1e-6 {
					t.Errorf("gauss-seidel reached relative error %.3g: the test no longer shows why IAD is needed", e)
				}
			} else if !errors.Is(err, ErrNotConverged) {
				t.Fatal(err)
			}
		})
	}
}

func TestIADSmallExplicit(t *testing.T) {
	p, want := ncdChain(3, 8, 2, 1e-10, 7)
	res, err := Solve(p, Options{Method: MethodIAD})
	if err != nil {
		t.Fatal(err)
	}
	if e := maxRelErr(res.Pi, want); e > 1e-12 {
		t.Errorf("iad: max relative error %.3g vs closed form (ncdChain), want <= 1e-12", e)
	}
	g, err := Solve(p, Options{Method: MethodGTH})
	if err != nil {
		t.Fatal(err)
	}
	if e := maxRelErr(res.Pi, g.Pi); e > 1e-12 {
		t.Errorf("iad vs gth: max relative error %.3g, want <= 1e-12", e)
	}
	if res.Diagnostics.Balance > 1e-12 {
		t.Errorf("balance %.3g", res.Diagnostics.Balance)
	}
}

// randomNCD is a nearly decomposable chain of k blocks of m states with
// random sparse rows inside the blocks (a cyclic shift plus r-1 random
// targets, weights in [0.05, 1.05) normalised) and, from every state, two
// transitions of probability in [0.5, 1.5) x coupling to random states
// of other blocks; the states are numbered in a random order.
func randomNCD(k, m, r int, coupling float64, seed uint64) *CSR {
	rng := rand.New(rand.NewPCG(seed, 31))
	n := k * m
	lab := rng.Perm(n)
	b := NewBuilder(n)
	w := make([]float64, r)
	for I := 0; I < k; I++ {
		for l := 0; l < m; l++ {
			from := lab[I*m+l]
			var out float64
			for range 2 {
				J := (I + 1 + rng.IntN(k-1)) % k
				p := coupling * (0.5 + rng.Float64())
				b.Add(from, lab[J*m+rng.IntN(m)], p)
				out += p
			}
			var s float64
			for t := range w {
				w[t] = 0.05 + rng.Float64()
				s += w[t]
			}
			b.Add(from, lab[I*m+(l+1)%m], (1-out)*w[0]/s)
			for t := 1; t < r; t++ {
				b.Add(from, lab[I*m+rng.IntN(m)], (1-out)*w[t]/s)
			}
		}
	}
	c, err := b.Build()
	if err != nil {
		panic(err)
	}
	return c
}

// TestIADRandomBlocks: IAD against dense GTH, which is componentwise
// accurate at any coupling (O'Cinneide, Numer. Math. 65, 1993), on chains
// whose conditional vectors within the blocks are not known in advance,
// from the uniform start, a random one and a point mass.
func TestIADRandomBlocks(t *testing.T) {
	p := randomNCD(24, 50, 4, 1e-10, 8)
	g, err := Solve(p, Options{Method: MethodGTH})
	if err != nil {
		t.Fatal(err)
	}
	n := p.Len()
	rng := rand.New(rand.NewPCG(8, 8))
	random := make([]float64, n)
	for i := range random {
		random[i] = rng.Float64()
	}
	point := make([]float64, n)
	point[17] = 1
	for _, tc := range []struct {
		name string
		init []float64
	}{{"uniform", nil}, {"random", random}, {"point", point}} {
		res, err := Solve(p, Options{Method: MethodIAD, Init: tc.init})
		if err != nil {
			t.Errorf("%s: %v", tc.name, err)
			continue
		}
		e := maxRelErr(res.Pi, g.Pi)
		t.Logf("%s: %d iterations, residual %.3g, max rel err vs gth %.3g", tc.name, res.Diagnostics.Iterations, res.Diagnostics.Residual, e)
		if e > 1e-12 {
			t.Errorf("%s: max relative error vs gth %.3g, want <= 1e-12", tc.name, e)
		}
	}
}

// TestNCDDetection: which chains the detection accepts (common practice:
// drop the entries below a gap in magnitude, blocks = strongly connected
// components of the rest; Stewart 1994, sec. 6.1).
func TestNCDDetection(t *testing.T) {
	ncd, _ := ncdChain(10, 20, 3, 1e-10, 4)
	strong, _ := ncdChain(10, 20, 3, 1e-2, 4) // coupling 1e-2 to 7e-2: no gap below 2^-10
	gap := randomSparse(300, 4, 9)            // one entry made tiny: a gap, but one block
	b := NewBuilder(gap.n)
	for i := 0; i < gap.n; i++ {
		gap.Row(i, func(j int, p float64) {
			if i == 5 && j == 6 {
				b.Add(i, j, 1e-12)
				b.Add(i, i, p-1e-12)
				return
			}
			b.Add(i, j, p)
		})
	}
	gapped, err := b.Build()
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name string
		c    *CSR
		nb   int // 0: rejected
	}{
		{"ncd 10 blocks", ncd, 10},
		{"strong coupling", strong, 0},
		{"random", randomSparse(300, 4, 9), 0},
		{"gap, one block", gapped, 0},
	} {
		p, ok := ncdPartition(tc.c)
		if !ok {
			p.nb = 0
		}
		if p.nb != tc.nb {
			t.Errorf("%s: %d blocks, want %d", tc.name, p.nb, tc.nb)
		}
		if ok && p.coupling > 7e-10*(1+1e-12) {
			t.Errorf("%s: coupling %.3g, want <= 7e-10", tc.name, p.coupling)
		}
	}
	if _, err := Solve(randomSparse(300, 4, 9), Options{Method: MethodIAD}); err == nil {
		t.Error("iad on a chain without blocks: want an error")
	} else if me := (*MethodMismatchError)(nil); !errors.As(err, &me) {
		t.Errorf("iad on a chain without blocks: %v, want a *MethodMismatchError", err)
	}
}

// A large random chain that is not NCD still goes to Gauss-Seidel.
func TestAutoNonNCDGaussSeidel(t *testing.T) {
	p := randomSparse(5000, 5, 12)
	res, err := Solve(p, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if res.Diagnostics.Method != MethodGaussSeidel {
		t.Errorf("auto chose %s, want gauss-seidel", res.Diagnostics.Method)
	}
}

// IAD on the ~100,000-state NCD chain of ncdChain (1000 blocks of 100,
// coupling 1e-10); auto selects IAD.
//
//	go test -run '^$' -bench IAD -benchtime 1x ./chain/
//
// The uniform start has the exact conditional vectors of these blocks
// (doubly stochastic), so the random start is the harder case.
func BenchmarkIAD(b *testing.B) {
	p, want := ncdChain(1000, 100, 3, 1e-10, 5)
	rng := rand.New(rand.NewPCG(5, 5))
	random := make([]float64, p.Len())
	for i := range random {
		random[i] = rng.Float64()
	}
	for _, tc := range []struct {
		name string
		init []float64
	}{{"uniform", nil}, {"random", random}} {
		b.Run(tc.name, func(b *testing.B) {
			var r Result
			for b.Loop() {
				var err error
				if r, err = Solve(p, Options{Init: tc.init}); err != nil {
					b.Fatal(err)
				}
			}
			if r.Diagnostics.Method != MethodIAD {
				b.Fatalf("auto chose %s", r.Diagnostics.Method)
			}
			b.ReportMetric(float64(r.Diagnostics.Iterations), "iterations")
			b.ReportMetric(r.Diagnostics.Residual*1e15, "residual-1e-15")
			b.ReportMetric(maxRelErr(r.Pi, want)*1e15, "relerr-1e-15")
		})
	}
}

// The cost of the NCD detection on the non-NCD 1e6-state chain of
// BenchmarkGaussSeidelSparse1e6 (what auto adds before Gauss-Seidel):
// "nogap" as it is (one pass over the values), "gap" with every 1000th
// stored value set to 1e-12 (a gap, so the filtered pattern goes through
// Tarjan, and is then rejected; the rows need not be stochastic here).
func BenchmarkNCDDetect1e6(b *testing.B) {
	m := randomSparse(1_000_000, 5, 3)
	g := &CSR{n: m.n, rowPtr: m.rowPtr, col: m.col, val: append([]float64(nil), m.val...)}
	for k := 0; k < len(g.val); k += 1000 {
		g.val[k] = 1e-12
	}
	for _, tc := range []struct {
		name string
		c    *CSR
	}{{"nogap", m}, {"gap", g}} {
		b.Run(tc.name, func(b *testing.B) {
			for b.Loop() {
				if _, ok := ncdPartition(tc.c); ok {
					b.Fatal("found blocks")
				}
			}
		})
	}
}

// ExampleSolve_iad solves a 4-state chain made of the blocks {0,1} and
// {2,3}, coupled by 1e-10. By hand: the blocks alone have the stationary
// vectors (6/13, 7/13) and (1/2, 1/2); the aggregated chain moves 1 -> 2
// at rate 1e-10 * 6/13 and 2 -> 1 at 2e-10 * 1/2, so the blocks get 13/19
// and 6/19, and pi = (6, 7, 3, 3)/19 up to O(1e-10).
func ExampleSolve_iad() {
	const e = 1e-10
	p, err := NewDense(4, []float64{
		0.3, 0.7 - e, e, 0,
		0.6, 0.4, 0, 0,
		0, 0, 0.5, 0.5,
		0, 2 * e, 0.5, 0.5 - 2*e,
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	r, err := Solve(p, Options{Method: MethodIAD})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(r.Diagnostics.Method)
	for i, v := range r.Pi {
		fmt.Printf("%d %.6f\n", i, v)
	}
	// Output:
	// iad
	// 0 0.315789
	// 1 0.368421
	// 2 0.157895
	// 3 0.157895
}
