package policies

import (
	"fmt"
	"math"
	"sort"
	"strconv"

	"ergostock/chain"
	"ergostock/inventory"
)

// positionChain is the chain of inventory position Y just after review in
// backorder mode. State i is Y = top - i, so the states run top, top-1, ...,
// s+1. From Y = y with demand d the next position is y - d if y - d > s;
// otherwise an order is placed: s-S and base-stock restart at top (state 0),
// s-nQ moves to s+1 + ((y-d-s-1) mod Q).
type positionChain struct {
	s, top int
	m      *chain.CSR
	pi     []float64
	diag   chain.Diagnostics
	negl   float64 // mass placed approximately when building rows
	// stride is 1, or for s-nQ the index g of the subgroup of positions
	// reachable from top: state i is then Y = top - i*g.
	stride int
	n      int // states (m is nil when solved without a matrix)
}

// states returns the number of states of the chain.
func (c *positionChain) states() int {
	if c.m != nil {
		return c.m.Len()
	}
	return c.n
}

// ip returns the inventory position of state i.
func (c *positionChain) ip(i int) int { return c.top - i*c.stride }

// negligibleTransition is the probability below which a transition of the
// inventory-position chain (there relative to P(D >= 1), the probability of
// leaving a position; or of the lost-sales chain, see buildLost) is
// not stored unless Options.Exhaustive is set: its mass moves to the
// restart at top (lost sales: to the lump to on-hand 0), the row stays stochastic, and the
// largest mass so moved in any row is reported in Evaluation.Neglected.
// For Poisson demand of mean 400 this keeps about 430 of the 1,390 demand
// values whose probability is a positive float64, and moves at most
// ~1e-19 per row; the stationary law changes by round-off only.
const negligibleTransition = 1e-20

// buildSS builds the s-S (and base-stock) chain. Row i (Y = y = top - i,
// a = y - s units above the reorder point) holds the demands d = 0..a-1 that
// leave Y above s, in columns i+d, and the lump P(D >= a) from the closed
// tail in column 0 (the restart at top). Every transition into a state j >= 1
// comes from a state i <= j: the chain is forward and its stationary law is
// found by forward substitution in O(nnz) (nnz <= n*m for n = top - s states
// and m the demand values stored). Demand values with probability below
// floor (0: none) are not stored; their mass joins the lump, and the
// largest such mass in a row is returned.
func buildSS(d lossTable, s, top int, floor float64) (*chain.CSR, float64, error) {
	n := top - s
	pmf := d.pmf
	// The stored demand values, and moved[a] = the mass of the others below a.
	var keep []int32
	moved := make([]float64, n+1)
	for k := 0; k < n; k++ {
		p := 0.0
		if k < len(pmf) {
			p = pmf[k]
		}
		moved[k+1] = moved[k]
		if p > 0 && p >= floor {
			keep = append(keep, int32(k))
		} else {
			moved[k+1] += p
		}
	}
	nnz := 0
	kk := 0
	for a := 1; a <= n; a++ {
		for kk < len(keep) && int(keep[kk]) < a {
			kk++
		}
		nnz += 1 + kk
	}
	rowPtr := make([]int, n+1)
	col := make([]int32, 0, nnz)
	val := make([]float64, 0, nnz)
	var worst float64
	for i := range n {
		a := n - i
		// P(D >= a) = P(D > a-1); table index a-1 (lo = 0).
		lump := d.over[a-1] + moved[a]
		worst = max(worst, moved[a])
		ks := keep
		if i == 0 && len(ks) > 0 && ks[0] == 0 {
			// Y = top: d = 0 stays at top, as does the lump.
			lump += pmf[0]
			ks = ks[1:]
		}
		if lump > 0 {
			col = append(col, 0)
			val = append(val, min(lump, 1)) // P(D >= 1) + P(D = 0) may round above 1
		}
		for _, k := range ks {
			if int(k) >= a {
				break
			}
			col = append(col, int32(i)+k)
			val = append(val, pmf[k])
		}
		rowPtr[i+1] = len(col)
	}
	m, err := chain.NewCSR(n, rowPtr, col, val)
	return m, worst, err
}

// residues returns q_r = P(D mod Q = r), r = 0..Q-1, summing the
// probabilities up to the point K where P(D > K) <= 1e-30, and placing that
// remaining tail mass on the residue of K+1, so every q sums to 1 to
// round-off. The returned mass is the part whose residue is approximate.
func residues(dist inventory.Distribution, q int) ([]float64, float64) {
	r := make([]float64, q)
	// A cut table counts its neglected mass in every tail; stop there.
	k := dist.Bound(max(1e-30, inventory.Neglected(dist)))
	for d := 0; d <= k; d++ {
		r[d%q] += dist.PMF(d)
	}
	rest := dist.Tail(k + 1)
	r[(k+1)%q] += rest
	for i := range r {
		r[i] = min(r[i], 1) // Q = 1: the sum may round above 1
	}
	return r, rest
}

// buildNQ builds the s-nQ chain on the positions s+1..s+Q. With u = Y-s-1 in
// 0..Q-1, the next position has u' = (u - D) mod Q whether or not an order
// is placed, so the chain is the random walk on the integers mod Q with
// steps -D: its matrix is circulant, hence doubly stochastic, and the
// uniform law is stationary (Hadley & Whitin 1963, Analysis of Inventory
// Systems, ch. 4, from memory). In state order top..s+1 (i = Q-1-u), row i
// has q_r in column (i + r) mod Q. When the residues reached by demand
// generate only a subgroup of index g > 1, the walk started at top stays in
// the states i = 0, g, 2g, ...; only those are built (renumbered i/g).
func buildNQ(q []float64) (*chain.CSR, int, error) {
	Q := len(q)
	g := Q
	for r, p := range q {
		if p > 0 {
			g = gcd(g, r)
		}
	}
	if g == 0 {
		g = Q
	}
	n := Q / g
	// The steps that occur, in units of g, ascending.
	var steps []int
	for r, p := range q {
		if p > 0 {
			steps = append(steps, r/g)
		}
	}
	rowPtr := make([]int, n+1)
	col := make([]int32, 0, n*len(steps))
	val := make([]float64, 0, n*len(steps))
	for i := range n {
		// Columns (i + r) mod n in increasing order: first the steps that
		// wrap around (r >= n - i), then the others.
		split := sort.SearchInts(steps, n-i)
		for _, r := range steps[split:] {
			col = append(col, int32(i+r-n))
			val = append(val, q[r*g])
		}
		for _, r := range steps[:split] {
			col = append(col, int32(i+r))
			val = append(val, q[r*g])
		}
		rowPtr[i+1] = len(col)
	}
	m, err := chain.NewCSR(n, rowPtr, col, val)
	return m, g, err
}

func gcd(a, b int) int {
	for b != 0 {
		a, b = b, a%b
	}
	return a
}

// evaluateBackorder evaluates p in backorder mode. With pi the stationary
// law of Y (inventory position just after review) and X_n the demand over n
// periods, independent of Y (SPEC section 2):
//
//	mean_on_hand         = E[(Y - X_{L+1})^+]
//	mean_backorders      = E[(X_{L+1} - Y)^+]
//	stockout_probability = P(X_{L+1} > Y)
//	fill_rate            = E[min(D, (Y - X_L)^+)] / E[D]
//	                     = (E[(Y - X_L)^+] - E[(Y - X_{L+1})^+]) / E[D]
//	order_frequency      = sum_y pi(y) P(D >= y - s)
//	E[ordered/period]    = E[D]  (flow balance)
//
// The middle identity for the fill rate is min(D, a^+) = a^+ - (a-D)^+ for
// a = Y - X_L, with X_{L+1} = X_L + D and D independent of X_L. Where
// little demand goes unserved (y far above the lead-time demand, a slow
// mover) that difference of two nearly equal expectations loses every
// digit, so per position the served demand is taken instead from
//
//	E[min(D, (y - X_L)^+)] = E[D] - (E[(X_{L+1} - y)^+] - E[(X_L - y)^+]),
//
// by D - min(D, a^+) = (D - a^+)^+ = (X_{L+1} - y)^+ - (X_L - y)^+ (check
// the cases X_L >= y and X_L < y), at the positions y above E[X_L]: the
// unserved part is there a difference of two tail sums of closed-form tails
// (partial.go), each accurate to its last digits, and the fill rate is
// 1 - unserved/E[D] to round-off. At or below E[X_L] (where the served
// part is not near E[D], and far below 0 where E[(X-y)^+] = E[X] - y
// rounds away E[X]) the direct difference is kept.
func evaluateBackorder(sys inventory.System, p Policy, opt Options) (*Evaluation, error) {
	s, top := p.Levels()
	n := top - s
	dist := sys.Demand
	mean := dist.Mean()
	if err := checkPositions(p, opt.MaxStates); err != nil {
		return nil, err
	}
	var tm timing
	var err error
	if opt.tm != nil {
		tm = *opt.tm
	} else if tm, err = timingOf(sys, p.Kind); err != nil {
		return nil, err
	}
	xl, neglL, xl1, neglL1 := tm.x0, tm.negl0, tm.x1, tm.negl1
	// The chain of the position at reviews moves with the demand between
	// reviews (D itself when R = 1).
	review := float64(tm.r)
	dist = tm.pos
	for _, x := range []inventory.Distribution{xl, xl1} {
		if err := checkLossTable(p, x, opt.MaxStates); err != nil {
			return nil, err
		}
	}
	if err := ctxErr(opt.Context); err != nil {
		return nil, fmt.Errorf("%v: %w", p, err)
	}

	var (
		c    *positionChain
		dtab lossTable
	)
	if m := opt.Chain.Method; p.Kind != SNQ && (m == "" || m == chain.MethodAuto) {
		c, dtab, err = solveRenewal(dist, p, opt)
	} else {
		c, dtab, err = solvePosition(dist, p, opt)
	}
	if err != nil {
		return nil, err
	}
	lo := s + 1
	meanL := 0.0
	if xl != nil {
		meanL = xl.Mean()
	}
	tL := newLossTable(xl, lo, top)
	tL1 := newLossTable(xl1, lo, top)

	var onHand, back, stockout, served, fullW, short, freq, ordered inventory.CompensatedSum
	for i, w := range c.pi {
		if w == 0 {
			continue
		}
		y := c.ip(i)
		k := y - lo
		onHand.Add(w * tL1.below[k])
		back.Add(w * tL1.above[k])
		stockout.Add(w * tL1.over[k])
		// Served demand from the smaller of its two exact forms, so that
		// neither subtracts nearly equal numbers (see the doc comment).
		direct := max(tL.below[k]-tL1.below[k], 0)
		missed := max(tL1.above[k]-tL.above[k], 0)
		if float64(y) > meanL {
			fullW.Add(w)
			short.Add(w * missed)
		} else {
			served.Add(w * direct)
		}
		a := y - s
		freq.Add(w * dtab.over[a-1])
		ordered.Add(w * orderedFrom(dist, dtab, p, a, n))
	}
	f := inventory.Figures{
		FillRate:            clamp01(fullW.Value() - short.Value()/mean + served.Value()/mean),
		StockoutProbability: clamp01(stockout.Value()),
		MeanOnHand:          onHand.Value(),
		MeanBackorders:      back.Value(),
		// Orders per review, divided by the R periods between reviews.
		OrderFrequency: clamp01(freq.Value()) / review,
	}
	perPeriod := mean // long-run flow balance: all demand is eventually ordered
	if f.OrderFrequency > 0 {
		f.MeanOrderQuantity = perPeriod / f.OrderFrequency
	}
	f.Price(sys, perPeriod)
	e := &Evaluation{
		Policy:      p,
		Figures:     f,
		States:      c.states(),
		Diagnostics: c.diag,
		Neglected:   max(c.negl, inventory.Neglected(dist), neglL, neglL1, tL.neglected, tL1.neglected, dtab.neglected),
		FlowBalance: math.Abs(ordered.Value()/review - mean),
	}
	if opt.Levels {
		if xl1 != nil {
			xhi := xl1.Bound(convolutionTail)
			if w := float64(len(c.pi)) * (float64(xhi) + 1); w > maxLevelsWork {
				return nil, &SizeError{Chain: "distribution of net inventory", Bound: w, Limit: int(maxLevelsWork), What: "multiply-adds",
					Reason: fmt.Sprintf("%v has %d positions and lead-time demand spans %d units", p, len(c.pi), xhi+1), LimitField: "levels work limit"}
			}
		}
		e.Levels = backorderLevels(c, xl1)
	}
	return e, nil
}

// checkPositions refuses, before anything is allocated, an
// inventory-position chain of more than limit states, naming the level that
// drives it. The count is computed in float64, so levels near the ends of
// the int range cannot wrap it.
func checkPositions(p Policy, limit int) error {
	var n float64
	field, value := "order_up_to", p.OrderUpTo
	switch p.Kind {
	case BaseStock:
		return nil
	case SS:
		n = float64(p.OrderUpTo) - float64(p.ReorderPoint)
		if mag(p.ReorderPoint) > mag(p.OrderUpTo) {
			field, value = "reorder_point", p.ReorderPoint
		}
	case SNQ:
		n = float64(p.OrderMultiple)
		field, value = "order_multiple", p.OrderMultiple
	}
	if n <= float64(limit) {
		return nil
	}
	return &SizeError{Chain: "inventory-position chain of " + p.String(), Bound: n, Limit: limit, What: "states",
		Input: field, Value: strconv.Itoa(value), Bytes: n * bytesPerPosition}
}

// checkLossTable refuses, before it is allocated, a loss table of the
// demand law x over the positions of p wider than limit entries: the table
// runs from where x has mass down to the reorder point up to the highest
// position, so a level far above the demand (or far below it) needs one
// entry per unit in between.
func checkLossTable(p Policy, x inventory.Distribution, limit int) error {
	s, top := p.Levels()
	n := lossEntries(x, s+1, top)
	if n <= float64(limit) {
		return nil
	}
	field, value := "order_up_to", p.OrderUpTo
	if p.Kind == SNQ || (p.Kind == SS && mag(p.ReorderPoint) > mag(p.OrderUpTo)) {
		field, value = "reorder_point", p.ReorderPoint
	}
	return &SizeError{Chain: "loss tables of lead-time demand for " + p.String(), Bound: n, Limit: limit, What: "entries",
		Input: field, Value: strconv.Itoa(value), Bytes: n * bytesPerPosition}
}

// maxLevelsWork bounds the multiply-adds of backorderLevels (states times
// the span of lead-time demand; some seconds of work).
const maxLevelsWork = 1e10

// solvePosition builds and solves the inventory-position chain of p; it
// also returns the loss table of one period's demand on 0..top-s.
func solvePosition(dist inventory.Distribution, p Policy, opt Options) (*positionChain, lossTable, error) {
	s, top := p.Levels()
	n := top - s
	if n > opt.MaxStates {
		return nil, lossTable{}, fmt.Errorf("%v: %w", p, &SizeError{Chain: "inventory-position", Bound: float64(n), Limit: opt.MaxStates, What: "inventory positions"})
	}
	chainOpt := opt.Chain
	// The rows hold at most min(n, points of positive probability) entries.
	dtab := newLossTable(dist, 0, n)
	support := 0
	for _, v := range dtab.pmf {
		if v > 0 {
			support++
		}
	}
	if tr := float64(n) * float64(min(support, n)+1); tr > float64(transitionsPerState)*float64(opt.MaxStates) {
		return nil, lossTable{}, fmt.Errorf("%v: %w", p, &SizeError{Chain: "inventory-position", Bound: tr, Limit: transitionsPerState * opt.MaxStates, What: "transitions"})
	}
	c := &positionChain{s: s, top: top, stride: 1}
	var err error
	switch p.Kind {
	case SNQ:
		q, rest := residues(dist, n)
		c.negl = rest
		c.m, c.stride, err = buildNQ(q)
		if err != nil {
			return nil, lossTable{}, fmt.Errorf("%v: building the inventory-position chain: %w", p, err)
		}
		if chainOpt.Method == "" || chainOpt.Method == chain.MethodAuto {
			chainOpt.Method = chain.MethodUniform
		}
		if err := c.solve(chainOpt); err != nil {
			return nil, lossTable{}, fmt.Errorf("%v: %w", p, err)
		}
	default:
		// Relative to the mass that leaves a position, P(D >= 1): for a slow
		// mover (P(D >= 1) = 1e-300, say) an absolute floor would fold every
		// move into the restart and pin the chain at top.
		floor := negligibleTransition * dist.Tail(1)
		if opt.Exhaustive {
			floor = 0
		}
		c.m, c.negl, err = buildSS(dtab, s, top, floor)
		if err != nil {
			return nil, lossTable{}, fmt.Errorf("%v: building the inventory-position chain: %w", p, err)
		}
		if chainOpt.Method == "" || chainOpt.Method == chain.MethodAuto || chainOpt.Method == chain.MethodForward {
			err = c.solveForward()
		} else {
			err = c.solve(chainOpt)
		}
		if err != nil {
			return nil, lossTable{}, fmt.Errorf("%v: %w", p, err)
		}
	}

	return c, dtab, nil
}

// orderedFrom returns E[units ordered at the next review | Y = y] for
// a = y - s: s-S and base-stock order S - (y - D) when D >= a, so
// E = (S-y) P(D >= a) + E[D; D >= a] = (S - s) P(D >= a) + E[(D-a)^+];
// s-nQ orders Q times the number of k >= 0 with a + kQ <= D, so
// E = Q sum_{k>=0} P(D >= a + kQ).
func orderedFrom(dist inventory.Distribution, dtab lossTable, p Policy, a, n int) float64 {
	if p.Kind != SNQ {
		return float64(n)*dtab.over[a-1] + dtab.above[a]
	}
	var s inventory.CompensatedSum
	neg := inventory.Neglected(dist)
	for k := a; k < a+n*tailSumCap; k += n {
		t := max(dist.Tail(k)-neg, 0)
		if t == 0 || (t < 1e-18*s.Value() && k > a) {
			break
		}
		s.Add(t)
	}
	return float64(n) * s.Value()
}

// solve runs the stationary solver and keeps the diagnostics.
func (c *positionChain) solve(opt chain.Options) error {
	r, err := chain.Solve(c.m, opt)
	if err != nil {
		return fmt.Errorf("solving the inventory-position chain of %d states: %w", c.m.Len(), err)
	}
	c.pi, c.diag = r.Pi, r.Diagnostics
	return nil
}

// solveForward solves the forward chain by chain.Forward directly when every
// state is reachable from top, which holds whenever P(D = k) > 0 for
// 1 <= k < n (all the usual families); the structural analysis that
// chain.Solve runs first then adds nothing. Otherwise, or if forward
// substitution refuses, chain.Solve restricts the chain to its closed class.
func (c *positionChain) solveForward() error {
	pi, err := chain.Forward(c.m)
	if err != nil {
		return c.solve(chain.Options{Method: chain.MethodForward})
	}
	c.pi = pi
	c.diag = chain.Check(c.m, pi)
	c.diag.Method = chain.MethodForward
	return nil
}

func clamp01(x float64) float64 {
	switch {
	case x < 0:
		return 0
	case x > 1:
		return 1
	}
	return x
}
