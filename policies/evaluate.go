package policies

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sort"
	"strconv"

	"ergostock/chain"
	"ergostock/inventory"
)

// DefaultMaxStates is the largest lost-sales chain built by default.
const DefaultMaxStates = 5_000_000

// Options tune an evaluation. The zero value uses the defaults.
type Options struct {
	// MaxStates is the largest chain to build (lost-sales states, or
	// inventory positions in backorder mode; at most 2^31-1); 0 means
	// DefaultMaxStates. Chains are refused before allocation when a bound
	// on their size exceeds it, or when a bound on their transitions
	// exceeds 32 times it.
	MaxStates int
	Chain     chain.Options // solver choice for the chain
	// Exhaustive stores every transition of positive probability; by
	// default those below 1e-20 are folded: in the inventory-position chain
	// of s-S and base-stock they join the restart at top, in the lost-sales
	// chain the lump to on-hand 0 (see Evaluation.Neglected). Per-state
	// expectations are never folded.
	Exhaustive bool
	// Levels asks for Evaluation.Levels, the stationary distribution of the
	// stock level at the end of a period (off by default: batch runs do not
	// pay for it).
	Levels bool
	// Context, when not nil, bounds the work: chain construction, the
	// stationary solve (it is passed on to Chain.Context when that is nil)
	// and the searches check it and return its error, wrapped, once it is
	// done. A batch gives each item a deadline through it.
	Context context.Context
	// Tables, when not nil, keeps the lead-time demand laws of the system
	// for other evaluations and searches of it (see DemandTables); it
	// changes no figure. Optimize makes its own when it is nil, shared by
	// its search and the evaluation of its optimum.
	Tables *DemandTables
}

// Evaluation is what a policy delivers, with the chain it came from.
type Evaluation struct {
	Policy      Policy
	Figures     inventory.Figures
	States      int               // states of the solved chain
	Diagnostics chain.Diagnostics // of the stationary solve
	// Neglected is the largest probability mass that any one truncation
	// left out or placed approximately (each is bounded separately): the
	// tail beyond a truncated convolution (lead-time demand of families
	// without a closed form for sums), the transitions below 1e-20 folded
	// (largest per row: into the restart of the s-S and base-stock chain in
	// backorder mode, into the lump to on-hand 0 in lost mode),
	// the residues of demand beyond P(D > K) <= 1e-30 for s-nQ, and the
	// remainders of the loss-function sums (below 1e-300 at the low end).
	Neglected float64
	// FlowBalance is |E[units ordered per period] - E[units served per
	// period]|, with the left side summed directly over the chain's
	// transitions and the right side E[D] (backorder mode) or
	// E[min(D, on-hand after the arrival)] (lost mode): a check of the
	// long-run flow balance, zero up to round-off.
	FlowBalance float64
	// Levels is the stationary distribution of net inventory (backorder
	// mode) or on-hand (lost mode) at the end of a period; nil unless
	// Options.Levels is set.
	Levels *LevelDistribution
}

// Evaluate computes every figure of policy p on system sys exactly from the
// stationary distribution of the chain the policy induces.
//
// Backorder mode: the chain is that of inventory position Y just after
// review, on s+1..top, started at top. With X_n the demand over n periods,
// on-hand is E[(Y-X_{L+1})^+], backorders E[(X_{L+1}-Y)^+], stockout
// probability P(X_{L+1} > Y), fill rate E[min(D, (Y-X_L)^+)]/E[D], order
// frequency E[P(D >= Y-s)], and E[D] units are ordered per period. The s-S
// and base-stock chain moves only down or restarts at top and is solved
// by forward substitution; the s-nQ chain is doubly stochastic (uniform
// law; Hadley & Whitin 1963, Analysis of Inventory Systems).
//
// Lost mode: the chain is that of (on-hand x, outstanding orders o_1..o_L)
// at review, over the states reachable from (top, 0, ..., 0), solved by
// sparse Gauss-Seidel (up to 300 states by the solver's automatic choice).
// With a the on-hand after the arrival and q the order, on-hand is
// E[(a-D)^+], lost sales E[(D-a)^+], stockout P(D > a), fill rate
// 1 - E[lost]/E[D], order frequency P(q > 0).
//
// Tails of demand are taken from the closed forms of the distribution:
// jumps past the reorder point (or past the stock on hand) are one lumped
// transition, so no demand tail is truncated; only transitions of
// negligible probability are folded (see Options.Exhaustive and
// Evaluation.Neglected). Solver diagnostics (residual, global balance)
// come with every answer.
//
// Random lead times and review periods (inventory.System's LeadTimeLaw,
// LeadTimeModel and ReviewPeriod; SPEC section 4), backorder mode: the
// chain is that of the position Y at reviews, moved by the demand between
// reviews D_R. Under sequential deliveries (Kaplan 1970) a period's net
// inventory is Y - X with X the demand over V + f + 1 periods, V the
// lead-time law and f uniform on 0..R-1 (the phase of the period in the
// review cycle), independent of Y; the stock before its demand is Y less
// the demand over V + f periods (inventory.MixedDemand). The formulas
// above hold with X_L and X_{L+1} replaced by these mixtures: each is
// linear in the law of X. The order frequency and the order cost are per
// period: the probability of an order at a review divided by R. Under
// independent lead times (orders may cross) base-stock is exact (see
// independentPipeline); other policies are refused with ErrNotExact. In
// lost mode a lead-time law (sequential deliveries) or R > 1 is evaluated
// on the chain of on-hand and the orders outstanding by age, observed at
// the reviews, with the transitions of a whole review cycle and the
// figures averaged over its R periods (see lostTimed); independent lead
// times are refused with ErrNotExact there. A one-point law and R = 1 give
// the fixed-lead-time figures.
//
// Errors name the policy and, for inputs, are *inventory.FieldError values
// naming the field; a chain larger than Options.MaxStates is refused with a
// *SizeError before any memory is taken.
func Evaluate(sys inventory.System, p Policy, opt Options) (*Evaluation, error) {
	if err := sys.Validate(); err != nil {
		return nil, err
	}
	if err := p.Validate(sys.Mode); err != nil {
		return nil, err
	}
	if opt.MaxStates == 0 {
		opt.MaxStates = DefaultMaxStates
	}
	if opt.MaxStates < 0 {
		return nil, fmt.Errorf("state limit %d: want a count >= 1 (0 for the default %d)", opt.MaxStates, DefaultMaxStates)
	}
	// States are indexed by int32.
	opt.MaxStates = min(opt.MaxStates, math.MaxInt32)
	if opt.Chain.Context == nil {
		opt.Chain.Context = opt.Context
	}
	if err := checkDemand(sys.Demand, opt.MaxStates); err != nil {
		return nil, err
	}
	var (
		e   *Evaluation
		err error
	)
	if sys.Mode == inventory.Lost {
		e, err = evaluateLostIn(sys, p, opt, nil)
	} else {
		e, err = evaluateBackorder(sys, p, opt)
	}
	if err != nil {
		return nil, err
	}
	if err := checkFigures(sys, e); err != nil {
		return nil, err
	}
	return e, nil
}

// ctxErr returns the error of ctx, or nil for a nil or live context.
func ctxErr(ctx context.Context) error {
	if ctx == nil {
		return nil
	}
	return ctx.Err()
}

// mag returns |x| as a float64 (no overflow at math.MinInt).
func mag(x int) float64 { return math.Abs(float64(x)) }

// SupportEps is the tail probability at which the width of a demand law's
// support is measured for the state limit (see checkDemand).
const SupportEps = 1e-12

// checkDemand refuses a demand law whose support is too wide for the state
// limit: the units between its SupportEps quantile and Bound(SupportEps)
// (where all but 2e-12 of the mass lies) number more than limit. Every
// table over the positions a policy visits spans at least that range, so
// such a law cannot be planned in these units; the message suggests larger
// ones.
func checkDemand(d inventory.Distribution, limit int) error {
	hi := d.Bound(SupportEps)
	lo := sort.Search(hi+1, func(k int) bool { return d.CDF(k) > SupportEps })
	if w := span(lo, hi); w > float64(limit) {
		return &SizeError{Chain: "tables of demand between its 1e-12 quantiles (" + strconv.Itoa(lo) + ".." + strconv.Itoa(hi) + ")",
			Bound: w, Limit: limit, What: "entries", Input: "demand", Value: d.String(), Bytes: w * bytesPerPosition,
			Reason: "its support is too wide for the state limit (plan in larger units, e.g. packs of 100)"}
	}
	return nil
}

// checkFigures refuses an evaluation whose figures are not finite or are
// negative: costs of rates near the float64 range overflow (1e308 times a
// mean on hand of 10 is +Inf). It names the cost rates, whose size is the
// only way a valid system reaches an overflow.
func checkFigures(sys inventory.System, e *Evaluation) error {
	for _, f := range e.Figures.Fields() {
		if isFinite(f.Value) && f.Value >= 0 {
			continue
		}
		if costField(sys, f.Name) == "" {
			return fmt.Errorf("%v: %s is %v, not a finite figure >= 0: %w", e.Policy, f.Label, f.Value, ErrNonFinite)
		}
		return &inventory.FieldError{Field: costField(sys, f.Name), Value: costValue(sys, f.Name),
			Want: fmt.Sprintf("cost rates whose figures fit a float64: %s of %v is %v (keep each rate times its quantity below 1e308)", f.Label, e.Policy, f.Value),
			Err:  ErrOverflow}
	}
	for _, d := range []struct {
		name string
		v    float64
	}{{"residual", e.Diagnostics.Residual}, {"balance", e.Diagnostics.Balance}, {"neglected mass", e.Neglected}, {"flow balance", e.FlowBalance}} {
		if !isFinite(d.v) {
			return fmt.Errorf("%v: the solver's %s is %v: %w", e.Policy, d.name, d.v, ErrNonFinite)
		}
	}
	return nil
}

// ErrNonFinite is wrapped by the error of an evaluation whose physical
// figures or diagnostics are not finite (a failed solve).
var ErrNonFinite = errors.New("the evaluation gave a non-finite figure")

// ErrOverflow is wrapped by the errors of figures that overflow.
var ErrOverflow = errors.New("figures beyond the float64 range")

// costField names the cost rate behind a figure (for messages).
func costField(sys inventory.System, figure string) string {
	switch figure {
	case "holding_cost":
		return "holding_cost"
	case "shortage_cost":
		return "shortage_cost"
	case "ordering_cost":
		return "order_cost"
	case "purchase_cost":
		return "unit_cost"
	case "total_cost":
	default:
		return ""
	}
	// The total: the largest rate.
	field, v := "holding_cost", sys.Holding
	for _, c := range []struct {
		f string
		v float64
	}{{"shortage_cost", sys.Shortage}, {"order_cost", sys.OrderCost}, {"unit_cost", sys.UnitCost}} {
		if c.v > v {
			field, v = c.f, c.v
		}
	}
	return field
}

func costValue(sys inventory.System, figure string) string {
	var v float64
	switch costField(sys, figure) {
	case "holding_cost":
		v = sys.Holding
	case "shortage_cost":
		v = sys.Shortage
	case "order_cost":
		v = sys.OrderCost
	case "unit_cost":
		v = sys.UnitCost
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

// leadTimeDemand returns the law of the demand over n periods (nil for
// n = 0, the law concentrated at 0) and the mass its computation neglected.
func leadTimeDemand(d inventory.Distribution, n int) (inventory.Distribution, float64, error) {
	switch n {
	case 0:
		return nil, 0, nil
	case 1:
		return d, 0, nil
	}
	x, err := inventory.Sum(d, n)
	if err != nil {
		return nil, 0, fmt.Errorf("demand over %d periods: %w", n, err)
	}
	return x, inventory.Neglected(x), nil
}
