package chain

import (
	"errors"
	"math"
	"math/big"
	"math/rand/v2"
	"strings"
	"testing"
)

// Two-state chain P = [[1-a, a], [b, 1-b]]: pi = (b/(a+b), a/(a+b)), a
// standard closed form (Kemeny & Snell, Finite Markov Chains, 1960).
func TestTwoStateClosedForm(t *testing.T) {
	for _, tc := range []struct{ a, b float64 }{
		{0.3, 0.6}, {0.5, 0.5}, {1e-6, 0.9}, {0.999, 0.001}, {1, 1}, {0.01, 0.02},
	} {
		m := dense(t, []float64{1 - tc.a, tc.a}, []float64{tc.b, 1 - tc.b})
		want := []float64{tc.b / (tc.a + tc.b), tc.a / (tc.a + tc.b)}
		for _, meth := range allMethods {
			r := mustSolve(t, m, Options{Method: meth})
			// GTH and auto are componentwise accurate; the others are
			// accurate in absolute terms (error ~ residual / spectral gap).
			e := maxRelErr(r.Pi, want)
			if meth != MethodGTH && meth != MethodAuto {
				e = maxAbsErr(r.Pi, want)
			}
			if e > 1e-10 {
				t.Errorf("a=%v b=%v %s: pi=%v, want %v (rel err %.2g)", tc.a, tc.b, meth, r.Pi, want, e)
			}
		}
	}
}

// Birth-death chain on 0..n-1 with up-probabilities p_i and down q_i:
// detailed balance gives pi_k proportional to prod_{i<k} p_i / q_{i+1}
// (Kelly, Reversibility and Stochastic Networks, 1979, ch. 1; from memory).
func TestBirthDeathProductFormula(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for _, n := range []int{2, 5, 40, 300} {
		p := make([]float64, n)
		q := make([]float64, n)
		b := NewBuilder(n)
		for i := 0; i < n; i++ {
			if i < n-1 {
				p[i] = 0.05 + 0.4*rng.Float64()
			}
			if i > 0 {
				q[i] = 0.05 + 0.4*rng.Float64()
			}
			b.Add(i, i, 1-p[i]-q[i])
			if i < n-1 {
				b.Add(i, i+1, p[i])
			}
			if i > 0 {
				b.Add(i, i-1, q[i])
			}
		}
		m, err := b.Build()
		if err != nil {
			t.Fatal(err)
		}
		want := make([]float64, n)
		want[0] = 1
		for k := 1; k < n; k++ {
			want[k] = want[k-1] * p[k-1] / q[k]
		}
		normalise(want)
		for _, meth := range allMethods {
			if meth == MethodEigen && n > 100 || (meth == MethodPower || meth == MethodGaussSeidel) && n > 40 {
				continue // eigen: dense limit; power, Gauss-Seidel: ~n^2 steps on a birth-death chain
			}
			r := mustSolve(t, m, Options{Method: meth})
			tol := 1e-12
			if meth == MethodPower || meth == MethodGaussSeidel || meth == MethodEigen || meth == MethodDirect {
				tol = 1e-8 // absolute, iterative/unstructured methods
				if e := maxAbsErr(r.Pi, want); e > tol {
					t.Errorf("n=%d %s: abs err %.2g", n, meth, e)
				}
				continue
			}
			if e := maxRelErr(r.Pi, want); e > tol {
				t.Errorf("n=%d %s: componentwise rel err %.2g", n, meth, e)
			}
		}
	}
}

// A doubly stochastic irreducible chain has the uniform distribution
// (Kemeny & Snell 1960; a convex combination of permutation matrices is
// doubly stochastic by Birkhoff's theorem).
func TestDoublyStochasticUniform(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	n := 12
	a := make([]float64, n*n)
	w := []float64{0.5, 0.25, 0.125, 0.125}
	for k, wk := range w {
		perm := rng.Perm(n)
		if k == 0 {
			for i := range perm { // a full cycle makes it irreducible
				perm[i] = (i + 1) % n
			}
		}
		for i, j := range perm {
			a[i*n+j] += wk
		}
	}
	m, err := NewDense(n, a)
	if err != nil {
		t.Fatal(err)
	}
	for _, meth := range append(allMethods, MethodUniform) {
		r := mustSolve(t, m, Options{Method: meth})
		for i, p := range r.Pi {
			if math.Abs(p-1/float64(n)) > 1e-10 {
				t.Errorf("%s: pi[%d]=%v, want 1/%d", meth, i, p, n)
			}
		}
	}
	if r := mustSolve(t, m, Options{}); r.Diagnostics.Method != MethodUniform {
		t.Errorf("auto chose %s, want uniform", r.Diagnostics.Method)
	}
	if _, err := Solve(randomDense(5, 1), Options{Method: MethodUniform}); err == nil {
		t.Error("uniform accepted a chain that is not doubly stochastic")
	}
}

// Every method agrees with GTH to 1e-10 on seeded random chains, and global
// balance holds to 1e-12 (the defining property of pi; Stewart 1994).
func TestMethodsAgreeAndBalance(t *testing.T) {
	for seed := uint64(1); seed <= 5; seed++ {
		var ms []Matrix = []Matrix{randomDense(30, seed), randomSparse(200, 4, seed)}
		for _, m := range ms {
			ref := mustSolve(t, m, Options{Method: MethodGTH})
			for _, meth := range allMethods {
				if meth == MethodEigen && m.Len() > 100 {
					continue
				}
				r := mustSolve(t, m, Options{Method: meth})
				if e := maxAbsErr(r.Pi, ref.Pi); e > 1e-10 {
					t.Errorf("seed %d n=%d %s: differs from gth by %.2g", seed, m.Len(), meth, e)
				}
				if r.Diagnostics.Balance > 1e-12 {
					t.Errorf("seed %d n=%d %s: balance %.2g > 1e-12", seed, m.Len(), meth, r.Diagnostics.Balance)
				}
				if b, _ := Balance(m, r.Pi); b != r.Diagnostics.Balance {
					t.Errorf("Balance() = %v, diagnostics %v", b, r.Diagnostics.Balance)
				}
			}
		}
	}
}

// gthRat is GTH in exact rational arithmetic (Grassmann, Taksar & Heyman
// 1985), the reference for the nearly decomposable test.
func gthRat(a []float64, n int) []*big.Rat {
	r := make([]*big.Rat, n*n)
	for k, v := range a {
		r[k] = new(big.Rat).SetFloat64(v)
	}
	tmp := new(big.Rat)
	for k := n - 1; k >= 1; k-- {
		s := new(big.Rat)
		for j := 0; j < k; j++ {
			s.Add(s, r[k*n+j])
		}
		for i := 0; i < k; i++ {
			r[i*n+k].Quo(r[i*n+k], s)
			f := r[i*n+k]
			if f.Sign() == 0 {
				continue
			}
			for j := 0; j < k; j++ {
				r[i*n+j].Add(r[i*n+j], tmp.Mul(f, r[k*n+j]))
			}
		}
	}
	pi := make([]*big.Rat, n)
	pi[0] = big.NewRat(1, 1)
	tot := big.NewRat(1, 1)
	for j := 1; j < n; j++ {
		pi[j] = new(big.Rat)
		for i := 0; i < j; i++ {
			pi[j].Add(pi[j], tmp.Mul(pi[i], r[i*n+j]))
		}
		tot.Add(tot, pi[j])
	}
	for j := range pi {
		pi[j].Quo(pi[j], tot)
	}
	return pi
}

// Nearly completely decomposable chain: three blocks coupled by 1e-10.
// GTH (and so auto) must keep full componentwise relative accuracy
// (O'Cinneide, Numer. Math. 65, 1993), checked against exact rational GTH.
func TestNearlyDecomposable(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 9))
	const blocks, bs = 3, 3
	n := blocks * bs
	a := make([]float64, n*n)
	for i := 0; i < n; i++ {
		bi := i / bs
		var s float64
		for j := bi * bs; j < (bi+1)*bs; j++ {
			a[i*n+j] = rng.Float64() + 0.1
			s += a[i*n+j]
		}
		for j := bi * bs; j < (bi+1)*bs; j++ {
			a[i*n+j] *= (1 - 1e-10) / s
		}
		a[i*n+((bi+1)%blocks)*bs+i%bs] += 1e-10
	}
	m, err := NewDense(n, a)
	if err != nil {
		t.Fatal(err)
	}
	exact := gthRat(a, n)
	want := make([]float64, n)
	for i, r := range exact {
		want[i], _ = r.Float64()
	}
	for _, meth := range []Method{MethodAuto, MethodGTH} {
		r := mustSolve(t, m, Options{Method: meth})
		if e := maxRelErr(r.Pi, want); e > 1e-13 {
			t.Errorf("%s: componentwise relative error %.2g, want <= 1e-13", meth, e)
		}
	}
}

// A deterministic 3-cycle has period 3 and pi uniform; power must iterate
// the lazy chain (I+P)/2 and say so (Stewart 1994, sec. 3.1).
func TestPeriodic(t *testing.T) {
	m := dense(t, []float64{0, 1, 0}, []float64{0, 0, 1}, []float64{1, 0, 0})
	for _, meth := range allMethods {
		r := mustSolve(t, m, Options{Method: meth})
		if r.Diagnostics.Period != 3 {
			t.Errorf("%s: period %d, want 3", meth, r.Diagnostics.Period)
		}
		if e := maxAbsErr(r.Pi, []float64{1. / 3, 1. / 3, 1. / 3}); e > 1e-12 {
			t.Errorf("%s: pi=%v", meth, r.Pi)
		}
		if lazy := meth == MethodPower; r.Diagnostics.Lazy != lazy {
			t.Errorf("%s: lazy=%v", meth, r.Diagnostics.Lazy)
		}
	}
	// Bipartite random walk on a 4-cycle: period 2.
	m2 := dense(t, []float64{0, .3, 0, .7}, []float64{.6, 0, .4, 0}, []float64{0, .2, 0, .8}, []float64{.5, 0, .5, 0})
	if p := Classify(m2).Period[0]; p != 2 {
		t.Errorf("4-cycle walk: period %d, want 2", p)
	}
	r := mustSolve(t, m2, Options{Method: MethodPower})
	g := mustSolve(t, m2, Options{Method: MethodGTH})
	if e := maxAbsErr(r.Pi, g.Pi); e > 1e-12 {
		t.Errorf("periodic power differs from gth by %.2g", e)
	}
}

func TestReducible(t *testing.T) {
	m := Labeled{Matrix: dense(t,
		[]float64{0.5, 0.5, 0, 0, 0},
		[]float64{0.5, 0.5, 0, 0, 0},
		[]float64{0.2, 0, 0.3, 0.5, 0}, // transient
		[]float64{0, 0, 0, 0, 1},
		[]float64{0, 0, 0, 1, 0},
	), Labels: []string{"a", "b", "c", "d", "e"}}
	_, err := Solve(m, Options{})
	var re *ReducibleError
	if !errors.As(err, &re) {
		t.Fatalf("err = %v, want *ReducibleError", err)
	}
	if got := err.Error(); !strings.Contains(got, "2 closed classes") || !strings.Contains(got, "{a, b}, {d, e}") {
		t.Errorf("message %q does not list the classes", got)
	}
	st := Classify(m)
	if len(st.Closed) != 2 || len(st.Transient) != 1 || st.Transient[0] != 2 {
		t.Errorf("structure %+v", st)
	}
	// Many classes are truncated.
	n := 20
	b := NewBuilder(n)
	for i := 0; i < n; i++ {
		b.Add(i, i, 1)
	}
	c, _ := b.Build()
	_, err = Solve(c, Options{})
	if got := err.Error(); !strings.Contains(got, "20 closed classes") || !strings.Contains(got, "and 16 more") {
		t.Errorf("truncation: %q", got)
	}
}

// Transient states get probability 0; the closed class is solved alone.
func TestTransient(t *testing.T) {
	m := dense(t,
		[]float64{0.2, 0.3, 0.5, 0},
		[]float64{0, 0.4, 0.6, 0},
		[]float64{0, 0.9, 0.1, 0},
		[]float64{0.25, 0.25, 0.25, 0.25},
	)
	// Closed class {1, 2}: two-state closed form with a=0.6, b=0.9.
	want := []float64{0, 0.9 / 1.5, 0.6 / 1.5, 0}
	for _, meth := range append(allMethods, MethodForward) {
		if meth == MethodForward {
			continue // 2 -> 1 is backward
		}
		r := mustSolve(t, m, Options{Method: meth})
		if e := maxAbsErr(r.Pi, want); e > 1e-10 || r.Pi[0] != 0 || r.Pi[3] != 0 {
			t.Errorf("%s: pi=%v, want %v", meth, r.Pi, want)
		}
		if r.Diagnostics.Transient != 2 {
			t.Errorf("%s: transient %d, want 2", meth, r.Diagnostics.Transient)
		}
	}
}

// Success-runs (renewal) chain: from j go to j+1 with probability p_j or
// restart at 0; then pi_j is proportional to prod_{i<j} p_i (Feller, An
// Introduction to Probability Theory, vol. 1, 1968, ch. XV; from memory).
func TestForwardRenewal(t *testing.T) {
	n := 400
	p := make([]float64, n)
	b := NewBuilder(n)
	rng := rand.New(rand.NewPCG(1, 2))
	for j := 0; j < n; j++ {
		if j < n-1 {
			p[j] = 0.5 + 0.49*rng.Float64()
			b.Add(j, j+1, p[j])
			b.Add(j, 0, 1-p[j])
		} else {
			b.Add(j, 0, 1)
		}
	}
	m, err := b.Build()
	if err != nil {
		t.Fatal(err)
	}
	want := make([]float64, n)
	want[0] = 1
	for j := 1; j < n; j++ {
		want[j] = want[j-1] * p[j-1]
	}
	normalise(want)
	r := mustSolve(t, m, Options{})
	if r.Diagnostics.Method != MethodForward {
		t.Errorf("auto chose %s, want forward", r.Diagnostics.Method)
	}
	if e := maxRelErr(r.Pi, want); e > 1e-12 {
		t.Errorf("forward: componentwise rel err %.2g", e)
	}
	g := mustSolve(t, m, Options{Method: MethodGTH})
	if e := maxRelErr(g.Pi, want); e > 1e-11 {
		t.Errorf("gth: rel err %.2g", e)
	}
	if _, err := Forward(randomDense(4, 1)); err == nil {
		t.Error("Forward accepted a backward transition")
	}
}

func TestCutFlow(t *testing.T) {
	m := randomSparse(300, 4, 8)
	r := mustSolve(t, m, Options{})
	in := make([]bool, 300)
	for i := 0; i < 100; i++ {
		in[i] = true
	}
	out, back := CutFlow(m, r.Pi, in)
	if math.Abs(out-back) > 1e-14 || out == 0 {
		t.Errorf("cut flows %v and %v differ", out, back)
	}
}

func TestIterativeNotConverged(t *testing.T) {
	m := randomSparse(100, 3, 2)
	for _, meth := range []Method{MethodPower, MethodGaussSeidel} {
		_, err := Solve(m, Options{Method: meth, MaxIter: 2})
		if !errors.Is(err, ErrNotConverged) || !strings.Contains(err.Error(), "residual") {
			t.Errorf("%s: err = %v", meth, err)
		}
	}
}

func TestSizeLimitsAndOptions(t *testing.T) {
	m := randomSparse(MaxEigenStates+1, 2, 1)
	if _, err := Solve(m, Options{Method: MethodEigen}); err == nil {
		t.Error("eigen accepted a chain above its limit")
	}
	if _, err := Solve(m, Options{Method: "nope"}); err == nil {
		t.Error("unknown method accepted")
	}
	if _, err := Solve(m, Options{Tol: -1}); err == nil {
		t.Error("negative tolerance accepted")
	}
}

// The iterative Tarjan and gonum's TarjanSCC find the same classes.
func TestSCCAgree(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 4))
	for trial := 0; trial < 50; trial++ {
		n := 1 + rng.IntN(60)
		b := NewBuilder(n)
		for i := 0; i < n; i++ {
			k := 1 + rng.IntN(3)
			for t := 0; t < k; t++ {
				b.Add(i, rng.IntN(n), 1/float64(k))
			}
		}
		c, err := b.Build()
		if err != nil {
			t.Fatal(err)
		}
		g := patternOf(c)
		s1, s2 := structureFrom(g, sccGonum(g)), structureFrom(g, sccTarjan(g))
		if len(s1.Classes) != len(s2.Classes) {
			t.Fatalf("trial %d: %d vs %d classes", trial, len(s1.Classes), len(s2.Classes))
		}
		for k := range s1.Classes {
			if !equalInts(s1.Classes[k], s2.Classes[k]) {
				t.Fatalf("trial %d: class %d: %v vs %v", trial, k, s1.Classes[k], s2.Classes[k])
			}
		}
		if !equalInts(s1.Period, s2.Period) || !equalInts(s1.Closed, s2.Closed) {
			t.Fatalf("trial %d: closed/period differ", trial)
		}
	}
}

func equalInts(a, b []int) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// Banded GTH on a large birth-death chain (bandwidth 1) against the
// detailed-balance product formula (Kelly 1979, ch. 1; from memory), and
// on a random banded chain against dense GTH.
func TestBandedGTH(t *testing.T) {
	rng := rand.New(rand.NewPCG(8, 1))
	n := 100000
	p := make([]float64, n)
	q := make([]float64, n)
	b := NewBuilder(n)
	for i := 0; i < n; i++ {
		if i < n-1 {
			p[i] = 0.05 + 0.4*rng.Float64()
			b.Add(i, i+1, p[i])
		}
		if i > 0 {
			q[i] = 0.05 + 0.4*rng.Float64()
			b.Add(i, i-1, q[i])
		}
		b.Add(i, i, 1-p[i]-q[i])
	}
	m, err := b.Build()
	if err != nil {
		t.Fatal(err)
	}
	r := mustSolve(t, m, Options{})
	if r.Diagnostics.Method != MethodGTH {
		t.Errorf("auto chose %s, want gth (banded)", r.Diagnostics.Method)
	}
	// Product formula in logs, since pi spans many orders of magnitude.
	logw := make([]float64, n)
	mx := 0.0
	for k := 1; k < n; k++ {
		logw[k] = logw[k-1] + math.Log(p[k-1]/q[k])
		mx = math.Max(mx, logw[k])
	}
	var z float64
	for k := range logw {
		z += math.Exp(logw[k] - mx)
	}
	for k := 0; k < n; k += 997 {
		want := math.Exp(logw[k]-mx) / z
		if want > 1e-300 && math.Abs(r.Pi[k]-want) > 1e-9*want {
			t.Fatalf("state %d: pi %v, want %v", k, r.Pi[k], want)
		}
	}
	// Random band of width 3 against dense GTH.
	nb, w := 300, 3
	bb := NewBuilder(nb)
	for i := 0; i < nb; i++ {
		var row []float64
		var cols []int
		for j := max(0, i-w); j <= min(nb-1, i+w); j++ {
			row = append(row, rng.Float64()+0.01)
			cols = append(cols, j)
		}
		s := sum(row)
		for k, j := range cols {
			bb.Add(i, j, row[k]/s)
		}
	}
	mb, err := bb.Build()
	if err != nil {
		t.Fatal(err)
	}
	band := gthBanded(mb, w)
	full := GTH(toDense(mb), nb)
	if e := maxRelErr(band, full); e > 1e-12 {
		t.Errorf("banded vs dense GTH: rel err %.2g", e)
	}
}

// Check computes the diagnostics of any vector: zero residual and balance
// at the exact two-state answer (Kemeny & Snell 1960), positive elsewhere.
func TestCheck(t *testing.T) {
	m := dense(t, []float64{0.75, 0.25}, []float64{0.5, 0.5})
	d := Check(m, []float64{2. / 3, 1. / 3})
	if d.Residual > 1e-16 || d.Balance > 1e-16 || d.States != 2 || d.NonZeros != 4 {
		t.Errorf("exact pi: %+v", d)
	}
	d = Check(m, []float64{0.5, 0.5})
	// pi P - pi = (0.125, -0.125): residual 0.25; flow out of 0 is 0.125,
	// flow in 0.25: balance 0.125.
	if math.Abs(d.Residual-0.25) > 1e-15 || math.Abs(d.Balance-0.125) > 1e-15 {
		t.Errorf("uniform pi: %+v", d)
	}
}
