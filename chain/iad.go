package chain

import (
	"context"
	"fmt"
	"math"
)

// Thresholds of the nearly-completely-decomposable (NCD) detection and of
// iterative aggregation/disaggregation (MethodIAD).
const (
	// AutoCoupling is the largest off-block mass of a row, sum over j
	// outside the block of i of P(i,j), of a partition accepted by the NCD
	// detection (used by MethodAuto and MethodIAD).
	AutoCoupling = 1e-3
	// MaxIADBlocks is the largest number of blocks: the aggregated chain is
	// solved by dense GTH at every iteration, O(blocks^3).
	MaxIADBlocks = 1000
	// IADDirectBlock is the largest block solved exactly in the block
	// Gauss-Seidel sweep (GTH on the block, factored once: O(m^3) once and
	// O(m^2) per sweep); larger blocks get iadInnerSweeps point sweeps.
	IADDirectBlock = 500
	// iadDirectBudget caps the float64s stored for the block factors
	// (256 MiB); blocks beyond it fall back to inner sweeps.
	iadDirectBudget = 1 << 25
	// iadInnerSweeps is the number of point Gauss-Seidel sweeps on a block
	// too large for the exact block solve.
	iadInnerSweeps = 10
	// ncdGap is the least number of empty binary orders of magnitude
	// (about 3 decades) between the entries kept and those dropped.
	ncdGap = 10
	// ncdDropExp is the biased float64 exponent of 2^-11: only entries
	// below 2^-10 (about 9.8e-4) may be dropped.
	ncdDropExp = 1023 - 11
	// iadSettle is the largest componentwise relative change between two
	// iterates with which iad stops (besides the residual target), and
	// iadExtra the most iterations it waits for it once the residual is
	// met.
	iadSettle = 1e-12
	iadExtra  = 5
)

// partition assigns each state of an irreducible chain to a block.
type partition struct {
	block    []int32 // block of each state
	nb       int     // number of blocks
	coupling float64 // largest off-block mass of a row
}

// ncdPartition looks for a nearly completely decomposable structure in the
// irreducible chain c (Courtois, Decomposability, 1977; Stewart 1994,
// sec. 6.1). The entries are binned by their binary exponent in one pass;
// if, below 2^-10, a run of at least ncdGap empty exponents separates large
// entries from small ones, the small ones are dropped (the widest such gap,
// the larger threshold on a tie) and the strongly connected components of
// what remains (iterative Tarjan) are the blocks. The partition is accepted
// when it has 2 to min(n/2, MaxIADBlocks) blocks and every row sends at
// most AutoCoupling of its mass outside its block. Cost: one pass over the
// values when there is no gap (the usual case for a chain that is not
// NCD), else O(n + nnz) more.
func ncdPartition(c *CSR) (partition, bool) {
	n := c.n
	var occ [2048]bool
	for _, v := range c.val {
		if v > 0 {
			occ[math.Float64bits(v)>>52&0x7ff] = true
		}
	}
	// Occupied exponents in decreasing order; a gap lies between two
	// consecutive ones, hi > lo, with lo <= ncdDropExp.
	bestLo, bestGap := -1, 0
	hi := -1
	for e := 2047; e >= 0; e-- {
		if !occ[e] {
			continue
		}
		if hi >= 0 && e <= ncdDropExp {
			if g := hi - e - 1; g >= ncdGap && g > bestGap {
				bestLo, bestGap = e, g
			}
		}
		hi = e
	}
	if bestLo < 0 {
		return partition{}, false
	}
	drop := uint64(bestLo) // drop entries whose exponent is <= drop
	ptr := make([]int, n+1)
	adj := make([]int32, 0, len(c.col))
	for i := 0; i < n; i++ {
		for k := c.rowPtr[i]; k < c.rowPtr[i+1]; k++ {
			if v := c.val[k]; v > 0 && math.Float64bits(v)>>52&0x7ff > drop {
				adj = append(adj, c.col[k])
			}
		}
		ptr[i+1] = len(adj)
	}
	comp := sccTarjan(pattern{n: n, ptr: ptr, adj: adj})
	nb := 0
	for _, b := range comp {
		nb = max(nb, int(b)+1)
	}
	if nb < 2 || nb > n/2 || nb > MaxIADBlocks {
		return partition{}, false
	}
	var worst float64
	for i := 0; i < n; i++ {
		var s float64
		for k := c.rowPtr[i]; k < c.rowPtr[i+1]; k++ {
			if comp[c.col[k]] != comp[i] {
				s += c.val[k]
			}
		}
		worst = max(worst, s)
	}
	if worst > AutoCoupling {
		return partition{}, false
	}
	return partition{block: comp, nb: nb, coupling: worst}, true
}

// blockFactor is the GTH reduction of one block I of m states, augmented
// by a state 0 standing for "outside the block": state l (1..m) goes to 0
// with its off-block mass d_l and to the other block states with P_II.
// The rows 1..m are reduced once (they do not depend on the inflow); only
// row 0 does, and it is reduced per solve.
type blockFactor struct {
	m int
	a []float64 // (m+1)^2, row-major, reduced rows 1..m
	s []float64 // s[k] = sum_{j<k} a[k][j] at the elimination of k
}

// newBlockFactor reduces rows 1..m of the augmented block matrix a
// (row 0 unused) as GTH does (Grassmann, Taksar & Heyman 1985).
func newBlockFactor(m int, a []float64) *blockFactor {
	n := m + 1
	s := make([]float64, n)
	for k := n - 1; k >= 1; k-- {
		rk := a[k*n : k*n+k]
		sk := sum(rk)
		if sk == 0 {
			sk = math.SmallestNonzeroFloat64
		}
		s[k] = sk
		for i := 1; i < k; i++ {
			f := a[i*n+k] / sk
			a[i*n+k] = f
			if f == 0 {
				continue
			}
			ri := a[i*n : i*n+k]
			for j, v := range rk {
				ri[j] += f * v
			}
		}
	}
	return &blockFactor{m: m, a: a, s: s}
}

// solve returns in x the solution of x (I - P_II) = b, where b >= 0 is the
// inflow into the block: the stationary vector y of the augmented chain
// whose state 0 moves to l with probability b_l/|b| satisfies
// y_I (I - P_II) = y_0 b/|b|, so x = y_I |b| / y_0. Putting b itself in
// row 0 (unnormalised) and y_0 = 1 gives x directly. No subtraction occurs.
// r0 is scratch of length m+1.
func (f *blockFactor) solve(b, x, r0 []float64) {
	n := f.m + 1
	r0[0] = 0
	copy(r0[1:], b)
	for k := n - 1; k >= 1; k-- {
		g := r0[k] / f.s[k]
		r0[k] = g
		if g == 0 {
			continue
		}
		rk := f.a[k*n : k*n+k]
		for j, v := range rk {
			r0[j] += g * v
		}
	}
	// Back substitution: y_0 = 1, y_j = sum_{i<j} y_i a(i,j), by rows
	// (y_i is final once the rows above it have been added).
	copy(x, r0[1:])
	for i := 1; i < n; i++ {
		yi := x[i-1]
		if yi == 0 {
			continue
		}
		ri := f.a[i*n+i+1 : (i+1)*n]
		for t, v := range ri {
			x[i+t] += yi * v
		}
	}
}

// relChange returns max_i |x_i - y_i| / x_i over the x_i > 0 (+Inf if
// some x_i = 0 < y_i).
func relChange(x, y []float64) float64 {
	var c float64
	for i, v := range x {
		d := math.Abs(v - y[i])
		switch {
		case v > 0:
			c = max(c, d/v)
		case d > 0:
			return math.Inf(1)
		}
	}
	return c
}

// iad solves pi P = pi by iterative aggregation/disaggregation in the form
// of Koury, McAllister & Stewart (SIAM J. Algebraic Discrete Methods 5(2),
// 1984; Stewart, Introduction to the Numerical Solution of Markov Chains,
// 1994, sec. 6.3). From the current x, each iteration
//
//  1. aggregates: pi_I = sum_{i in I} x_i and, for I != J,
//     A_IJ = sum_{i in I} (x_i / pi_I) sum_{j in J} P(i,j);
//  2. solves xi A = xi by dense GTH (the diagonal of A is not needed);
//  3. disaggregates: z_i = xi_I x_i / pi_I;
//  4. makes one block Gauss-Seidel sweep from z: for I = 1..N in turn,
//     x_I (I - P_II) = sum_{J != I} x_J P_JI with the newest x_J, solved
//     exactly by the block's GTH factor (blocks of at most IADDirectBlock
//     states) or by iadInnerSweeps point sweeps (larger blocks);
//
// and normalises. It stops when ||x P - x||_1 <= tol and the iterate has
// settled (relative change <= iadSettle, see the loop). The stationary
// vector is a fixed point of the iteration; on an NCD chain the error is
// reduced at each step by a factor of the order of the coupling (Stewart
// 1994, sec. 6.3), so a few iterations suffice, and since the aggregated
// chain and the block systems are solved subtraction-free, the answer is
// componentwise accurate where plain Gauss-Seidel is not (its error is of
// the order of residual / coupling).
func iad(ctx context.Context, c *CSR, part partition, tol float64, maxIter int, init []float64) ([]float64, int, error) {
	n, nb := c.n, part.nb
	blk := part.block
	// States by block (counting sort), and the local index of each state.
	start := make([]int, nb+1)
	for _, b := range blk {
		start[b+1]++
	}
	for b := 0; b < nb; b++ {
		start[b+1] += start[b]
	}
	states := make([]int32, n)
	loc := make([]int32, n)
	fill := make([]int, nb)
	copy(fill, start[:nb])
	for i, b := range blk {
		loc[i] = int32(fill[b] - start[b])
		states[fill[b]] = int32(i)
		fill[b]++
	}
	rp, col, val := c.rowPtr, c.col, c.val
	off := make([]float64, n) // sum_{k != i} P(i,k)
	var (
		outRow []int32 // off-block entries: row, target block, value
		outBlk []int32
		outVal []float64
	)
	for i := 0; i < n; i++ {
		for k := rp[i]; k < rp[i+1]; k++ {
			j := col[k]
			if int(j) != i {
				off[i] += val[k]
			}
			if blk[j] != blk[i] {
				outRow = append(outRow, int32(i))
				outBlk = append(outBlk, blk[j])
				outVal = append(outVal, val[k])
			}
		}
	}
	tptr, trow, tval := transpose(c)
	// Exact factors of the small blocks.
	factors := make([]*blockFactor, nb)
	budget := iadDirectBudget
	maxM := 0
	for b := 0; b < nb; b++ {
		m := start[b+1] - start[b]
		if m > IADDirectBlock || (m+1)*(m+1) > budget {
			continue
		}
		budget -= (m + 1) * (m + 1)
		maxM = max(maxM, m)
		w := m + 1
		a := make([]float64, w*w)
		for l, s := range states[start[b]:start[b+1]] {
			r := (l + 1) * w
			for k := rp[s]; k < rp[s+1]; k++ {
				j := col[k]
				if blk[j] == int32(b) {
					a[r+int(loc[j])+1] += val[k]
				} else {
					a[r] += val[k]
				}
			}
		}
		factors[b] = newBlockFactor(m, a)
	}
	bv := make([]float64, maxM)
	xv := make([]float64, maxM)
	r0 := make([]float64, maxM+1)

	x := startVector(n, init)
	agg := make([]float64, nb)
	A := make([]float64, nb*nb)
	// pull returns sum_{i != j} x_i P(i,j).
	pull := func(j int) float64 {
		var s float64
		for k := tptr[j]; k < tptr[j+1]; k++ {
			s += x[trow[k]] * tval[k]
		}
		return s
	}
	residual := func() float64 {
		var r float64
		for j := 0; j < n; j++ {
			r += math.Abs(pull(j) - off[j]*x[j])
		}
		return r
	}
	prev := make([]float64, n)
	copy(prev, x)
	met := 0 // iterations done with the residual target met
	r := math.Inf(1)
	var stall stagnation
	for it := 1; it <= maxIter; it++ {
		if err := ctxErr(ctx); err != nil {
			return x, it - 1, fmt.Errorf("iad: stopped after %d iterations: %w", it-1, err)
		}
		// 1. Aggregate.
		clear(agg)
		for i, b := range blk {
			agg[b] += x[i]
		}
		clear(A)
		for k, i := range outRow {
			I := blk[i]
			if agg[I] > 0 {
				A[int(I)*nb+int(outBlk[k])] += x[i] * outVal[k] / agg[I]
			}
		}
		// 2. Solve the aggregated chain.
		xi := GTH(A, nb)
		// 3. Disaggregate.
		for b := 0; b < nb; b++ {
			mem := states[start[b]:start[b+1]]
			if agg[b] > 0 {
				f := xi[b] / agg[b]
				for _, s := range mem {
					x[s] *= f
				}
			} else {
				for _, s := range mem {
					x[s] = xi[b] / float64(len(mem))
				}
			}
		}
		// 4. One block Gauss-Seidel sweep.
		for b := 0; b < nb; b++ {
			mem := states[start[b]:start[b+1]]
			if f := factors[b]; f != nil {
				m := len(mem)
				var tot float64
				for l, j := range mem {
					var s float64
					for k := tptr[j]; k < tptr[j+1]; k++ {
						if i := trow[k]; blk[i] != int32(b) {
							s += x[i] * tval[k]
						}
					}
					bv[l] = s
					tot += s
				}
				if tot == 0 {
					continue // no inflow yet: keep the block as it is
				}
				f.solve(bv[:m], xv[:m], r0[:m+1])
				for l, j := range mem {
					x[j] = xv[l]
				}
				continue
			}
			for range iadInnerSweeps {
				for _, j := range mem {
					if off[j] > 0 {
						x[j] = pull(int(j)) / off[j]
					}
				}
			}
		}
		normalise(x)
		r = residual()
		// On an NCD chain the residual is blind to an aggregate error
		// (it sees it multiplied by the coupling), so the residual target
		// alone is not enough: the iterate must also have settled
		// componentwise. The error contracts by about the coupling per
		// step, so a relative change of at most iadSettle leaves an error
		// far below it. If round-off keeps the change above that,
		// iadExtra more iterations are allowed once the residual is met.
		ch := relChange(x, prev)
		copy(prev, x)
		if r <= tol {
			if ch <= iadSettle || met >= iadExtra {
				return x, it, nil
			}
			met++
		}
		if stall.stuck(r) {
			return x, it, fmt.Errorf("iad: %w: residual stagnated at %.3g after %d iterations, want <= %g (round-off floor: raise the tolerance)", ErrNotConverged, stall.best, it, tol)
		}
	}
	return x, maxIter, fmt.Errorf("iad: %w after %d iterations: residual %.3g, want <= %g (raise the iteration cap or the tolerance)", ErrNotConverged, maxIter, r, tol)
}
