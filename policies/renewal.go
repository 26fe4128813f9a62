package policies

import (
	"fmt"
	"gonum.org/v1/gonum/floats"
	"math"

	"ergostock/chain"
	"ergostock/inventory"
)

// maxRenewalWork bounds the multiply-adds of one renewal recursion (its
// check costs as much again): a few seconds of work.
const maxRenewalWork = 2e9

// solveRenewal finds the stationary law of the s-S (or base-stock)
// inventory-position chain without building its matrix, by the renewal
// recursion. With p_k = P(D = k), state j the position top - j, and the
// chain of buildSS (demand k < a moves j to j + k, the rest restarts at top),
// global balance at a state j >= 1 reads
//
//	pi_j P(D >= 1) = sum_{k=1}^{j} pi_{j-k} p_k,
//
// since every position above y (and only those) feeds y, and y is left
// exactly when D >= 1. So pi_j is proportional to the renewal mass m(j) =
// sum_{k=1}^{j} q_k m(j-k), q_k = p_k / P(D >= 1), m(0) = 1 (Zheng and
// Federgruen 1991; this is forward substitution on the chain's matrix
// taken in its structure, as chain.Forward does on the stored rows). It costs
// contiguous dot products, O(n w) for n positions and w the stored demand
// values, with P(D >= 1) from the closed tail (so a slow mover, P(D >= 1) =
// 1e-300, is exact). Demand values below floor are left out of the kernel,
// as buildSS folds them into the restart.
//
// The diagnostics are those chain.Check would give on the matrix buildSS
// stores (same folding, same entries), computed from its structure without
// storing it: the residual ||pi P - pi||_1, recomputing every inflow in a
// second pass independent of the solve, and the largest global-balance
// violation, with out-flows from row sums of stored entries (no
// subtraction). NonZeros is the count of stored entries that matrix has.
func solveRenewal(dist inventory.Distribution, p Policy, opt Options) (*positionChain, lossTable, error) {
	s, top := p.Levels()
	n := top - s
	if n > opt.MaxStates {
		return nil, lossTable{}, fmt.Errorf("%v: %w", p, &SizeError{Chain: "inventory-position", Bound: float64(n), Limit: opt.MaxStates, What: "inventory positions"})
	}
	dtab := newLossTable(dist, 0, n)
	pmf := dtab.pmf
	floor := negligibleTransition * dist.Tail(1)
	if opt.Exhaustive {
		floor = 0
	}
	kept := func(k int) bool { return k < len(pmf) && pmf[k] > 0 && pmf[k] >= floor }
	// The kernel on 1..n-1: dense over klo..khi (zeros where not kept).
	klo, khi := 0, 0
	var moved float64 // mass of the demand values below n not kept
	for k := 0; k < n; k++ {
		if !kept(k) {
			if k < len(pmf) {
				moved += pmf[k]
			}
			continue
		}
		if k == 0 {
			continue
		}
		if klo == 0 {
			klo = k
		}
		khi = k
	}
	var ker []float64
	if klo > 0 {
		ker = make([]float64, khi-klo+1)
		for k := klo; k <= khi; k++ {
			if kept(k) {
				ker[k-klo] = pmf[k]
			}
		}
	}
	if w := float64(n) * float64(len(ker)); w > maxRenewalWork {
		return nil, lossTable{}, &SizeError{Chain: "renewal recursion of " + p.String(), Bound: w, Limit: int(maxRenewalWork), What: "multiply-adds",
			Reason: fmt.Sprintf("%d positions times a demand kernel of %d values", n, len(ker)), LimitField: "the evaluation's work limit"}
	}
	up := dist.Tail(1)
	if !(up > 0) {
		return nil, lossTable{}, fmt.Errorf("%v: demand is never positive (P(D >= 1) = %v)", p, up)
	}
	rev := reversed(ker)
	pi := make([]float64, n)
	pi[0] = 1
	ctx := opt.Context
	for j := 1; j < n; j++ {
		if ctx != nil && j&4095 == 0 {
			if err := ctx.Err(); err != nil {
				return nil, lossTable{}, fmt.Errorf("%v: solving the inventory-position chain: %w", p, err)
			}
		}
		pi[j] = conv(rev, klo, pi, j) / up
	}
	var z inventory.CompensatedSum
	for _, v := range pi {
		z.Add(v)
	}
	inv := 1 / z.Value()
	for j := range pi {
		pi[j] *= inv
	}
	c := &positionChain{s: s, top: top, stride: 1, pi: pi, negl: moved, n: n}
	c.diag = renewalCheck(pi, ker, klo, dtab, kept, n)
	c.diag.Method = chain.MethodForward
	return c, dtab, nil
}

// conv returns sum_{k=klo}^{min(khi, j)} ker[k-klo] pi[j-k], with rev
// the kernel reversed (rev[t] = ker[len(ker)-1-t]), so that the sum is one
// contiguous dot product: with m = min(len(ker), j-klo+1) terms it is
// rev[len(ker)-m:] against pi[j-klo-m+1 : j-klo+1] (gonum's floats.Dot,
// vectorised on common processors).
func conv(rev []float64, klo int, pi []float64, j int) float64 {
	if len(rev) == 0 || j < klo {
		return 0
	}
	m := min(len(rev), j-klo+1)
	return floats.Dot(rev[len(rev)-m:], pi[j-klo-m+1:j-klo+1])
}

// reversed returns a reversed copy of ker.
func reversed(ker []float64) []float64 {
	rev := make([]float64, len(ker))
	for i, v := range ker {
		rev[len(ker)-1-i] = v
	}
	return rev
}

// renewalCheck returns the residual, balance, states and stored entries of
// pi on the matrix buildSS would store (see solveRenewal).
func renewalCheck(pi, ker []float64, klo int, dtab lossTable, kept func(int) bool, n int) chain.Diagnostics {
	rev := reversed(ker)
	pmf := dtab.pmf
	p0 := 0.0
	if kept(0) {
		p0 = pmf[0]
	}
	// moved[a] = mass of the values k < a not kept; K[x] = kept mass on 1..x.
	moved := make([]float64, n+1)
	K := make([]float64, n+1)
	cnt := make([]int, n+1) // cnt[a] = kept values in 0..a-1
	for k := 0; k < n; k++ {
		moved[k+1] = moved[k]
		K[k+1] = K[k]
		cnt[k+1] = cnt[k]
		if kept(k) {
			cnt[k+1]++
			if k >= 1 {
				K[k+1] += pmf[k]
			}
		} else if k < len(pmf) {
			moved[k+1] += pmf[k]
		}
	}
	// K[x+1] = kept mass on 1..x; restart entry of state i (a = n - i).
	col0 := func(i int) float64 {
		a := n - i
		l := dtab.over[a-1] + moved[a]
		if i == 0 {
			l += p0
		}
		return min(l, 1)
	}
	d := chain.Diagnostics{States: n}
	var y0 inventory.CompensatedSum // inflow to state 0 from the others
	var resid float64
	worst, state := 0.0, 0
	for i := 0; i < n; i++ {
		a := n - i
		c0 := col0(i)
		// Stored entries of row i: the restart (if positive) and the kept
		// values k < a (k = 0 joins the restart at i = 0).
		nk := cnt[a]
		if i == 0 && kept(0) {
			nk--
		}
		if c0 > 0 {
			nk++
		}
		d.NonZeros += nk
		if i == 0 {
			continue
		}
		y0.Add(pi[i] * c0)
		in := conv(rev, klo, pi, i) // inflow from the states above, off the diagonal
		resid += math.Abs(in + pi[i]*p0 - pi[i])
		out := pi[i] * (c0 + K[a])
		if v := math.Abs(out - in); v > worst {
			worst, state = v, i
		}
	}
	// State 0: inflow y0 from the others, out-flow pi_0 K[n].
	resid += math.Abs(y0.Value() + pi[0]*col0(0) - pi[0])
	if v := math.Abs(pi[0]*K[n] - y0.Value()); v > worst {
		worst, state = v, 0
	}
	d.Residual, d.Balance, d.BalanceState = resid, worst, state
	return d
}
