package policies

import (
	"fmt"
	"math"
)

// floorWork caps the multiply-adds of a floor-constrained s-S search (a few
// seconds), which costs O(n) per candidate and so grows with the square of
// the widest width it must examine.
const floorWork = 4_000_000_000

// constrained is the outcome of a floor-constrained s-S search.
type constrained struct {
	s, S     int
	cost     float64
	nmax     int // widths S-s searched: 1..nmax
	computed int
}

// widthBound returns a lower bound, valid for every s-S policy with
// S - s = n, on its holding and backorder cost sum_y pi(y) G(y):
//
//	LB(n) = min(h, b) sum_{d >= 1} (1 - M(2d)/M(n))^+ .
//
// Proof. By Jensen's inequality G(y) >= h (y-mu)^+ + b (mu-y)^+ >=
// min(h,b) |y - mu| with mu = E[X_{L+1}], and E|Y-mu| >= sum_{d>=1}
// P(|Y-mu| >= d). The positions with |y - mu| < d are at most 2d
// consecutive integers; under the stationary law m(S-y)/M(n) any r
// consecutive positions carry at most M(r)/M(n), because the expected number
// of renewals in any r consecutive integers is at most that in 0..r-1 (start
// afresh at the first renewal in the window; strong Markov property). So
// P(|Y-mu| >= d) >= 1 - M(2d)/M(n).
//
// LB is non-decreasing in n (M is increasing), so once LB(n) reaches the
// cost of a feasible policy no wider policy can be cheaper.
func (mo *boModel) widthBound(n int) float64 {
	mo.ensureM(n)
	mn := mo.cm[n]
	var v float64
	for d := 1; 2*d < n; d++ {
		v += 1 - mo.cm[2*d]/mn
	}
	return min(mo.h, mo.b) * v
}

// ssConstrained finds the cheapest s-S policy in backorder mode meeting the
// floors, exactly. For a fixed width n = S - s the cost
//
//	c_n(s) = [K + sum_{j<n} m(j) G(s+n-j)] / M(n)
//
// is convex in s (a non-negative combination of shifts of the convex G),
// and the fill rate and the stockout probability are averages of fill(y)
// and so(y) under the same weights, hence monotone in s. So the cheapest
// feasible s for width n is max(s_u(n), s_f(n)), with s_u the unconstrained
// minimiser and s_f the smallest feasible reorder point; both are found by
// walks from the previous width's values. Widths run from 1 until
// widthBound(n) reaches the best feasible cost, which proves the rest
// dearer. Ties keep the first (narrowest) width found.
func (mo *boModel) ssConstrained(fl floors, start zfResult) (constrained, error) {
	best := constrained{cost: math.Inf(1)}
	work := 0
	sU := start.s
	sF := start.s
	for n := 1; ; n++ {
		if n >= maxLevel {
			return best, fmt.Errorf("s-S search under the floor %v: width above %d", fl, maxLevel)
		}
		if isFinite(best.cost) && mo.widthBound(n) >= best.cost {
			best.nmax = n - 1
			return best, nil
		}
		if work > floorWork {
			return best, fmt.Errorf("s-S search under the floor %v: stopped at width %d after %.3g operations without proving the optimum (orders this large relative to demand are beyond the exact constrained search; try s-nQ)", fl, n, float64(work))
		}
		cost := func(s int) float64 {
			best.computed++
			work += n
			return mo.ssCost(s, s+n)
		}
		feasible := func(s int) bool {
			best.computed++
			work += n
			_, fill, so := mo.ssService(s, s+n)
			return fl.meets(fill, so)
		}
		// Unconstrained minimiser of the convex c_n.
		c := cost(sU)
		moved := false
		for {
			if c2 := cost(sU - 1); c2 < c {
				sU, c, moved = sU-1, c2, true
				continue
			}
			break
		}
		if !moved {
			for {
				if c2 := cost(sU + 1); c2 < c {
					sU, c = sU+1, c2
					continue
				}
				break
			}
		}
		// Smallest feasible reorder point at or above sU.
		s := max(sF, sU)
		if feasible(s) {
			for s > sU && feasible(s-1) {
				s--
			}
		} else {
			for !feasible(s + 1) {
				s++
				if s-sU >= maxLevel {
					return best, noneMeets(fl, map[string][2]int{"reorder_point": {sU, s}, "order_up_to_minus_reorder_point": {n, n}})
				}
			}
			s++
		}
		sF = s
		if s != sU {
			c = cost(s)
		}
		if c < best.cost {
			best.s, best.S, best.cost = s, s+n, c
		}
	}
}
