package report

import (
	"fmt"
	"math"

	"ergostock/chain"
	"ergostock/inventory"
	"ergostock/policies"
)

// levelEps is the per-period demand tail left out when the demand over
// several periods is convolved; the neglected mass is reported.
const levelEps = 1e-13

// levelLaw is the stationary law of the stock level a chart shows: P[i] is
// the probability of level Lo+i. Neglected is the probability mass outside
// P (a truncated demand tail), at most (L+1) * 1e-13.
type levelLaw struct {
	Lo        int
	P         []float64
	Neglected float64
}

// mean returns the mean level of the law.
func (l levelLaw) mean() float64 {
	m := 0.0
	for i, p := range l.P {
		m += float64(l.Lo+i) * p
	}
	return m
}

// errNoLevels reports a case whose level distribution this package cannot
// compute from the public API (lost sales with a positive lead time).
var errNoLevels = fmt.Errorf("the on-hand distribution of a lost-sales chain with a positive lead time is not available")

// stockLevels returns the stationary law of net inventory at the end of a
// period (backorder mode) or of on-hand stock at the end of a period (lost
// mode, zero lead time only).
//
// Backorder mode: net inventory is NI = Y - X_(L+1) with Y the inventory
// position just after review, independent of the demand X_(L+1) over the
// lead time and the period (SPEC section 1; Zipkin, Foundations of
// Inventory Management, 2000, §6.2). The law of Y is
//   - base-stock S: Y = S;
//   - s-S: P(Y = S-j) = m(j) / sum_{i<S-s} m(i), j = 0..S-s-1, with m the
//     renewal mass of demand, m(0) = 1/(1-p0), m(j) = sum_{k=1..j} p_k
//     m(j-k) / (1-p0) (Veinott & Wagner 1965, Management Science 11(5);
//     Zheng & Federgruen 1991, Operations Research 39(4));
//   - s-nQ: uniform on the positions reachable from s+Q (see snqClass),
//     the stationary law of the doubly stochastic chain of inventory
//     position (Hadley & Whitin, Analysis of Inventory Systems, 1963;
//     Zipkin 2000, §6.3).
//
// Lost mode with L = 0: the chain of on-hand y just after review on
// s+1..top, y -> (y-D)^+ then an order if that is <= s, is solved with
// package chain; on-hand at the end of the period is (y-D)^+.
func stockLevels(sys inventory.System, p policies.Policy) (levelLaw, error) {
	s, top := p.Levels()
	if sys.Mode == inventory.Lost {
		if sys.LeadTime > 0 {
			return levelLaw{}, errNoLevels
		}
		return lostLevels(sys.Demand, p, s, top)
	}
	var y []float64 // P(Y = s+1+i)
	n := top - s
	switch p.Kind {
	case policies.BaseStock:
		y = make([]float64, n)
		y[n-1] = 1
	case policies.SS:
		m := renewalMass(sys.Demand, n)
		y = make([]float64, n)
		tot := 0.0
		for j := range n {
			tot += m[j]
		}
		for j := range n {
			y[n-1-j] = m[j] / tot
		}
	case policies.SNQ:
		y = make([]float64, n)
		c := snqClass(sys.Demand, s, n)
		for _, v := range c {
			y[v-s-1] = 1 / float64(len(c))
		}
	default:
		return levelLaw{}, fmt.Errorf("policy type %q: want base-stock, s-S or s-nQ", p.Kind)
	}
	x, negl := periodsDemand(sys.Demand, sys.LeadTime+1)
	// NI = Y - X ranges over s+1-(len(x)-1) .. top.
	lo := s + 1 - (len(x) - 1)
	out := make([]float64, top-lo+1)
	for i, py := range y {
		if py == 0 {
			continue
		}
		yv := s + 1 + i
		for k, px := range x {
			out[yv-k-lo] += py * px
		}
	}
	return levelLaw{Lo: lo, P: out, Neglected: negl}, nil
}

// renewalMass returns m(0..n-1), the expected number of periods, counted
// from an order, in which cumulative demand equals j (see stockLevels).
func renewalMass(d inventory.Distribution, n int) []float64 {
	m := make([]float64, n)
	p := make([]float64, n)
	for k := range n {
		p[k] = d.PMF(k)
	}
	q := 1 - p[0]
	m[0] = 1 / q
	for j := 1; j < n; j++ {
		sum := 0.0
		for k := 1; k <= j; k++ {
			sum += p[k] * m[j-k]
		}
		m[j] = sum / q
	}
	return m
}

// periodsDemand returns the pmf of the demand over n >= 1 periods by
// repeated convolution, each period's demand cut where P(D > k) <= 1e-13,
// and the neglected mass (at most n * 1e-13).
func periodsDemand(d inventory.Distribution, n int) ([]float64, float64) {
	b := d.Bound(levelEps)
	one := make([]float64, b+1)
	for k := range one {
		one[k] = d.PMF(k)
	}
	negl := d.Tail(b + 1)
	x := append([]float64(nil), one...)
	for range n - 1 {
		y := make([]float64, len(x)+b)
		for i, a := range x {
			if a == 0 {
				continue
			}
			for k, c := range one {
				y[i+k] += a * c
			}
		}
		x = y
	}
	return x, math.Min(1, float64(n)*negl)
}

// lostLevels solves the lost-sales chain with zero lead time (see
// stockLevels) and returns the law of on-hand at the end of a period.
func lostLevels(d inventory.Distribution, p policies.Policy, s, top int) (levelLaw, error) {
	if top < 0 {
		return levelLaw{}, fmt.Errorf("policy %v: order-up-to level below 0", p)
	}
	lo := max(s+1, 0)
	n := top - lo + 1
	b := chain.NewBuilder(n)
	next := func(x int) int {
		if x > s {
			return x
		}
		return x + p.Order(x)
	}
	for i := range n {
		y := lo + i
		// Demand d < y leaves y-d on hand; d >= y leaves 0.
		for k := range y {
			if pk := d.PMF(k); pk > 0 {
				b.Add(i, next(y-k)-lo, pk)
			}
		}
		if t := d.Tail(y); t > 0 {
			b.Add(i, next(0)-lo, t)
		}
	}
	m, err := b.Build()
	if err != nil {
		return levelLaw{}, fmt.Errorf("on-hand chain of %v: %w", p, err)
	}
	res, err := chain.Solve(m, chain.Options{})
	if err != nil {
		return levelLaw{}, fmt.Errorf("on-hand chain of %v: %w", p, err)
	}
	out := make([]float64, top+1)
	for i, py := range res.Pi {
		y := lo + i
		for k := range y {
			out[y-k] += py * d.PMF(k)
		}
		out[0] += py * d.Tail(y)
	}
	return levelLaw{Lo: 0, P: out}, nil
}

// snqClass returns the inventory positions after review that an s-nQ
// policy visits when started at s+Q. Positions move as y -> s+1 + ((y-D-s-1)
// mod Q), so from s+Q they reach exactly the positions y with s+Q-y a
// multiple of g = gcd(Q, the demand sizes of positive probability); on them
// the chain is irreducible and doubly stochastic, so its stationary law is
// uniform. For most demand laws g = 1 and every position s+1..s+Q is
// visited. Demand sizes are scanned up to the point where P(D > k) <= 1e-13.
func snqClass(d inventory.Distribution, s, q int) []int {
	g := q
	for k := 1; k <= d.Bound(levelEps) && g > 1; k++ {
		if d.PMF(k) > 0 {
			g = gcd(g, k)
		}
	}
	var c []int
	for y := s + q; y > s; y -= g {
		c = append(c, y)
	}
	return c
}

func gcd(a, b int) int {
	for b != 0 {
		a, b = b, a%b
	}
	return a
}
