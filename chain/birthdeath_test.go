package chain

import (
	"math"
	"math/big"
	"testing"
)

// birthDeathExact returns the stationary law of the birth-death chain on
// 0..n-1 with constant up- and down-probabilities, correctly rounded to
// float64: the cut equations pi_j up = pi_{j+1} down give the product form
// pi_j proportional to (up/down)^j (Kemeny & Snell, Finite Markov Chains,
// 1960, sec. 7.1; Stewart, Introduction to the Numerical Solution of
// Markov Chains, 1994, sec. 1.6), evaluated in 320-bit arithmetic
// (math/big) and rounded once, to a subnormal or 0 where the true value is
// that small.
func birthDeathExact(n int, up, down float64) []float64 {
	const prec = 320
	r := new(big.Float).SetPrec(prec).Quo(big.NewFloat(up).SetPrec(prec), big.NewFloat(down).SetPrec(prec))
	w := make([]*big.Float, n)
	w[0] = big.NewFloat(1).SetPrec(prec)
	total := new(big.Float).SetPrec(prec).Set(w[0])
	for j := 1; j < n; j++ {
		w[j] = new(big.Float).SetPrec(prec).Mul(w[j-1], r)
		total.Add(total, w[j])
	}
	pi := make([]float64, n)
	for j := range w {
		pi[j], _ = new(big.Float).SetPrec(prec).Quo(w[j], total).Float64()
	}
	return pi
}

// checkAgainst compares pi with the correctly rounded exact law: relative
// error rel where the value is normal, and in the subnormal range at most
// two units of the smallest subnormal more.
func checkAgainst(t *testing.T, name string, pi, want []float64, rel float64) {
	t.Helper()
	const tiny = 0x1p-1074
	zeros := 0
	for j, w := range want {
		g := pi[j]
		if math.IsNaN(g) || math.IsInf(g, 0) || g < 0 {
			t.Fatalf("%s: pi[%d] = %v, want %v", name, j, g, w)
		}
		if w == 0 {
			zeros++
		}
		if math.Abs(g-w) > rel*w+2*tiny {
			t.Fatalf("%s: pi[%d] = %.17g, want %.17g (relative error %.3g)", name, j, g, w, math.Abs(g-w)/w)
		}
	}
	t.Logf("%s: %d states, %d of them 0 in the exact rounded law", name, len(want), zeros)
}

// The drifting birth-death chain of issue 10 (up 0.5, down 0.45, the rest
// a self-loop, reflecting ends) printed NaN: the unnormalised product form
// overflows. At 8000 states about 960 states, and at 200,000 about 193,000,
// have a probability below the smallest subnormal.
func TestDriftingBirthDeathExact(t *testing.T) {
	for _, tc := range []struct {
		n        int
		up, down float64
		methods  []Method
		rel      float64
	}{
		{8000, 0.5, 0.45, []Method{MethodAuto, MethodGTH}, 1e-11},
		{200000, 0.5, 0.45, []Method{MethodAuto}, 1e-10},
		// Steeper: a factor 10 a state, so the lower 700 states underflow
		// on a chain small enough for every dense method.
		{1000, 0.5, 0.05, []Method{MethodAuto, MethodGTH, MethodDirect, MethodGMRES}, 1e-11},
		{400, 0.5, 0.02, []Method{MethodGTH, MethodEigen}, 1e-11},
	} {
		m := birthDeath(tc.n, tc.up, tc.down)
		want := birthDeathExact(tc.n, tc.up, tc.down)
		for _, meth := range tc.methods {
			r := mustSolve(t, m, Options{Method: meth})
			if meth == MethodDirect || meth == MethodEigen || meth == MethodGMRES {
				// Not componentwise accurate where pi is small: an
				// absolute error of the order of the residual.
				if e := maxAbsErr(r.Pi, want); e > 1e-11 || badEntry(r.Pi) >= 0 {
					t.Errorf("n=%d %s: absolute error %.3g", tc.n, r.Diagnostics.Method, e)
				}
			} else {
				checkAgainst(t, string(r.Diagnostics.Method), r.Pi, want, tc.rel)
			}
			if !(r.Diagnostics.Residual <= 1e-12) {
				t.Errorf("n=%d %s: residual %v", tc.n, meth, r.Diagnostics.Residual)
			}
		}
	}
}

// No method returns a non-finite or negative probability, on the drifting
// chains and on chains whose transitions span the float64 range (a forward
// chain whose unnormalised pi overflows within a few states): each method
// either answers with a valid vector or fails with an error.
func TestNoNonFiniteOrNegative(t *testing.T) {
	// A forward chain that leaves state 1 with probability 1e-150 and
	// states 2..11 with 1e-310 (a subnormal), so pi_j/pi_0 reaches 1e310,
	// beyond float64.
	n := 12
	b := NewBuilder(n)
	for j := 0; j < n; j++ {
		exit := 1e-310
		switch j {
		case 0:
			exit = 1
		case 1:
			exit = 1e-150
		}
		b.Add(j, (j+1)%n, exit)
		if exit < 1 {
			b.Add(j, j, 1-exit)
		}
	}
	fwd := mustBuild(t, b)
	for _, tc := range []struct {
		name string
		m    Matrix
	}{
		{"forward overflow", fwd},
		{"drift 400", birthDeath(400, 0.5, 0.02)},
		{"drift 5000", birthDeath(5000, 0.5, 0.45)},
	} {
		for _, meth := range Methods {
			r, err := Solve(tc.m, Options{Method: meth, MaxIter: 3000})
			if err != nil {
				continue
			}
			if k := badEntry(r.Pi); k >= 0 {
				t.Errorf("%s %s: pi[%d] = %v", tc.name, meth, k, r.Pi[k])
			}
		}
	}
	// The forward chain: pi_j proportional to 1/exit_j (each state is
	// entered once a cycle and stays a geometric time of mean 1/exit_j;
	// renewal-reward, common practice), so pi_0 = 1e-311 (subnormal),
	// pi_1 = 1e-161 and the others 0.1.
	r := mustSolve(t, fwd, Options{})
	want := []float64{1e-311, 1e-161}
	for j := 2; j < n; j++ {
		want = append(want, 0.1)
	}
	if r.Diagnostics.Method != MethodForward {
		t.Errorf("forward overflow: solved by %s", r.Diagnostics.Method)
	}
	checkAgainst(t, "forward overflow", r.Pi, want, 1e-14)
}
