package network

import (
	"fmt"
	"math"
)

// maxScan is the widest range of centre levels Optimize scans in full.
const maxScan = 3000

// MaxFillRate is the highest fill-rate floor Optimize accepts: closer to 1
// the figures cannot confirm it.
const MaxFillRate = 1 - 1e-9

// Plan is the outcome of Optimize: the network with its levels set (in
// the network's reading of the centre's level), its figures, and how the
// levels were found.
type Plan struct {
	Network *Network
	Result  *Result
	// Search says how the levels were found and what is guaranteed.
	Search string
}

// Optimize finds base-stock levels of least expected cost per period that
// meet every store's fill-rate floor (Location.MinFillRate; 0 for none).
//
//   - One store, no floor: the exact recursion of Clark and Scarf (see the
//     package documentation). Optimal.
//   - One store with a floor: for every centre installation level s0 from
//     0 to the 1 - 1e-15 quantile of the centre's lead-time demand, the
//     cheapest store level meeting the floor (the store's cost is convex
//     and its fill rate increasing in its level, given s0); the best pair.
//     Optimal over that range (a negative centre level is never better:
//     it is the same policy as s0 = 0 with a lower store level). Beyond
//     3000 levels the ternary search below takes its place.
//   - Several stores: the same inner step for every store under the
//     decomposition, and the centre level by a ternary search over the same
//     range assuming the cost unimodal in it, then a check of the
//     neighbours within 3 units: a local optimum of an approximation,
//     labelled so.
func Optimize(n *Network) (*Plan, error) {
	if err := n.Validate(false); err != nil {
		return nil, err
	}
	if n.Centre.MinFillRate != 0 {
		return nil, n.errAt(n.Centre, "min_fill_rate", "%s: want it empty at the centre: floors apply to the stores' fill rates", ftoa(n.Centre.MinFillRate))
	}
	floors := false
	for _, st := range n.Stores {
		if st.MinFillRate > MaxFillRate {
			return nil, n.errAt(st, "min_fill_rate", "%s: want at most 1 - 1e-9, the finest floor the figures confirm: %w", ftoa(st.MinFillRate), ErrLimit)
		}
		if st.MinFillRate > 0 {
			floors = true
		}
		if st.Shortage == 0 && st.MinFillRate == 0 {
			return nil, n.errAt(st, "shortage_cost", "0 with no fill-rate floor: want a shortage cost > 0 or a min_fill_rate, else holding no stock is cheapest")
		}
	}
	m, err := newModel(n)
	if err != nil {
		return nil, err
	}
	var s0 int
	var s []int
	var search string
	switch {
	case len(n.Stores) == 1 && !floors:
		s0, s, err = m.clarkScarf()
		search = "exact recursion of Clark and Scarf (1960): optimal"
	case len(n.Stores) == 1 && m.x0Bound <= maxScan:
		s0, s, err = m.scanCentre()
		search = fmt.Sprintf("every centre level 0..%d, the cheapest store level meeting its floor for each: optimal", m.x0Bound)
	case len(n.Stores) == 1:
		s0, s, err = m.ternaryCentre()
		search = fmt.Sprintf("centre level by ternary search over 0..%d (too wide to scan; cost assumed unimodal in it, neighbours within 3 checked), the cheapest store level meeting its floor for each: a local optimum", m.x0Bound)
	default:
		s0, s, err = m.ternaryCentre()
		search = "centre level by ternary search (cost assumed unimodal in it, neighbours within 3 checked), each store's cheapest level meeting its floor for that centre level: a local optimum of the approximation"
	}
	if err != nil {
		return nil, err
	}
	res, err := m.evaluate(s0, s)
	if err != nil {
		return nil, err
	}
	return &Plan{Network: n.withLevels(s0, s), Result: res, Search: search}, nil
}

// clarkScarf returns the optimal installation levels of a serial system
// from the echelon recursion: S1* the least y with
// P(X_{L1+1} <= y) >= (b + h0)/(b + h1) (no limit when h1 <= h0), and S0
// the least level where the first difference of
// C(S0) = h0 (S0 - E X_{L0}) + E[G1(min(S1*, S0 - X_{L0}))] turns >= 0:
//
//	C(S0+1) - C(S0) = h0 + sum_{x > S0 - S1*} P(X_{L0} = x) ((h1 + b) F1(S0 - x) - b - h0),
//
// nondecreasing in S0 since G1 is convex (Clark and Scarf 1960; Chen and
// Zheng 1994). The store level is then min(S1*, S0).
func (m *model) clarkScarf() (int, []int, error) {
	st := m.n.Stores[0]
	h0, h1, b := m.n.Centre.Holding, st.Holding, st.Shortage
	x1 := m.xl1[0]
	b1 := x1.Bound(cutEps)
	unlimited := h1 <= h0
	s1 := math.MaxInt
	if !unlimited {
		frac := (b + h0) / (b + h1)
		s1 = b1 + 1
		for y := 0; y <= b1; y++ {
			if x1.CDF(y) >= frac {
				s1 = y
				break
			}
		}
	}
	hi := m.x0Bound + b1 + 1
	if !unlimited {
		hi = s1 + m.x0Bound + 1
	}
	F1 := make([]float64, hi+1)
	for y := range F1 {
		F1[y] = x1.CDF(y)
	}
	p0 := make([]float64, m.x0Bound+1)
	for x := range p0 {
		p0[x] = m.x0.PMF(x)
	}
	tail := m.x0.Tail(m.x0Bound + 1)
	diff := func(S int) float64 {
		d := h0
		for x, p := range p0 {
			y := S - x
			if !unlimited && y >= s1 {
				continue
			}
			f := 0.0
			if y >= 0 {
				f = F1[min(y, hi)]
			}
			d += p * ((h1+b)*f - b - h0)
		}
		return d - tail*(b+h0) // the cut tail sits far below S1*
	}
	lo := -1 // diff(-1) = -b < 0
	for lo+1 < hi {
		mid := lo + (hi-lo)/2
		if diff(mid) >= 0 {
			hi = mid
		} else {
			lo = mid
		}
	}
	S0 := hi
	s1 = min(s1, S0)
	return S0 - s1, []int{s1}, nil
}

// bestStore returns the cheapest level of store i meeting its floor when
// the units the centre owes it have law pb, and that level's cost.
func (m *model) bestStore(i int, pb []float64) (int, float64, error) {
	st := m.n.Stores[i]
	x1 := m.xl1[i]
	hiZ := len(pb) - 1 + x1.Bound(cutEps)
	F1 := make([]float64, hiZ+1)
	for y := range F1 {
		F1[y] = x1.CDF(y)
	}
	cdfZ := func(s int) float64 {
		var c float64
		for k, p := range pb {
			if y := s - k; y >= 0 && p > 0 {
				c += p * F1[min(y, hiZ)]
			}
		}
		return c
	}
	// The cost is convex in s: its minimiser is the least s with
	// P(B + X_{L+1} <= s) >= b/(b+h).
	frac := 1.0
	if st.Holding+st.Shortage > 0 {
		frac = st.Shortage / (st.Holding + st.Shortage)
	}
	lo, hi := -1, hiZ
	for lo+1 < hi {
		mid := lo + (hi-lo)/2
		if cdfZ(mid) >= frac {
			hi = mid
		} else {
			lo = mid
		}
	}
	s := hi
	if frac == 0 {
		s = 0
	}
	f, err := m.store(i, s, pb)
	if err != nil {
		return 0, 0, err
	}
	if floor := st.MinFillRate; floor > 0 && f.fill < floor {
		// The fill rate increases with s: double the step, then bisect.
		lo, step := s, 1
		hi := s
		for {
			hi = lo + step
			if hi-s > maxSupport {
				return 0, 0, m.n.errAt(st, "min_fill_rate", "%s: no level within %d units of %d meets it", ftoa(floor), maxSupport, s)
			}
			g, err := m.store(i, hi, pb)
			if err != nil {
				return 0, 0, err
			}
			if g.fill >= floor {
				break
			}
			lo, step = hi, step*2
		}
		for lo+1 < hi {
			mid := lo + (hi-lo)/2
			g, err := m.store(i, mid, pb)
			if err != nil {
				return 0, 0, err
			}
			if g.fill >= floor {
				hi = mid
			} else {
				lo = mid
			}
		}
		s = hi
		if f, err = m.store(i, s, pb); err != nil {
			return 0, 0, err
		}
	}
	return s, st.Holding*f.onHand + st.Shortage*f.backorders, nil
}

// atCentre returns the stores' best levels and the network's cost at
// centre installation level s0.
func (m *model) atCentre(s0 int) ([]int, float64, error) {
	cf, err := m.centre(s0)
	if err != nil {
		return nil, 0, err
	}
	cost := m.n.Centre.Holding * cf.onHand
	b0, _, err := m.backorderLaw(s0)
	if err != nil {
		return nil, 0, err
	}
	if m.n.Split != TwoMoment {
		if err := m.checkThin(s0, b0); err != nil {
			return nil, 0, err
		}
	}
	levels := make([]int, len(m.n.Stores))
	for i := range m.n.Stores {
		pb := b0
		if len(m.n.Stores) > 1 {
			if pb, err = m.split(b0, i); err != nil {
				return nil, 0, err
			}
		}
		s, c, err := m.bestStore(i, pb)
		if err != nil {
			return nil, 0, err
		}
		levels[i] = s
		cost += c
	}
	return levels, cost, nil
}

func (m *model) scanCentre() (int, []int, error) {
	best, bestCost := -1, math.Inf(1)
	var bestLevels []int
	for s0 := 0; s0 <= m.x0Bound; s0++ {
		levels, cost, err := m.atCentre(s0)
		if err != nil {
			return 0, nil, err
		}
		if cost < bestCost {
			best, bestCost, bestLevels = s0, cost, levels
		}
	}
	return best, bestLevels, nil
}

func (m *model) ternaryCentre() (int, []int, error) {
	memo := map[int]float64{}
	levelsAt := map[int][]int{}
	cost := func(s0 int) (float64, error) {
		if c, ok := memo[s0]; ok {
			return c, nil
		}
		l, c, err := m.atCentre(s0)
		if err != nil {
			return 0, err
		}
		memo[s0], levelsAt[s0] = c, l
		return c, nil
	}
	lo, hi := 0, m.x0Bound
	if n := len(m.n.Stores); n > 1 && m.n.Split != TwoMoment {
		// Below this level the split of the backorders is refused (checkThin).
		kmax := int(math.Sqrt(2 * maxThinWork / float64(n)))
		lo = max(0, m.x0Bound+1-kmax)
	}
	floor := lo
	for hi-lo > 4 {
		a, b := lo+(hi-lo)/3, hi-(hi-lo)/3
		ca, err := cost(a)
		if err != nil {
			return 0, nil, err
		}
		cb, err := cost(b)
		if err != nil {
			return 0, nil, err
		}
		if ca <= cb {
			hi = b
		} else {
			lo = a
		}
	}
	best, bestCost := -1, math.Inf(1)
	for s0 := max(lo-3, floor); s0 <= min(hi+3, m.x0Bound); s0++ {
		c, err := cost(s0)
		if err != nil {
			return 0, nil, err
		}
		if c < bestCost {
			best, bestCost = s0, c
		}
	}
	return best, levelsAt[best], nil
}
