package policies

import (
	"math"
	"sort"

	"ergostock/inventory"
)

// lossTable holds, for a demand law X on 0, 1, 2, ... and every integer y of
// a range lo..hi, the first-order loss functions
//
//	below(y) = E[(y-X)^+] = sum_{k=0}^{y-1} P(X <= k),
//	above(y) = E[(X-y)^+] = sum_{k>=y} P(X > k),
//
// and the tail over(y) = P(X > y), all in O(hi - lo + 1) time by running
// sums (the standard loss-function identities; Zipkin 2000, Foundations of
// Inventory Management, appendix C, from memory). Every sum adds
// non-negative terms: the right tail starts from the distribution's closed
// tail P(X >= hi+1), so small tails keep their relative accuracy and nothing
// is truncated except the rapidly vanishing remainder of above(hi) (see
// tailSum). A nil X stands for the law concentrated at 0.
type lossTable struct {
	lo    int
	pmf   []float64 // P(X = pmf0 + i); pmf0 = 0 when lo <= 0
	pmf0  int
	below []float64 // E[(y-X)^+], y = lo..hi
	above []float64 // E[(X-y)^+], y = lo..hi
	over  []float64 // P(X > y), y = lo..hi
	// neglected bounds the part of above(hi) that tailSum left out.
	neglected float64
}

// tailSumCap is the most closed-tail terms summed for above(hi).
const tailSumCap = 1 << 16

func newLossTable(x inventory.Distribution, lo, hi int) lossTable {
	if hi < lo {
		hi = lo
	}
	n := hi - lo + 1
	t := lossTable{lo: lo, below: make([]float64, n), above: make([]float64, n), over: make([]float64, n)}
	if x == nil {
		for i := range n {
			y := lo + i
			t.below[i] = float64(max(y, 0))
			t.above[i] = float64(max(-y, 0))
			if y < 0 {
				t.over[i] = 1
			}
		}
		t.pmf = []float64{1}
		return t
	}
	mu := x.Mean()
	h := max(hi, 0)
	// Start the running sums at k0 <= lo, the largest point with
	// k0 P(X < k0) <= 1e-300, so E[(k0-X)^+] <= 1e-300 is taken as 0 and a
	// table far above 0 costs O(hi - k0), not O(hi).
	k0 := lossStart(x, lo)
	m := h - k0 + 1
	pmf := make([]float64, m) // P(X = k0 + i)
	next := 0                 // where to look again for an all-zero tail
	terms := newPMFStepper(x, k0)
	for i := range pmf {
		k := k0 + i
		pmf[i] = terms.at(k)
		// Past the mean, once P(X >= k) itself is 0 in float64 every
		// later term is 0 too (each is at most that tail): the rest of
		// the table stays zero without computing its terms.
		if pmf[i] == 0 && float64(k) > mu && i >= next {
			if x.Tail(k) == 0 {
				break
			}
			next = i + 256
		}
	}
	t.pmf, t.pmf0 = pmf, k0
	// P(X > k) for k = k0..h, downwards from the closed tail P(X >= h+1).
	gt := make([]float64, m)
	gt[m-1] = x.Tail(h + 1)
	for i := m - 2; i >= 0; i-- {
		gt[i] = gt[i+1] + pmf[i+1]
	}
	// E[(k-X)^+] = E[(k-1-X)^+] + P(X <= k-1), upwards from k0.
	bw := make([]float64, m+1)
	cdf := 0.0
	if k0 > 0 {
		cdf = x.CDF(k0 - 1)
	}
	for i := range m {
		cdf += pmf[i]
		bw[i+1] = bw[i] + cdf
	}
	// E[(X-k)^+] = P(X > k) + E[(X-k-1)^+], downwards from k = h.
	ab := make([]float64, m)
	rest, negl := tailSum(x, h+1, mu, bw[m])
	t.neglected = negl
	if k0 > 0 {
		t.neglected = max(t.neglected, float64(k0)*x.CDF(k0-1))
	}
	ab[m-1] = gt[m-1] + rest
	for i := m - 2; i >= 0; i-- {
		ab[i] = ab[i+1] + gt[i]
	}
	for i := range n {
		y := lo + i
		if y < 0 {
			t.above[i] = mu - float64(y)
			t.over[i] = 1
			continue
		}
		t.over[i] = gt[y-k0]
		t.above[i] = ab[y-k0]
		t.below[i] = bw[y-k0]
	}
	return t
}

// lossStart returns the point k0 <= lo where newLossTable starts its running
// sums: the largest k0 with k0 P(X < k0) <= lowerNegligible (0 for lo <= 0).
func lossStart(x inventory.Distribution, lo int) int {
	if lo <= 0 || x == nil {
		return 0
	}
	lo = min(lo, math.MaxInt-1)
	return max(sort.Search(lo+1, func(k int) bool { return float64(k)*x.CDF(k-1) > lowerNegligible })-1, 0)
}

// lossEntries returns the float64 entries newLossTable(x, lo, hi) would
// allocate per array, computed in float64: the range lo..hi plus the
// running sums from lossStart(x, lo) to max(hi, 0).
func lossEntries(x inventory.Distribution, lo, hi int) float64 {
	n := span(lo, max(hi, lo))
	if x == nil {
		return n
	}
	return n + span(lossStart(x, lo), max(hi, 0))
}

// lowerNegligible bounds the mass E[(k0-X)^+] that a loss table starting
// at k0 > 0 takes as 0.
const lowerNegligible = 1e-300

// tailSum returns sum_{k>=from} P(X > k) = E[(X-from)^+] from the closed
// tails, stopping when a term no longer changes the sum, and a bound on the
// part left out. If the terms decay too slowly to finish in tailSumCap
// steps, it falls back to the identity E[(X-y)^+] = E[X] - y + E[(y-X)^+]
// with below = E[(from-X)^+].
//
// When from lies below the mean the identity is used at once: both terms
// mu - from and below are positive, so nothing cancels, and the tails
// between from and the mean (O(mean) of them) are not summed one by one.
func tailSum(x inventory.Distribution, from int, mu, below float64) (sum, neglected float64) {
	if float64(from) < mu {
		return mu - float64(from) + below, 0
	}
	// A truncated convolution counts its neglected mass in every tail;
	// where that mass lies is unknown, so it is left out here and
	// reported with the evaluation.
	neg := inventory.Neglected(x)
	prev := 0.0
	for k := from; k < from+tailSumCap; k++ {
		term := max(x.Tail(k+1)-neg, 0)
		if term == 0 {
			return sum, 0
		}
		sum += term
		if term <= 1e-17*sum {
			// Remaining terms decay at least geometrically at ratio term/prev.
			if prev > term {
				r := term / prev
				return sum, term * r / (1 - r)
			}
			return sum, term
		}
		prev = term
	}
	return max(mu-float64(from)+below, 0), 0
}

// at returns the index of y in the table's range.
func (t *lossTable) at(y int) int { return y - t.lo }

// pmfStepper returns P(X = k) for k = k0, k0+1, ... in turn. For the
// Poisson law it uses the ratio of successive terms,
//
//	P(X = k+1) = P(X = k) m / (k+1)
//
// (the standard recurrence; Johnson, Kemp and Kotz, Univariate Discrete
// Distributions, 3rd ed. 2005, section 4.2, from memory), restarted from
// the closed term every pmfAnchor steps and whenever a term falls below
// pmfRecurrenceFloor, so each term carries at most about 2 pmfAnchor
// rounding errors (under 1e-14 relative) and none is computed from a
// subnormal one. P(X = 0) and P(X = 1) are always closed terms: the
// renewal recursion of the position chain divides by the closed tail
// P(D >= 1), and a first kernel term off from the closed one in its last
// digits drifts over thousands of positions (seen at mean 1e-12 in
// TestRenewalMatchesMatrix). A loss table of X_L needs thousands of terms, and the
// closed term (an exponential, a logarithm and a square root) was about
// half of the evaluation of the 2,000-position s-S chain (issue 14). Other
// laws are evaluated term by term.
type pmfStepper struct {
	x      inventory.Distribution
	m      float64 // Poisson mean; 0: term by term
	k      int     // the last k returned, or k0-1
	p      float64 // P(X = k)
	anchor int     // steps since the closed term
}

const (
	pmfAnchor          = 16
	pmfRecurrenceFloor = 1e-280
)

func newPMFStepper(x inventory.Distribution, k0 int) *pmfStepper {
	st := &pmfStepper{x: x, k: k0 - 1}
	if p, ok := x.(inventory.Poisson); ok {
		st.m = p.Mean()
	}
	return st
}

// at returns P(X = k); k is the previous k plus one.
func (st *pmfStepper) at(k int) float64 {
	if st.m > 0 && k == st.k+1 && k > 1 && st.anchor < pmfAnchor && st.p >= pmfRecurrenceFloor {
		if v := st.p * (st.m / float64(k)); v >= pmfRecurrenceFloor {
			st.k, st.p = k, v
			st.anchor++
			return v
		}
	}
	st.k, st.p, st.anchor = k, st.x.PMF(k), 0
	return st.p
}
