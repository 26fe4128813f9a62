package chain

import (
	"context"
	"errors"
	"fmt"
	"math"
)

// GMRES with an ILU(0) preconditioner, for chains on which Gauss-Seidel
// crawls (slowly mixing chains: nearly decomposable ones without a clear
// magnitude gap, drifting chains, inventory chains with rare moves down).
//
// The singular system pi (I - P) = 0, sum pi = 1 is made regular by fixing
// one state k at pi_k = 1: for j != k,
//
//	y_j sum_{l != j} P(j,l) - sum_{i != j, k} y_i P(i,j) = P(k,j),
//
// that is A y = b with A = (I - Q)^T, Q the chain with state k removed.
// Q is substochastic and irreducible through k, so A is a nonsingular
// M-matrix, its solution y > 0, and its incomplete LU factorisation with
// the pattern of A, ILU(0), exists with positive pivots (Meijerink & van
// der Vorst, Math. Comp. 31, 1977). The diagonal is the off-diagonal row
// sum of P, computed without subtraction. y is found by restarted GMRES
// (Saad & Schultz, SIAM J. Sci. Stat. Comput. 7(3), 1986) with right
// preconditioning (Saad, Iterative Methods for Sparse Linear Systems, 2nd
// ed., 2003, Algs. 9.5 and 10.4), then pi = y / sum y. This is the
// projection approach to Markov chains of Philippe, Saad & Stewart
// (Operations Research 40(6), 1992) and Stewart (Introduction to the
// Numerical Solution of Markov Chains, 1994, ch. 4). The state fixed is the
// most probable one of the start vector (without one, of the vector after
// gmresStartSweeps Gauss-Seidel sweeps), which keeps the system well
// scaled.
//
// The answer is accepted on the true residual ||pi P - pi||_1 <= tol, after
// round-off negatives (components far below the residual) are set to 0.
// A restarted cycle that gains less than a factor 10 doubles the restart
// length (up to gmresMaxRestart, within gmresMemory), the usual cure for
// the stagnation of restarted GMRES (Saad 2003, ch. 6; from memory);
// if they are not met after the Krylov cycles, up to gmresPolish
// Gauss-Seidel sweeps finish from the Krylov answer.

const (
	gmresRestart = 50
	// gmresMaxRestart is the longest restart cycle: the restart length
	// doubles from gmresRestart while cycles stagnate.
	gmresMaxRestart = 800
	gmresMaxCycles  = 400
	gmresPolish     = 200
	// gmresStartSweeps is the number of Gauss-Seidel sweeps that give the
	// start vector when there is none.
	gmresStartSweeps = 10
	// gmresMemory caps the Krylov basis (float64s).
	gmresMemory = 1 << 24
)

// ilu0 is the incomplete LU factorisation of a sparse matrix with the
// pattern of the matrix: L (unit lower) and U share the storage of a.
type ilu0 struct {
	n    int
	ptr  []int
	col  []int32
	val  []float64
	diag []int // position of the diagonal in each row
}

// newILU0 factorises the CSR matrix (ptr, col, val), whose rows have
// sorted columns and a diagonal entry (Saad 2003, Alg. 10.4, IKJ form).
func newILU0(n int, ptr []int, col []int32, a []float64) (*ilu0, error) {
	val := make([]float64, len(a))
	copy(val, a)
	diag := make([]int, n)
	for i := 0; i < n; i++ {
		diag[i] = -1
		for k := ptr[i]; k < ptr[i+1]; k++ {
			if int(col[k]) == i {
				diag[i] = k
			}
		}
		if diag[i] < 0 {
			return nil, fmt.Errorf("ilu0: row %d has no diagonal", i)
		}
	}
	iw := make([]int, n)
	for i := range iw {
		iw[i] = -1
	}
	for i := 0; i < n; i++ {
		for k := ptr[i]; k < ptr[i+1]; k++ {
			iw[col[k]] = k
		}
		for k := ptr[i]; k < diag[i]; k++ {
			c := int(col[k])
			piv := val[diag[c]]
			val[k] /= piv
			f := val[k]
			for t := diag[c] + 1; t < ptr[c+1]; t++ {
				if p := iw[col[t]]; p >= 0 {
					val[p] -= f * val[t]
				}
			}
		}
		if d := val[diag[i]]; !(d > 0) || math.IsInf(d, 0) {
			return nil, fmt.Errorf("ilu0: pivot %v in row %d", d, i)
		}
		for k := ptr[i]; k < ptr[i+1]; k++ {
			iw[col[k]] = -1
		}
	}
	return &ilu0{n: n, ptr: ptr, col: col, val: val, diag: diag}, nil
}

// solve sets z = (LU)^{-1} v (z and v may not alias).
func (f *ilu0) solve(v, z []float64) {
	for i := 0; i < f.n; i++ {
		s := v[i]
		for k := f.ptr[i]; k < f.diag[i]; k++ {
			s -= f.val[k] * z[f.col[k]]
		}
		z[i] = s
	}
	for i := f.n - 1; i >= 0; i-- {
		s := z[i]
		for k := f.diag[i] + 1; k < f.ptr[i+1]; k++ {
			s -= f.val[k] * z[f.col[k]]
		}
		z[i] = s / f.val[f.diag[i]]
	}
}

// gmresSolve returns the stationary distribution of the irreducible chain
// c and the number of Krylov steps (plus polishing sweeps) it took.
func gmresSolve(ctx context.Context, c *CSR, tol float64, maxIter int, init []float64) ([]float64, int, error) {
	n := c.n
	if n == 1 {
		return []float64{1}, 0, nil
	}
	if init == nil {
		// A few sweeps find a probable state to fix (fixing a state of
		// tiny probability makes y huge and the system badly scaled).
		init, _, _ = gaussSeidel(ctx, c, 0, gmresStartSweeps, nil, nil)
	}
	k := 0
	if init != nil {
		for i, v := range init {
			if v > init[k] {
				k = i
			}
		}
	}
	// A = (I - Q)^T by rows (row j of A is column j of P), states != k
	// renumbered 0..n-2.
	idx := func(s int) int32 {
		if s > k {
			return int32(s - 1)
		}
		return int32(s)
	}
	tptr, trow, tval := transpose(c)
	off := make([]float64, n)
	for i := 0; i < n; i++ {
		for q := c.rowPtr[i]; q < c.rowPtr[i+1]; q++ {
			if int(c.col[q]) != i {
				off[i] += c.val[q]
			}
		}
	}
	N := n - 1
	ptr := make([]int, N+1)
	col := make([]int32, 0, len(trow)+N)
	val := make([]float64, 0, len(trow)+N)
	b := make([]float64, N)
	for j := 0; j < n; j++ {
		if j == k {
			continue
		}
		r := idx(j)
		placed := false
		for q := tptr[j]; q < tptr[j+1]; q++ {
			i := int(trow[q])
			if i == k {
				b[r] = tval[q]
				continue
			}
			if !placed && i > j {
				col, val = append(col, r), append(val, off[j])
				placed = true
			}
			col, val = append(col, idx(i)), append(val, -tval[q])
		}
		if !placed {
			col, val = append(col, r), append(val, off[j])
		}
		ptr[r+1] = len(col)
	}
	tptr, trow, tval = nil, nil, nil
	pre, err := newILU0(N, ptr, col, val)
	if err != nil {
		return nil, 0, fmt.Errorf("gmres: %w", err)
	}
	matvec := func(x, y []float64) {
		for i := 0; i < N; i++ {
			var s float64
			for q := ptr[i]; q < ptr[i+1]; q++ {
				s += val[q] * x[col[q]]
			}
			y[i] = s
		}
	}
	mMax := min(gmresMaxRestart, max(5, gmresMemory/N-1))
	m := min(gmresRestart, mMax)
	y := make([]float64, N)
	if init != nil && init[k] > 0 {
		for s, v := range init {
			if s != k {
				y[idx(s)] = v / init[k]
			}
		}
	} else {
		pre.solve(b, y)
	}
	var V [][]float64 // the Krylov basis, grown as needed
	var H, cs, sn, g []float64
	z := make([]float64, N)
	w := make([]float64, N)
	r := make([]float64, N)
	full := make([]float64, n)
	// result normalises y (with y_k = 1) into full, clamping round-off
	// negatives, and returns the residual ||pi P - pi||_1.
	result := func() float64 {
		for s := 0; s < n; s++ {
			switch {
			case s == k:
				full[s] = 1
			default:
				full[s] = max(y[idx(s)], 0)
			}
		}
		normalise(full)
		return Residual(c, full)
	}
	steps := 0
	best := math.Inf(1)
	worse := 0
cycles:
	for cycle := 0; cycle < gmresMaxCycles && steps < maxIter; cycle++ {
		if ctx != nil {
			if err := ctx.Err(); err != nil {
				return nil, steps, fmt.Errorf("gmres: stopped after %d steps: %w", steps, err)
			}
		}
		matvec(y, r)
		for i := range r {
			r[i] = b[i] - r[i]
		}
		beta := norm2(r)
		res := result()
		if res <= tol {
			return full, steps, nil
		}
		switch {
		case res < best/10:
			best, worse = res, 0
		case m < mMax:
			// A restarted cycle that gains less than a factor 10 is
			// stagnating (restarts discard the directions it needs):
			// double the restart length (see the doc above).
			m = min(2*m, mMax)
			best, worse = min(best, res), 0
		default:
			best = min(best, res)
			if worse++; worse >= 3 {
				break cycles // the Krylov cycles have reached their floor
			}
		}
		if len(V) < m+1 || len(cs) != m {
			for len(V) < m+1 {
				V = append(V, make([]float64, N))
			}
			H = make([]float64, (m+1)*m) // H[i*m+j]
			cs, sn, g = make([]float64, m), make([]float64, m), make([]float64, m+1)
		}
		if beta == 0 || math.IsNaN(beta) {
			break
		}
		// The L1 residual of pi = y / sum y is at most 2 ||r||_1 / sum y
		// <= 2 sqrt(N) ||r||_2 / sum y (the equation of state k follows
		// from the others, as the columns of I - P sum to 0), so the cycle
		// aims at a quarter of the tolerance on that bound.
		sy := 1.0
		for _, v := range y {
			sy += max(v, 0)
		}
		target := 0.25 * tol * sy / (2 * math.Sqrt(float64(N)))
		for i := range r {
			V[0][i] = r[i] / beta
		}
		clear(g)
		g[0] = beta
		j := 0
		for ; j < m && steps < maxIter; j++ {
			steps++
			pre.solve(V[j], z)
			matvec(z, w)
			for i := 0; i <= j; i++ { // modified Gram-Schmidt
				h := dot(w, V[i])
				H[i*m+j] = h
				axpy(-h, V[i], w)
			}
			h := norm2(w)
			H[(j+1)*m+j] = h
			if h != 0 {
				for i := range w {
					V[j+1][i] = w[i] / h
				}
			}
			for i := 0; i < j; i++ { // previous rotations
				a, bb := H[i*m+j], H[(i+1)*m+j]
				H[i*m+j] = cs[i]*a + sn[i]*bb
				H[(i+1)*m+j] = -sn[i]*a + cs[i]*bb
			}
			a, bb := H[j*m+j], H[(j+1)*m+j]
			d := math.Hypot(a, bb)
			if d == 0 {
				break
			}
			cs[j], sn[j] = a/d, bb/d
			H[j*m+j] = d
			H[(j+1)*m+j] = 0
			g[j+1] = -sn[j] * g[j]
			g[j] = cs[j] * g[j]
			if math.Abs(g[j+1]) <= target || h == 0 {
				j++
				break
			}
		}
		// Solve the triangular system and update y += M^{-1} V t.
		t := make([]float64, j)
		for i := j - 1; i >= 0; i-- {
			s := g[i]
			for l := i + 1; l < j; l++ {
				s -= H[i*m+l] * t[l]
			}
			t[i] = s / H[i*m+i]
		}
		clear(w)
		for i := 0; i < j; i++ {
			axpy(t[i], V[i], w)
		}
		pre.solve(w, z)
		axpy(1, z, y)
	}
	res := result()
	if res <= tol {
		return full, steps, nil
	}
	// Polish with Gauss-Seidel from the Krylov answer.
	x, it, err := gaussSeidel(ctx, c, tol, gmresPolish, full, nil)
	if err == nil {
		return x, steps + it, nil
	}
	if errors.Is(err, ErrNotConverged) {
		return nil, steps + it, fmt.Errorf("gmres: %w after %d Krylov steps and %d Gauss-Seidel sweeps: residual %.3g, want <= %g (raise the tolerance)", ErrNotConverged, steps, it, min(res, Residual(c, x)), tol)
	}
	return nil, steps + it, err
}

func dot(a, b []float64) float64 {
	var s float64
	for i, v := range a {
		s += v * b[i]
	}
	return s
}

func norm2(a []float64) float64 { return math.Sqrt(dot(a, a)) }

// axpy sets y += a x.
func axpy(a float64, x, y []float64) {
	for i, v := range x {
		y[i] += a * v
	}
}
