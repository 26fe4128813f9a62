package policies

import (
	"fmt"
	"math"
	"strconv"

	"ergostock/inventory"
)

// DefaultMaxEvaluations caps the chain evaluations of a lost-sales search.
const DefaultMaxEvaluations = 400

// floorTol is the round-off allowed when the chain's figures confirm a floor
// that the closed-form service figures of a backorder search found met.
const floorTol = 1e-12

// DefaultPatience is how many base-stock levels past the best a lost-sales
// scan evaluates without improvement before it stops.
const DefaultPatience = 5

// SearchOptions tune the search for the cheapest policy. The zero value
// searches without a service floor with the default evaluation options.
type SearchOptions struct {
	// MinFillRate, when in (0, 1), asks for fill_rate >= MinFillRate;
	// 0 means no floor.
	MinFillRate float64
	// MaxStockout, when in (0, 1), asks for stockout_probability <=
	// MaxStockout; 0 means no ceiling.
	MaxStockout float64
	Eval        Options
	// MaxEvaluations caps the chains a lost-sales search evaluates;
	// 0 means DefaultMaxEvaluations.
	MaxEvaluations int
	// Patience stops a lost-sales base-stock scan after this many levels
	// past the best without improvement; 0 means DefaultPatience, and a
	// negative value scans on to the proven cost bounds.
	Patience int
	// Cache, when not nil, keeps the chain evaluations of lost-sales
	// searches so that another search of the same system (under other
	// floors, as the exchange curve runs them) reuses them. It changes no
	// result: a reused evaluation counts against MaxEvaluations as a new
	// one would.
	Cache *EvalCache
}

// Search records how a search ran: how many candidate policies it costed
// (closed-form costs in backorder mode, chain evaluations in lost mode, plus
// the final evaluation of the optimum), by which method, within which
// bounds on the levels (each a closed range [lo, hi]), and what the result
// is guaranteed to be.
type Search struct {
	Evaluated int               `json:"policies_evaluated"`
	Method    string            `json:"method"`
	Bounds    map[string][2]int `json:"bounds"`
	Guarantee string            `json:"guarantee"`
}

// Optimum is the cheapest policy found with its evaluation.
type Optimum struct {
	Evaluation
	Search Search
}

// Optimize finds the cheapest policy of the given kind for sys, under the
// service floors of opt, and evaluates it with Evaluate.
//
// Backorder mode (exact, global):
//   - base-stock: the critical fractile, the smallest S with
//     P(X_{L+1} <= S) >= b/(b+h) (Arrow, Harris and Marschak 1951; Veinott
//     1966); under a floor, the smallest S at or above it that meets the
//     floor, since the cost is convex in S and the fill rate rises and the
//     stockout probability falls with S.
//   - s-S: the algorithm of Zheng and Federgruen (1991), "Finding optimal
//     (s,S) policies is about as simple as evaluating a single policy".
//     Under a floor: a sweep over S; for each S the cost is unimodal and
//     the service monotone in s, so the cheapest feasible s is
//     max(s_u, s_f); S stops at a proven bound (see ssConstrained).
//   - s-nQ: the position after review is uniform on the Q levels above s,
//     so for each Q the cost is convex in s; Q stops where the mean of the
//     Q smallest one-period costs, a lower bound for every s, reaches the
//     best cost found. A floor raises s as for s-S.
//
// The purchase cost c E[D] is the same for every policy in backorder mode
// (every unit demanded is ordered once) and does not move the optimum.
//
// Random lead times and review periods (backorder mode): the same searches
// run on the problem at reviews. The renewal kernel is the demand between
// reviews D_R; the one-period cost G(y), fill(y) and so(y) use the
// lead-time demand mixed over the lead-time law and the phase of the review
// cycle (see timing), averaged per period; the order cost per period is K/R
// per order placed at a review. Every guarantee above holds unchanged: a
// mixture of the convex functions G_l is convex, fill(y) and so(y) stay
// monotone in y, and the cost per period is (K/R + sum_j m(j) G(S-j)) /
// M(S-s), the form of Zheng and Federgruen (1991) with kernel D_R, so their
// bounds apply to the R-period problem with the mixed lead-time demand
// (for R-period reviews with a fixed lead time, see also Zipkin 2000,
// section 6.7). Under independent lead times only base-stock is searched
// (the fractile of the pipeline law, exact); other kinds are refused with
// ErrNotExact, as is lost mode with independent lead times.
// TestSearchCostConvexUnderTiming checks the convexity of G and the
// monotone service on the search's own tables.
//
// Lost mode: searches that evaluate candidates on the exact chain (at most
// MaxEvaluations of them, each once), starting from the backorder optimum
// for the shortage cost b - c (a lost unit forgoes its purchase). Base-stock
// scans S both ways between proven cost bounds (global optimum when both
// bounds are reached; otherwise best of the scanned range, stopped by
// Patience). s-S and s-nQ use a compass search: the result is a local
// optimum (no cheaper policy among its eight unit neighbours), with no
// global guarantee, because the lost-sales cost is not known to be convex.
// Search.Guarantee says which case applies. Under a lead-time law
// (sequential deliveries) or a review period the candidates are evaluated
// on the chain at reviews (see lostTimed) and the same searches run; the
// base-stock bounds still hold (on hand at the end of a period is at least
// the position after the last review whose orders have all arrived, less
// the demand since, a law that does not depend on the position; on hand
// before demand never exceeds S), so the base-stock scan keeps its
// guarantee, and s-S and s-nQ stay local optima.
//
// Costs h <= 0 or b <= 0 are refused (no finite optimum, or none worth
// finding); so are floors outside (0, 1), as *inventory.FieldError values
// naming min_fill_rate or max_stockout_probability. When no policy within
// the bounds meets a floor, the error says so and gives the bounds. The
// returned policy's floors are confirmed on Evaluate's figures (to 1e-12).
func Optimize(sys inventory.System, kind Kind, opt SearchOptions) (*Optimum, error) {
	if err := sys.Validate(); err != nil {
		return nil, err
	}
	if !(sys.Holding > 0) {
		return nil, &inventory.FieldError{Field: "holding_cost", Value: fmt.Sprint(sys.Holding),
			Want: "a holding cost > 0 to optimize (with h = 0 more stock is never worse)"}
	}
	if !(sys.Shortage > 0) {
		return nil, &inventory.FieldError{Field: "shortage_cost", Value: fmt.Sprint(sys.Shortage),
			Want: "a shortage cost > 0 to optimize (with b = 0 the cheapest policy holds nothing)"}
	}
	fl := floors{minFill: opt.MinFillRate, maxStockout: opt.MaxStockout}
	for _, f := range []struct {
		name string
		v    float64
	}{{"min_fill_rate", fl.minFill}, {"max_stockout_probability", fl.maxStockout}} {
		if f.v != 0 && !(f.v > 0 && f.v < 1) {
			return nil, &inventory.FieldError{Field: f.name, Value: fmt.Sprint(f.v), Want: "a probability strictly between 0 and 1"}
		}
	}
	if fl.maxStockout != 0 && fl.maxStockout < ServiceResolution {
		return nil, &inventory.FieldError{Field: "max_stockout_probability", Value: fmt.Sprint(fl.maxStockout),
			Want: "a ceiling of at least 1e-12: service figures are resolved to about 1e-12 (round-off, folded transitions, truncated lead-time tables), so no policy can be shown to meet a smaller one",
			Err:  ErrLimit}
	}
	if fl.minFill != 0 && fl.minFill > 1-ServiceResolution {
		return nil, &inventory.FieldError{Field: "min_fill_rate", Value: fmt.Sprint(fl.minFill),
			Want: "a floor of at most 1 - 1e-12: service figures are resolved to about 1e-12 (round-off, folded transitions, truncated lead-time tables), so no policy can be shown to meet a higher one",
			Err:  ErrLimit}
	}
	switch kind {
	case BaseStock, SS, SNQ:
	default:
		return nil, &inventory.FieldError{Field: "policy", Value: string(kind), Want: "base-stock, s-S or s-nQ"}
	}
	limit := opt.Eval.MaxStates
	if limit <= 0 {
		limit = DefaultMaxStates
	}
	if err := checkDemand(sys.Demand, limit); err != nil {
		return nil, err
	}
	if err := checkCostScale(sys); err != nil {
		return nil, err
	}
	if opt.MaxEvaluations < 0 {
		return nil, fmt.Errorf("evaluation cap %d: want a count >= 1 (0 for the default %d)", opt.MaxEvaluations, DefaultMaxEvaluations)
	}
	if opt.MaxEvaluations == 0 {
		opt.MaxEvaluations = DefaultMaxEvaluations
	}
	if opt.Eval.Tables == nil {
		// The search and the evaluation of its optimum share the laws.
		opt.Eval.Tables = NewDemandTables()
	}
	var (
		o   *Optimum
		err error
	)
	if sys.Mode == inventory.Lost {
		if err := checkLostTiming(sys); err != nil {
			return nil, err
		}
		o, err = optimizeLost(sys, kind, fl, opt)
		if err == nil && !sys.FixedTiming() {
			o.Search.Method += fmt.Sprintf("; each chain observed at reviews every %d period(s), with a cycle's transitions, under %s deliveries", sys.Review(), sys.Model())
		}
	} else {
		o, err = optimizeBackorder(sys, kind, fl, opt)
	}
	if err != nil {
		return nil, err
	}
	if fl.violation(o.Figures.FillRate, o.Figures.StockoutProbability) > floorTol {
		// The search's own service figures said the floor is met; the chain
		// disagrees beyond round-off. Never return a policy that misses it.
		return nil, fmt.Errorf("%v: the evaluated fill rate %.12g and stockout probability %.12g miss the floor %v that the search found met",
			o.Policy, o.Figures.FillRate, o.Figures.StockoutProbability, fl)
	}
	return o, nil
}

// optimizeBackorder runs the exact backorder searches and evaluates the
// optimum on the chain.
func optimizeBackorder(sys inventory.System, kind Kind, fl floors, opt SearchOptions) (*Optimum, error) {
	if err := checkOrderQuantity(sys, kind, opt.Eval.MaxStates); err != nil {
		return nil, err
	}
	mo, err := opt.Eval.Tables.searchModel(sys, opt.Eval, kind)
	if err != nil {
		return nil, err
	}
	var (
		p  Policy
		sr Search
	)
	switch kind {
	case BaseStock:
		p, sr, err = mo.baseStock(fl)
	case SS:
		p, sr, err = mo.optimizeSS(fl)
	case SNQ:
		p, sr, err = mo.snqSearch(mo.pos, fl)
	}
	if err != nil {
		return nil, err
	}
	opt.Eval.Tables.keepModel(sys, opt.Eval, kind, mo)
	if !sys.FixedTiming() {
		sr.Method += fmt.Sprintf("; at reviews every %d period(s), with the lead-time demand mixed over the lead-time law and the review phase (%s deliveries)", sys.Review(), sys.Model())
	}
	// The final evaluation takes the search's lead-time laws from
	// opt.Eval.Tables (see DemandTables): they are built once.
	ev, err := Evaluate(sys, p, opt.Eval)
	if err != nil {
		return nil, fmt.Errorf("evaluating the optimum: %w", err)
	}
	sr.Evaluated++
	return &Optimum{Evaluation: *ev, Search: sr}, nil
}

// checkCostScale refuses cost rates whose costs would overflow float64 in
// the search: the one-period costs h E[(y-X)^+] + b E[(X-y)^+] over the
// levels searched reach about max(h, b) times the span of the lead-time
// demand, (L+1) E[D] + 10 sd + 1, and the search adds up to millions of
// them. It names the larger rate.
func checkCostScale(sys inventory.System) error {
	n := float64(sys.LeadTime) + 1
	if !sys.FixedTiming() {
		n = float64(sys.LeadTime + sys.Review())
		if sys.LeadTimeLaw != nil {
			if w, _, err := sys.LeadTimeWeights(); err == nil {
				n = float64(len(w) + sys.Review())
			}
		}
	}
	d := sys.Demand
	scale := n*d.Mean() + 10*math.Sqrt(n*d.Variance()) + 1
	field, rate := "holding_cost", sys.Holding
	if sys.Shortage > rate {
		field, rate = "shortage_cost", sys.Shortage
	}
	if sys.OrderCost > rate {
		field, rate = "order_cost", sys.OrderCost
	}
	if rate*scale*1e12 <= math.MaxFloat64 {
		return nil
	}
	return &inventory.FieldError{Field: field, Value: strconv.FormatFloat(rate, 'g', -1, 64),
		Want: fmt.Sprintf("cost rates whose costs fit a float64 in the search: the rate times the span of lead-time demand (about %.3g units) times 1e12 must stay below 1.8e308", scale),
		Err:  ErrOverflow}
}

// ServiceResolution is the finest service requirement Optimize accepts:
// a stockout ceiling below it, or a fill-rate floor above 1 minus it, is
// refused (ErrLimit), since the figures that would confirm it carry errors
// of that order (floorTol).
const ServiceResolution = floorTol

// ErrLimit is wrapped by the errors of inputs refused because they lie
// beyond what the evaluation can resolve or hold (not because they are
// malformed): a command reports them with exit status 1.
var ErrLimit = inventory.ErrLimit

// checkOrderQuantity refuses, before any table is built, an s-S or s-nQ
// search whose order quantity must be wider than the state limit: the
// economic order quantity with planned backorders,
//
//	EOQ = sqrt(2 K E[D] (h + b) / (h b))
//
// (F. W. Harris 1913; the backorder form in Hadley and Whitin 1963, ch. 4,
// from memory), which the optimal S - s (or Q) approaches as K grows. It
// names the order cost, and gives the mean demand and holding cost.
func checkOrderQuantity(sys inventory.System, kind Kind, limit int) error {
	if kind == BaseStock || sys.OrderCost == 0 {
		return nil
	}
	if limit <= 0 {
		limit = DefaultMaxStates
	}
	h, b, k, mu := sys.Holding, sys.Shortage, sys.OrderCost, sys.Demand.Mean()
	eoq := math.Sqrt(2*k*mu/h) * math.Sqrt((h+b)/b)
	if !(eoq > float64(limit)) {
		return nil
	}
	return &SizeError{Chain: string(kind) + " search", Bound: eoq, Limit: limit, What: "units of order quantity",
		Input: "order_cost", Value: strconv.FormatFloat(k, 'g', -1, 64), Bytes: eoq * bytesPerEntry,
		Reason: fmt.Sprintf("with mean demand %.6g and holding cost %.6g it makes the economic order quantity sqrt(2 K E[D] (h+b)/(h b)) about %.3g units", mu, h, eoq)}
}

// baseStock returns the critical fractile, raised to the smallest level
// meeting the floors.
func (mo *boModel) baseStock(fl floors) (Policy, Search, error) {
	S, err := mo.fractile()
	if err != nil {
		return Policy{}, Search{}, err
	}
	lo := S
	n := 1
	for {
		_, fill, so := mo.ssService(S-1, S)
		if fl.meets(fill, so) {
			break
		}
		if S-lo >= mo.levelCap() {
			return Policy{}, Search{}, noneMeets(fl, map[string][2]int{"order_up_to": {lo, S}})
		}
		S++
		n++
	}
	sr := Search{
		Evaluated: n,
		Method:    "critical fractile of lead-time-plus-one-period demand",
		Bounds:    map[string][2]int{"order_up_to": {lo, S}},
		Guarantee: "global optimum (exact): the cost is convex in S with its smallest minimiser at the critical fractile",
	}
	if !fl.none() {
		sr.Method += ", raised to the smallest level meeting the floor"
		sr.Guarantee = "global optimum under the floor (exact): the cost is convex in S, the fill rate non-decreasing and the stockout probability non-increasing in S"
	}
	return Policy{Kind: BaseStock, OrderUpTo: S}, sr, nil
}

// optimizeSS runs Zheng-Federgruen and, if its optimum misses a floor, the
// constrained search.
func (mo *boModel) optimizeSS(fl floors) (Policy, Search, error) {
	r, err := mo.zfOnce()
	if err != nil {
		return Policy{}, Search{}, err
	}
	sr := Search{
		Evaluated: r.computed,
		Method:    "Zheng-Federgruen (1991)",
		Bounds:    map[string][2]int{"reorder_point": {r.sLo, max(r.ystar-1, r.s)}, "order_up_to": {r.ystar, r.sStop - 1}},
		Guarantee: "global optimum over all s < S (exact; proved by Zheng and Federgruen 1991)",
	}
	p := Policy{Kind: SS, ReorderPoint: r.s, OrderUpTo: r.S}
	if fl.none() {
		return p, sr, nil
	}
	_, fill, so := mo.ssService(r.s, r.S)
	if fl.meets(fill, so) {
		sr.Guarantee = "global optimum under the floor (exact): the unconstrained optimum meets it"
		return p, sr, nil
	}
	c, err := mo.ssConstrained(fl, r)
	if err != nil {
		return Policy{}, Search{}, err
	}
	return Policy{Kind: SS, ReorderPoint: c.s, OrderUpTo: c.S}, Search{
		Evaluated: r.computed + c.computed,
		Method:    "Zheng-Federgruen (1991), then a sweep over the order-up-to level S with, for each S, the cheapest reorder point meeting the floor",
		Bounds:    map[string][2]int{"order_up_to": {c.SLo, c.SHi}, "reorder_point": {c.sLo, c.sHi}},
		Guarantee: "global optimum under the floor (exact): for each S the cost is unimodal and the service monotone in s; levels S outside the sweep provably cost more",
	}, nil
}

// noneMeets is the error when no policy within the bounds meets the floors.
func noneMeets(fl floors, bounds map[string][2]int) error {
	return fmt.Errorf("no policy within the bounds %v meets %v", formatBounds(bounds), fl)
}

// formatBounds prints bounds in a stable order.
func formatBounds(b map[string][2]int) string {
	s := ""
	for _, k := range []string{"reorder_point", "order_up_to", "order_multiple", "order_up_to_minus_reorder_point"} {
		if v, ok := b[k]; ok {
			if s != "" {
				s += ", "
			}
			s += fmt.Sprintf("%s %d..%d", k, v[0], v[1])
		}
	}
	return s
}
