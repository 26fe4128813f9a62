package report

import (
	"math"

	"ergostock/inventory"
)

// renewalCost computes the expected total cost per period of s-S and s-nQ
// policies in backorder mode without building a chain, for the cost map.
//
// With Y the inventory position after review and X = X_(L+1) the demand over
// the lead time and one period, the expected end-of-period holding and
// backorder cost at position y is G(y) = h E[(y-X)^+] + b E[(X-y)^+]. For
// s-S the long-run cost is the renewal-reward ratio
//
//	c(s, S) = [K + sum_{j=0}^{S-s-1} m(j) G(S-j)] / M(S-s) + c E[D],
//
// M(n) = sum_{j<n} m(j), m the renewal mass of demand (Veinott & Wagner 1965,
// "Computing optimal (s, S) inventory policies", Management Science 11(5);
// Zheng & Federgruen 1991, Operations Research 39(4), eq. (2)). For s-nQ,
// Y is uniform on the set C of positions the policy visits, s+1..s+Q for
// most demand laws (Hadley & Whitin 1963; see snqClass); an order is placed
// when Y - D <= s, and
//
//	c(s, Q) = (1/|C|) sum_{y in C} [K P(D >= y-s) + G(y)] + c E[D].
//
// In backorder mode every unit demanded is bought, so the purchase cost
// per period is c E[D].
type renewalCost struct {
	sys  inventory.System
	x    []float64 // pmf of X_(L+1), truncated (see periodsDemand)
	cdf  []float64 // cdf[k] = P(X <= k)
	xp   []float64 // xp[k] = sum_{x <= k} x P(X = x)
	mean float64   // E[X], exact
	m    []float64 // renewal mass, grown on demand
}

func newRenewalCost(sys inventory.System) *renewalCost {
	x, _ := periodsDemand(sys.Demand, sys.LeadTime+1)
	r := &renewalCost{sys: sys, x: x, mean: float64(sys.LeadTime+1) * sys.Demand.Mean()}
	r.cdf = make([]float64, len(x))
	r.xp = make([]float64, len(x))
	c, s := 0.0, 0.0
	for k, p := range x {
		c += p
		s += float64(k) * p
		r.cdf[k], r.xp[k] = c, s
	}
	return r
}

// g returns G(y).
func (r *renewalCost) g(y int) float64 {
	// E[(y-X)^+] = y P(X <= y-1) - sum_{x <= y-1} x P(X = x).
	var below float64
	if k := y - 1; k >= 0 {
		k = min(k, len(r.x)-1)
		below = float64(y)*r.cdf[k] - r.xp[k]
	}
	above := r.mean - float64(y) + below // E[(X-y)^+]
	return r.sys.Holding*below + r.sys.Shortage*math.Max(0, above)
}

func (r *renewalCost) mass(n int) []float64 {
	if len(r.m) < n {
		r.m = renewalMass(r.sys.Demand, n)
	}
	return r.m[:n]
}

// ss returns c(s, S) for s < S.
func (r *renewalCost) ss(s, S int) float64 {
	n := S - s
	m := r.mass(n)
	num, den := r.sys.OrderCost, 0.0
	for j := range n {
		num += m[j] * r.g(S-j)
		den += m[j]
	}
	return num/den + r.sys.UnitCost*r.sys.Demand.Mean()
}

// snq returns c(s, Q) for Q >= 1, averaging over the positions the policy
// visits (see snqClass).
func (r *renewalCost) snq(s, q int) float64 {
	c := snqClass(r.sys.Demand, s, q)
	freq, hold := 0.0, 0.0
	for _, y := range c {
		freq += r.sys.Demand.Tail(y - s)
		hold += r.g(y)
	}
	return (r.sys.OrderCost*freq+hold)/float64(len(c)) + r.sys.UnitCost*r.sys.Demand.Mean()
}
