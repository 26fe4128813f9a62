package policies

import (
	"fmt"
	"math"

	"ergostock/inventory"
)

// supportGCD returns the greatest common divisor of the positive demand
// values with positive probability, up to the kernel's bound.
func (mo *boModel) supportGCD() int {
	g := 0
	for i := mo.qlo; i < len(mo.q); i++ {
		if mo.q[i] > 0 {
			g = gcd(g, i)
			if g == 1 {
				break
			}
		}
	}
	return max(g, 1)
}

// snqWork caps the additions the s-nQ search spends on its windows (about
// a second): with demand on a lattice of step gD > 1 a window of an order
// multiple Q sums Q/gcd(Q, gD) positions one by one.
const snqWork = 500_000_000

// snqSearch finds the cheapest s-nQ policy in backorder mode, exactly.
//
// Cost. Under s-nQ the inventory position after review, started at s+Q,
// moves on the positions s+Q-ig, i = 0..r-1, with g = gcd(Q, support of D)
// and r = Q/g, and its stationary law is uniform there (the transition
// matrix on those positions is doubly stochastic and irreducible; Hadley and
// Whitin 1963, for g = 1). An order is placed when the position y falls to
// s or below, that is when D >= y - s, so
//
//	P(order) = (1/r) sum_{i=1}^{r} P(D >= i g),       (= E[min(D,Q)]/Q for g = 1)
//	cost(s,Q) = K P(order) + (1/r) sum_{i=0}^{r-1} G(s+Q-ig)   (+ c E[D]).
//
// Search over s for fixed Q. The window term is convex in s (a sum of
// shifts of the convex G) and the fill rate and stockout probability are
// monotone in s, so the cheapest feasible s is max(s_u(Q), s_f(Q)) with s_u
// the unconstrained minimiser and s_f the smallest reorder point meeting the
// floor; both are found by walks from the previous Q's values.
//
// Bound on Q. Every cost with a given r is at least H(r), the mean of the r
// smallest values of G (the ordering term is >= 0), and H is non-decreasing.
// Since r >= ceil(Q/gD) for gD the support's gcd, once H(ceil(Q/gD)) reaches
// the best cost found no larger Q can do better; Q runs from 1 to there.
// For convex G the r smallest values lie in a window around the minimiser,
// so H is built by growing that window one point at a time. With g = 1 a
// window costs O(1) from prefix sums of G, fill and so, so the search takes
// time linear in the largest Q plus the lengths of the walks.
func (mo *boModel) snqSearch(d inventory.Distribution, fl floors) (Policy, Search, error) {
	ystar, err := mo.fractile()
	if err != nil {
		return Policy{}, Search{}, err
	}
	gD := mo.supportGCD()
	// smallest[r] = sum of the r smallest values of G.
	smallest := []float64{0, mo.G(ystar)}
	wa, wb := ystar, ystar
	lowBound := func(r int) float64 {
		for len(smallest) <= r {
			if mo.G(wa-1) <= mo.G(wb+1) {
				wa--
				smallest = append(smallest, smallest[len(smallest)-1]+mo.G(wa))
			} else {
				wb++
				smallest = append(smallest, smallest[len(smallest)-1]+mo.G(wb))
			}
		}
		return smallest[r] / float64(r)
	}

	var (
		bestCost = math.Inf(1)
		best     Policy
		computed int
		work     int // additions spent on the windows, capped at snqWork
		sU       = ystar - 1
		sF       = ystar - 1
		Q        int
		tails    = []float64{1}
		minDQ    float64
	)
	for Q = 1; ; Q++ {
		if Q >= mo.levelCap() {
			return Policy{}, Search{}, mo.capErr("s-nQ search", "order multiple", float64(Q))
		}
		if err := mo.tick(); err != nil {
			return Policy{}, Search{}, err
		}
		rMin := (Q + gD - 1) / gD
		if isFinite(bestCost) && lowBound(rMin) >= bestCost {
			break
		}
		g := gcd(Q, gD)
		r := Q / g
		tails = append(tails, d.Tail(Q)) // tails[k] = P(D >= k)
		var order float64
		if g == 1 {
			minDQ += tails[Q] // E[min(D, Q)] = sum_{k=1}^{Q} P(D >= k)
			order = minDQ / float64(Q)
		} else {
			minDQ += tails[Q]
			for i := 1; i <= r; i++ {
				order += tails[i*g]
			}
			order /= float64(r)
		}
		if work > snqWork {
			return Policy{}, Search{}, &SizeError{Chain: "s-nQ search", Bound: float64(work), Limit: snqWork, What: "operations",
				Input: "demand", Value: d.String(), LimitField: "the search's work limit",
				Reason: fmt.Sprintf("the s-nQ search reached order multiple %d after %.3g operations without proving the optimum (demand values share the factor %d, so each order multiple's positions are summed one by one: plan in units of %d, or use s-S)", Q, float64(work), gD, gD)}
		}
		if g == 1 {
			work++
		} else {
			work += r
		}
		window := func(s int) (cost, fill, so float64) {
			computed++
			if g == 1 {
				cost, fill, so = mo.sums(s+1, s+Q)
				fr := float64(Q)
				return mo.k*order + cost/fr, fill / fr, so / fr
			}
			mo.ensureY(s+Q-(r-1)*g, s+Q)
			work += r
			for i := range r {
				k := s + Q - i*g - mo.glo
				cost += mo.g[k]
				fill += mo.fr[k]
				so += mo.s[k]
			}
			fr := float64(r)
			return mo.k*order + cost/fr, fill / fr, so / fr
		}
		cost := func(s int) float64 { c, _, _ := window(s); return c }
		feasible := func(s int) bool { _, f, o := window(s); return fl.meets(f, o) }

		// Start from the previous minimiser shifted by half a step.
		if Q > 1 {
			sU--
		}
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
		s := sU
		if !fl.none() {
			s = max(sF, sU)
			if feasible(s) {
				for s > sU && feasible(s-1) {
					s--
				}
			} else {
				for !feasible(s + 1) {
					s++
					if s-sU >= mo.levelCap() {
						return Policy{}, Search{}, noneMeets(fl, map[string][2]int{"reorder_point": {sU, s}, "order_multiple": {Q, Q}})
					}
				}
				s++
			}
			sF = s
			if s != sU {
				c = cost(s)
			}
		}
		if c < bestCost {
			bestCost = c
			best = Policy{Kind: SNQ, ReorderPoint: s, OrderMultiple: Q}
		}
	}
	sr := Search{
		Evaluated: computed,
		Method:    "for each order multiple the cheapest reorder point by convexity",
		Bounds:    map[string][2]int{"order_multiple": {1, Q - 1}},
		Guarantee: "global optimum (exact): convex in s for each Q; larger Q provably cost more",
	}
	if !fl.none() {
		sr.Method += ", raised to meet the floor"
		sr.Guarantee = "global optimum under the floor (exact): convex cost and monotone service in s for each Q; larger Q provably cost more"
	}
	return best, sr, nil
}
