package policies

import (
	"context"
	"encoding/binary"
	"fmt"
	"math"
	"math/big"
	"math/rand/v2"
	"slices"

	"ergostock/chain"
	"ergostock/inventory"
)

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

// lostChain is the lost-sales chain of the state after the arrival. With
// L >= 1 the state at the review of period t is z = (a, o_2, ..., o_L): a
// the stock on hand once the order due this period, o_1, has arrived
// (a = x + o_1, x the on-hand at the review) and o_2..o_L the later
// orders (o_2 due next period); with L = 0 it is z = (a), the stock on
// hand once the order just placed has arrived. Only the states reachable
// from (top, 0, ..., 0) are built.
//
// The chain of z is exact, and one dimension smaller than that of the
// state at review s = (x, o_1, ..., o_L) of the event order (review,
// receive, demand; SPEC section 1). Proof. (i) z is Markov: with L >= 1
// the inventory position at the review is x + o_1 + ... + o_L = a + o_2 +
// ... + o_L, a function of z, so the order q = Order(a + o_2 + ... + o_L)
// is one too; demand D leaves (a - D)^+ on hand, and next period's order
// o_2 arrives, so
//
//	z' = ((a - D)^+ + o_2, o_3, ..., o_L, q)    (L >= 2),
//	z' = (a - D)^+ + q                          (L = 1),
//	z' = x' + Order(x'),  x' = (a - D)^+        (L = 0),
//
// a function of z and this period's demand alone, which is independent of
// the past: z' = f(z, D). (ii) z = phi(s) with phi(x, o_1, ..., o_L) =
// (x + o_1, o_2, ..., o_L) (L = 0: phi(x) = x + Order(x)), so the chain
// of z is the image of the chain of s: the image of a stationary law of s
// is a stationary law of z, and the states reachable from (top, 0, ..., 0)
// map onto those reachable from phi(top, 0, ..., 0) = (top, 0, ..., 0).
// (iii) Every figure of SPEC section 2 is E[g(z, D)] with D independent of
// z: on-hand at the end of the period (a - D)^+, lost sales (D - a)^+,
// a stockout 1{D > a}, units served min(D, a), and, with L >= 1, the order
// q = Order(a + o_2 + ... + o_L) of the review; with L = 0 the order of
// the next review, q' = Order((a - D)^+), whose stationary law is that of
// the order of this review. So both chains give the same numbers, from
// C(top+k, k) states at most (k = max(L, 1): tuples of k non-negative
// integers with sum <= top) instead of C(top+L+1, L+1): 46,376 instead of
// 324,632 for L = 4, top = 30, and top+1 instead of (top+1)(top+2)/2 for
// L = 1. TestLostPostArrivalMatchesReview checks every figure against the
// chain of s to 1e-12.
type lostChain struct {
	L, top int
	k      int     // components of a state: max(L, 1)
	tuples []int32 // state i is tuples[i*k : (i+1)*k] = a, o_2..o_L
	avail  []int32 // a: on-hand after the arrival, per state
	// order is the order q of the review, per state (L >= 1); with L = 0,
	// ordFreq and ordQty hold P(q' > 0) and E[q'] for the order q' of the
	// next review instead.
	order           []int32
	ordFreq, ordQty []float64
	m               *chain.CSR
	pi              []float64
	diag            chain.Diagnostics
	// negl is the largest probability mass folded into another transition
	// of the same row (transitions below negligibleTransition; 0 with
	// Options.Exhaustive).
	negl float64
}

// ip returns the sum of the components of state i: the inventory position
// at the review before ordering (L >= 1), or after ordering (L = 0).
func (c *lostChain) ip(i int) int {
	var s int
	for _, v := range c.tuples[i*c.k : (i+1)*c.k] {
		s += int(v)
	}
	return s
}

// orders returns P(order > 0) and E[order] of the review of state i (with
// L = 0, of the next review; see lostChain).
func (c *lostChain) orders(i int) (freq, qty float64) {
	if c.L == 0 {
		return c.ordFreq[i], c.ordQty[i]
	}
	if q := c.order[i]; q > 0 {
		return 1, float64(q)
	}
	return 0, 0
}

// lostBound returns C(top+k, k) with k = max(L, 1), the number of tuples
// (a, o_2, ..., o_L) of non-negative integers with sum <= top, as a
// float64 (+Inf if it overflows).
func lostBound(top, L int) float64 {
	if top < 0 {
		return 1
	}
	k := max(L, 1)
	if min(top, k) > 64 {
		// The exact binomial of a long pipeline has millions of digits;
		// its logarithm decides the comparison with any limit.
		lg := func(x int) float64 { v, _ := math.Lgamma(float64(x) + 1); return v }
		if l := lg(top+k) - lg(k) - lg(top); l < 700 {
			return math.Exp(l)
		}
		return math.Inf(1)
	}
	var b big.Int
	b.Binomial(int64(top+k), int64(k))
	f, _ := new(big.Float).SetInt(&b).Float64()
	return f
}

// stateIndex maps state tuples (a, o_2..o_L) to indices in two levels: the
// pipeline o_2..o_L picks a group (a map keyed by the mixed-radix number of
// radix top+1 when (top+1)^(L-1) fits in 63 bits, else by the tuple's
// bytes), and within a group on-hand a indexes a slice directly,
// a <= top - sum(o). All successors of a state share the next pipeline, so
// building a row costs one map access whatever the number of its
// transitions.
//
// When the mixed-radix keys are few ((top+1)^(L-1) at most about four times the
// states expected, and at most denseIndexMax), the first level is a table
// indexed by the key instead of a map: the same groups at the same
// offsets (so the same numbering and the same chain, bit for bit), without
// hashing.
type stateIndex struct {
	top   int
	radix uint64
	small map[uint64]int32 // pipeline key -> offset of its group in slots
	large map[string]int32
	// dense, when not nil, replaces small: dense[key] is the offset of the
	// group plus one, 0 for a group not yet seen; ndense counts them.
	dense  []int32
	ndense int
	useD   bool
	buf    []byte
	slots  []int32 // state index, or -1 for a state not yet seen
}

// denseIndexMax is the most keys a dense first level of stateIndex holds
// (4 bytes each).
const denseIndexMax = 1 << 22

// newStateIndex returns an index for pipelines of n components (n = L-1).
func newStateIndex(top, n, hint int) *stateIndex {
	ix := &stateIndex{}
	ix.reset(top, n, hint, 0)
	return ix
}

// reset empties ix for pipelines of n components below top, keeping its
// storage; hint is the number of groups expected, states that of states
// (which decides whether the first level may be a dense table).
func (ix *stateIndex) reset(top, n, hint, states int) {
	ix.top, ix.radix = top, uint64(top)+1
	ix.slots = ix.slots[:0]
	ix.useD, ix.ndense = false, 0
	if float64(n)*math.Log2(float64(top)+1) < 63 {
		ix.large = nil
		if keys := math.Pow(float64(top)+1, float64(n)); keys <= denseIndexMax && keys <= 4*float64(states)+1<<16 {
			ix.useD = true
			ix.dense = grow(ix.dense, int(keys))
			clear(ix.dense)
			return
		}
		if ix.small == nil {
			ix.small = make(map[uint64]int32, hint)
		}
		clear(ix.small)
		return
	}
	ix.small = nil
	if ix.large == nil {
		ix.large = make(map[string]int32, hint)
	}
	clear(ix.large)
}

// groups returns the number of groups in ix.
func (ix *stateIndex) groups() int {
	if ix.useD {
		return ix.ndense
	}
	return len(ix.small) + len(ix.large)
}

// baseStockStart returns a starting vector for the lost-sales chain of a
// base-stock policy: the law the state would have if nothing were lost.
// Then every order replaces one period's demand, so the later orders
// o_2..o_L are L-1 independent demands and the inventory position at
// review, a + o_2 + ... + o_L, is S less one more demand D' (a = 0 when
// that is negative, the lump):
//
//	init(a, o) = prod_k P(D = o_k) * P(D = S - sum(o) - a)   for a > 0,
//	init(0, o) = prod_k P(D = o_k) * P(D >= S - sum(o)).
//
// (With L = 0 the chain has the single state a = S.) It only changes the
// number of sweeps; the answer meets the solver's tolerance from any start.
func baseStockStart(c *lostChain, dtab lossTable) []float64 {
	n := c.m.Len()
	k := c.k
	init := make([]float64, n)
	var mass float64
	for i := range n {
		t := c.tuples[i*k : (i+1)*k]
		v, r := 1.0, c.top-int(t[0])
		for _, o := range t[1:] {
			v *= dtab.pmf[o]
			r -= int(o)
		}
		switch {
		case t[0] > 0 && r < len(dtab.pmf):
			v *= dtab.pmf[r]
		case t[0] > 0:
			v = 0
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
	if ix.useD {
		var k uint64
		for _, v := range o {
			k = k*ix.radix + uint64(v)
		}
		if off := ix.dense[k]; off > 0 {
			return int(off - 1)
		}
		off := add()
		ix.dense[k] = off + 1
		ix.ndense++
		return int(off)
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

// lostMemoryLimit is the most memory a lost-sales chain may take, as
// estimated by lostMemory: 2 GiB, whatever Options.MaxStates allows, so
// that a run stays within a 4 GB cap with the transient copies of growing
// buffers and the solver's work.
const lostMemoryLimit = 2 << 30

// Bytes of memory per state, per transition, per index slot and per
// pipeline group of a lost-sales chain, as lostMemory counts them: a
// state holds its k components, a, the order (L >= 1) or two float64
// order figures (L = 0), its group and its row pointer, and the solver's
// vectors (the stationary law and about five more of float64, the
// structural pass); a transition its column and value, twice (the matrix
// and the transpose that Gauss-Seidel sweeps); a group its map entry.
const (
	lostBytesPerStateFixed = 4 + 4 + 4 + 8 + 8 + 6*8 + 16
	lostBytesPerTransition = 2 * (4 + 8)
	lostBytesPerSlot       = 4
	lostBytesPerGroup      = 48
)

// lostStateBytes returns the bytes per state of a lost-sales chain with
// lead time L (see lostBytesPerStateFixed).
func lostStateBytes(L int) float64 {
	b := float64(4*max(L, 1) + lostBytesPerStateFixed)
	if L == 0 {
		b += 16 - 4
	}
	return b
}

// lostMemory returns the estimated bytes of a lost-sales chain of n
// states, nnz transitions, slots index slots and groups pipelines with
// lead time L.
func lostMemory(L int, n, nnz, slots, groups float64) float64 {
	return n*lostStateBytes(L) + nnz*lostBytesPerTransition + slots*lostBytesPerSlot + groups*lostBytesPerGroup
}

// LostMemoryError refuses a lost-sales chain whose memory, estimated
// before or while it is built, passes the limit of 2 GiB. It unwraps to
// a *SizeError (What "bytes of memory"), so callers that map a
// *SizeError to a refusal for size treat both alike.
type LostMemoryError struct {
	LeadTime int
	States   float64 // a lower bound on the reachable states: counted, or proven by lostProbe
	Bytes    float64 // estimated memory of those states and their transitions
	Size     *SizeError
	// StateBytes, when not 0, is the memory of one state (else that of the
	// fixed-lead-time chain with LeadTime, lostStateBytes).
	StateBytes float64
}

func (e *LostMemoryError) Error() string {
	b := e.StateBytes
	if b == 0 {
		b = lostStateBytes(e.LeadTime)
	}
	return fmt.Sprintf("lost-sales chain with lead time %d needs at least %.0f states of %.0f bytes each with their transitions, an estimated %s, above the memory limit of %s (lower the lead time or the order-up-to level)",
		e.LeadTime, e.States, b, formatBytes(e.Bytes), formatBytes(lostMemoryLimit))
}

func (e *LostMemoryError) Unwrap() error { return e.Size }

// formatBytes writes b in the largest binary unit that keeps it >= 1.
func formatBytes(b float64) string {
	units := []string{"B", "KiB", "MiB", "GiB", "TiB", "PiB", "EiB"}
	u := 0
	for b >= 1024 && u < len(units)-1 {
		b /= 1024
		u++
	}
	if u == 0 {
		return fmt.Sprintf("%.0f B", b)
	}
	return fmt.Sprintf("%.1f %s", b, units[u])
}

func memoryError(L int, states, bytes float64) error {
	return &LostMemoryError{LeadTime: L, States: states, Bytes: bytes,
		Size: &SizeError{Chain: "lost-sales", Bound: bytes, Limit: lostMemoryLimit, What: "bytes of memory", Counted: true}}
}

// lostWork holds the buffers of lost-sales chain construction. A search
// keeps one and builds every chain in it, so that each chain reuses the
// storage of the last and is sized from it; its zero value is ready.
// A chain built in it is valid until the next build.
type lostWork struct {
	tuples, avail, order, groups []int32
	ordFreq, ordQty              []float64
	rowPtr                       []int
	col                          []int32
	val                          []float64
	folded, acc                  []float64
	touched                      []int32
	nx, oq                       []int32
	kd                           []int
	mark                         []int
	sortBuf                      []entry
	ix                           stateIndex
	// last is the number of states of the last chain built.
	last int
}

// grow returns s with room for n elements, reusing its storage.
func grow[T any](s []T, n int) []T {
	if cap(s) < n {
		return make([]T, n)
	}
	return s[:n]
}

// buildLost enumerates the reachable states breadth first, then writes the
// transitions: from a state with a on hand after the arrival, demand d =
// 0..a-1 (exact probabilities) leaves a - d on hand, and the lump
// P(D >= a) from the closed tail leaves 0; the successor's on-hand after
// the next arrival is that plus o_2 (L >= 2) or the order q (L = 1), or,
// with L = 0, x' + Order(x') for x' left on hand (successors that
// coincide are merged). No demand tail is cut. The root, (top, 0, ..., 0)
// unless that state cannot be re-entered (see rootSteps), is state 0 and
// the numbering is breadth-first, which the Gauss-Seidel sweeps and
// chain.Solve's structural check rely on for speed (not for correctness).
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
// table (see evaluateLost).
//
// Memory stays within the limits whichever way: the reachable chain,
// usually far smaller than the a-priori bound C(top+k, k) (an s-S policy
// with large orders keeps at most one or two orders in the pipeline), is
// enumerated with running counts of states, transitions and index slots,
// and refused with a *SizeError as soon as one passes its limit or the
// estimated memory (lostMemory, with the capacity of every growing
// buffer) would pass lostMemoryLimit. With a very long pipeline, where
// even a few states pass that limit, a random walk on the chain first
// proves a lower bound on its states (lostProbe) and refuses before
// anything of the chain's size is allocated. opt.Context is checked every
// 4096 states. The chain lives in w (a new lostWork when w is nil).
func buildLost(dtab lossTable, p Policy, top, L int, opt Options, w *lostWork) (*lostChain, error) {
	if w == nil {
		w = &lostWork{}
	}
	bound := lostBound(top, L)
	support := 0
	for _, v := range dtab.pmf {
		if v > 0 {
			support++
		}
	}
	maxTransitions := transitionsPerState * opt.MaxStates
	maxSlots := indexSlotsPerState * opt.MaxStates
	k := max(L, 1)
	perState := lostStateBytes(L)
	pmf := dtab.pmf
	floor := negligibleTransition
	if opt.Exhaustive {
		floor = 0
	}
	// keep reports whether the transition of demand d is stored.
	keep := func(d int) bool { return d < len(pmf) && pmf[d] > 0 && pmf[d] >= floor }
	// A row is fixed by a (on hand after the arrival) and the group g of
	// the next pipeline: demand d < a with P(D = d) > 0 leads to on-hand
	// a - d, the lump P(D >= a) to 0. The first pass enumerates the states
	// (and counts each row's transitions); the second writes the rows into
	// arrays of the exact size.
	w.folded = grow(w.folded, top+2) // folded[a] = sum of P(D = d), d < a, 0 < P(D = d) < floor
	folded := w.folded
	folded[0] = 0
	// kd lists the stored demands below top+1, in increasing order.
	w.kd = w.kd[:0]
	for d := 0; d <= top && d < len(pmf); d++ {
		if keep(d) {
			w.kd = append(w.kd, d)
		}
	}
	kd := w.kd
	for a := 1; a <= top+1; a++ {
		folded[a] = folded[a-1]
		if d := a - 1; !keep(d) && d < len(pmf) && pmf[d] > 0 {
			folded[a] += pmf[d]
		}
	}
	// A state passes the memory limit alone: refuse at once. Otherwise,
	// when a few million states or fewer pass it (a long pipeline), prove
	// first that the chain has that many (the probe costs O(need) time
	// and memory, not the chain's).
	if perState > lostMemoryLimit {
		return nil, memoryError(L, 1, perState)
	}
	if need := math.Floor(lostMemoryLimit/perState) + 1; need <= lostProbeMax && bound > need {
		need = min(need, float64(opt.MaxStates)+1)
		seen, err := lostProbe(dtab, p, top, L, keep, folded, int(need), opt)
		if err != nil {
			return nil, err
		}
		if float64(seen) >= need {
			if float64(seen) > float64(opt.MaxStates) {
				return nil, &SizeError{Chain: "lost-sales", Bound: bound, Limit: opt.MaxStates, What: "states", Counted: true}
			}
			return nil, memoryError(L, float64(seen), lostMemory(L, float64(seen), float64(seen), 0, 0))
		}
	}

	// The first chain of a search is sized from the a-priori bound (the
	// reachable count for base-stock; s-S and s-nQ reach far fewer
	// states), later ones from the chain built before (a neighbour).
	hint := w.last + w.last/4
	if hint == 0 {
		hint = 1 << 12
		if p.Kind == BaseStock && bound <= float64(opt.MaxStates) {
			hint = int(bound)
		}
	}
	hint = min(hint, int(lostMemoryLimit/perState/4)+1)
	c := &lostChain{L: L, top: top, k: k}
	w.tuples = slices.Grow(w.tuples[:0], k*hint)
	w.avail, w.groups, w.rowPtr = w.avail[:0], w.groups[:0], append(w.rowPtr[:0], 0)
	w.order, w.ordFreq, w.ordQty = w.order[:0], w.ordFreq[:0], w.ordQty[:0]
	ix := &w.ix
	ix.reset(top, k-1, hint/max(top, 1)+1, hint)
	ix.slots = slices.Grow(ix.slots, hint)

	// memory estimates the bytes of the chain so far with states growing
	// to n, counted at the capacity of the buffers that grow, and the
	// transitions and solver vectors they will need.
	// A group keyed by bytes holds its key too.
	keyBytes := 0.0
	if ix.large != nil {
		keyBytes = float64(k-1) + 16
	}
	memory := func(n, nnz int) float64 {
		g := float64(ix.groups())
		return lostMemory(L, float64(max(n, cap(w.avail))), float64(nnz), float64(cap(ix.slots)), g) + g*keyBytes + 4*float64(cap(ix.dense))
	}

	// With L = 0, nx[x] = x + Order(x) is the on-hand after the next
	// arrival and oq[x] = Order(x) the order, for x left on hand.
	if L == 0 {
		w.nx, w.oq = grow(w.nx, top+1), grow(w.oq, top+1)
		for x := range top + 1 {
			q := p.Order(x)
			w.nx[x], w.oq[x] = int32(x+q), int32(q)
		}
	}
	nx := w.nx
	cur := make([]int32, k)
	next := make([]int32, k)
	// step sets next[1:] to the pipeline of the successors of state cur and
	// returns a, the order q of the review (L >= 1) and the amount c that
	// joins the on-hand x' left by demand in a successor (x' + c, next[1:]).
	step := func() (a, q, c int) {
		a = int(cur[0])
		if L == 0 {
			return a, 0, 0
		}
		var ip int
		for _, v := range cur {
			ip += int(v)
		}
		q = p.Order(ip)
		if L == 1 {
			return a, q, q
		}
		copy(next[1:], cur[2:])
		next[L-1] = int32(q)
		return a, q, int(cur[1])
	}
	// target returns the on-hand after the next arrival of a successor
	// that has x on hand at the end of the period.
	target := func(x, c int) int {
		if L == 0 {
			return int(nx[x])
		}
		return x + c
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
			a, _, c := step()
			best, x := 0.0, 0
			for d := 0; d < a && d < len(pmf); d++ {
				if keep(d) && pmf[d] > best {
					best, x = pmf[d], a-d
				}
			}
			if a > 0 && dtab.over[a-1]+folded[a] > best {
				x = 0
			}
			next[0] = int32(target(x, c))
			copy(cur, next)
		}
	}
	ix.slots[ix.group(cur[1:])+int(cur[0])] = 0
	w.tuples = append(w.tuples, cur...)

	var ctx context.Context = opt.Context
	// mark[y] tells whether on-hand y after the next arrival is already a
	// target of the current row: i+1 in the first pass, n+i+1 in the
	// second (with L = 0 successors can coincide).
	w.mark = grow(w.mark, top+1)
	mark := w.mark
	clear(mark)
	nnz := 0
	for i := 0; i < len(w.tuples)/k; i++ {
		if ctx != nil && i%4096 == 4095 {
			if err := ctx.Err(); err != nil {
				return nil, fmt.Errorf("building the lost-sales chain (%d states so far): %w", i, err)
			}
		}
		copy(cur, w.tuples[i*k:(i+1)*k])
		a, q, c := step()
		w.avail = append(w.avail, int32(a))
		if L > 0 {
			w.order = append(w.order, int32(q))
		}
		g := ix.group(next[1:])
		w.groups = append(w.groups, int32(g))
		// Number new states in the order demand d = 0, 1, ..., then the
		// lump: breadth-first order, which suits the Gauss-Seidel sweeps
		// (numbering on-hand upwards instead took 25 times the sweeps on
		// an s-S chain).
		row := 0
		lump := a == 0 || dtab.over[a-1] > 0 // else demand never empties the shelf from a
		for j := 0; j <= len(kd); j++ {
			var x int
			switch {
			case j < len(kd) && kd[j] < a:
				x = a - kd[j]
			case lump:
				x, j = 0, len(kd)
			default:
				j = len(kd)
				continue
			}
			y := target(x, c)
			if mark[y] == i+1 {
				continue
			}
			mark[y] = i + 1
			row++
			if ix.slots[g+y] < 0 {
				if len(w.tuples)+k > cap(w.tuples) {
					// Growing keeps the old buffer until the copy is made.
					n := len(w.tuples)/k + 1
					if m := memory(2*n, nnz) + float64(4*cap(w.tuples)); m > lostMemoryLimit {
						return nil, memoryError(L, float64(n), m)
					}
				}
				ix.slots[g+y] = int32(len(w.tuples) / k)
				next[0] = int32(y)
				w.tuples = append(w.tuples, next...)
			}
		}
		nnz += row
		w.rowPtr = append(w.rowPtr, nnz)
		if n := len(w.tuples) / k; n > opt.MaxStates {
			return nil, &SizeError{Chain: "lost-sales", Bound: bound, Limit: opt.MaxStates, What: "states", Counted: true}
		}
		if nnz > maxTransitions {
			return nil, &SizeError{Chain: "lost-sales", Bound: bound * float64(min(support, top)+1), Limit: maxTransitions, What: "transitions", Counted: true}
		}
		if len(ix.slots) > maxSlots {
			return nil, &SizeError{Chain: "lost-sales", Bound: bound, Limit: maxSlots, What: "index slots", Counted: true}
		}
		if i%256 == 255 {
			if m := memory(len(w.tuples)/k, nnz); m > lostMemoryLimit {
				return nil, memoryError(L, float64(len(w.tuples)/k), m)
			}
		}
	}
	n := len(w.tuples) / k
	if m := memory(n, nnz); m > lostMemoryLimit {
		return nil, memoryError(L, float64(n), m)
	}
	c.tuples, c.avail, c.order = w.tuples, w.avail, w.order
	w.col, w.val = grow(w.col, nnz), grow(w.val, nnz)
	col, val, rowPtr := w.col, w.val, w.rowPtr
	if L == 0 {
		w.ordFreq, w.ordQty = grow(w.ordFreq, n), grow(w.ordQty, n)
		c.ordFreq, c.ordQty = w.ordFreq, w.ordQty
	}
	// acc[y] gathers the probability of the successor with on-hand y
	// after the next arrival (merging those that coincide when L = 0).
	w.acc = grow(w.acc, top+1)
	acc := w.acc
	buf := w.sortBuf
	stamp := w.touched[:0] // the targets of the current row, in order
	for i := range n {
		if ctx != nil && i%4096 == 4095 {
			if err := ctx.Err(); err != nil {
				return nil, fmt.Errorf("building the lost-sales chain: %w", err)
			}
		}
		a, g := int(c.avail[i]), int(w.groups[i])
		cc := 0
		switch {
		case L == 1:
			cc = int(c.order[i])
		case L >= 2:
			cc = int(w.tuples[i*k+1])
		}
		stamp = stamp[:0]
		add := func(x int, v float64) {
			y := target(x, cc)
			if mark[y] != n+i+1 {
				mark[y] = n + i + 1
				stamp = append(stamp, int32(y))
			}
			acc[y] += v
		}
		// In the order of the first pass, so that a row whose targets were
		// numbered by it comes out sorted.
		last := -1
		var freq, qty float64 // L = 0: the next review's order, from the exact pmf
		if L == 0 {
			for d := 0; d < a && d < len(pmf); d++ {
				if q := w.oq[a-d]; q > 0 && pmf[d] > 0 {
					freq += pmf[d]
					qty += pmf[d] * float64(q)
				}
			}
		}
		for _, d := range kd {
			if d >= a {
				break
			}
			add(a-d, pmf[d])
			last = a - d
		}
		fold := folded[a]
		var lump float64
		switch {
		case a == 0:
			lump = 1
			add(0, 1)
		case dtab.over[a-1] > 0:
			// A tail within round-off of 1 can come out a hair above it.
			lump = dtab.over[a-1]
			add(0, min(dtab.over[a-1]+fold, 1))
		case fold > 0 && last >= 0:
			// No lump: P(D >= a) = 0, so the stored entries carry almost all
			// of the row (some P(D = d) >= 1/a) and last exists.
			add(last, fold)
		}
		if L == 0 {
			if q := w.oq[0]; q > 0 {
				freq += lump
				qty += lump * float64(q)
			}
			c.ordFreq[i], c.ordQty[i] = freq, qty
		}
		c.negl = max(c.negl, fold)
		lo := rowPtr[i]
		if len(stamp) != rowPtr[i+1]-lo {
			return nil, fmt.Errorf("building the lost-sales chain: row %d has %d transitions, want %d", i, len(stamp), rowPtr[i+1]-lo)
		}
		for j, y := range stamp {
			// Merged successors (L = 0) can sum to a hair above 1.
			col[lo+j], val[lo+j] = ix.slots[g+int(y)], min(acc[y], 1)
			acc[y] = 0
		}
		buf = sortRow(col[lo:rowPtr[i+1]], val[lo:rowPtr[i+1]], buf)
	}
	w.sortBuf, w.touched = buf, stamp
	w.last = n
	m, err := chain.NewCSR(n, rowPtr, col, val)
	if err != nil {
		return nil, fmt.Errorf("building the lost-sales chain: %w", err)
	}
	c.m = m
	return c, nil
}

// lostProbeMax is the largest number of states lostProbe is asked to
// find: it is run only when so few states pass the memory limit (a
// pipeline of about a thousand periods or more).
const lostProbeMax = 1 << 22

// lostProbe returns how many distinct states a seeded random walk of the
// lost-sales chain visits from its root (the root of buildLost, reached as
// it is when P(D = 0) is not stored), stopping at need states or after
// 8 need + 1024 periods, or once 4 n + 1024 periods in a row found no
// new state (n those seen: a small chain). Each period draws a stored
// transition, so every
// state visited is one buildLost would build: the count is a lower bound
// on the chain's states. States are told apart by a 64-bit polynomial hash
// of the tuple, rolled in O(1) per period over a ring of the pipeline; two
// states with the same hash count once, which only lowers the bound.
// Memory: the ring (4 L bytes) and a set of at most need hashes.
func lostProbe(dtab lossTable, p Policy, top, L int, keep func(int) bool, folded []float64, need int, opt Options) (int, error) {
	pmf := dtab.pmf
	n := max(L-1, 0) // pipeline o_2..o_L
	ring := make([]int32, n)
	head, pipe := 0, 0 // ring[head] is o_2; pipe = sum of the pipeline
	const base = 0x9e3779b97f4a7c15
	// pow = base^(n-1), the weight of o_2 in the pipeline's hash
	// h = sum_j ring[head+j mod n] base^(n-1-j).
	pow := uint64(1)
	for range max(n-1, 0) {
		pow *= base
	}
	var h uint64
	a := top
	// advance moves the walk to the successor that has x on hand at the
	// end of the period.
	advance := func(x int) {
		if L == 0 {
			a = x + p.Order(x)
			return
		}
		q := p.Order(a + pipe)
		if n == 0 {
			a = x + q
			return
		}
		o2 := ring[head]
		a = x + int(o2)
		h = (h-uint64(o2)*pow)*base + uint64(q)
		ring[head] = int32(q)
		head = (head + 1) % n
		pipe += q - int(o2)
	}
	if !keep(0) {
		// The root walk of buildLost.
		for range rootSteps(L) {
			best, x := 0.0, 0
			for d := 0; d < a && d < len(pmf); d++ {
				if keep(d) && pmf[d] > best {
					best, x = pmf[d], a-d
				}
			}
			if a > 0 && dtab.over[a-1]+folded[a] > best {
				x = 0
			}
			advance(x)
		}
	}
	// cum[d] = sum of the stored P(D = e), e <= d, to draw a demand.
	cum := make([]float64, min(len(pmf), top+1))
	var s float64
	for d := range cum {
		if keep(d) {
			s += pmf[d]
		}
		cum[d] = s
	}
	rng := rand.New(rand.NewPCG(20261202, uint64(L)))
	seen := make(map[uint64]struct{}, min(need, 1<<16))
	steps := 8*need + 1024
	fresh := 0 // the last period that found a new state
	for t := 0; t < steps && len(seen) < need; t++ {
		if t%4096 == 4095 && opt.Context != nil {
			if err := opt.Context.Err(); err != nil {
				return 0, fmt.Errorf("sizing the lost-sales chain: %w", err)
			}
		}
		key := h*0xbf58476d1ce4e5b9 ^ uint64(a)
		if _, ok := seen[key]; !ok {
			seen[key] = struct{}{}
			fresh = t
		} else if t-fresh > 4*len(seen)+1024 {
			break // a small chain: the walk keeps revisiting it
		}
		// Draw the on-hand x left by this period's demand among the
		// stored transitions from a: d < a with keep(d), or the lump.
		x := 0
		if m := min(a, len(cum)); m > 0 {
			lump := dtab.over[a-1] > 0
			tot := cum[m-1]
			if lump {
				tot += dtab.over[a-1]
			}
			d, _ := slices.BinarySearch(cum[:m], rng.Float64()*tot)
			switch {
			case d < m && keep(d):
				x = a - d
			case d < m || !lump:
				// Round-off at the end of the table: the largest stored
				// demand below a.
				for d = m - 1; d > 0 && !keep(d); d-- {
				}
				if keep(d) {
					x = a - d
				}
			}
		}
		advance(x)
	}
	return len(seen), nil
}

// rootSteps is the number of periods of the most probable demand that
// lead from (top, 0, ..., 0) to the root of a lost-sales chain whose start
// state cannot be re-entered: enough to refill the pipeline twice.
func rootSteps(L int) int { return 2*(L+1) + 8 }

// sortRow sorts the transitions of a row by target state (targets are
// distinct). Rows mostly come out of the enumeration sorted; short ones
// are insertion-sorted, long ones sorted through buf (returned for reuse).
func sortRow(col []int32, val []float64, buf []entry) []entry {
	n := len(col)
	sorted := true
	for k := 1; k < n && sorted; k++ {
		sorted = col[k-1] < col[k]
	}
	switch {
	case sorted:
	case n <= 32:
		for k := 1; k < n; k++ {
			cj, vj := col[k], val[k]
			m := k
			for ; m > 0 && col[m-1] > cj; m-- {
				col[m], val[m] = col[m-1], val[m-1]
			}
			col[m], val[m] = cj, vj
		}
	default:
		buf = buf[:0]
		for k := range col {
			buf = append(buf, entry{col[k], val[k]})
		}
		slices.SortFunc(buf, func(x, y entry) int { return int(x.j) - int(y.j) })
		for k, e := range buf {
			col[k], val[k] = e.j, e.p
		}
	}
	return buf
}

// entry is a transition of a row being sorted.
type entry struct {
	j int32
	p float64
}

// solveLost builds and solves the lost-sales chain of p in w (a new
// lostWork when w is nil); it also returns the loss table of one period's
// demand on 0..top.
func solveLost(dist inventory.Distribution, p Policy, L int, opt Options, w *lostWork) (*lostChain, lossTable, error) {
	_, top := p.Levels()
	top = max(top, 0)
	// Refuse before the demand table (O(top)) or the chain is allocated:
	// the states at the top level alone number top+1 on-hand levels times
	// at least one pipeline, and one state holds L-1 later orders.
	// Otherwise buildLost counts as it goes.
	if top >= opt.MaxStates {
		return nil, lossTable{}, fmt.Errorf("%v: %w", p, &SizeError{Chain: "lost-sales", Bound: lostBound(top, L), Limit: opt.MaxStates, What: "states"})
	}
	if b := lostStateBytes(L); b > lostMemoryLimit {
		return nil, lossTable{}, fmt.Errorf("%v: %w", p, memoryError(L, 1, b))
	}
	if opt.Context != nil {
		if err := opt.Context.Err(); err != nil {
			return nil, lossTable{}, fmt.Errorf("%v: %w", p, err)
		}
	}
	dtab := newLossTable(dist, 0, top)
	c, err := buildLost(dtab, p, top, L, opt, w)
	if err != nil {
		return nil, dtab, fmt.Errorf("%v: %w", p, err)
	}
	copt := opt.Chain
	auto := copt.Method == "" || copt.Method == chain.MethodAuto
	if auto && c.m.Len() > lostDenseStates {
		// Gauss-Seidel, which the chain package replaces on its own by a
		// direct or GMRES solve when it crawls (heavy losses, slow mixing).
		copt.Method = chain.MethodGaussSeidel
		copt.Fallback = true
	}
	if copt.Method == chain.MethodGaussSeidel && copt.Init == nil {
		// Measured on the chain of the state at review: BenchmarkEvaluateLost
		// 29 -> 27 sweeps, the chains of BenchmarkOptimizeLostBaseStock
		// 19 -> 14-16. (Starting a search's s-S or s-nQ chain from its
		// predecessor's law, mapped by state, took 3-4 times the sweeps of
		// the uniform start: those chains converge in 2-7 sweeps from any
		// start that has no holes.)
		if p.Kind == BaseStock {
			copt.Init = baseStockStart(c, dtab)
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

// evaluateLost evaluates p in lost mode on the chain of the state after
// the arrival (see lostChain). With a the on-hand after the arrival and q
// the order of the review, in the stationary law of the state and an
// independent demand D:
//
//	mean_on_hand         = E[(a - D)^+]
//	mean_lost_sales      = E[(D - a)^+]
//	fill_rate            = 1 - E[lost] / E[D] = E[min(D, a)] / E[D]
//	stockout_probability = P(D > a)
//	order_frequency      = P(q > 0),  mean_order_quantity = E[q | q > 0]
//	purchase_cost        = c E[q],    shortage_cost = b E[lost]
//
// (with L = 0, q is the order of the next review, Order((a - D)^+), whose
// stationary law is the same). Backorders are 0.
func evaluateLost(sys inventory.System, p Policy, opt Options) (*Evaluation, error) {
	return evaluateLostIn(sys, p, opt, nil)
}

// evaluateLostIn is evaluateLost with the chain built in w (nil: a new
// lostWork). The Evaluation keeps no reference to w.
func evaluateLostIn(sys inventory.System, p Policy, opt Options, w *lostWork) (*Evaluation, error) {
	if !sys.FixedTiming() {
		// A lead-time law or reviews every R > 1 periods: the chain at
		// reviews (see lostTimed).
		return evaluateLostTimed(sys, p, opt, w)
	}
	dist := sys.Demand
	mean := dist.Mean()
	c, dtab, err := solveLost(dist, p, sys.LeadTime, opt, w)
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
		if f, q := c.orders(i); f > 0 {
			freq.Add(w * f)
			ordered.Add(w * q)
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
		e.Levels = lostLevels(c, dtab)
	}
	return e, nil
}

// LostStateBound returns C(top+k, k), k = max(L, 1): the most states the
// lost-sales chain of a policy with highest position top and lead time L
// can have (the chain of the state after the arrival; see lostChain).
// s-S and s-nQ policies with large orders reach far fewer.
func LostStateBound(top, L int) float64 { return lostBound(top, L) }
