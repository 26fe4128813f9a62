package policies

import (
	"sort"

	"ergostock/inventory"
)

// LevelDistribution is the stationary distribution of a stock level at the
// end of a period (after that period's demand), as Evaluate computes it
// when Options.Levels is set:
//
//	P(level = Min + k) = P[k],  k = 0, ..., len(P)-1,
//	Below = P(level < Min),     Above = P(level > Max()).
//
// Backorder mode (Of = NetInventory): net inventory NI = Y - X_{L+1}, with Y
// the inventory position just after review in its stationary law pi and
// X_{L+1} the demand over L+1 periods, independent of Y (the standard
// identity "net inventory = inventory position minus lead-time demand";
// Zipkin 2000, Foundations of Inventory Management, ch. 6, from memory):
//
//	P(NI = k) = sum_y pi(y) P(X_{L+1} = y - k).
//
// NI^+ is the on-hand stock and NI^- the backorders, so sum_k k^+ P(NI = k)
// is Figures.MeanOnHand, sum_k k^- P(NI = k) Figures.MeanBackorders and
// P(NI < 0) Figures.StockoutProbability.
//
// Lost mode (Of = OnHand): on-hand (a - D)^+, with a the on-hand after the
// arrival in the stationary law of the lost-sales chain:
//
//	P(OH = k) = sum_states pi P(D = a - k)  for 1 <= k <= a,
//	P(OH = 0) = sum_states pi P(D >= a),
//
// so sum_k k P(OH = k) is Figures.MeanOnHand.
//
// Levels of negligible probability are left out at both ends: Below and
// Above are each at most 1e-12 (LevelTail). In backorder mode they also
// hold the mass, at most 1e-30 on each side, of the lead-time demand values
// left out of the convolution. Nothing else is approximated: the entries
// are sums of products of the stationary probabilities and the demand law.
type LevelDistribution struct {
	Of    Level
	Min   int
	P     []float64
	Below float64
	Above float64
}

// Level names the stock level a LevelDistribution describes.
type Level string

// The levels.
const (
	NetInventory Level = "net inventory" // backorder mode: on-hand minus backorders
	OnHand       Level = "on hand"       // lost mode
)

// LevelTail is the largest probability left out at either end of a
// LevelDistribution.
const LevelTail = 1e-12

// convolutionTail is the mass of lead-time demand left out of the
// convolution of a net-inventory distribution, on each side.
const convolutionTail = 1e-30

// Max returns the highest level listed, Min + len(P) - 1.
func (d *LevelDistribution) Max() int { return d.Min + len(d.P) - 1 }

// At returns P(level = k), 0 outside Min..Max().
func (d *LevelDistribution) At(k int) float64 {
	if k < d.Min || k > d.Max() {
		return 0
	}
	return d.P[k-d.Min]
}

// trim builds the distribution of the levels lo, lo+1, ... with
// probabilities p, leaving out at each end the longest run of levels whose
// total is at most LevelTail; below and above are masses already known to
// lie beyond the ends.
func trim(of Level, lo int, p []float64, below, above float64) *LevelDistribution {
	i, j := 0, len(p)
	for i < j && below+p[i] <= LevelTail {
		below += p[i]
		i++
	}
	for j > i && above+p[j-1] <= LevelTail {
		above += p[j-1]
		j--
	}
	return &LevelDistribution{Of: of, Min: lo + i, P: append([]float64(nil), p[i:j]...), Below: below, Above: above}
}

// backorderLevels returns the distribution of net inventory at the end of a
// period, P(NI = k) = sum_y pi(y) P(X = y - k) with X = X_{L+1}, over the
// values of X between its 1e-30 quantiles (xlo..xhi), in O(states x
// (xhi - xlo)).
func backorderLevels(c *positionChain, x inventory.Distribution) *LevelDistribution {
	xhi := x.Bound(convolutionTail)
	// xlo: the largest point with P(X < xlo) <= 1e-30 (CDF non-decreasing).
	xlo := sort.Search(xhi+1, func(k int) bool { return x.CDF(k) > convolutionTail })
	pmf := make([]float64, xhi-xlo+1)
	for k := range pmf {
		pmf[k] = x.PMF(xlo + k)
	}
	s := c.top
	for i := range c.pi {
		s = min(s, c.ip(i))
	}
	lo, hi := s-xhi, c.top-xlo
	p := make([]float64, hi-lo+1)
	for i, w := range c.pi {
		if w == 0 {
			continue
		}
		y := c.ip(i)
		// k = y - x for x = xlo..xhi: p index y - x - lo, descending.
		base := p[y-xhi-lo : y-xlo-lo+1]
		for k, v := range pmf {
			base[len(base)-1-k] += w * v
		}
	}
	left := 0.0
	if xlo > 0 {
		left = x.CDF(xlo - 1) // P(X < xlo): NI above the listed top
	}
	return trim(NetInventory, lo, p, x.Tail(xhi+1), left)
}

// lostLevels returns the distribution of on-hand at the end of a period:
// (a - D)^+ for the on-hand a after the arrival of every state, in
// O(transitions).
func lostLevels(c *lostChain, dtab lossTable) *LevelDistribution {
	p := make([]float64, c.top+1)
	for i, w := range c.pi {
		if w == 0 {
			continue
		}
		a := int(c.avail[i])
		if a == 0 {
			p[0] += w
			continue
		}
		p[0] += w * dtab.over[a-1] // P(D >= a)
		for d := 0; d < a && d < len(dtab.pmf); d++ {
			p[a-d] += w * dtab.pmf[d]
		}
	}
	return trim(OnHand, 0, p, 0, 0)
}
