package policies

import (
	"errors"
	"fmt"
	"math"
	"sync"

	"ergostock/inventory"
)

// lostCandidate is one memoised chain evaluation of a lost-sales search.
type lostCandidate struct {
	ev   *Evaluation
	err  error
	cost float64 // total cost; +Inf when the chain could not be evaluated
	viol float64 // how far the figures miss the floors (0 when met)
}

// better orders candidates: any feasible one beats any infeasible one;
// feasible ones by cost, infeasible ones by their violation of the floors.
func (a lostCandidate) better(b lostCandidate) bool {
	switch {
	case a.err != nil:
		return false
	case b.err != nil:
		return true
	case a.viol == 0 && b.viol == 0:
		return a.cost < b.cost
	case a.viol == 0:
		return true
	case b.viol == 0:
		return false
	}
	return a.viol < b.viol
}

// lostSearch evaluates candidates on the exact lost-sales chain, once each.
// Every chain is built in work, so that it reuses the buffers of the one
// before and is sized from it (neighbouring policies have chains of
// similar size).
type lostSearch struct {
	sys  inventory.System
	opt  SearchOptions
	eopt Options // opt.Eval with the defaults of Evaluate applied
	fl   floors
	memo map[Policy]lostCandidate
	// cacheKey names the system and options of opt.Cache's entries.
	cacheKey string
	evals    int
	work     lostWork
	// one is the model of one period's demand (its kernel D) for the lower
	// bound of lostLower: the search's model has the demand between
	// reviews as its kernel when R > 1.
	one *boModel
}

var errCap = errors.New("evaluation cap reached")

// eval returns the memoised evaluation of p; errCap once the cap is spent.
// A chain too large to build (a *SizeError) is a candidate that loses to
// every evaluated one, not a failure of the search.
func (ls *lostSearch) eval(p Policy) (lostCandidate, error) {
	if c, ok := ls.memo[p]; ok {
		return c, nil
	}
	if ls.evals >= ls.opt.MaxEvaluations {
		return lostCandidate{}, errCap
	}
	if ctx := ls.eopt.Context; ctx != nil {
		if err := ctx.Err(); err != nil {
			return lostCandidate{}, fmt.Errorf("lost-sales search stopped after %d evaluations: %w", ls.evals, err)
		}
	}
	ls.evals++
	var ev *Evaluation
	err := p.Validate(ls.sys.Mode)
	if err == nil {
		if ce, ok := ls.opt.Cache.get(ls.cacheKey, p); ok {
			ev, err = ce.ev, ce.err
		} else {
			ev, err = evaluateLostIn(ls.sys, p, ls.eopt, &ls.work)
			if err == nil || errors.As(err, new(*SizeError)) {
				ls.opt.Cache.put(ls.cacheKey, p, cachedEval{ev, err})
			}
		}
	}
	var c lostCandidate
	if err != nil {
		var se *SizeError
		if !errors.As(err, &se) {
			return c, err
		}
		c = lostCandidate{err: err, cost: math.Inf(1), viol: math.Inf(1)}
	} else {
		c = lostCandidate{ev: ev, cost: ev.Figures.TotalCost, viol: ls.fl.violation(ev.Figures.FillRate, ev.Figures.StockoutProbability)}
	}
	ls.memo[p] = c
	return c, nil
}

// optimizeLost dispatches the lost-sales searches.
func optimizeLost(sys inventory.System, kind Kind, fl floors, opt SearchOptions) (*Optimum, error) {
	// The backorder optimum with shortage cost b - c starts the search: a
	// lost unit costs b but saves its purchase c.
	bo := sys
	bo.Mode = inventory.Backorder
	bo.Shortage = max(sys.Shortage-sys.UnitCost, sys.Shortage*1e-6)
	tabs := Options{Tables: opt.Eval.Tables} // the laws do not depend on mode or costs
	mo, err := newBOModelOpt(bo, tabs)
	if err != nil {
		return nil, err
	}
	// The lost-sales lower bounds use X_{L+1} and D of the real system.
	lost, err := newBOModelOpt(sys, tabs)
	if err != nil {
		return nil, err
	}
	eopt := opt.Eval
	if eopt.MaxStates == 0 {
		eopt.MaxStates = DefaultMaxStates
	}
	if eopt.MaxStates < 0 {
		return nil, fmt.Errorf("state limit %d: want a count >= 1 (0 for the default %d)", eopt.MaxStates, DefaultMaxStates)
	}
	eopt.MaxStates = min(eopt.MaxStates, math.MaxInt32)
	if eopt.Chain.Context == nil {
		eopt.Chain.Context = eopt.Context
	}
	ls := &lostSearch{sys: sys, opt: opt, eopt: eopt, fl: fl, memo: map[Policy]lostCandidate{}, one: lost}
	if sys.Review() > 1 {
		s1 := sys
		s1.ReviewPeriod = 1
		if ls.one, err = newBOModel(s1); err != nil {
			return nil, err
		}
	}
	if opt.Cache != nil {
		ls.cacheKey = cacheKey(sys, eopt)
	}
	// Under a floor the start is the backorder optimum under the same floor
	// (backorder service is a guide to lost-sales service, not equal to it).
	switch kind {
	case BaseStock:
		p, _, err := mo.baseStock(fl)
		if err != nil {
			return nil, err
		}
		return ls.baseStock(lost, max(p.OrderUpTo, 0))
	case SS:
		p, _, err := mo.optimizeSS(fl)
		if err != nil {
			return nil, err
		}
		s := max(p.ReorderPoint, -1)
		S := max(p.OrderUpTo, s+1)
		return ls.pattern(lost, ssCoords{}, [2]int{s, S})
	default:
		p, _, err := mo.snqSearch(bo.Demand, fl)
		if err != nil {
			return nil, err
		}
		return ls.pattern(lost, snqCoords{}, [2]int{max(p.ReorderPoint, -1), p.OrderMultiple})
	}
}

// lostLower returns bounds on the lost-sales cost of any policy whose
// inventory position after review is at least y and at most top:
//
//	cost >= h E[(y - X_{L+1})^+] + min(b, c) E[D]             (upper),
//	cost >= min(b, c) E[D] + (b - c)^+ E[(D - top)^+]          (lower).
//
// The first holds because all stock counted in the position at a review
// has arrived L periods later and only demand can have taken it away, so
// on-hand at the end of that period is at least (y - X_{L+1})^+; the
// second because on-hand before demand never exceeds top, so at least
// (D - top)^+ is lost each period; and b E[lost] + c E[ordered] =
// c E[D] + (b - c) E[lost] >= min(b, c) E[D] since 0 <= E[lost] <= E[D].
// Under a lead-time law (sequential deliveries) and reviews every R
// periods the first holds with X_{L+1} replaced by the mixed law of mo.x1:
// in every period the last review whose orders have all arrived is V + f
// periods back (V of the lead-time law, f the phase, both independent of
// stock), and on hand is at least that review's position less the demand
// since. The second uses one period's demand, from one (mo itself when
// R = 1).
func lostLower(mo, one *boModel, y, top int) (upper, lower float64) {
	base := min(mo.b, mo.c) * mo.mu
	return mo.h*mo.x1.below(y) + base, base + max(mo.b-mo.c, 0)*lostAbove(one, top)
}

// lostAbove returns E[(D - top)^+] for single-period demand.
func lostAbove(mo *boModel, top int) float64 {
	// E[(D-top)^+] = sum_{k > top} P(D >= k), from the kernel's pmf.
	p0 := 1 / mo.m[0]
	q := 1 - p0 // q[i] = P(D = i)/q
	var v float64
	for i := max(top+1, mo.qlo); i < len(mo.q); i++ {
		v += float64(i-top) * mo.q[i] * q
	}
	return v
}

// baseStock scans base-stock levels in lost mode, upwards from S0 and then
// downwards from S0-1. A scan in either direction stops at the first of:
//
//   - the proven bound: upwards, the first S whose upper bound of lostLower
//     (with y = S, the position after every review) reaches the cheapest
//     feasible cost found; downwards, S = 0 or the first S whose lower
//     bound (with top = S) does. Both bounds are monotone in S, so no level
//     beyond is cheaper;
//   - patience: Patience consecutive levels (default DefaultPatience) past
//     the cheapest feasible level so far without a cheaper one (skipped
//     when Patience < 0);
//   - the evaluation cap.
//
// When both scans end at their proven bounds the result is the global
// optimum over all S >= 0; otherwise it is the best level of the scanned
// range, and the lost-sales cost is not known to be convex or unimodal in S,
// so levels outside that range are not proven dearer.
func (ls *lostSearch) baseStock(mo *boModel, S0 int) (*Optimum, error) {
	best := lostCandidate{err: errCap}
	hi, lo := S0, S0
	capped := false
	proven := [2]bool{}
	patience := ls.opt.Patience
	if patience == 0 {
		patience = DefaultPatience
	}
	// try evaluates S; improved reports a new best.
	try := func(S int) (ok, improved bool, err error) {
		c, err := ls.eval(Policy{Kind: BaseStock, OrderUpTo: S})
		if err == errCap {
			capped = true
			return false, false, nil
		}
		if err != nil {
			return false, false, err
		}
		if c.err != nil && S == S0 {
			// The scan starts here and would go on from here: refuse now,
			// with the reason, rather than try level after level.
			return false, false, fmt.Errorf("lost-sales base-stock search: the scan starts at the backorder optimum for b - c, order-up-to %d, and its chain is too large: %w", S0, c.err)
		}
		if c.err != nil && S > S0 {
			// Chains only grow with S: no level above can be evaluated.
			return false, false, nil
		}
		if c.better(best) {
			best = c
			return true, true, nil
		}
		return true, false, nil
	}
	for dir := range 2 {
		step, S := 1, S0
		if dir == 1 {
			step, S = -1, S0-1
		}
		since := 0
		for ; ; S += step {
			if S < 0 {
				proven[dir] = true
				break
			}
			if best.err == nil && best.viol == 0 {
				up, low := lostLower(mo, ls.one, S, S)
				if (dir == 0 && up >= best.cost) || (dir == 1 && low >= best.cost) {
					proven[dir] = true
					break
				}
				if patience > 0 && since >= patience {
					break
				}
			}
			if S-S0 >= maxLevel {
				break
			}
			ok, improved, err := try(S)
			if err != nil {
				return nil, err
			}
			if !ok {
				break
			}
			if improved {
				since = 0
			} else {
				since++
			}
			if dir == 0 {
				hi = S
			} else {
				lo = S
			}
		}
		if capped {
			break
		}
	}
	bounds := map[string][2]int{"order_up_to": {lo, hi}}
	if best.err != nil {
		return nil, fmt.Errorf("no base-stock level within %s could be evaluated: %w", formatBounds(bounds), best.err)
	}
	if best.viol > 0 {
		return nil, ls.noneMeets(bounds, capped)
	}
	var g string
	switch {
	case proven[0] && proven[1]:
		g = "global optimum over all S >= 0 (exact chain; levels outside the scan are excluded by proven cost bounds)"
	case capped:
		g = fmt.Sprintf("best of the levels scanned before the cap of %d evaluations; no global guarantee", ls.opt.MaxEvaluations)
	default:
		g = fmt.Sprintf("best of the levels scanned, which stopped %d levels past the best without improvement where the proven cost bounds were not yet reached; the lost-sales cost is not known to be convex in S, so there is no global guarantee", patience)
	}
	return &Optimum{Evaluation: *best.ev, Search: Search{
		Evaluated: ls.evals,
		Method:    "scan of base-stock levels on the exact lost-sales chain from the critical fractile for b - c",
		Bounds:    bounds,
		Guarantee: g,
	}}, nil
}

// noneMeets is the error of a lost-sales search that found no policy
// meeting the floors.
func (ls *lostSearch) noneMeets(bounds map[string][2]int, capped bool) error {
	err := noneMeets(ls.fl, bounds)
	if capped {
		return fmt.Errorf("%w (the cap of %d evaluations stopped the search; raise --max-evaluations)", err, ls.opt.MaxEvaluations)
	}
	return err
}

// coords maps a point of a two-dimensional search to a policy.
type coords interface {
	policy(x [2]int) (Policy, bool) // false when x is not a legal policy
	names() [2]string
}

type ssCoords struct{}

func (ssCoords) policy(x [2]int) (Policy, bool) {
	return Policy{Kind: SS, ReorderPoint: x[0], OrderUpTo: x[1]}, x[0] >= -1 && x[1] > x[0]
}
func (ssCoords) names() [2]string { return [2]string{"reorder_point", "order_up_to"} }

type snqCoords struct{}

func (snqCoords) policy(x [2]int) (Policy, bool) {
	return Policy{Kind: SNQ, ReorderPoint: x[0], OrderMultiple: x[1]}, x[0] >= -1 && x[1] >= 1
}
func (snqCoords) names() [2]string { return [2]string{"reorder_point", "order_multiple"} }

// pattern is a compass (pattern) search on the exact lost-sales chain
// (Hooke and Jeeves 1961; Kolda, Lewis and Torczon, SIAM Review 45(3),
// 2003): from the start it polls the eight neighbours at distance delta in
// each coordinate, moves to the best improving one, and halves delta when
// none improves; delta starts at about a quarter of the standard deviation
// of X_{L+1} and the search stops when no neighbour at distance 1 improves.
// Every chain is evaluated once (memoised), and at most MaxEvaluations
// chains are evaluated.
//
// What is guaranteed: the result is no worse than any of its eight unit
// neighbours (a local optimum), or, if the cap stopped the search, the best
// policy evaluated. The lost-sales cost is not known to be convex or
// unimodal in (s, S) or (s, Q): there is no global guarantee. Reorder
// points are kept at -1 or above (the position never falls below 0).
func (ls *lostSearch) pattern(mo *boModel, cs coords, x0 [2]int) (*Optimum, error) {
	delta := 1
	if v := ls.sys.Demand.Variance() * float64(ls.sys.LeadTime+1); v > 0 && isFinite(v) {
		delta = max(1, int(math.Sqrt(v)/4))
	}
	lo, hi := x0, x0
	note := func(x [2]int) {
		for i := range 2 {
			lo[i], hi[i] = min(lo[i], x[i]), max(hi[i], x[i])
		}
	}
	capped := false
	at := func(x [2]int) (lostCandidate, bool, error) {
		p, ok := cs.policy(x)
		if !ok {
			return lostCandidate{}, false, nil
		}
		c, err := ls.eval(p)
		if err == errCap {
			capped = true
			return c, false, nil
		}
		if err != nil {
			return c, false, err
		}
		note(x)
		return c, true, nil
	}
	x := x0
	cur, ok, err := at(x)
	if err != nil {
		return nil, err
	}
	if !ok {
		return nil, fmt.Errorf("lost-sales search: the starting policy %v could not be evaluated", x)
	}
	if cur.err != nil {
		p, _ := cs.policy(x)
		return nil, fmt.Errorf("lost-sales search: the compass search starts at the backorder optimum for b - c, %v, and its chain is too large: %w", p, cur.err)
	}
	for !capped {
		bestX, bestC := x, cur
		for _, d := range [8][2]int{{-1, 0}, {1, 0}, {0, -1}, {0, 1}, {-1, -1}, {1, 1}, {-1, 1}, {1, -1}} {
			y := [2]int{x[0] + d[0]*delta, x[1] + d[1]*delta}
			c, ok, err := at(y)
			if err != nil {
				return nil, err
			}
			if ok && c.better(bestC) {
				bestX, bestC = y, c
			}
		}
		if bestX != x {
			x, cur = bestX, bestC
			continue
		}
		if delta == 1 {
			break
		}
		delta /= 2
	}
	n := cs.names()
	bounds := map[string][2]int{n[0]: {lo[0], hi[0]}, n[1]: {lo[1], hi[1]}}
	if cur.err != nil {
		return nil, fmt.Errorf("no policy within %s could be evaluated: %w", formatBounds(bounds), cur.err)
	}
	if cur.viol > 0 {
		return nil, ls.noneMeets(bounds, capped)
	}
	g := "local optimum: no cheaper policy among its eight unit neighbours on the exact chain; the lost-sales cost is not known to be convex, so there is no global guarantee"
	if capped {
		g = fmt.Sprintf("best policy evaluated before the cap of %d evaluations; not verified as a local optimum; no global guarantee", ls.opt.MaxEvaluations)
	}
	return &Optimum{Evaluation: *cur.ev, Search: Search{
		Evaluated: ls.evals,
		Method:    "compass search on the exact lost-sales chain from the backorder optimum for b - c",
		Bounds:    bounds,
		Guarantee: g,
	}}, nil
}

// EvalCache keeps lost-sales chain evaluations across searches of one
// system (see SearchOptions.Cache). It is safe for concurrent use; entries
// of another system or other evaluation options replace the old ones.
type EvalCache struct {
	mu  sync.Mutex
	key string
	m   map[Policy]cachedEval
}

type cachedEval struct {
	ev  *Evaluation
	err error
}

// NewEvalCache returns an empty cache.
func NewEvalCache() *EvalCache { return &EvalCache{} }

func (c *EvalCache) get(key string, p Policy) (cachedEval, bool) {
	if c == nil {
		return cachedEval{}, false
	}
	c.mu.Lock()
	defer c.mu.Unlock()
	if c.key != key {
		return cachedEval{}, false
	}
	e, ok := c.m[p]
	return e, ok
}

func (c *EvalCache) put(key string, p Policy, e cachedEval) {
	if c == nil {
		return
	}
	c.mu.Lock()
	defer c.mu.Unlock()
	if c.key != key || c.m == nil {
		c.key, c.m = key, map[Policy]cachedEval{}
	}
	c.m[p] = e
}

// cacheKey identifies a system and the evaluation options that shape its
// chains' figures.
func cacheKey(sys inventory.System, o Options) string {
	law := ""
	if sys.LeadTimeLaw != nil {
		law = sys.LeadTimeLaw.String()
	}
	return fmt.Sprintf("%s|%d|%s|%s|%d|%g|%g|%g|%g|%v|%d|%v|%s|%g|%d", sys.Demand, sys.LeadTime, law, sys.LeadTimeModel, sys.ReviewPeriod,
		sys.Holding, sys.Shortage, sys.OrderCost, sys.UnitCost, sys.Mode, o.MaxStates, o.Exhaustive, o.Chain.Method, o.Chain.Tol, o.Chain.MaxIter)
}
