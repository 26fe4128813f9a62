package policies

// The lost-sales chain on the state at review, (x, o_1, ..., o_L), as it was
// built before the smaller post-arrival chain of lost.go replaced it. It is
// kept here, unchanged but for the names, as the reference that
// TestLostPostArrivalMatchesReview checks the smaller chain against.

import (
	"fmt"
	"math"
	"slices"
	"testing"

	"ergostock/chain"
	"ergostock/inventory"
)

// refLostChain is the chain of the state at review, before ordering, in lost
// mode: on-hand x and the outstanding orders o_1..o_L (o_1 the oldest, due
// this period). Order q = p.Order(x + sum o). With L = 0 the order arrives at
// once; with L >= 1 o_1 arrives and q joins the end of the pipeline. With
// a = on-hand after the arrival, demand d leaves (a - d)^+ on hand and loses
// (d - a)^+. Only the states reachable from (top, 0, ..., 0) are built.
type refLostChain struct {
	L, top int
	tuples []int32 // state i is tuples[i*(L+1) : (i+1)*(L+1)] = x, o_1..o_L
	avail  []int32 // a: on-hand after the arrival, per state
	order  []int32 // q: quantity ordered at the review, per state
	m      *chain.CSR
	pi     []float64
	diag   chain.Diagnostics
	// negl is the largest probability mass folded into another transition
	// of the same row (transitions below negligibleTransition; 0 with
	// Options.Exhaustive).
	negl float64
}

// ip returns the inventory position at review (before ordering) of state i.
func (c *refLostChain) ip(i int) int {
	var s int
	for _, v := range c.tuples[i*(c.L+1) : (i+1)*(c.L+1)] {
		s += int(v)
	}
	return s
}

// refBaseStockStart returns a starting vector for the lost-sales chain of a
// base-stock policy: the law the state would have if nothing were lost.
// Then every order replaces one period's demand, so the pipeline o_1..o_L
// holds L independent demands and on-hand at review is x = S - sum(o) - D'
// for one more demand D' (0 when that is negative, the lump):
//
//	init(x, o) = prod_k P(D = o_k) * P(D = S - sum(o) - x)   for x > 0,
//	init(0, o) = prod_k P(D = o_k) * P(D >= S - sum(o)).
//
// It only changes the number of sweeps; the answer meets the solver's
// tolerance from any start. Near the optimum, where little is lost, it is
// close to the answer (1 sweep instead of 17 for Poisson 8.4, L = 1,
// S = 60); with heavy losses it can take a few more sweeps than the
// uniform start (53 instead of 50 for Poisson 6, L = 2, S = 15; mixing in
// the uniform vector did not help).
func refBaseStockStart(c *refLostChain, dtab lossTable) []float64 {
	n := c.m.Len()
	wd := c.L + 1
	init := make([]float64, n)
	var mass float64
	for i := range n {
		t := c.tuples[i*wd : (i+1)*wd]
		v, r := 1.0, c.top-int(t[0])
		for _, o := range t[1:] {
			v *= dtab.pmf[o]
			r -= int(o)
		}
		switch {
		case t[0] > 0:
			v *= dtab.pmf[r]
		case r > 0:
			v *= dtab.over[r-1]
		}
		init[i] = v
		mass += v
	}
	if !(mass > 0) {
		return nil
	}
	return init
}

// refBuildLost enumerates the reachable states breadth first, then writes the
// transitions: from a state with a on hand after the arrival, demand d =
// 0..a-1 (exact probabilities) leads to a - d on hand, and the lump
// P(D >= a) from the closed tail to 0 on hand. No demand tail is cut. The
// root, (top, 0, ..., 0) unless that state cannot be re-entered (see
// rootSteps), is state 0 and the numbering is breadth-first, which the
// Gauss-Seidel sweeps and chain.Solve's structural check rely on for speed
// (not for correctness).
//
// The 1e-20 rule of the inventory-position chain applies here too: unless
// opt.Exhaustive is set, a demand d < a with 0 < P(D = d) <
// negligibleTransition is not stored; its mass joins the lump to 0 on hand
// (or, in a row whose lump P(D >= a) is 0 in float64, the stored entry of
// the largest demand), so rows stay stochastic, their pattern is a subset
// of the exhaustive one, and no state is created by the folding. States
// reachable only through folded transitions are not built. The largest
// mass folded in a row is returned in the chain's negl. Only the matrix is
// folded: the figures take their per-state expectations from the demand
// table (see refEvaluateLost).
//
// Memory stays within the limit whichever way: when the a-priori bound
// C(top+L+1, L+1) on the states (and the bound it implies on transitions)
// is within it, the chain is built directly; otherwise the reachable chain,
// usually far smaller than the bound (an s-S policy with large orders keeps
// at most one or two orders in the pipeline), is enumerated with running
// counts of states, transitions and index slots, and refused with a
// *SizeError as soon as one passes its limit.
func refBuildLost(dtab lossTable, p Policy, top, L int, opt Options) (*refLostChain, error) {
	bound := lostBound(top, L)
	support := 0
	for _, v := range dtab.pmf {
		if v > 0 {
			support++
		}
	}
	maxTransitions := transitionsPerState * opt.MaxStates
	maxSlots := indexSlotsPerState * opt.MaxStates
	w := L + 1
	// The a-priori bound is the reachable count for base-stock; s-S and
	// s-nQ reach far fewer states, so a loose bound only seeds the sizes.
	hint := 1 << 12
	if bound <= float64(min(opt.MaxStates, 1<<22)) {
		hint = int(bound)
	}
	c := &refLostChain{L: L, top: top, tuples: make([]int32, 0, w*hint)}
	ix := newStateIndex(top, L, hint/max(top, 1)+1)
	ix.slots = slices.Grow(ix.slots, hint)

	// A row is fixed by a (on hand after the arrival) and the group g of
	// the next pipeline: demand d < a with P(D = d) > 0 leads to on-hand
	// a - d, the lump P(D >= a) to 0. The first pass enumerates the states
	// (and counts each row's transitions, npos[a] + 1); the second writes
	// the rows into arrays of the exact size.
	pmf := dtab.pmf
	floor := negligibleTransition
	if opt.Exhaustive {
		floor = 0
	}
	// keep reports whether the transition of demand d is stored.
	keep := func(d int) bool { return d < len(pmf) && pmf[d] > 0 && pmf[d] >= floor }
	npos := make([]int, top+2)       // npos[a] = #{d < a : keep(d)}
	folded := make([]float64, top+2) // folded[a] = sum of P(D = d), d < a, 0 < P(D = d) < floor
	for a := 1; a <= top+1; a++ {
		npos[a], folded[a] = npos[a-1], folded[a-1]
		switch d := a - 1; {
		case keep(d):
			npos[a]++
		case d < len(pmf) && pmf[d] > 0:
			folded[a] += pmf[d]
		}
	}
	rowLen := func(a int) int {
		if a == 0 || dtab.over[a-1] > 0 {
			return npos[a] + 1
		}
		return npos[a]
	}
	cur := make([]int32, w)
	next := make([]int32, w)
	// step sets next[1:] to the pipeline after the review of state cur
	// and returns a and the order q.
	step := func() (a, q int) {
		var ip int
		for _, v := range cur {
			ip += int(v)
		}
		q = p.Order(ip)
		if L == 0 {
			return int(cur[0]) + q, q
		}
		copy(next[1:], cur[2:])
		next[L] = int32(q)
		return int(cur[0]) + int(cur[1]), q
	}
	// The start state (top, 0, ..., 0) is re-entered only by demand 0
	// from a = top. When that transition is not stored (P(D = 0) below
	// the floor: gamma, normal or Poisson demand with a large mean) the
	// start would be transient, and so would every state reached only
	// through it; chain.Solve would then need its full structural pass.
	// Then the chain is rooted instead at the state reached from the start
	// by rootSteps(L) periods of the most probable demand (the lump when
	// it is likelier), which lies in the recurrent class in every case
	// seen; if it did not, chain.Solve finds the class all the same.
	cur[0] = int32(top)
	if !keep(0) {
		for range rootSteps(L) {
			a, _ := step()
			best, x := 0.0, 0
			for d := 0; d < a && d < len(pmf); d++ {
				if keep(d) && pmf[d] > best {
					best, x = pmf[d], a-d
				}
			}
			if a > 0 && dtab.over[a-1]+folded[a] > best {
				x = 0
			}
			next[0] = int32(x)
			copy(cur, next)
		}
	}
	ix.slots[ix.group(cur[1:])+int(cur[0])] = 0
	c.tuples = append(c.tuples, cur...)

	groups := make([]int, 0, hint) // g per state
	nnz := 0
	for i := 0; i < len(c.tuples)/w; i++ {
		copy(cur, c.tuples[i*w:(i+1)*w])
		a, q := step()
		c.avail = append(c.avail, int32(a))
		c.order = append(c.order, int32(q))
		g := ix.group(next[1:])
		groups = append(groups, g)
		// Number new states in the order demand d = 0, 1, ..., then the
		// lump: breadth-first order, which suits the Gauss-Seidel sweeps
		// (numbering on-hand upwards instead took 25 times the sweeps on
		// an s-S chain).
		for d := 0; d <= a; d++ {
			x := a - d
			switch {
			case x > 0 && !keep(d):
				continue
			case x == 0 && a > 0 && !(dtab.over[a-1] > 0):
				continue // demand never empties the shelf from a
			}
			if ix.slots[g+x] < 0 {
				ix.slots[g+x] = int32(len(c.tuples) / w)
				next[0] = int32(x)
				c.tuples = append(c.tuples, next...)
			}
		}
		nnz += rowLen(a)
		if len(c.tuples)/w > opt.MaxStates {
			return nil, &SizeError{Chain: "lost-sales", Bound: bound, Limit: opt.MaxStates, What: "states", Counted: true}
		}
		if nnz > maxTransitions {
			return nil, &SizeError{Chain: "lost-sales", Bound: bound * float64(min(support, top)+1), Limit: maxTransitions, What: "transitions", Counted: true}
		}
		if len(ix.slots) > maxSlots {
			return nil, &SizeError{Chain: "lost-sales", Bound: bound, Limit: maxSlots, What: "index slots", Counted: true}
		}
	}
	n := len(c.tuples) / w
	rowPtr := make([]int, n+1)
	col := make([]int32, nnz)
	val := make([]float64, nnz)
	var buf []entry
	for i := range n {
		a, g := int(c.avail[i]), groups[i]
		// In the order of the first pass, so that a row whose targets were
		// numbered by it comes out sorted.
		k, last := rowPtr[i], -1
		for d := 0; d < a && d < len(pmf); d++ {
			if keep(d) {
				col[k], val[k] = ix.slots[g+a-d], pmf[d]
				last = k
				k++
			}
		}
		fold := folded[a]
		switch {
		case a == 0:
			col[k], val[k] = ix.slots[g], 1
			k++
		case dtab.over[a-1] > 0:
			// A tail within round-off of 1 can come out a hair above it.
			col[k], val[k] = ix.slots[g], min(dtab.over[a-1]+fold, 1)
			k++
		case fold > 0 && last >= 0:
			// No lump: P(D >= a) = 0, so the stored entries carry almost all
			// of the row (some P(D = d) >= 1/a) and last exists.
			val[last] += fold
		}
		c.negl = max(c.negl, fold)
		rowPtr[i+1] = k
		buf = sortRow(col[rowPtr[i]:k], val[rowPtr[i]:k], buf)
	}
	m, err := chain.NewCSR(n, rowPtr, col, val)
	if err != nil {
		return nil, fmt.Errorf("building the lost-sales chain: %w", err)
	}
	c.m = m
	return c, nil
}

// refSolveLost builds and solves the lost-sales chain of p; it also returns
// the loss table of one period's demand on 0..top.
func refSolveLost(dist inventory.Distribution, p Policy, L int, opt Options) (*refLostChain, lossTable, error) {
	_, top := p.Levels()
	top = max(top, 0)
	// Refuse before the demand table (O(top)) or the chain is allocated:
	// the states at the top level alone number top+1 on-hand levels times
	// at least one pipeline. Otherwise refBuildLost counts as it goes.
	if top >= opt.MaxStates {
		return nil, lossTable{}, fmt.Errorf("%v: %w", p, &SizeError{Chain: "lost-sales", Bound: lostBound(top, L), Limit: opt.MaxStates, What: "states"})
	}
	dtab := newLossTable(dist, 0, top)
	c, err := refBuildLost(dtab, p, top, L, opt)
	if err != nil {
		return nil, dtab, fmt.Errorf("%v: %w", p, err)
	}
	copt := opt.Chain
	auto := copt.Method == "" || copt.Method == chain.MethodAuto
	if auto && c.m.Len() > lostDenseStates {
		copt.Method = chain.MethodGaussSeidel
	}
	if copt.Method == chain.MethodGaussSeidel && copt.Init == nil {
		// Measured: BenchmarkEvaluateLost 29 -> 27 sweeps, the chains of
		// BenchmarkOptimizeLostBaseStock 19 -> 14-16. (Starting a search's
		// s-S or s-nQ chain from its predecessor's law, mapped by state,
		// took 3-4 times the sweeps of the uniform start: those chains
		// converge in 2-7 sweeps from any start that has no holes.)
		if p.Kind == BaseStock {
			copt.Init = refBaseStockStart(c, dtab)
		}
	}
	r, err := chain.Solve(c.m, copt)
	if err == nil && auto && copt.Method != chain.MethodGaussSeidel && math.IsNaN(r.Diagnostics.Residual) {
		// Dense GTH can underflow when the transitions are extremely
		// uneven (e.g. Poisson demand of mean 400 against an order-up-to
		// level of 10: probabilities near 1e-155, whose products vanish);
		// Gauss-Seidel divides by those small numbers instead.
		copt.Method = chain.MethodGaussSeidel
		r, err = chain.Solve(c.m, copt)
	}
	if err == nil && math.IsNaN(r.Diagnostics.Residual) {
		err = fmt.Errorf("%s gave a distribution that is not a number (try another --method)", r.Diagnostics.Method)
	}
	if err != nil {
		return nil, dtab, fmt.Errorf("%v: solving the lost-sales chain of %d states: %w", p, c.m.Len(), err)
	}
	c.pi, c.diag = r.Pi, r.Diagnostics
	return c, dtab, nil
}

// refEvaluateLost evaluates p in lost mode. With a the on-hand after the
// arrival and q the order at review, in the stationary law of the state:
//
//	mean_on_hand         = E[(a - D)^+]
//	mean_lost_sales      = E[(D - a)^+]
//	fill_rate            = 1 - E[lost] / E[D] = E[min(D, a)] / E[D]
//	stockout_probability = P(D > a)
//	order_frequency      = P(q > 0),  mean_order_quantity = E[q | q > 0]
//	purchase_cost        = c E[q],    shortage_cost = b E[lost]
//
// Backorders are 0.
func refEvaluateLost(sys inventory.System, p Policy, opt Options) (*Evaluation, error) {
	dist := sys.Demand
	mean := dist.Mean()
	c, dtab, err := refSolveLost(dist, p, sys.LeadTime, opt)
	if err != nil {
		return nil, err
	}
	var onHand, lost, served, stockout, freq, ordered inventory.CompensatedSum
	for i, w := range c.pi {
		if w == 0 {
			continue
		}
		a := int(c.avail[i])
		onHand.Add(w * dtab.below[a])
		served.Add(w * max(float64(a)-dtab.below[a], 0)) // E[min(D, a)] = a - E[(a-D)^+]
		lost.Add(w * dtab.above[a])
		stockout.Add(w * dtab.over[a])
		if q := c.order[i]; q > 0 {
			freq.Add(w)
			ordered.Add(w * float64(q))
		}
	}
	f := inventory.Figures{
		MeanOnHand:          onHand.Value(),
		MeanLostSales:       lost.Value(),
		StockoutProbability: clamp01(stockout.Value()),
		OrderFrequency:      clamp01(freq.Value()),
	}
	// 1 - E[lost]/E[D], computed as E[served]/E[D] (the same by
	// min(D, a) + (D - a)^+ = D), which is exactly 0 when nothing is stocked.
	f.FillRate = clamp01(served.Value() / mean)
	perPeriod := ordered.Value()
	if f.OrderFrequency > 0 {
		f.MeanOrderQuantity = perPeriod / freq.Value()
	}
	f.Price(sys, perPeriod)
	e := &Evaluation{
		Policy:      p,
		Figures:     f,
		States:      c.m.Len(),
		Diagnostics: c.diag,
		Neglected:   max(c.negl, dtab.neglected, inventory.Neglected(dist)),
		FlowBalance: math.Abs(perPeriod - served.Value()),
	}
	if opt.Levels {
		e.Levels = refLostLevels(c, dtab)
	}
	return e, nil
}

// refLostLevels returns the distribution of on-hand at the end of a period:
// (a - D)^+ for the on-hand a after the arrival of every state, in
// O(transitions).
func refLostLevels(c *refLostChain, dtab lossTable) *LevelDistribution {
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

// TestLostPostArrivalMatchesReview checks the chain of the state after the
// arrival (lostChain) against the chain of the state at review that it
// replaced (refBuildLost, kept above): every figure, and the on-hand level
// distribution, to 1e-12 relative (plus 1e-15 absolute for figures near
// 0), for the three policies, lead times 0..4, Poisson, negative binomial
// and explicit demand laws (one with a gap in its support, one that is
// never 0, so that the chain is rooted away from the start), folded and
// exhaustive. Both chains are solved by GTH (Grassmann, Taksar and Heyman,
// "Regenerative analysis and steady state distributions for Markov
// chains", Operations Research 33(5), 1985), so the check is on the chains
// and not on a solver's tolerance; a second pass uses the default solvers
// of both (Gauss-Seidel above 300 states, tolerance 1e-13).
func TestLostPostArrivalMatchesReview(t *testing.T) {
	nb, err := inventory.NewNegBin(3, 7)
	if err != nil {
		t.Fatal(err)
	}
	dists := []inventory.Distribution{
		poisson(t, 2.5), nb,
		pmf(t, 0.2, 0.1, 0, 0.4, 0.3),
		pmf(t, 0, 0.5, 0.3, 0, 0.2),
	}
	// top per lead time: the chain of the state at review has at most
	// C(top+L+1, L+1) states, 351..462 here.
	tops := []int{40, 25, 12, 8, 6}
	var worst float64
	for _, d := range dists {
		for L, top := range tops {
			s := top / 3
			for _, p := range []Policy{
				{Kind: BaseStock, OrderUpTo: top},
				{Kind: SS, ReorderPoint: s, OrderUpTo: top},
				{Kind: SNQ, ReorderPoint: s, OrderMultiple: top - s},
			} {
				for _, exh := range []bool{false, true} {
					for _, m := range []chain.Method{chain.MethodGTH, ""} {
						name := fmt.Sprintf("%v L=%d %v exhaustive=%v method=%q", d, L, p, exh, m)
						sys := lostSystem(d, L, 1, 9, 5, 2)
						opt := Options{MaxStates: DefaultMaxStates, Exhaustive: exh, Levels: true, Chain: chain.Options{Method: m}}
						got, err := evaluateLost(sys, p, opt)
						if err != nil {
							t.Fatalf("%s: %v", name, err)
						}
						want, err := refEvaluateLost(sys, p, opt)
						if err != nil {
							t.Fatalf("%s reference: %v", name, err)
						}
						if got.States > want.States {
							t.Errorf("%s: %d states, the chain at review %d", name, got.States, want.States)
						}
						gf, wf := got.Figures.Fields(), want.Figures.Fields()
						for i := range gf {
							diff := math.Abs(gf[i].Value - wf[i].Value)
							if diff > 1e-12*math.Abs(wf[i].Value)+1e-15 {
								t.Errorf("%s: %s = %.17g, at review %.17g", name, gf[i].Name, gf[i].Value, wf[i].Value)
							}
							if wf[i].Value != 0 {
								worst = max(worst, diff/math.Abs(wf[i].Value))
							}
						}
						for _, v := range [][2]float64{{got.FlowBalance, want.FlowBalance}, {got.Neglected, want.Neglected}} {
							if math.Abs(v[0]-v[1]) > 1e-12 {
								t.Errorf("%s: flow balance or neglected %g, at review %g", name, v[0], v[1])
							}
						}
						gl, wl := got.Levels, want.Levels
						if gl.Min != wl.Min || len(gl.P) != len(wl.P) {
							t.Errorf("%s: levels from %d, %d values; at review from %d, %d", name, gl.Min, len(gl.P), wl.Min, len(wl.P))
							continue
						}
						for i := range gl.P {
							if math.Abs(gl.P[i]-wl.P[i]) > 1e-12*wl.P[i]+1e-15 {
								t.Errorf("%s: P(on hand = %d) = %.17g, at review %.17g", name, gl.Min+i, gl.P[i], wl.P[i])
							}
						}
					}
				}
			}
		}
	}
	t.Logf("largest relative difference of a figure: %.3g", worst)
}

// TestLostChainSizes: the chain of the state after the arrival has at
// most C(top+k, k) states (k = max(L, 1)), and all of them for
// base-stock with Poisson demand: 46,376 for L = 4, S = 30 (the chain at
// review: C(35, 5) = 324,632), and 151 for normal(100, 8), L = 1, S = 150
// with every transition stored (99 when those below 1e-20 are folded;
// at review 11,476 at most).
func TestLostChainSizes(t *testing.T) {
	nrm, err := inventory.NewNormal(100, 8)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		d      inventory.Distribution
		L, S   int
		exh    bool
		states int
	}{
		{poisson(t, 5), 4, 30, false, 46376},
		{nrm, 1, 150, true, 151},
		{nrm, 1, 150, false, 99},
		{poisson(t, 5), 0, 30, false, 1},
	} {
		e, err := Evaluate(lostSystem(c.d, c.L, 1, 9, 0, 0), Policy{Kind: BaseStock, OrderUpTo: c.S}, Options{Exhaustive: c.exh})
		if err != nil {
			t.Fatal(err)
		}
		if e.States != c.states || float64(e.States) > lostBound(c.S, c.L) {
			t.Errorf("%v L=%d S=%d: %d states, want %d (bound %.0f)", c.d, c.L, c.S, e.States, c.states, lostBound(c.S, c.L))
		}
	}
}
