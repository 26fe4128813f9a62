package batch

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime/debug"
	"sort"
	"strings"

	"ergostock/inventory"
	"ergostock/policies"
)

// Fitted is the demand model of one SKU fitted from its history.
type Fitted struct {
	Demand   inventory.Distribution
	Pattern  string   // smooth, erratic, intermittent or lumpy; "" if none
	Warnings []string // about the history and the fit
	// Series is the per-period demand the model was fitted to (for the
	// resampling of --uncertainty); nil when not kept.
	Series []int
}

// Planner runs the plan of one item: the demand model (the item's demand
// column, else the fit of its history), the system, the cheapest policy of
// the item's type under its fill-rate floor, and the cost of the policy in
// use. The functions are fields so that tests can stand in for them.
type Planner struct {
	// Fit returns the fitted demand of a SKU; its errors (no history, bad
	// rows) fail the item and should name the history file and line.
	Fit func(sku string) (*Fitted, error)
	// Pattern, if not nil, gives the demand pattern of a SKU's history for
	// the items whose demand column replaces the fit.
	Pattern func(sku string) string
	// Optimize and Evaluate default to policies.Optimize and
	// policies.Evaluate when nil.
	Optimize func(inventory.System, policies.Kind, policies.SearchOptions) (*policies.Optimum, error)
	Evaluate func(inventory.System, policies.Policy, policies.Options) (*policies.Evaluation, error)
	Options  policies.Options // for every evaluation
	// Uncertainty, when not nil, runs after a successful plan of an item
	// (see UncertaintyStep) and adds its cells and warnings to the row;
	// fitted is nil when the item's demand column replaced the fit.
	Uncertainty func(ctx context.Context, it Item, sys inventory.System, fitted *Fitted, row *Row)
}

// DefaultKind is the policy type searched when an item names none: s-S when
// orders carry a fixed cost, else base-stock (which is optimal without one).
func DefaultKind(sys inventory.System) policies.Kind {
	if sys.OrderCost > 0 {
		return policies.SS
	}
	return policies.BaseStock
}

// Plan plans one item with no deadline; see PlanContext.
func (p *Planner) Plan(it Item) Row { return p.PlanContext(context.Background(), it) }

// PlanContext plans one item. It never panics: a failure of any step,
// including a panic of a step, is the row's Err, and the other items are
// unaffected. ctx bounds the work (it is passed to the engine as
// policies.Options.Context); when ctx is an item context of Run whose
// deadline passed, the row's Err is a *TimeoutError naming the step.
// A row whose figures are not finite and non-negative (an overflow) fails
// too, with the first such figure named.
func (p *Planner) PlanContext(ctx context.Context, it Item) (row Row) {
	row = Row{Item: it.Index, SKU: it.SKU, Carried: it.Carried}
	defer func() {
		if v := recover(); v != nil {
			row.Policy, row.Figures, row.CurrentTotalCost, row.Current, row.CurrentFillRate = nil, nil, nil, nil, nil
			row.Err = &PanicError{Value: v, Stack: debug.Stack()}
		}
		if row.Err != nil {
			if te := timeoutOf(ctx); te != nil {
				row.Policy, row.Figures, row.CurrentTotalCost, row.Current, row.CurrentFillRate = nil, nil, nil, nil, nil
				row.Err = te
			}
			return
		}
		if err := row.checkFinite(); err != nil {
			row.Policy, row.Figures, row.CurrentTotalCost, row.Current, row.CurrentFillRate = nil, nil, nil, nil, nil
			row.Err = err
		}
	}()
	if it.Err != nil {
		row.Err = it.Err
		return row
	}
	row.Location = it.Location
	row.Warnings = append(row.Warnings, it.Warnings...)
	if strings.ContainsAny(it.SKU, "\r\n") {
		row.Err = fmt.Errorf("sku %q: want a SKU without line breaks", it.SKU)
		return row
	}
	sys := it.System
	var fitted *Fitted
	row.SetTiming(sys)
	if sys.Demand != nil && p.Pattern != nil {
		SetStage(ctx, "reading the demand pattern")
		row.Pattern = p.Pattern(it.Key())
	}
	if sys.Demand == nil {
		if p.Fit == nil {
			row.Err = errors.New("no demand column and no history")
			return row
		}
		SetStage(ctx, "fitting the demand history")
		f, err := p.Fit(it.Key())
		if err != nil {
			row.Err = err
			return row
		}
		sys.Demand = f.Demand
		fitted = f
		row.Pattern = f.Pattern
		row.Warnings = append(row.Warnings, f.Warnings...)
	}
	if sys.Demand == nil {
		row.Err = errors.New("no demand model")
		return row
	}
	row.Demand = sys.Demand.String()
	row.DemandMean, row.DemandVariance = sys.Demand.Mean(), sys.Demand.Variance()
	if err := sys.Validate(); err != nil {
		if it.System.Demand != nil {
			err = &LineError{File: it.File, Line: it.Line, Err: err}
		} else {
			var fe *inventory.FieldError
			if errors.As(err, &fe) {
				err = fmt.Errorf("fitted %s %q: want %s", fe.Field, fe.Value, fe.Want)
			}
		}
		row.Err = err
		return row
	}
	opt := p.Options
	opt.Context = ctx
	// The search, the evaluation of its optimum and that of the current
	// policy share the item's lead-time demand laws: computed once.
	opt.Tables = policies.NewDemandTables()

	kind := it.Kind
	if kind == "" {
		kind = DefaultKind(sys)
	}
	optimize, evaluate := p.Optimize, p.Evaluate
	if optimize == nil {
		optimize = policies.Optimize
	}
	if evaluate == nil {
		evaluate = policies.Evaluate
	}
	SetStage(ctx, "optimizing "+string(kind))
	best, err := optimize(sys, kind, policies.SearchOptions{MinFillRate: it.MinFillRate, Eval: opt})
	if err != nil {
		row.Err = fmt.Errorf("optimize %s: %w", kind, err)
		if errors.Is(err, policies.ErrNotExact) && sys.Model() == inventory.Independent {
			// The engine names its flags; say which cells answer it.
			row.Err = fmt.Errorf("%w; in the items file: policy base-stock, or lead_time_model sequential", row.Err)
		}
		return row
	}
	var cur *policies.Evaluation
	if it.Current != nil {
		SetStage(ctx, fmt.Sprintf("evaluating the current policy %v", *it.Current))
		cur, err = evaluate(sys, *it.Current, opt)
		if errors.Is(err, policies.ErrNotExact) {
			// The recommendation is exact; the policy in use is of a
			// type the engine does not evaluate exactly under these lead
			// times (s-S or s-nQ with orders that may cross): say so and
			// leave its cost and the saving empty rather than fail the
			// item.
			row.Warnings = append(row.Warnings, fmt.Sprintf("current policy %v not evaluated (current_total_cost and saving left empty): %v", *it.Current, err))
			cur, err = nil, nil
		}
		if err != nil {
			row.Err = fmt.Errorf("current policy %v: %w", *it.Current, err)
			return row
		}
	}

	pol, fig := best.Policy, best.Figures
	row.Policy, row.Figures = &pol, &fig
	row.States = best.States
	row.Residual = best.Diagnostics.Residual
	row.Balance = best.Diagnostics.Balance
	row.Neglected = best.Neglected
	row.Evaluated = best.Search.Evaluated
	if cur != nil {
		c, fr, p := cur.Figures.TotalCost, cur.Figures.FillRate, *it.Current
		row.CurrentTotalCost, row.CurrentFillRate, row.Current = &c, &fr, &p
		if it.MinFillRate > 0 && cur.Figures.FillRate < it.MinFillRate {
			row.Warnings = append(row.Warnings, fmt.Sprintf("current policy %v has fill rate %.4g, below min_fill_rate %g",
				*it.Current, cur.Figures.FillRate, it.MinFillRate))
		}
	}
	if p.Uncertainty != nil {
		SetStage(ctx, "resampling the history")
		p.Uncertainty(ctx, it, sys, fitted, &row)
	}
	return row
}

// checkFinite returns an error naming the first number of a planned row
// that is not finite or is negative: such a figure comes from inputs too
// large for double precision, and must not reach the results as a figure.
func (r *Row) checkFinite() error {
	bad := func(name string, v float64) error {
		if math.IsNaN(v) || math.IsInf(v, 0) || v < 0 {
			return fmt.Errorf("%s %v: want a finite figure >= 0 (the item's costs or demand are too large for double precision)", name, v)
		}
		return nil
	}
	if r.Demand != "" {
		if err := bad("demand_mean", r.DemandMean); err != nil {
			return err
		}
		if err := bad("demand_variance", r.DemandVariance); err != nil {
			return err
		}
	}
	if r.Figures != nil {
		for _, f := range r.Figures.Fields() {
			if err := bad(f.Name, f.Value); err != nil {
				return err
			}
		}
	}
	if r.CurrentTotalCost != nil {
		if err := bad("current_total_cost", *r.CurrentTotalCost); err != nil {
			return err
		}
		if r.CurrentFillRate != nil {
			if err := bad("current_fill_rate", *r.CurrentFillRate); err != nil {
				return err
			}
		}
		if v, ok := r.Saving(); ok && (math.IsNaN(v) || math.IsInf(v, 0)) {
			return fmt.Errorf("saving %v: want a finite figure (the item's costs are too large for double precision)", v)
		}
	}
	for _, d := range []struct {
		name string
		v    float64
	}{{"residual", r.Residual}, {"balance", r.Balance}, {"neglected", r.Neglected}} {
		if err := bad(d.name, d.v); err != nil {
			return err
		}
	}
	return nil
}

// FailedRow is the row of an item that failed with err before or outside
// its plan (a timeout, a panic caught by Run).
func FailedRow(it Item, err error) Row {
	return Row{Item: it.Index, SKU: it.SKU, Err: err, Carried: it.Carried}
}

// PlanAll plans items with Run: each item gets the budget opt.ItemTimeout,
// a panic or a timeout becomes the item's error, and emit gets the rows in
// the order of items.
//
// Items are started most expensive first (see CostOrder), unless
// opt.Order is set.
func (p *Planner) PlanAll(ctx context.Context, items []Item, opt RunOptions, emit func(r *Row) error) error {
	if opt.Order == nil {
		opt.Order = CostOrder(items)
	}
	return Run(ctx, len(items), opt,
		func(ctx context.Context, i int) Row { return p.PlanContext(ctx, items[i]) },
		func(i int, err error) Row { return FailedRow(items[i], err) },
		func(i int, r Row) error { return emit(&r) })
}

// CostOrder orders items for starting, most expensive first by a rough
// estimate of their work, ties in input order: a lost-sales item's chain
// grows like a power of its lead time (the state after the arrival has
// one order-up-to split over L stages), a backorder item's work is nearly
// flat in the lead time. Only the start order changes; the results do not.
func CostOrder(items []Item) []int {
	weight := func(it *Item) float64 {
		L := float64(it.System.LeadTime)
		if law := it.System.LeadTimeLaw; law != nil {
			L = law.Mean()
		}
		if it.System.Mode == inventory.Lost {
			return 1e3 * math.Pow(L+2, 4)
		}
		return 1 + L/8
	}
	order := make([]int, len(items))
	w := make([]float64, len(items))
	for i := range items {
		order[i] = i
		w[i] = weight(&items[i])
	}
	sort.SliceStable(order, func(a, b int) bool { return w[order[a]] > w[order[b]] })
	return order
}
