package policies

import (
	"encoding/binary"
	"fmt"
	"math"
	"math/big"
	"slices"

	"ergostock/chain"
	"ergostock/inventory"
)

// SizeError reports a chain too large to build under the limit
// (Options.MaxStates, the --max-states flag of the command).
type SizeError struct {
	Chain string  // "lost-sales" or "inventory-position"
	Bound float64 // upper bound on the count, e.g. C(top+L+1, L+1) states
	Limit int
	What  string // "states", "transitions" or "inventory positions"
	// Counted is set when Bound is not an a-priori bound but the count
	// reached while enumerating the reachable states, when it passed Limit.
	Counted bool
}

func (e *SizeError) Error() string {
	if e.Counted {
		return fmt.Sprintf("%s chain has more than %d reachable %s (the a-priori bound is %.0f; raise --max-states, or lower the order-up-to level or the lead time)",
			e.Chain, e.Limit, e.What, e.Bound)
	}
	return fmt.Sprintf("%s chain of up to %.0f %s exceeds the limit of %d (raise --max-states, or lower the order-up-to level or the lead time)",
		e.Chain, e.Bound, e.What, e.Limit)
}

// transitionsPerState is how many stored transitions per allowed state the
// lost-sales chain may hold: memory stays proportional to states times
// transitions, and this caps the product.
const transitionsPerState = 32

// indexSlotsPerState caps the state index (one int32 slot per on-hand
// level of every pipeline seen) at this many slots per allowed state.
const indexSlotsPerState = 16

// lostDenseStates is the largest lost-sales chain left to the solver's
// automatic choice (which may pick the dense, subtraction-free GTH method,
// O(n^3)); larger ones are solved by sparse Gauss-Seidel sweeps, O(nnz)
// each, unless Options.Chain names a method.
const lostDenseStates = 300

// lostChain is the chain of the state at review, before ordering, in lost
// mode: on-hand x and the outstanding orders o_1..o_L (o_1 the oldest, due
// this period). Order q = p.Order(x + sum o). With L = 0 the order arrives at
// once; with L >= 1 o_1 arrives and q joins the end of the pipeline. With
// a = on-hand after the arrival, demand d leaves (a - d)^+ on hand and loses
// (d - a)^+. Only the states reachable from (top, 0, ..., 0) are built.
type lostChain struct {
	L, top int
	tuples []int32 // state i is tuples[i*(L+1) : (i+1)*(L+1)] = x, o_1..o_L
	avail  []int32 // a: on-hand after the arrival, per state
	order  []int32 // q: quantity ordered at the review, per state
	m      *chain.CSR
	pi     []float64
	diag   chain.Diagnostics
}

// ip returns the inventory position at review (before ordering) of state i.
func (c *lostChain) ip(i int) int {
	var s int
	for _, v := range c.tuples[i*(c.L+1) : (i+1)*(c.L+1)] {
		s += int(v)
	}
	return s
}

// lostBound returns C(top+L+1, L+1), the number of tuples (x, o_1..o_L) of
// non-negative integers with sum <= top, as a float64 (+Inf if it overflows).
func lostBound(top, L int) float64 {
	if top < 0 {
		return 1
	}
	var b big.Int
	b.Binomial(int64(top+L+1), int64(L+1))
	f, _ := new(big.Float).SetInt(&b).Float64()
	return f
}

// stateIndex maps state tuples (x, o_1..o_L) to indices in two levels: the
// pipeline o_1..o_L picks a group (a map keyed by the mixed-radix number of
// radix top+1 when (top+1)^L fits in 63 bits, else by the tuple's bytes),
// and within a group on-hand x indexes a slice directly, x <= top - sum(o).
// All successors of a state share the next pipeline, so building a row
// costs one map access whatever the number of its transitions.
type stateIndex struct {
	top   int
	radix uint64
	small map[uint64]int32 // pipeline key -> offset of its group in slots
	large map[string]int32
	buf   []byte
	slots []int32 // state index, or -1 for a state not yet seen
}

func newStateIndex(top, L, hint int) *stateIndex {
	ix := &stateIndex{top: top, radix: uint64(top) + 1}
	if float64(L)*math.Log2(float64(top)+1) < 63 {
		ix.small = make(map[uint64]int32, hint)
	} else {
		ix.large = make(map[string]int32, hint)
	}
	return ix
}

// group returns the offset in slots of the group of pipeline o, adding
// the group if it is new.
func (ix *stateIndex) group(o []int32) int {
	var sum int
	for _, v := range o {
		sum += int(v)
	}
	add := func() int32 {
		off := int32(len(ix.slots))
		for range ix.top - sum + 1 {
			ix.slots = append(ix.slots, -1)
		}
		return off
	}
	if ix.small != nil {
		var k uint64
		for _, v := range o {
			k = k*ix.radix + uint64(v)
		}
		if off, ok := ix.small[k]; ok {
			return int(off)
		}
		off := add()
		ix.small[k] = off
		return int(off)
	}
	ix.buf = ix.buf[:0]
	for _, v := range o {
		ix.buf = binary.AppendUvarint(ix.buf, uint64(v))
	}
	if off, ok := ix.large[string(ix.buf)]; ok {
		return int(off)
	}
	off := add()
	ix.large[string(ix.buf)] = off
	return int(off)
}

// buildLost enumerates the reachable states breadth first and collects the
// transitions: from a state with a on hand after the arrival, demand d =
// 0..a-1 (exact probabilities) leads to a - d on hand, and the lump
// P(D >= a) from the closed tail to 0 on hand. Nothing is truncated.
//
// Memory stays within the limit whichever way: when the a-priori bound
// C(top+L+1, L+1) on the states (and the bound it implies on transitions)
// is within it, the chain is built directly; otherwise the reachable chain,
// usually far smaller than the bound (an s-S policy with large orders keeps
// at most one or two orders in the pipeline), is enumerated with running
// counts of states, transitions and index slots, and refused with a
// *SizeError as soon as one passes its limit.
func buildLost(dtab lossTable, p Policy, top, L int, opt Options) (*lostChain, error) {
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
	hint := int(min(bound, float64(opt.MaxStates), 1<<20))
	c := &lostChain{L: L, top: top, tuples: make([]int32, 0, w*hint)}
	ix := newStateIndex(top, L, hint/max(top, 1)+1)
	start := make([]int32, w)
	start[0] = int32(top)
	ix.slots = slices.Grow(ix.slots, hint)
	ix.slots[ix.group(start[1:])+top] = 0
	c.tuples = append(c.tuples, start...)

	pmf := dtab.pmf
	rowPtr := make([]int, 1, hint+1)
	col := make([]int32, 0, hint*8)
	val := make([]float64, 0, hint*8)
	type entry struct {
		j int32
		p float64
	}
	var row []entry
	cur := make([]int32, w)
	next := make([]int32, w)
	for i := 0; i < len(c.tuples)/w; i++ {
		copy(cur, c.tuples[i*w:(i+1)*w])
		var ip int
		for _, v := range cur {
			ip += int(v)
		}
		q := p.Order(ip)
		var a int
		if L == 0 {
			a = int(cur[0]) + q
		} else {
			a = int(cur[0]) + int(cur[1])
			copy(next[1:], cur[2:])
			next[L] = int32(q)
		}
		c.avail = append(c.avail, int32(a))
		c.order = append(c.order, int32(q))
		row = row[:0]
		g := ix.group(next[1:])
		target := func(x int, pr float64) {
			j := ix.slots[g+x]
			if j < 0 {
				j = int32(len(c.tuples) / w)
				ix.slots[g+x] = j
				next[0] = int32(x)
				c.tuples = append(c.tuples, next...)
			}
			row = append(row, entry{j, pr})
		}
		for d := 0; d < a && d < len(pmf); d++ {
			if pmf[d] > 0 {
				target(a-d, pmf[d])
			}
		}
		if a == 0 {
			target(0, 1)
		} else if lump := dtab.over[a-1]; lump > 0 {
			// A tail within round-off of 1 can come out a hair above it.
			target(0, min(lump, 1))
		}
		if len(c.tuples)/w > opt.MaxStates {
			return nil, &SizeError{Chain: "lost-sales", Bound: bound, Limit: opt.MaxStates, What: "states", Counted: true}
		}
		if len(col)+len(row) > maxTransitions {
			return nil, &SizeError{Chain: "lost-sales", Bound: bound * float64(min(support, top)+1), Limit: maxTransitions, What: "transitions", Counted: true}
		}
		if len(ix.slots) > maxSlots {
			return nil, &SizeError{Chain: "lost-sales", Bound: bound, Limit: maxSlots, What: "index slots", Counted: true}
		}
		slices.SortFunc(row, func(x, y entry) int { return int(x.j) - int(y.j) })
		for _, e := range row {
			col = append(col, e.j)
			val = append(val, e.p)
		}
		rowPtr = append(rowPtr, len(col))
	}
	n := len(c.tuples) / w
	m, err := chain.NewCSR(n, rowPtr, col, val)
	if err != nil {
		return nil, fmt.Errorf("building the lost-sales chain: %w", err)
	}
	c.m = m
	return c, nil
}

// solveLost builds and solves the lost-sales chain of p; it also returns
// the loss table of one period's demand on 0..top.
func solveLost(dist inventory.Distribution, p Policy, L int, opt Options) (*lostChain, lossTable, error) {
	_, top := p.Levels()
	top = max(top, 0)
	// Refuse before the demand table (O(top)) or the chain is allocated:
	// the states at the top level alone number top+1 on-hand levels times
	// at least one pipeline. Otherwise buildLost counts as it goes.
	if top >= opt.MaxStates {
		return nil, lossTable{}, fmt.Errorf("%v: %w", p, &SizeError{Chain: "lost-sales", Bound: lostBound(top, L), Limit: opt.MaxStates, What: "states"})
	}
	dtab := newLossTable(dist, 0, top)
	c, err := buildLost(dtab, p, top, L, opt)
	if err != nil {
		return nil, dtab, fmt.Errorf("%v: %w", p, err)
	}
	copt := opt.Chain
	if (copt.Method == "" || copt.Method == chain.MethodAuto) && c.m.Len() > lostDenseStates {
		copt.Method = chain.MethodGaussSeidel
	}
	r, err := chain.Solve(c.m, copt)
	if err != nil {
		return nil, dtab, fmt.Errorf("%v: solving the lost-sales chain of %d states: %w", p, c.m.Len(), err)
	}
	c.pi, c.diag = r.Pi, r.Diagnostics
	return c, dtab, nil
}

// evaluateLost evaluates p in lost mode. With a the on-hand after the
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
func evaluateLost(sys inventory.System, p Policy, opt Options) (*Evaluation, error) {
	dist := sys.Demand
	mean := dist.Mean()
	c, dtab, err := solveLost(dist, p, sys.LeadTime, opt)
	if err != nil {
		return nil, err
	}
	var onHand, lost, served, stockout, freq, ordered kahan
	for i, w := range c.pi {
		if w == 0 {
			continue
		}
		a := int(c.avail[i])
		onHand.add(w * dtab.below[a])
		served.add(w * max(float64(a)-dtab.below[a], 0)) // E[min(D, a)] = a - E[(a-D)^+]
		lost.add(w * dtab.above[a])
		stockout.add(w * dtab.over[a])
		if q := c.order[i]; q > 0 {
			freq.add(w)
			ordered.add(w * float64(q))
		}
	}
	f := inventory.Figures{
		MeanOnHand:          onHand.value(),
		MeanLostSales:       lost.value(),
		StockoutProbability: clamp01(stockout.value()),
		OrderFrequency:      clamp01(freq.value()),
	}
	// 1 - E[lost]/E[D], computed as E[served]/E[D] (the same by
	// min(D, a) + (D - a)^+ = D), which is exactly 0 when nothing is stocked.
	f.FillRate = clamp01(served.value() / mean)
	perPeriod := ordered.value()
	if f.OrderFrequency > 0 {
		f.MeanOrderQuantity = perPeriod / freq.value()
	}
	f.HoldingCost = sys.Holding * f.MeanOnHand
	f.ShortageCost = sys.Shortage * f.MeanLostSales
	f.OrderingCost = sys.OrderCost * f.OrderFrequency
	f.PurchaseCost = sys.UnitCost * perPeriod
	f.TotalCost = f.HoldingCost + f.ShortageCost + f.OrderingCost + f.PurchaseCost
	return &Evaluation{
		Policy:      p,
		Figures:     f,
		States:      c.m.Len(),
		Diagnostics: c.diag,
		Neglected:   max(dtab.neglected, inventory.Neglected(dist)),
		FlowBalance: math.Abs(perPeriod - served.value()),
	}, nil
}
