package policies

import (
	"encoding/binary"
	"fmt"
	"math"
	"slices"

	"ergostock/chain"
	"ergostock/inventory"
)

// cutoffLaw returns the law of Kaplan's arrival cut-off T of sys, pT[l] =
// P(T = l) for l = 0..lmax, in lost mode: every order at least T periods
// old arrives in a period, T drawn anew each period independently of all
// else (Kaplan 1970, Management Science 16(7)). A fixed lead time L is the
// cut-off fixed at L; a law w is realised by P(T <= l) = w[l]/P(L >= l)
// (inventory.KaplanCutoff), and lmax is the first l where that reaches 1:
// no order is ever older than lmax. neglected is the mass of the law moved
// onto its last point when its tail was cut (inventory.System's
// LeadTimeWeights). Independent lead times (orders that may cross) are
// refused with ErrNotExact: this chain keeps orders in their sequence.
func cutoffLaw(sys inventory.System) (pT []float64, lmax int, neglected float64, err error) {
	if err := checkLostTiming(sys); err != nil {
		return nil, 0, 0, err
	}
	if sys.LeadTimeLaw == nil {
		pT = make([]float64, sys.LeadTime+1)
		pT[sys.LeadTime] = 1
		return pT, sys.LeadTime, 0, nil
	}
	w, negl, err := sys.LeadTimeWeights()
	if err != nil {
		return nil, 0, 0, err
	}
	F, _, ok := inventory.KaplanCutoff(w)
	if !ok {
		return nil, 0, 0, &inventory.FieldError{Field: "lead_time", Value: sys.LeadTimeLaw.String(),
			Want: "a law whose hazard P(L = l)/P(L >= l) does not fall (Kaplan 1970: sequential deliveries)"}
	}
	lmax = len(F) - 1
	for l, f := range F {
		if f >= 1 {
			lmax = l
			break
		}
	}
	pT = make([]float64, lmax+1)
	prev := 0.0
	for l := range lmax + 1 {
		f := min(F[l], 1)
		if l == lmax {
			f = 1
		}
		pT[l] = max(f-prev, 0)
		prev = max(prev, f)
	}
	return pT, lmax, negl, nil
}

// checkLostTiming refuses, with ErrNotExact, the lead-time model the
// lost-sales chain does not carry: independent lead times (orders that may
// cross) with a law of more than one point.
func checkLostTiming(sys inventory.System) error {
	if sys.LeadTimeLaw != nil && sys.Model() == inventory.Independent && !onePointLaw(sys) {
		return &inventory.FieldError{Field: "lead_time_model", Value: string(sys.Model()),
			Want: "sequential with --unmet lost (with independent lead times, where orders may cross, only base-stock in backorder mode is evaluated exactly)", Err: ErrNotExact}
	}
	return nil
}

// longestLeadTime returns lmax of cutoffLaw without building the law (a
// fixed lead time is returned as it is, however long).
func longestLeadTime(sys inventory.System) (int, error) {
	if sys.LeadTimeLaw == nil {
		return sys.LeadTime, nil
	}
	_, lmax, _, err := cutoffLaw(sys)
	return lmax, err
}

// lostTimedBytes estimates the memory of a lostTimed chain's fixed part
// before anything is allocated: the cut-off law and the orders by age
// (lmax + 1 entries each), and the cycle's three sets of lmax + 2 vectors
// over on hand 0..top, plus one state.
func lostTimedBytes(lmax, top, k int) float64 {
	return float64(lmax+2)*(3*float64(top+1)*8+8+4+8) + lostTimedStateBytes(k)
}

// timedMemoryError is memoryError for a lostTimed chain of k components
// (its states and the cycle's vectors).
func timedMemoryError(lmax, k int, states, bytes float64) error {
	err := memoryError(lmax, states, bytes)
	if me, ok := err.(*LostMemoryError); ok {
		me.StateBytes = lostTimedStateBytes(k)
	}
	return err
}

// lostTimed is the lost-sales chain under Kaplan's sequential deliveries
// (a lead-time law) or reviews every R > 1 periods, observed at the
// reviews. Each period runs: review (at phase 0 of the cycle only: the
// order Order(IP) is placed, of age 0), arrival of every outstanding order
// at least T periods old (T the period's cut-off, see cutoffLaw), demand
// served from on hand and the rest lost, then every order ages by one.
//
// The state at a review is z = (x + o_lmax, o_R, o_2R, ..., o_(k-1)R): x
// the stock on hand, o_a the outstanding quantity ordered a periods ago
// (orders are placed only at reviews, so a is a multiple of R, and never
// above lmax). An order of age lmax arrives in the period for sure, so it
// is counted with the stock, as the fixed-lead-time chain does with the
// order due (see lostChain); k = max(1, ceil(lmax/R)). Arrived orders and
// orders of size 0 are both recorded as 0: since the arrivals of a period
// are all the orders at least T old, which orders remain depends only on
// their ages and T, not on which have arrived before. The position at the
// review is the sum of z, so the order is a function of z; the cycle that
// follows depends on z, the R cut-offs and the R demands only, all
// independent of the past: z is Markov. Its transitions are those of R
// periods, computed by carrying the law of (on hand, pipeline) through the
// cycle: within it the pipeline left is fixed by the orders of z and the
// age m from which every order has arrived, so the law at a phase is one
// vector over on hand per m (at most lmax + 2 of them).
//
// Every figure is a per-period average over the cycle: with u_f(a) the law
// of the stock on hand after the arrival of phase f (before demand),
// E[on hand] = (1/R) sum_f sum_a u_f(a) E[(a - D)^+] and alike for lost
// sales E[(D - a)^+], units served a - E[(a - D)^+] and stockouts
// P(D > a); the order frequency is P(order at a review) / R and the units
// ordered per period E[order] / R (SPEC section 4). Per state the chain
// keeps the sums over its cycle (cyc), so the figures are one pass over
// the stationary law.
//
// With R = 1 and a fixed lead time this is the chain of lostChain, of the
// same states; TestLostTimedFixedMatches checks the figures to 1e-12.
type lostTimed struct {
	R, lmax, k, top int
	pT              []float64
	tuples          []int32   // state i is tuples[i*k : (i+1)*k]
	order           []int32   // the order of the review of state i
	cyc             []float64 // per state 4 sums over the cycle: on hand, lost, served, stockout
	m               *chain.CSR
	pi              []float64
	diag            chain.Diagnostics
	negl            float64
}

// lostTimedStateBytes estimates the memory per state of a lostTimed chain
// of k components: the state and order, the cycle sums, the row pointer,
// the index slot and the solver's vectors (as lostStateBytes).
func lostTimedStateBytes(k int) float64 {
	return float64(4*k) + 4 + 4*8 + 8 + 4 + 6*8 + 16
}

// lostCycle carries one review state through a cycle; its buffers are
// reused from state to state.
type lostCycle struct {
	c     *lostTimed
	dtab  lossTable
	kd    []int     // stored demands, increasing
	fold  []float64 // fold[a]: mass of the demands below a that are not stored
	floor float64
	// orders are the cycle's orders of positive size with their ages at
	// the current phase (those older than lmax dropped: they have arrived
	// in every group); whether one is still out depends on the group m.
	orders []ageQty
	tlist  []int       // the cut-offs T with P(T) > 0
	act    []int       // the groups m of cur in use
	uact   []int       // the groups of u in use
	cur    [][]float64 // law of on hand at the start of the phase, by m
	nxt    [][]float64
	u      [][]float64 // law of on hand after the arrival, by next m
	used   []bool
	uused  []bool
	// lo, hi bound the support of cur[m] (and of u[m] while it is built).
	lo, hi, ulo, uhi []int
}

func newLostCycle(c *lostTimed, dtab lossTable, opt Options) *lostCycle {
	lc := &lostCycle{c: c, dtab: dtab, floor: negligibleTransition}
	if opt.Exhaustive {
		lc.floor = 0
	}
	pmf := dtab.pmf
	for d := 0; d <= c.top && d < len(pmf); d++ {
		if pmf[d] > 0 && pmf[d] >= lc.floor {
			lc.kd = append(lc.kd, d)
		}
	}
	lc.fold = make([]float64, c.top+2)
	for a := 1; a <= c.top+1; a++ {
		lc.fold[a] = lc.fold[a-1]
		if d := a - 1; d < len(pmf) && pmf[d] > 0 && pmf[d] < lc.floor {
			lc.fold[a] += pmf[d]
		}
	}
	g := c.lmax + 2
	for T, pt := range c.pT {
		if pt > 0 {
			lc.tlist = append(lc.tlist, T)
		}
	}
	lc.cur, lc.nxt, lc.u = make([][]float64, g), make([][]float64, g), make([][]float64, g)
	lc.used, lc.uused = make([]bool, g), make([]bool, g)
	lc.lo, lc.hi, lc.ulo, lc.uhi = make([]int, g), make([]int, g), make([]int, g), make([]int, g)
	return lc
}

// ageQty is an order: its age in periods and its size.
type ageQty struct {
	age int
	q   int32
}

// vec returns the zeroed vector m of vs, allocating it on first use.
func (lc *lostCycle) vec(vs [][]float64, m int) []float64 {
	if vs[m] == nil {
		vs[m] = make([]float64, lc.c.top+1)
	}
	return vs[m]
}

// run carries state z through one cycle. It returns the order of the
// review and adds the cycle's sums to cyc (on hand, lost, served,
// stockout); at the end lc.cur[m] for m in lc.act (support lo[m]..hi[m])
// holds the law of on hand at the next review with every order of age >=
// m arrived, and lc.orders the orders with their ages at that review (see
// next). The caller clears those vectors and their used flags. With levels
// non-nil it adds the law of on hand at the end of each period to it.
func (lc *lostCycle) run(z []int32, p Policy, cyc []float64, levels []float64) int {
	c, dtab := lc.c, lc.dtab
	lmax, R := c.lmax, c.R
	var ip int
	for _, v := range z {
		ip += int(v)
	}
	q := p.Order(ip)
	lc.orders = lc.orders[:0]
	if q > 0 {
		lc.orders = append(lc.orders, ageQty{0, int32(q)})
	}
	for j := 1; j < c.k; j++ {
		if z[j] > 0 {
			lc.orders = append(lc.orders, ageQty{j * R, z[j]})
		}
	}
	m0 := lmax + 1
	v := lc.vec(lc.cur, m0)
	v[z[0]] = 1
	lc.used[m0], lc.lo[m0], lc.hi[m0] = true, int(z[0]), int(z[0])
	lc.act = append(lc.act[:0], m0)
	for range R {
		// Arrivals: from group m with cut-off T, the orders of ages T..m-1.
		uused := lc.uused
		lc.uact = lc.uact[:0]
		for _, m := range lc.act {
			src := lc.cur[m]
			for _, T := range lc.tlist {
				pt := c.pT[T]
				arr := 0
				if T < m {
					for _, o := range lc.orders {
						if o.age >= T && o.age < m {
							arr += int(o.q)
						}
					}
				}
				nm := min(min(m, T)+1, lmax+1)
				dst := lc.vec(lc.u, nm)
				if !uused[nm] {
					uused[nm] = true
					lc.uact = append(lc.uact, nm)
					lc.ulo[nm], lc.uhi[nm] = lc.lo[m]+arr, lc.hi[m]+arr
				} else {
					lc.ulo[nm], lc.uhi[nm] = min(lc.ulo[nm], lc.lo[m]+arr), max(lc.uhi[nm], lc.hi[m]+arr)
				}
				for x := lc.lo[m]; x <= lc.hi[m]; x++ {
					if w := src[x]; w != 0 {
						dst[x+arr] += pt * w
					}
				}
			}
			clear(src[lc.lo[m] : lc.hi[m]+1])
			lc.used[m] = false
		}
		// Demand: figures from the law after the arrival, then on hand at
		// the end of the period.
		lc.act = lc.act[:0]
		for _, m := range lc.uact {
			uused[m] = false
			u := lc.u[m]
			dst := lc.vec(lc.nxt, m)
			hi := 0
			for a := lc.ulo[m]; a <= lc.uhi[m]; a++ {
				w := u[a]
				if w == 0 {
					continue
				}
				u[a] = 0
				cyc[0] += w * dtab.below[a]
				cyc[1] += w * dtab.above[a]
				cyc[2] += w * max(float64(a)-dtab.below[a], 0)
				cyc[3] += w * dtab.over[a]
				if levels != nil {
					if a == 0 {
						levels[0] += w
					} else {
						levels[0] += w * dtab.over[a-1]
						for d := 0; d < a && d < len(dtab.pmf); d++ {
							levels[a-d] += w * dtab.pmf[d]
						}
					}
				}
				if a == 0 {
					dst[0] += w
					continue
				}
				hi = max(hi, a)
				for _, d := range lc.kd {
					if d >= a {
						break
					}
					dst[a-d] += w * dtab.pmf[d]
				}
				dst[0] += w * min(dtab.over[a-1]+lc.fold[a], 1)
			}
			lc.nxt[m] = lc.cur[m]
			lc.cur[m] = dst
			lc.used[m], lc.lo[m], lc.hi[m] = true, 0, hi
			lc.act = append(lc.act, m)
		}
		// Age every order by one period; one older than lmax has arrived
		// whatever the group.
		n := 0
		for _, o := range lc.orders {
			if o.age++; o.age <= lmax {
				lc.orders[n] = o
				n++
			}
		}
		lc.orders = lc.orders[:n]
	}
	return q
}

// next sets the components after the first of the review state that
// follows group m at the end of a cycle (the orders still out, by age
// R, 2R, ...) and returns what joins the on hand in the first: the order
// of age lmax, which arrives in the next period for sure.
func (lc *lostCycle) next(m int, next []int32) (extra int) {
	clear(next[1:])
	lmax, R, k := lc.c.lmax, lc.c.R, lc.c.k
	for _, o := range lc.orders {
		switch {
		case o.age >= m: // arrived
		case o.age == lmax:
			extra += int(o.q)
		case o.age%R == 0 && o.age/R < k:
			next[o.age/R] = o.q
		}
	}
	return extra
}

// lostTimedIndex maps review states to indices: the components after the
// first pick a group (a map keyed by their bytes) and the first component
// indexes a slice of slots within it.
type lostTimedIndex struct {
	top   int
	group map[string]int32
	buf   []byte
	slots []int32
}

func (ix *lostTimedIndex) offset(rest []int32) int {
	ix.buf = ix.buf[:0]
	sum := 0
	for _, v := range rest {
		ix.buf = binary.AppendUvarint(ix.buf, uint64(v))
		sum += int(v)
	}
	if off, ok := ix.group[string(ix.buf)]; ok {
		return int(off)
	}
	off := len(ix.slots)
	for range ix.top - sum + 1 {
		ix.slots = append(ix.slots, -1)
	}
	ix.group[string(ix.buf)] = int32(off)
	return off
}

// buildLostTimed enumerates the review states reachable from (top, 0, ...,
// 0) breadth first and writes their cycle transitions and sums. Row
// entries below negligibleTransition (unless opt.Exhaustive) join the
// row's largest entry, so rows stay stochastic and states reached only
// through them are not built; within the cycle demands below it join the
// lump to 0 on hand, as in buildLost. The largest mass so moved in a row is
// the chain's negl. States, transitions, index slots and the estimated
// memory are counted as the chain grows and refused past their limits with
// a *SizeError or *LostMemoryError, as buildLost does.
//
// The chain's arrays come from w (the buffers of a search, reused from
// chain to chain; nil: new ones) and are valid until its next build.
func buildLostTimed(sys inventory.System, p Policy, top int, dtab lossTable, opt Options, w *lostWork) (*lostTimed, error) {
	if w == nil {
		w = &lostWork{}
	}
	pT, lmax, _, err := cutoffLaw(sys)
	if err != nil {
		return nil, err
	}
	R := sys.Review()
	k := max(1, (lmax+R-1)/R)
	c := &lostTimed{R: R, lmax: lmax, k: k, top: top, pT: pT}
	bound := lostBound(top, k)
	perState := lostTimedStateBytes(k)
	cycleBytes := lostTimedBytes(lmax, top, k) - perState
	maxTransitions := transitionsPerState * opt.MaxStates
	maxSlots := indexSlotsPerState * opt.MaxStates
	memory := func(n, nnz, slots, groups int) float64 {
		return float64(n)*perState + float64(nnz)*lostBytesPerTransition + float64(slots)*lostBytesPerSlot +
			float64(groups)*(lostBytesPerGroup+float64(k)+16) + cycleBytes
	}
	lc := newLostCycle(c, dtab, opt)
	ix := &lostTimedIndex{top: top, group: map[string]int32{}}
	root := make([]int32, k)
	root[0] = int32(top)
	ix.slots[ix.offset(root[1:])+top] = 0
	c.tuples = append(w.tuples[:0], root...)
	c.order = w.order[:0]
	c.cyc = w.folded[:0]
	rowPtr := append(w.rowPtr[:0], 0)
	col, val := w.col[:0], w.val[:0]
	// acc[j] gathers the row's probability of state j, mark[j] = i+1 once
	// j is a target of row i, and stamp lists the row's targets.
	acc, mark := []float64{0}, []int32{0} // the root's
	var stamp []int32
	next := make([]int32, k)
	floor := negligibleTransition
	if opt.Exhaustive {
		floor = 0
	}
	ctx := opt.Context
	for i := 0; i < len(c.tuples)/k; i++ {
		if ctx != nil && (R > 64 || i%1024 == 1023) {
			if err := ctx.Err(); err != nil {
				return nil, fmt.Errorf("building the lost-sales chain (%d states so far): %w", i, err)
			}
		}
		z := c.tuples[i*k : (i+1)*k]
		var cyc [4]float64
		q := lc.run(z, p, cyc[:], nil)
		c.order = append(c.order, int32(q))
		c.cyc = append(c.cyc, cyc[:]...)
		stamp = stamp[:0]
		for _, m := range lc.act {
			// The next review's state from the orders by age and m.
			extra := lc.next(m, next)
			off := ix.offset(next[1:])
			v := lc.cur[m]
			// New states are numbered in the order demand 0, 1, ... (on
			// hand downwards): breadth-first by demand, which suits the
			// Gauss-Seidel sweeps (see buildLost).
			for x := lc.hi[m]; x >= lc.lo[m]; x-- {
				w := v[x]
				if w == 0 {
					continue
				}
				v[x] = 0
				y := x + extra
				s := ix.slots[off+y]
				if s < 0 {
					s = int32(len(c.tuples) / k)
					// ix.slots may have moved: index again.
					ix.slots[off+y] = s
					next[0] = int32(y)
					c.tuples = append(c.tuples, next...)
					acc, mark = append(acc, 0), append(mark, 0)
				}
				if mark[s] != int32(i+1) {
					mark[s] = int32(i + 1)
					stamp = append(stamp, s)
				}
				acc[s] += w
			}
			lc.used[m] = false
		}
		if !slices.IsSorted(stamp) {
			slices.Sort(stamp)
		}
		// Fold the negligible entries into the largest.
		best, fold := stamp[0], 0.0
		for _, j := range stamp {
			if acc[j] > acc[best] {
				best = j
			}
		}
		for _, j := range stamp {
			if acc[j] < floor && j != best {
				fold += acc[j]
				acc[j] = 0
			}
		}
		acc[best] += fold
		c.negl = max(c.negl, fold)
		for _, j := range stamp {
			if acc[j] > 0 || j == best {
				col = append(col, j)
				val = append(val, acc[j])
			}
			acc[j] = 0
		}
		rowPtr = append(rowPtr, len(col))
		n := len(c.tuples) / k
		if n > opt.MaxStates {
			return nil, &SizeError{Chain: "lost-sales", Bound: bound, Limit: opt.MaxStates, What: "states", Counted: true}
		}
		if len(col) > maxTransitions {
			return nil, &SizeError{Chain: "lost-sales", Bound: bound * float64(top+1), Limit: maxTransitions, What: "transitions", Counted: true}
		}
		if len(ix.slots) > maxSlots {
			return nil, &SizeError{Chain: "lost-sales", Bound: bound, Limit: maxSlots, What: "index slots", Counted: true}
		}
		if i%256 == 255 || i == n-1 {
			if mb := memory(max(n, cap(c.tuples)/k), max(len(col), cap(col)), cap(ix.slots), len(ix.group)); mb > lostMemoryLimit {
				return nil, timedMemoryError(lmax, k, float64(n), mb)
			}
		}
	}
	n := len(c.tuples) / k
	w.tuples, w.order, w.folded, w.rowPtr, w.col, w.val = c.tuples, c.order, c.cyc, rowPtr, col, val
	m, err := chain.NewCSR(n, rowPtr, col, val)
	if err != nil {
		return nil, fmt.Errorf("building the lost-sales chain: %w", err)
	}
	c.m = m
	return c, nil
}

// evaluateLostTimed evaluates p in lost mode under a lead-time law or a
// review period R > 1 on the chain of lostTimed; see its doc for the
// figures.
func evaluateLostTimed(sys inventory.System, p Policy, opt Options, w *lostWork) (*Evaluation, error) {
	_, top := p.Levels()
	top = max(top, 0)
	if err := checkLostTiming(sys); err != nil {
		return nil, err
	}
	// Refuse before anything of the size of the pipeline or of the levels
	// is allocated (a fixed lead time may be up to 1e9 periods).
	lmax, err := longestLeadTime(sys)
	if err != nil {
		return nil, err
	}
	R := sys.Review()
	k := max(1, (lmax+R-1)/R)
	if top >= opt.MaxStates {
		return nil, fmt.Errorf("%v: %w", p, &SizeError{Chain: "lost-sales", Bound: lostBound(top, k), Limit: opt.MaxStates, What: "states"})
	}
	if b := lostTimedBytes(lmax, top, k); b > lostMemoryLimit {
		return nil, fmt.Errorf("%v: %w", p, timedMemoryError(lmax, k, 1, b))
	}
	// With a fixed lead time every order sits, at k-1 successive reviews,
	// in each of the pipeline's components in turn, so once the policy
	// orders (at the empty position, say) the chain has at least k
	// states: refuse a very long pipeline at once rather than after
	// counting them.
	if sys.LeadTimeLaw == nil && k > 1 && p.Order(0) > 0 {
		if b := float64(k) * lostTimedStateBytes(k); b > lostMemoryLimit {
			return nil, fmt.Errorf("%v: %w", p, timedMemoryError(lmax, k, float64(k), b))
		}
	}
	_, _, lneg, err := cutoffLaw(sys)
	if err != nil {
		return nil, err
	}
	if err := ctxErr(opt.Context); err != nil {
		return nil, fmt.Errorf("%v: %w", p, err)
	}
	dist := sys.Demand
	dtab := newLossTable(dist, 0, top)
	c, err := buildLostTimed(sys, p, top, dtab, opt, w)
	if err != nil {
		return nil, fmt.Errorf("%v: %w", p, err)
	}
	copt := opt.Chain
	auto := copt.Method == "" || copt.Method == chain.MethodAuto
	if auto && c.m.Len() > lostDenseStates {
		copt.Method = chain.MethodGaussSeidel
		copt.Fallback = true
	}
	r, err := chain.Solve(c.m, copt)
	if err == nil && auto && copt.Method != chain.MethodGaussSeidel && math.IsNaN(r.Diagnostics.Residual) {
		copt.Method = chain.MethodGaussSeidel
		r, err = chain.Solve(c.m, copt)
	}
	if err == nil && math.IsNaN(r.Diagnostics.Residual) {
		err = fmt.Errorf("%s gave a distribution that is not a number (try another --method)", r.Diagnostics.Method)
	}
	if err != nil {
		return nil, fmt.Errorf("%v: solving the lost-sales chain of %d states: %w", p, c.m.Len(), err)
	}
	c.pi, c.diag = r.Pi, r.Diagnostics
	var onHand, lost, served, stockout, freq, ordered inventory.CompensatedSum
	for i, w := range c.pi {
		if w == 0 {
			continue
		}
		cy := c.cyc[4*i : 4*i+4]
		onHand.Add(w * cy[0])
		lost.Add(w * cy[1])
		served.Add(w * cy[2])
		stockout.Add(w * cy[3])
		if q := c.order[i]; q > 0 {
			freq.Add(w)
			ordered.Add(w * float64(q))
		}
	}
	rf := float64(R)
	f := inventory.Figures{
		MeanOnHand:          onHand.Value() / rf,
		MeanLostSales:       lost.Value() / rf,
		StockoutProbability: clamp01(stockout.Value() / rf),
		OrderFrequency:      clamp01(freq.Value() / rf),
	}
	f.FillRate = clamp01(served.Value() / rf / dist.Mean())
	perPeriod := ordered.Value() / rf
	if freq.Value() > 0 {
		f.MeanOrderQuantity = ordered.Value() / freq.Value()
	}
	f.Price(sys, perPeriod)
	e := &Evaluation{
		Policy:      p,
		Figures:     f,
		States:      c.m.Len(),
		Diagnostics: c.diag,
		Neglected:   max(c.negl, dtab.neglected, inventory.Neglected(dist), lneg),
		FlowBalance: math.Abs(perPeriod - served.Value()/rf),
	}
	if opt.Levels {
		lc := newLostCycle(c, dtab, opt)
		lv := make([]float64, top+1)
		var cyc [4]float64
		tmp := make([]float64, top+1)
		for i, w := range c.pi {
			if w == 0 {
				continue
			}
			clear(tmp)
			lc.run(c.tuples[i*c.k:(i+1)*c.k], p, cyc[:], tmp)
			for _, m := range lc.act {
				clear(lc.cur[m][lc.lo[m] : lc.hi[m]+1])
				lc.used[m] = false
			}
			for x, v := range tmp {
				lv[x] += w * v / rf
			}
		}
		e.Levels = trim(OnHand, 0, lv, 0, 0)
	}
	return e, nil
}
