package uncertainty

import (
	"fmt"
	"math"
	"runtime"
	"sync"

	"ergostock/inventory"
	"ergostock/policies"
)

// DefaultMaxRobustEvaluations caps the exact evaluations of a robust search
// (candidates times resampled models).
const DefaultMaxRobustEvaluations = 2_000_000

// Robust is the policy of least mean cost over the resampled models that
// meets the fill-rate floor in at least the required share of them, and
// how it compares with the plug-in recommendation on the same models.
//
// The mean over the B models is the bootstrap estimate of the expected
// cost under the uncertainty of the model; choosing the policy that
// minimises it, rather than the optimum of the point estimate, is the idea
// of operational statistics (Liyanage and Shanthikumar 2005), and the
// share constraint is a bootstrap version of the service targets set from
// limited data by Akcay, Biller and Tayur (2011).
type Robust struct {
	Policy policies.Policy
	// MeanCost is the mean total cost over the resampled models; FillRate
	// the spread of the fill rate; FloorShare the share of models in which
	// the fill rate meets the floor (1 without a floor).
	MeanCost   float64
	FillRate   Spread
	FloorShare float64
	// Point is the robust policy's figures under the point model.
	Point inventory.Figures
	// The plug-in recommendation on the same models, for comparison.
	PlugInMeanCost   float64
	PlugInFloorShare float64
	// ExtraCost is MeanCost - PlugInMeanCost (what the robust policy
	// costs over the plug-in, on average over the models; negative when it
	// is also cheaper on average).
	ExtraCost float64
	// Candidates is the number of policies considered (each evaluated on
	// every model, or given up once it provably cannot be the best; see
	// robustSearcher.get), Evaluations the exact evaluations in all.
	Candidates  int
	Evaluations int
	// Guarantee says what is known of the result.
	Guarantee string
}

// candidate is a policy's figures over the used resampled models.
type candidate struct {
	mean   float64
	share  float64
	fill   []float64
	err    error
	pruned bool // given up early: not the best (see get)
}

type robustSearcher struct {
	sys     []inventory.System // one per used resample
	mode    inventory.Mode
	eval    policies.Options
	floor   float64
	conf    float64
	cap     int
	workers int
	memo    map[policies.Policy]*candidate
	evals   int
}

func (rs *robustSearcher) feasible(c *candidate) bool {
	return c.err == nil && !c.pruned && (rs.floor == 0 || c.share >= rs.conf-1e-12)
}

// errCap is the error of a search that ran out of its evaluation budget.
type errCap struct{ cap int }

func (e errCap) Error() string {
	return fmt.Sprintf("the search needs more than %d exact evaluations (candidates x resamples); use fewer resamples", e.cap)
}

// pruneChunk is the number of models evaluated between two checks of the
// pruning bounds: fixed, so that the count of evaluations does not depend
// on the worker count.
const pruneChunk = 16

// get evaluates p on every model (once). With prune, the evaluation stops
// early when p can no longer be the best: costs are non-negative, so the
// cost summed over the models evaluated so far, divided by their total
// number, is a lower bound of the mean cost, and p is given up once that
// bound passes the best feasible mean cost found (limit); it is also given
// up once more models miss the floor than the required share allows. A
// pruned candidate is never better than the best found then, nor than any
// found later (the best only gets cheaper), so pruning changes no result.
func (rs *robustSearcher) get(p policies.Policy, prune bool, limit float64) *candidate {
	if c, ok := rs.memo[p]; ok && (!c.pruned || prune) {
		return c
	}
	c := &candidate{}
	rs.memo[p] = c
	if err := p.Validate(rs.mode); err != nil {
		c.err = err
		return c
	}
	n := len(rs.sys)
	cost := make([]float64, n)
	c.fill = make([]float64, n)
	errs := make([]error, n)
	maxMiss := n - int(math.Ceil(rs.conf*float64(n)-1e-9))
	sum, miss := 0.0, 0
	for lo := 0; lo < n; lo += pruneChunk {
		hi := min(n, lo+pruneChunk)
		if rs.evals+hi-lo > rs.cap {
			c.err = errCap{rs.cap}
			return c
		}
		rs.evals += hi - lo
		var wg sync.WaitGroup
		w := min(rs.workers, hi-lo)
		for k := 0; k < w; k++ {
			wg.Add(1)
			go func(k int) {
				defer wg.Done()
				for i := lo + k; i < hi; i += w {
					e, err := policies.Evaluate(rs.sys[i], p, rs.eval)
					if err != nil {
						errs[i] = err
						continue
					}
					cost[i], c.fill[i] = e.Figures.TotalCost, e.Figures.FillRate
				}
			}(k)
		}
		wg.Wait()
		for i := lo; i < hi; i++ {
			if errs[i] != nil {
				c.err = fmt.Errorf("%v on resampled model %d: %w", p, i, errs[i])
				return c
			}
			sum += cost[i]
			if rs.floor != 0 && c.fill[i] < rs.floor-1e-12 {
				miss++
			}
		}
		if prune && hi < n && (sum/float64(n) > limit || (rs.floor != 0 && miss > maxMiss)) {
			c.pruned = true
			c.mean = math.Inf(1)
			return c
		}
	}
	c.mean = sum / float64(n)
	c.share = float64(n-miss) / float64(n)
	return c
}

// better reports whether a is a better feasible candidate than b (nil b
// loses); ties go to the smaller levels, compared in order.
func (rs *robustSearcher) better(a policies.Policy, ca *candidate, b *policies.Policy, cb *candidate) bool {
	if !rs.feasible(ca) {
		return false
	}
	if b == nil {
		return true
	}
	if ca.mean != cb.mean {
		return ca.mean < cb.mean
	}
	if a.ReorderPoint != b.ReorderPoint {
		return a.ReorderPoint < b.ReorderPoint
	}
	if a.OrderUpTo != b.OrderUpTo {
		return a.OrderUpTo < b.OrderUpTo
	}
	return a.OrderMultiple < b.OrderMultiple
}

// robustSearch finds the robust policy over the used resamples of res.
//
// Base-stock: each model's cost is convex in S and its fill rate rises
// with S (backorder mode), so the mean cost is convex and the share of
// models meeting the floor rises with S. Every model's own optimum meets
// its floor and lies at or below hi, the largest of them, so at hi the
// share is 1 and the mean cost does not fall above hi: scanning down from
// hi while the level stays feasible and the mean cost does not rise finds
// the exact robust optimum (global in backorder mode; in lost mode, where
// convexity is not proven, the best of the scan).
//
// s-S and s-nQ: every candidate in the box spanned by the resampled
// models' optima (reorder points times order-up-to levels or multiples)
// is considered (evaluated on every model unless it provably cannot be
// the best: see get), after the plug-in policy and the median levels, then
// a compass search moves from the best
// of the box by unit steps of both levels (eight neighbours) while a
// feasible neighbour is cheaper. The result is the best of the box and a
// local optimum beyond it (the mean of costs that are each well behaved
// need not be unimodal). Where the box alone would pass the evaluation
// budget, the compass search starts from the plug-in recommendation and
// from the box's median corner instead.
func robustSearch(res *Result, sys inventory.System, kind policies.Kind, opt Options, conf float64) (*Robust, error) {
	rs := &robustSearcher{mode: sys.Mode, eval: opt.Search.Eval, floor: opt.Search.MinFillRate, conf: conf,
		cap: opt.MaxRobustEvaluations, memo: map[policies.Policy]*candidate{}}
	if rs.cap <= 0 {
		rs.cap = DefaultMaxRobustEvaluations
	}
	rs.workers = opt.Workers
	if rs.workers <= 0 {
		rs.workers = runtime.GOMAXPROCS(0)
	}
	var opts []policies.Policy
	for i := range res.Resamples {
		r := &res.Resamples[i]
		if r.Err != nil {
			continue
		}
		s := sys
		s.Demand = r.Demand
		rs.sys = append(rs.sys, s)
		opts = append(opts, r.Optimum)
	}
	lo, hi := opts[0], opts[0]
	for _, p := range opts[1:] {
		lo.ReorderPoint, hi.ReorderPoint = min(lo.ReorderPoint, p.ReorderPoint), max(hi.ReorderPoint, p.ReorderPoint)
		lo.OrderUpTo, hi.OrderUpTo = min(lo.OrderUpTo, p.OrderUpTo), max(hi.OrderUpTo, p.OrderUpTo)
		lo.OrderMultiple, hi.OrderMultiple = min(lo.OrderMultiple, p.OrderMultiple), max(hi.OrderMultiple, p.OrderMultiple)
	}
	var best *policies.Policy
	var bc *candidate
	consider := func(p policies.Policy) (*candidate, error) {
		limit := math.Inf(1)
		if bc != nil {
			limit = bc.mean
		}
		c := rs.get(p, true, limit)
		if ce, ok := c.err.(errCap); ok {
			return c, ce
		}
		if rs.better(p, c, best, bc) {
			q := p
			best, bc = &q, c
		}
		return c, nil
	}
	guarantee := ""
	switch kind {
	case policies.BaseStock:
		prev := (*candidate)(nil)
		for S := hi.OrderUpTo; ; S-- {
			c, err := consider(policies.Policy{Kind: kind, OrderUpTo: S})
			if err != nil {
				return nil, err
			}
			if !rs.feasible(c) || (prev != nil && c.mean > prev.mean) {
				break
			}
			prev = c
		}
		guarantee = "exact: global optimum of the mean cost under the share constraint (the mean of convex costs is convex)"
		if sys.Mode == inventory.Lost {
			guarantee = "best of a scan down from the largest resampled optimum (lost-sales cost not proven convex)"
		}
	case policies.SS, policies.SNQ:
		second := func(p *policies.Policy) *int {
			if kind == policies.SS {
				return &p.OrderUpTo
			}
			return &p.OrderMultiple
		}
		loB, hiB := *second(&lo), *second(&hi)
		box := (hi.ReorderPoint - lo.ReorderPoint + 1) * (hiB - loB + 1)
		mid := policies.Policy{Kind: kind, ReorderPoint: int(res.ReorderPoint.P50)}
		if kind == policies.SS {
			mid.OrderUpTo = int(res.OrderUpTo.P50)
		} else {
			mid.OrderMultiple = int(res.OrderMultiple.P50)
		}
		// The plug-in policy and the median levels first: a good early
		// best lets the box prune most candidates after a few models.
		for _, p := range []policies.Policy{res.Point.Policy, mid} {
			if _, err := consider(p); err != nil {
				return nil, err
			}
		}
		if box*len(rs.sys) <= rs.cap/2 {
			for s := lo.ReorderPoint; s <= hi.ReorderPoint; s++ {
				for v := loB; v <= hiB; v++ {
					p := policies.Policy{Kind: kind, ReorderPoint: s}
					*second(&p) = v
					if _, err := consider(p); err != nil {
						return nil, err
					}
				}
			}
			guarantee = fmt.Sprintf("best of the %d candidates spanned by the resampled optima, and a local optimum beyond (compass search)", box)
		} else {
			guarantee = "local optimum (compass search from the plug-in policy and the median levels; the box of resampled optima was too large to evaluate whole)"
		}
		if best == nil {
			// Nothing feasible yet: raise both levels from the top corner.
			p := hi
			p.Kind = kind
			for i := 0; best == nil && i < 1000; i++ {
				if _, err := consider(p); err != nil {
					return nil, err
				}
				p.ReorderPoint++
				if kind == policies.SS {
					p.OrderUpTo++
				}
			}
		}
		for moved := best != nil; moved; {
			moved = false
			cur := *best
			for ds := -1; ds <= 1; ds++ {
				for dv := -1; dv <= 1; dv++ {
					if ds == 0 && dv == 0 {
						continue
					}
					p := cur
					p.ReorderPoint += ds
					*second(&p) += dv
					before := best
					if _, err := consider(p); err != nil {
						return nil, err
					}
					if best != before {
						moved = true
					}
				}
			}
		}
	default:
		return nil, fmt.Errorf("policy %q: want base-stock, s-S or s-nQ", kind)
	}
	if best == nil {
		return nil, fmt.Errorf("no candidate meets min_fill_rate %g in %g of the %d resampled models (%d candidates evaluated)", rs.floor, conf, len(rs.sys), len(rs.memo))
	}
	pt, err := policies.Evaluate(sys, *best, opt.Search.Eval)
	if err != nil {
		return nil, fmt.Errorf("evaluate %v on the point model: %w", *best, err)
	}
	plug := rs.get(res.Point.Policy, false, 0)
	if plug.err != nil {
		return nil, plug.err
	}
	r := &Robust{Policy: *best, MeanCost: bc.mean, FillRate: spread(append([]float64(nil), bc.fill...)),
		FloorShare: bc.share, Point: pt.Figures, PlugInMeanCost: plug.mean, PlugInFloorShare: plug.share,
		ExtraCost: bc.mean - plug.mean, Candidates: len(rs.memo), Evaluations: rs.evals, Guarantee: guarantee}
	return r, nil
}
