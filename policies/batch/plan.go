package batch

import (
	"errors"
	"fmt"

	"ergostock/inventory"
	"ergostock/policies"
)

// Fitted is the demand model of one SKU fitted from its history.
type Fitted struct {
	Demand   inventory.Distribution
	Pattern  string   // smooth, erratic, intermittent or lumpy; "" if none
	Warnings []string // about the history and the fit
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
}

// DefaultKind is the policy type searched when an item names none: s-S when
// orders carry a fixed cost, else base-stock (which is optimal without one).
func DefaultKind(sys inventory.System) policies.Kind {
	if sys.OrderCost > 0 {
		return policies.SS
	}
	return policies.BaseStock
}

// Plan plans one item. It never panics: a failure of any step, including
// a panic of a step, is the row's Err, and the other items are unaffected.
func (p *Planner) Plan(it Item) (row Row) {
	row = Row{Item: it.Index, SKU: it.SKU}
	defer func() {
		if v := recover(); v != nil {
			row.Policy, row.Figures, row.CurrentTotalCost = nil, nil, nil
			row.Err = fmt.Errorf("internal error: %v", v)
		}
	}()
	if it.Err != nil {
		row.Err = it.Err
		return row
	}
	sys := it.System
	if sys.Demand != nil && p.Pattern != nil {
		row.Pattern = p.Pattern(it.SKU)
	}
	if sys.Demand == nil {
		if p.Fit == nil {
			row.Err = errors.New("no demand column and no history")
			return row
		}
		f, err := p.Fit(it.SKU)
		if err != nil {
			row.Err = err
			return row
		}
		sys.Demand = f.Demand
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
	best, err := optimize(sys, kind, policies.SearchOptions{MinFillRate: it.MinFillRate, Eval: p.Options})
	if err != nil {
		row.Err = fmt.Errorf("optimize %s: %w", kind, err)
		return row
	}
	var cur *policies.Evaluation
	if it.Current != nil {
		cur, err = evaluate(sys, *it.Current, p.Options)
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
		c := cur.Figures.TotalCost
		row.CurrentTotalCost = &c
		if it.MinFillRate > 0 && cur.Figures.FillRate < it.MinFillRate {
			row.Warnings = append(row.Warnings, fmt.Sprintf("current policy %v has fill rate %.4g, below min_fill_rate %g",
				*it.Current, cur.Figures.FillRate, it.MinFillRate))
		}
	}
	return row
}
