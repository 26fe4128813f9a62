package chain

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"
)

// Forward returns the stationary distribution of an irreducible chain in
// which every transition into a state j >= 1 comes from a state i <= j,
// that is P(i,j) = 0 for i > j >= 1. Global balance at j then reads
//
//	pi_j * sum_{k!=j} P(j,k) = sum_{i<j} pi_i P(i,j),
//
// so with pi_0 = 1 each pi_j follows from the earlier ones by one division,
// after which pi is normalised. Every operation is an addition,
// multiplication or division of non-negative numbers (1 - P(j,j) is
// computed as the sum of the other entries of row j), so the result is
// accurate to a few ulps componentwise, in O(n + nnz) (the subtraction-free
// argument of Grassmann, Taksar & Heyman, Operations Research 33(5), 1985).
func Forward(m Matrix) ([]float64, error) {
	return forward(unwrap(m), func(i int) string { return fmt.Sprint(i) })
}

func forward(m Matrix, name func(int) string) ([]float64, error) {
	n := m.Len()
	acc := make([]float64, n)
	pi := make([]float64, n)
	var bad error
	for i := 0; i < n && bad == nil; i++ {
		var off float64
		m.Row(i, func(j int, p float64) {
			if j != i {
				off += p
			}
			if p != 0 && j >= 1 && j < i && bad == nil {
				bad = &MethodMismatchError{Method: MethodForward, Reason: fmt.Sprintf("transition from state %s back to state %s", name(i), name(j))}
			}
		})
		if i == 0 {
			pi[0] = 1
		} else {
			if off == 0 {
				return nil, &MethodMismatchError{Method: MethodForward, Reason: fmt.Sprintf("state %s is absorbing (chain not irreducible)", name(i))}
			}
			pi[i] = acc[i] / off
		}
		pii := pi[i]
		m.Row(i, func(j int, p float64) {
			if j > i {
				acc[j] += pii * p
			}
		})
	}
	if bad != nil {
		return nil, bad
	}
	if finiteVector(pi) {
		normalise(pi)
		if finiteVector(pi) {
			return pi, nil
		}
	}
	return forwardX(m), nil
}

// forwardX is forward substitution in extended range (see xfloat), for a
// chain whose unnormalised pi overflows float64 (pi_j/pi_0 beyond
// 2^1023); the pattern has been checked by forward.
func forwardX(m Matrix) []float64 {
	n := m.Len()
	acc := make([]xfloat, n)
	x := make([]xfloat, n)
	for i := 0; i < n; i++ {
		var off float64
		m.Row(i, func(j int, p float64) {
			if j != i {
				off += p
			}
		})
		if i == 0 {
			x[0] = xfloat{0.5, 1}
		} else {
			x[i] = acc[i].div(off)
		}
		xi := x[i]
		m.Row(i, func(j int, p float64) {
			if j > i && p != 0 {
				acc[j] = acc[j].add(xi.scale(p))
			}
		})
	}
	return xnormalise(x)
}

func normalise(x []float64) {
	s := sum(x)
	for i := range x {
		x[i] /= s
	}
}

// GTH returns the stationary distribution of the irreducible n-state chain
// whose row-major transition matrix is a (overwritten), by the algorithm of
// Grassmann, Taksar & Heyman, "Regenerative analysis and steady state
// distributions for Markov chains", Operations Research 33(5), 1985. States
// are censored out from the last: for k = n-1, ..., 1, with
// s_k = sum_{j<k} a(k,j),
//
//	a(i,j) += a(i,k) a(k,j) / s_k   for i, j < k,
//
// then pi_0 = 1 and pi_j = sum_{i<j} pi_i a(i,j) / s_j. No subtraction
// occurs (s_k replaces 1 - a(k,k)), so the result has small componentwise
// relative error even for nearly decomposable chains (O'Cinneide, Numer.
// Math. 65, 1993). Work n^3/3 multiply-adds. The substitution falls back
// to extended range (gthBack) when the unnormalised pi overflows, so the
// answer is finite and >= 0 for any irreducible input, its smallest
// components rounded to subnormals or 0 when that is their true size.
func GTH(a []float64, n int) []float64 {
	s := make([]float64, n)
	for k := n - 1; k >= 1; k-- {
		rk := a[k*n : k*n+k]
		sk := sum(rk)
		if sk == 0 {
			sk = math.SmallestNonzeroFloat64 // reducible input; avoid 0/0
		}
		s[k] = sk
		// Row k normalised, a(k,j)/s_k <= 1, so no product overflows
		// even when s_k is tiny; column k keeps a(i,k) and pi_k is
		// divided by s_k in the substitution.
		for j := range rk {
			rk[j] /= sk
		}
		for i := 0; i < k; i++ {
			if f := a[i*n+k]; f != 0 {
				floats.AddScaled(a[i*n:i*n+k], f, rk) // ri += f*rk, gonum's assembly axpy
			}
		}
	}
	return gthBack(n, func(int) int { return 0 }, func(i, j int) float64 { return a[i*n+j] }, s)
}

// direct solves pi (P - I) = 0 with the last equation replaced by
// sum pi = 1, by dense LU with partial pivoting (gonum mat; Stewart 1994,
// sec. 2.3). Round-off can leave tiny negative components; they are kept
// as computed and show up in the diagnostics.
func direct(m Matrix) ([]float64, error) {
	n := m.Len()
	p := toDense(m)
	// A = (P - I)^T, row n-1 replaced by ones.
	a := mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			v := p[j*n+i]
			if i == j {
				v--
			}
			a.Set(i, j, v)
		}
	}
	for j := 0; j < n; j++ {
		a.Set(n-1, j, 1)
	}
	b := mat.NewVecDense(n, nil)
	b.SetVec(n-1, 1)
	var lu mat.LU
	lu.Factorize(a)
	var x mat.VecDense
	if err := lu.SolveVecTo(&x, false, b); err != nil {
		return nil, fmt.Errorf("direct: %w", err)
	}
	pi := make([]float64, n)
	for i := range pi {
		pi[i] = x.AtVec(i)
	}
	return pi, nil
}

// eigen returns the left eigenvector of P for the eigenvalue nearest 1
// (gonum mat.Eigen), real part, normalised to sum 1.
func eigen(m Matrix) ([]float64, error) {
	n := m.Len()
	a := mat.NewDense(n, n, toDense(m))
	var e mat.Eigen
	if !e.Factorize(a, mat.EigenLeft) {
		return nil, fmt.Errorf("eigen: the eigenvalue decomposition failed")
	}
	vals := e.Values(nil)
	best := 0
	for k, v := range vals {
		if cmplx.Abs(v-1) < cmplx.Abs(vals[best]-1) {
			best = k
		}
	}
	var vec mat.CDense
	e.LeftVectorsTo(&vec)
	pi := make([]float64, n)
	for i := range pi {
		pi[i] = real(vec.At(i, best))
	}
	s := sum(pi)
	if s == 0 || math.IsNaN(s) {
		return nil, fmt.Errorf("eigen: the eigenvector for eigenvalue 1 sums to %v", s)
	}
	for i := range pi {
		pi[i] /= s
	}
	return pi, nil
}

// power iterates x <- x P from init (the uniform vector when init is nil;
// Stewart 1994, sec. 3.1), normalising each step, until ||x P - x||_1 <= tol.
// On a periodic chain the iteration does not converge, so the lazy chain
// (I + P)/2 is iterated instead: it has the same stationary distribution
// and is aperiodic.
func power(ctx context.Context, c *CSR, lazy bool, tol float64, maxIter int, init []float64, sw *switcher) ([]float64, int, error) {
	n := c.n
	x := startVector(n, init)
	y := make([]float64, n)
	r := math.Inf(1)
	var stall stagnation
	for it := 1; it <= maxIter; it++ {
		if err := ctxErr(ctx); err != nil {
			return x, it - 1, fmt.Errorf("power: stopped after %d iterations: %w", it-1, err)
		}
		mulVec(c, x, y)
		r = 0
		for j := range y {
			r += math.Abs(y[j] - x[j])
		}
		if r <= tol {
			return x, it, nil
		}
		if stall.stuck(r) {
			return x, it, fmt.Errorf("power: %w: residual stagnated at %.3g after %d iterations, want <= %g (raise the tolerance, or use gth)", ErrNotConverged, stall.best, it, tol)
		}
		if err := sw.check(MethodPower, it, r, tol); err != nil {
			return x, it, err
		}
		if lazy {
			for j := range y {
				y[j] = 0.5*y[j] + 0.5*x[j]
			}
		}
		normalise(y)
		x, y = y, x
	}
	return x, maxIter, fmt.Errorf("power: %w after %d iterations: residual %.3g, want <= %g (raise the iteration cap or the tolerance, or use gth)", ErrNotConverged, maxIter, r, tol)
}

// ctxErr returns ctx.Err(), or nil for a nil ctx.
func ctxErr(ctx context.Context) error {
	if ctx == nil {
		return nil
	}
	return ctx.Err()
}

// startVector returns a normalised copy of init (already checked by Solve:
// length n, finite, non-negative, positive sum), or the uniform vector
// when init is nil.
func startVector(n int, init []float64) []float64 {
	x := make([]float64, n)
	if init == nil {
		for i := range x {
			x[i] = 1 / float64(n)
		}
		return x
	}
	copy(x, init)
	normalise(x)
	return x
}

// transpose returns the off-diagonal part of c by columns: for column j,
// the rows i != j and values P(i,j) at positions ptr[j] <= k < ptr[j+1].
// Built in O(n + nnz).
func transpose(c *CSR) (ptr []int, row []int32, val []float64) {
	n := c.n
	ptr = make([]int, n+1)
	for i := 0; i < n; i++ {
		for k := c.rowPtr[i]; k < c.rowPtr[i+1]; k++ {
			if j := int(c.col[k]); j != i {
				ptr[j+1]++
			}
		}
	}
	for j := 0; j < n; j++ {
		ptr[j+1] += ptr[j]
	}
	pos := make([]int, n)
	copy(pos, ptr[:n])
	row = make([]int32, ptr[n])
	val = make([]float64, ptr[n])
	for i := 0; i < n; i++ {
		for k := c.rowPtr[i]; k < c.rowPtr[i+1]; k++ {
			if j := c.col[k]; int(j) != i {
				row[pos[j]] = int32(i)
				val[pos[j]] = c.val[k]
				pos[j]++
			}
		}
	}
	return ptr, row, val
}

// gaussSeidel solves pi (I - P) = 0 by forward Gauss-Seidel sweeps
// (Stewart 1994, sec. 3.2):
//
//	pi_j <- sum_{i!=j} pi_i P(i,j) / sum_{k!=j} P(j,k),   j = 0, ..., n-1,
//
// using the newest values, from init (nil: the uniform vector); the vector
// is normalised after each sweep and the residual ||pi P - pi||_1 checked.
//
// The sweep runs on the rows, in the "push" form: in(j) = sum_{i!=j} pi_i
// P(i,j) is kept for every j, and when pi_i is updated the change times
// row i is added to the in(j) of its targets, so in(j) holds the newest
// values when state j's turn comes: the same iterates as the column form,
// without building the transpose (which cost as much as several sweeps).
// After a sweep in() belongs to the new vector, so the residual is checked
// every sweep in O(n); a residual within the tolerance is confirmed on
// inflows recomputed from scratch (additions of non-negative terms), which
// also happens every 16 sweeps, so the round-off of the updates does not
// accumulate. On nearly completely decomposable chains convergence can be
// very slow; the error then reports the residual reached.
func gaussSeidel(ctx context.Context, c *CSR, tol float64, maxIter int, init []float64, sw *switcher) ([]float64, int, error) {
	n := c.n
	rp, col, val := c.rowPtr, c.col, c.val
	diag := make([]float64, n) // P(j,j)
	off := make([]float64, n)  // sum_{k!=j} P(j,k)
	for i := 0; i < n; i++ {
		for k := rp[i]; k < rp[i+1]; k++ {
			if int(col[k]) != i {
				off[i] += val[k]
			} else {
				diag[i] += val[k]
			}
		}
	}
	x := startVector(n, init)
	in := make([]float64, n)
	// inflow sets in(j) = sum_{i!=j} x_i P(i,j).
	inflow := func() {
		clear(in)
		for i := 0; i < n; i++ {
			xi := x[i]
			if xi == 0 {
				continue
			}
			cs, vs := rowOf(rp, col, val, i)
			for k, j := range cs {
				if int(j) != i {
					in[j] += xi * vs[k]
				}
			}
		}
	}
	inflow()
	r := math.Inf(1)
	var stall stagnation
	for it := 1; it <= maxIter; it++ {
		if err := ctxErr(ctx); err != nil {
			return x, it - 1, fmt.Errorf("gauss-seidel: stopped after %d sweeps: %w", it-1, err)
		}
		for i := 0; i < n; i++ {
			xi := max(in[i], 0) / off[i]
			if d := xi - x[i]; d != 0 {
				x[i] = xi
				cs, vs := rowOf(rp, col, val, i)
				for k, j := range cs {
					if int(j) != i {
						in[j] += d * vs[k]
					}
				}
			}
		}
		s := sum(x)
		for i := range x {
			x[i] /= s
			in[i] /= s
		}
		// in() now holds the inflows of the new vector, so the residual
		// costs O(n); it is confirmed on inflows recomputed from scratch
		// (O(nnz)) before it is accepted, and these are refreshed every 16
		// sweeps as well.
		r = residualFrom(in, diag, x)
		if r <= tol || it%16 == 0 || it == maxIter {
			inflow()
			r = residualFrom(in, diag, x)
			if r <= tol {
				return x, it, nil
			}
		}
		if stall.stuck(r) {
			return x, it, fmt.Errorf("gauss-seidel: %w: residual stagnated at %.3g after %d sweeps, want <= %g (the round-off floor, or a nearly decomposable chain: raise the tolerance or try --method iad or gmres)", ErrNotConverged, stall.best, it, tol)
		}
		if err := sw.check(MethodGaussSeidel, it, r, tol); err != nil {
			return x, it, err
		}
	}
	return x, maxIter, fmt.Errorf("gauss-seidel: %w after %d sweeps: residual %.3g, want <= %g (the chain may be nearly decomposable or slowly mixing: raise the iteration cap or the tolerance, or use gmres, or gth on up to %d states)", ErrNotConverged, maxIter, r, tol, MaxGTHStates)
}

// rowOf returns the columns and values of row i of a CSR matrix as slices
// of the same length, so that a loop over them needs no bounds checks on
// the row's entries (the sweeps of gaussSeidel; the arithmetic and its
// order are those of a loop over rp[i] <= k < rp[i+1]).
func rowOf(rp []int, col []int32, val []float64, i int) ([]int32, []float64) {
	lo, hi := rp[i], rp[i+1]
	cs := col[lo:hi:hi]
	return cs, val[lo:hi:hi][:len(cs)]
}

// residualFrom returns sum_j |in(j) + P(j,j) x_j - x_j|, the residual
// ||x P - x||_1 given the inflows in(j) = sum_{i!=j} x_i P(i,j).
func residualFrom(in, diag, x []float64) float64 {
	var r float64
	for j := range x {
		r += math.Abs(in[j] + diag[j]*x[j] - x[j])
	}
	return r
}

// stagnationSweeps is how many iterations without a new best residual end
// an iterative solve as stagnated (the residual has hit its round-off
// floor above the tolerance).
const stagnationSweeps = 200

type stagnation struct {
	best  float64
	since int
	init  bool
}

func (s *stagnation) stuck(r float64) bool {
	if !s.init || r < s.best {
		s.best, s.since, s.init = r, 0, true
		return false
	}
	s.since++
	return s.since >= stagnationSweeps
}
