package chain

import (
	"math/rand/v2"
	"slices"
	"strings"
	"testing"
)

// rootedClass must agree with the full decomposition (Classify): it
// succeeds exactly when state 0 lies in the only closed class, and then
// gives that class and its period. Seeded random graphs with 1-3 targets a
// row cover reducible, transient and periodic cases; the rings of cyclic
// blocks cover periods 2-4.
func TestRootedClassAgrees(t *testing.T) {
	rng := rand.New(rand.NewPCG(6, 2))
	var ms []*CSR
	for range 300 {
		n := 1 + rng.IntN(40)
		b := NewBuilder(n)
		for i := 0; i < n; i++ {
			k := 1 + rng.IntN(3)
			for range k {
				b.Add(i, rng.IntN(n), 1/float64(k))
			}
		}
		ms = append(ms, mustBuild(t, b))
	}
	for d := 2; d <= 4; d++ {
		// States i*d + r, block r -> block r+1 (mod d): period d.
		blocks := 5
		n := blocks * d
		b := NewBuilder(n)
		for i := 0; i < n; i++ {
			r := i % d
			for k := 0; k < 2; k++ {
				j := rng.IntN(blocks)*d + (r+1)%d
				b.Add(i, j, 0.5)
			}
		}
		ms = append(ms, mustBuild(t, b))
	}
	// A random cycle through 200 states (period 200), and the same with a
	// self-loop and a transient tail: marking the states that reach 0 by
	// sweeps over the rows needs far more than rootSweeps sweeps, so the
	// search over the columns finishes.
	for _, extra := range []bool{false, true} {
		n := 200
		perm := rng.Perm(n - 1)
		b := NewBuilder(n + 3)
		prev := 0
		for _, v := range perm {
			b.Add(prev, v+1, 1)
			prev = v + 1
		}
		if extra {
			b.Add(prev, 0, 0.5)
			b.Add(prev, prev, 0.5)
		} else {
			b.Add(prev, 0, 1)
		}
		for i := n; i < n+3; i++ {
			b.Add(i, i-1, 1)
		}
		ms = append(ms, mustBuild(t, b))
	}
	var rooted, periodic int
	for trial, c := range ms {
		st := Classify(c)
		want := len(st.Closed) == 1 && slices.Contains(st.Classes[st.Closed[0]], 0)
		mem, per, ok := rootedClass(c)
		if ok != want {
			t.Fatalf("trial %d: rootedClass ok=%v, want %v (closed classes %d)", trial, ok, want, len(st.Closed))
		}
		if !ok {
			continue
		}
		rooted++
		if per > 1 {
			periodic++
		}
		if !equalInts(mem, st.Classes[st.Closed[0]]) || per != st.Period[0] {
			t.Fatalf("trial %d: class %v period %d, want %v period %d", trial, mem, per, st.Classes[st.Closed[0]], st.Period[0])
		}
	}
	if rooted < 30 || periodic < 3 {
		t.Fatalf("only %d rooted and %d periodic cases: the test does not cover enough", rooted, periodic)
	}
}

func mustBuild(t *testing.T, b *Builder) *CSR {
	t.Helper()
	c, err := b.Build()
	if err != nil {
		t.Fatal(err)
	}
	return c
}

// Gauss-Seidel through the rooted path: state 0 recurrent, state 2
// transient (it leaves for good), and the answer the two-state closed form
// of the class {0, 1} (Kemeny & Snell 1960): pi = (b, a)/(a+b) for
// P(0,1) = a, P(1,0) = b.
func TestGaussSeidelRootedTransient(t *testing.T) {
	b := NewBuilder(3)
	b.Add(0, 0, 0.7)
	b.Add(0, 1, 0.3)
	b.Add(1, 0, 0.6)
	b.Add(1, 1, 0.4)
	b.Add(2, 0, 0.5)
	b.Add(2, 2, 0.5)
	c := mustBuild(t, b)
	want := []float64{0.6 / 0.9, 0.3 / 0.9, 0}
	for _, init := range [][]float64{nil, {0, 0, 1}, {1, 2, 3}} {
		r := mustSolve(t, c, Options{Method: MethodGaussSeidel, Init: init})
		if e := maxAbsErr(r.Pi, want); e > 1e-13 || r.Pi[2] != 0 {
			t.Errorf("init %v: pi = %v, want %v", init, r.Pi, want)
		}
		if d := r.Diagnostics; d.Transient != 1 || d.Period != 1 || d.Residual > 1e-13 {
			t.Errorf("init %v: diagnostics %+v: want 1 transient state, period 1, residual <= 1e-13", init, d)
		}
	}
}

// A starting vector at the answer needs one sweep (or power step); a poor
// one still reaches the tolerance and the same answer.
func TestInitVector(t *testing.T) {
	c := randomSparse(2000, 5, 21)
	ref := mustSolve(t, c, Options{Method: MethodGaussSeidel, Tol: 1e-14})
	skew := make([]float64, c.Len())
	for i := range skew {
		skew[i] = float64(i%7) + 0.5
	}
	for _, meth := range []Method{MethodGaussSeidel, MethodPower} {
		r := mustSolve(t, c, Options{Method: meth, Init: ref.Pi, Tol: 1e-13})
		if r.Diagnostics.Iterations > 8 {
			t.Errorf("%s from the answer: %d iterations, want a few", meth, r.Diagnostics.Iterations)
		}
		r = mustSolve(t, c, Options{Method: meth, Init: skew, Tol: 1e-13})
		if e := maxRelErr(r.Pi, ref.Pi); e > 1e-9 || r.Diagnostics.Residual > 1e-13 {
			t.Errorf("%s from a skewed start: rel err %g, residual %g", meth, e, r.Diagnostics.Residual)
		}
	}
	bad := []struct {
		init []float64
		want string
	}{
		{make([]float64, 3), "starting vector of 3 entries"},
		{append(make([]float64, c.Len()-1), -1), "want a finite number >= 0"},
		{make([]float64, c.Len()), "sums to 0"},
	}
	for _, tc := range bad {
		_, err := Solve(c, Options{Method: MethodGaussSeidel, Init: tc.init})
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("Init %v...: error %v, want one containing %q", tc.init[:3], err, tc.want)
		}
	}
}

// Gauss-Seidel on a CSR chain whose state 0 is transient (it is never
// entered again) falls back to the full classification: the answer is the
// closed class {1, 2} of TestTransient's chain, by the two-state closed
// form (Kemeny & Snell 1960).
func TestGaussSeidelTransientRoot(t *testing.T) {
	b := NewBuilder(4)
	for i, row := range [][]float64{
		{0.2, 0.3, 0.5, 0},
		{0, 0.4, 0.6, 0},
		{0, 0.9, 0.1, 0},
		{0.25, 0.25, 0.25, 0.25},
	} {
		for j, p := range row {
			if p > 0 {
				b.Add(i, j, p)
			}
		}
	}
	c := mustBuild(t, b)
	if _, _, ok := rootedClass(c); ok {
		t.Fatal("rootedClass accepted a chain whose state 0 is transient")
	}
	r := mustSolve(t, c, Options{Method: MethodGaussSeidel, Init: []float64{1, 0, 0, 1}})
	want := []float64{0, 0.9 / 1.5, 0.6 / 1.5, 0}
	if e := maxAbsErr(r.Pi, want); e > 1e-13 || r.Pi[0] != 0 || r.Pi[3] != 0 || r.Diagnostics.Transient != 2 {
		t.Errorf("pi = %v (transient %d), want %v", r.Pi, r.Diagnostics.Transient, want)
	}
}
