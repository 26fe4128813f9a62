package chain

import (
	"math"
	"math/rand/v2"
	"testing"
)

// randomDense returns a seeded random dense n-state chain with all entries
// positive (irreducible and aperiodic).
func randomDense(n int, seed uint64) *Dense {
	rng := rand.New(rand.NewPCG(seed, 7))
	a := make([]float64, n*n)
	for i := 0; i < n; i++ {
		row := a[i*n : (i+1)*n]
		for j := range row {
			row[j] = rng.Float64() + 0.01
		}
		normalise(row)
	}
	d, err := NewDense(n, a)
	if err != nil {
		panic(err)
	}
	return d
}

// randomSparse returns a seeded random sparse chain with k entries a row:
// a ring i -> i+1 (irreducible) plus k-1 random targets; aperiodic through
// a self-loop at state 0.
func randomSparse(n, k int, seed uint64) *CSR {
	rng := rand.New(rand.NewPCG(seed, 11))
	b := NewBuilder(n)
	b.Grow(n * k)
	w := make([]float64, k)
	for i := 0; i < n; i++ {
		var s float64
		for t := range w {
			w[t] = rng.Float64() + 0.05
			s += w[t]
		}
		b.Add(i, (i+1)%n, w[0]/s)
		for t := 1; t < k; t++ {
			j := rng.IntN(n)
			if i == 0 && t == 1 {
				j = 0
			}
			b.Add(i, j, w[t]/s)
		}
	}
	c, err := b.Build()
	if err != nil {
		panic(err)
	}
	return c
}

func maxRelErr(got, want []float64) float64 {
	var e float64
	for i := range want {
		d := math.Abs(got[i] - want[i])
		if want[i] != 0 {
			d /= want[i]
		}
		e = math.Max(e, d)
	}
	return e
}

func maxAbsErr(got, want []float64) float64 {
	var e float64
	for i := range want {
		e = math.Max(e, math.Abs(got[i]-want[i]))
	}
	return e
}

func mustSolve(t *testing.T, m Matrix, o Options) Result {
	t.Helper()
	r, err := Solve(m, o)
	if err != nil {
		t.Fatalf("Solve(%s): %v", o.Method, err)
	}
	return r
}

func dense(t *testing.T, rows ...[]float64) *Dense {
	t.Helper()
	var a []float64
	for _, r := range rows {
		a = append(a, r...)
	}
	d, err := NewDense(len(rows), a)
	if err != nil {
		t.Fatal(err)
	}
	return d
}

// allMethods are the methods that apply to any small irreducible chain.
var allMethods = []Method{MethodAuto, MethodPower, MethodEigen, MethodDirect, MethodGTH, MethodGaussSeidel}
