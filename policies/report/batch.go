package report

import (
	"fmt"
	"math"
	"runtime"
	"sort"
	"sync"

	"ergostock/inventory"
	"ergostock/inventory/history"
	"ergostock/policies"
	"ergostock/policies/batch"
)

// DefaultTargets are the common fill-rate targets of the exchange curve.
var DefaultTargets = []float64{0.90, 0.95, 0.98, 0.99, 0.995, 0.999}

// Exchange-curve searches of lost-sales items use smaller limits than a
// single evaluation, to keep the page quick: an item whose chain would be
// larger is left out of the curve (and listed), and a search stops after
// fewer evaluations.
const (
	exchangeMaxStates      = 50_000
	exchangeMaxEvaluations = 60
)

// BatchInput is what the page for a batch is built from.
type BatchInput struct {
	ResultsFile string
	Rows        []ResultRow
	// Period is the planning period of the results (day, week or month),
	// "" when the results file does not say.
	Period string
	// ItemsFile and Items, when given, let the page re-optimise every
	// item under common fill-rate targets for the exchange curve.
	ItemsFile string
	Items     []batch.Item
	// History, when given, adds the demand-pattern map (ADI against CV²).
	History *history.History
	Targets []float64 // nil means DefaultTargets
	Workers int       // 0 means all cores
	Version string
}

// exchange is the computed exchange curve.
type exchange struct {
	Points     []exchangePoint
	Batch      *exchangePoint // the batch's own recommendations
	Measure    string         // what the y axis sums
	Axis       string         // the y axis label
	UnitCost   bool           // investment at unit cost (else holding cost)
	Items      int            // items on the curve
	LeftOut    []string       // items left out, with the reason
	Optimized  int            // searches run (the rest reuse an answer that meets the target)
	TargetsBad []float64      // targets dropped because no item set met them
}

// BatchPage is the gathered and rendered content of a batch page.
type BatchPage struct {
	In       BatchInput
	Exchange *exchange
	Patterns []patternSaving
	Scatter  []patternPoint
	Charts   []Chart
	Notes    []string
	optimize optFunc
}

// BuildBatch gathers the batch page: totals, the exchange curve (when the
// items are given), the saving by pattern, and renders the charts.
func BuildBatch(in BatchInput) (*BatchPage, error) {
	return buildBatch(in, policies.Optimize)
}

func buildBatch(in BatchInput, opt optFunc) (*BatchPage, error) {
	if len(in.Rows) == 0 {
		return nil, fmt.Errorf("%s: no items", in.ResultsFile)
	}
	if in.Targets == nil {
		in.Targets = DefaultTargets
	}
	for _, t := range in.Targets {
		if !(t > 0 && t < 1) {
			return nil, fmt.Errorf("fill-rate target %v: want a fraction strictly between 0 and 1", t)
		}
	}
	if in.Workers <= 0 {
		in.Workers = runtime.GOMAXPROCS(0)
	}
	pg := &BatchPage{In: in, optimize: opt}
	pg.Patterns = savingByPattern(in.Rows)
	if in.Items != nil {
		pg.Exchange = pg.exchangeCurve()
	}
	if in.History != nil {
		pg.Scatter = patternMap(in.History)
	}
	pg.render()
	return pg, nil
}

// patternOrder is the order of the patterns on the charts.
var patternOrder = map[string]int{"smooth": 0, "erratic": 1, "intermittent": 2, "lumpy": 3}

// savingByPattern totals the saving of the items with a current policy by
// demand pattern; items without a pattern are grouped as "unknown".
func savingByPattern(rows []ResultRow) []patternSaving {
	by := map[string]*patternSaving{}
	for _, r := range rows {
		if r.Saving == nil {
			continue
		}
		p := r.Pattern
		if p == "" {
			p = "unknown"
		}
		s := by[p]
		if s == nil {
			s = &patternSaving{Pattern: p}
			by[p] = s
		}
		s.Items++
		s.Saving += *r.Saving
	}
	var out []patternSaving
	for _, s := range by {
		out = append(out, *s)
	}
	sort.Slice(out, func(i, j int) bool {
		oi, ok := patternOrder[out[i].Pattern]
		if !ok {
			oi = 10
		}
		oj, ok := patternOrder[out[j].Pattern]
		if !ok {
			oj = 10
		}
		if oi != oj {
			return oi < oj
		}
		return out[i].Pattern < out[j].Pattern
	})
	return out
}

// exchangeCurve re-optimises every usable item under each common fill-rate
// target and sums investment and demand-weighted fill rate per target
// (Silver, Pyke & Thomas 2017, the exchange curve of aggregate service
// against aggregate inventory). An item that cannot be optimised at every
// target is left out of all points, so the points compare the same items.
func (pg *BatchPage) exchangeCurve() *exchange {
	in := pg.In
	ex := &exchange{UnitCost: true}
	byRow := map[string]*ResultRow{}
	for i := range in.Rows {
		r := &in.Rows[i]
		if _, dup := byRow[r.Key()]; !dup {
			byRow[r.Key()] = r
		}
	}
	type job struct {
		sys   inventory.System
		kind  policies.Kind
		row   *ResultRow
		sku   string
		floor float64 // the item's own fill-rate floor
	}
	var jobs []job
	for _, it := range in.Items {
		r := byRow[it.Key()]
		name := itemName(it)
		switch {
		case it.Err != nil:
			continue // already listed among the errors
		case r == nil:
			ex.LeftOut = append(ex.LeftOut, fmt.Sprintf("%s: not in %s", name, in.ResultsFile))
			continue
		case r.Figures == nil || r.Demand == "":
			continue // failed in the batch: listed among the errors
		}
		d, err := inventory.Parse(r.Demand)
		if err != nil {
			ex.LeftOut = append(ex.LeftOut, fmt.Sprintf("%s: %s line %d: %v", name, in.ResultsFile, r.Line, err))
			continue
		}
		sys := it.System
		sys.Demand = d
		kind := it.Kind
		if kind == "" {
			kind = batch.DefaultKind(sys)
		}
		if sys.UnitCost <= 0 {
			ex.UnitCost = false
		}
		jobs = append(jobs, job{sys, kind, r, name, it.MinFillRate})
	}
	nt := len(in.Targets)
	res := make([]*policies.Optimum, len(jobs)*nt)
	errs := make([]error, len(jobs)*nt)
	order := make([]int, nt) // targets in increasing order
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool { return in.Targets[order[a]] < in.Targets[order[b]] })
	searches := make([]int, len(jobs))
	var wg sync.WaitGroup
	next := make(chan int)
	for range max(1, min(in.Workers, len(jobs))) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for ji := range next {
				j := jobs[ji]
				// In backorder mode the base-stock and s-S searches are
				// exact: the cheapest policy under a floor f that also
				// meets a higher target t is the cheapest under t, as the
				// policies meeting t are among those meeting f. So the
				// batch's own policy (found under the item's floor) and
				// the answer for a lower target are reused when they
				// already meet the target.
				exact := j.sys.Mode == inventory.Backorder && (j.kind == policies.BaseStock || j.kind == policies.SS)
				var prev *policies.Optimum
				// The lost-sales searches of one item under the targets
				// share their chain evaluations (the results are those of
				// searches run alone).
				cache := policies.NewEvalCache()
				// and all of its searches the lead-time demand laws.
				tables := policies.NewDemandTables()
				for _, t := range order {
					k := ji*nt + t
					target := in.Targets[t]
					if exact && prev != nil && prev.Figures.FillRate >= target {
						res[k] = prev
						continue
					}
					if exact && prev == nil && j.floor <= target && j.row.Policy != nil && j.row.Policy.Kind == j.kind && j.row.Figures.FillRate >= target {
						res[k] = &policies.Optimum{Evaluation: policies.Evaluation{Policy: *j.row.Policy, Figures: *j.row.Figures}}
						prev = res[k]
						continue
					}
					so := policies.SearchOptions{MinFillRate: target, Cache: cache}
					so.Eval.Tables = tables
					if j.sys.Mode == inventory.Lost {
						so.Eval.MaxStates, so.MaxEvaluations = exchangeMaxStates, exchangeMaxEvaluations
					}
					o, err := pg.optimize(j.sys, j.kind, so)
					searches[ji]++
					res[k], errs[k] = o, err
					if err == nil {
						prev = o
					}
				}
			}
		}()
	}
	// Lost-sales items first: their searches are the long ones.
	start := make([]int, 0, len(jobs))
	for ji, j := range jobs {
		if j.sys.Mode == inventory.Lost {
			start = append(start, ji)
		}
	}
	for ji, j := range jobs {
		if j.sys.Mode != inventory.Lost {
			start = append(start, ji)
		}
	}
	for _, ji := range start {
		next <- ji
	}
	close(next)
	wg.Wait()
	for _, n := range searches {
		ex.Optimized += n
	}
	ex.Measure = "inventory investment (sum of unit cost × mean on hand)"
	ex.Axis = "inventory investment at unit cost"
	if !ex.UnitCost {
		ex.Axis = "holding cost per period"
		ex.Measure = "holding cost per period (sum of h × mean on hand; some items have no unit cost)"
	}
	value := func(sys inventory.System, f inventory.Figures) float64 {
		if ex.UnitCost {
			return sys.UnitCost * f.MeanOnHand
		}
		return sys.Holding * f.MeanOnHand
	}
	pts := make([]exchangePoint, nt)
	var demand, bInv, bFill float64
	for ji, j := range jobs {
		var bad error
		for t := range nt {
			if errs[ji*nt+t] != nil {
				bad = fmt.Errorf("target %s: %w", pct(in.Targets[t]), errs[ji*nt+t])
				break
			}
		}
		if bad != nil {
			ex.LeftOut = append(ex.LeftOut, fmt.Sprintf("%s: %v", j.sku, bad))
			continue
		}
		ex.Items++
		w := j.sys.Demand.Mean()
		demand += w
		for t := range nt {
			f := res[ji*nt+t].Figures
			pts[t].Investment += value(j.sys, f)
			pts[t].FillRate += w * f.FillRate
		}
		bInv += value(j.sys, *j.row.Figures)
		bFill += w * j.row.Figures.FillRate
	}
	if ex.Items == 0 || demand == 0 {
		return ex
	}
	for t := range nt {
		pts[t].FillRate /= demand
		pts[t].Label = percent(in.Targets[t])
	}
	ex.Points = pts
	ex.Batch = &exchangePoint{Label: "the batch's recommendations (item floors as in the items file)",
		FillRate: bFill / demand, Investment: bInv}
	return ex
}

// patternPoint is one SKU on the demand-pattern map.
type patternPoint struct {
	SKU      string
	ADI, CV2 float64
	Pattern  string
}

// patternMap summarises every SKU of the history with demand.
func patternMap(h *history.History) []patternPoint {
	var out []patternPoint
	for _, k := range h.SKUs {
		if len(k.Demand) == 0 {
			continue
		}
		s := history.Summarize(k.Demand)
		if math.IsNaN(s.ADI) || math.IsNaN(s.CV2) {
			continue
		}
		name := k.SKU
		if k.Location != "" {
			name += " @ " + k.Location
		}
		out = append(out, patternPoint{SKU: name, ADI: s.ADI, CV2: s.CV2, Pattern: string(s.Pattern)})
	}
	return out
}

// itemName is an item's SKU, with its location after " @ " when the items
// file has a location column, as ResultRow.Name.
func itemName(it batch.Item) string {
	if it.Location == "" {
		return it.SKU
	}
	return it.SKU + " @ " + it.Location
}
