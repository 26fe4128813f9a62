package policies

import (
	"fmt"
	"sync"

	"ergostock/inventory"
)

// ErrNotExact is wrapped by the refusals of a combination of lead-time
// model, review period, policy and mode that the exact engine does not
// evaluate (simulate answers it). It counts as a limit (exit status 1):
// errors.Is(err, inventory.ErrLimit) holds.
var ErrNotExact error = notExact{}

type notExact struct{}

func (notExact) Error() string {
	return "not evaluated exactly by the chain (estimate it with ergostock simulate)"
}
func (notExact) Is(target error) bool { return target == inventory.ErrLimit }

// timing holds the laws behind the figures of a backorder system:
//
//	pos  the demand between two reviews, D_R (R-fold sum of D), which drives
//	     the chain of the inventory position at reviews;
//	x0   the law X with the stock before a period's demand = Y - X;
//	x1   the law X with the net inventory at the end of a period = Y - X.
//
// Fixed lead time L and R = 1: pos = D, x0 = X_L, x1 = X_{L+1} (nil for the
// law concentrated at 0). Sequential deliveries (Kaplan 1970) with review
// period R: x0 and x1 are the demand over V + phase and V + phase + 1
// periods, V the lead-time law and phase uniform on 0..R-1 (see
// inventory.MixedDemand): the period's net inventory is the position after
// the last review all of whose orders have arrived, less the demand since
// that review. Independent lead times (base-stock only): see
// independentPipeline.
type timing struct {
	pos, x0, x1  inventory.Distribution
	negl0, negl1 float64
	r            int
}

// timingOf returns the timing of sys in backorder mode for a policy of kind
// k, refusing combinations the exact engine does not cover.
func timingOf(sys inventory.System, k Kind) (timing, error) {
	t := timing{pos: sys.Demand, r: sys.Review()}
	var err error
	if sys.FixedTiming() {
		if t.x0, t.negl0, err = leadTimeDemand(sys.Demand, sys.LeadTime); err != nil {
			return t, err
		}
		if t.x1, t.negl1, err = leadTimeDemand(sys.Demand, sys.LeadTime+1); err != nil {
			return t, err
		}
		return t, nil
	}
	if t.r > 1 {
		if t.pos, err = inventory.Sum(sys.Demand, t.r); err != nil {
			return t, fmt.Errorf("demand over the review period of %d periods: %w", t.r, err)
		}
	}
	if err := timingKindErr(sys, k); err != nil {
		return t, err
	}
	if sys.LeadTimeLaw != nil && sys.Model() == inventory.Independent && !onePointLaw(sys) {
		t.x0, t.x1, err = independentPipeline(sys, t.pos)
		if err != nil {
			return t, err
		}
	} else {
		xs, err := inventory.MixedDemands(sys, 0, 1)
		if err != nil {
			return t, err
		}
		t.x0, t.x1 = xs[0], xs[1]
	}
	t.negl0, t.negl1 = inventory.Neglected(t.x0), inventory.Neglected(t.x1)
	return t, nil
}

// timingKindErr refuses a policy kind other than base-stock under
// independent lead times (with more than one point), where orders may
// cross. It is the only way the timing of a system depends on the kind.
func timingKindErr(sys inventory.System, k Kind) error {
	if sys.FixedTiming() || k == BaseStock || sys.LeadTimeLaw == nil || sys.Model() != inventory.Independent || onePointLaw(sys) {
		return nil
	}
	return &inventory.FieldError{Field: "lead_time_model", Value: string(sys.Model()),
		Want: "sequential for " + string(k) + " (with independent lead times, where orders may cross, only base-stock in backorder mode is evaluated exactly: --policy base-stock)", Err: ErrNotExact}
}

// DemandTables keeps the laws of demand that the backorder figures of one
// system rest on (demand over the lead time and over the lead time plus one
// period, or their mixtures over a lead-time law and the review phase, and
// the demand between reviews), so that a search, the evaluation of its
// optimum and other evaluations of the same system compute them once: pass
// it as Options.Tables. The laws depend on the demand, the lead time (or
// its law and model) and the review period only, not on costs, mode or
// policy. A system with another demand or timing replaces the kept laws,
// so a wrong pairing costs time, never a wrong figure. It is safe for
// concurrent use (the laws are read-only once built).
type DemandTables struct {
	mu   sync.Mutex
	key  string
	t    timing
	err  error
	done bool
	// built counts the timings computed (a check for the tests that the
	// laws are computed once per item).
	built int
	// model is the backorder model of the last base-stock or s-S search,
	// for the next search of the same system and costs (modelKey).
	model    *boModel
	modelKey string
}

// searchModel returns the backorder model of sys for a search of kind k:
// the one kept by the last search of the same system, costs and state
// limit, or a new one. A kept model is handed out once (the next caller
// builds its own until it is kept again), so concurrent searches never
// share one. The models of base-stock and s-S searches are shared: their
// tables hold values computed point by point (G, fill and so at a level,
// the renewal mass m(j) by its recursion, the Zheng-Federgruen optimum),
// the same bits however far a table has grown. s-nQ searches read prefix
// sums, whose last digits depend on where a table starts, and build
// their own.
func (d *DemandTables) searchModel(sys inventory.System, opt Options, k Kind) (*boModel, error) {
	if d == nil || k == SNQ {
		return newBOModelKind(sys, opt, k)
	}
	if err := timingKindErr(sys, k); err != nil {
		return nil, err
	}
	key := modelKey(sys, opt)
	d.mu.Lock()
	mo := d.model
	if mo != nil && d.modelKey == key {
		d.model = nil
	} else {
		mo = nil
	}
	d.mu.Unlock()
	if mo == nil {
		return newBOModelKind(sys, opt, k)
	}
	mo.ctx, mo.ticks = opt.Context, 0
	return mo, nil
}

// keepModel keeps mo, the model of a finished base-stock or s-S search
// of sys, for the next search (see searchModel).
func (d *DemandTables) keepModel(sys inventory.System, opt Options, k Kind, mo *boModel) {
	if d == nil || k == SNQ || mo == nil {
		return
	}
	key := modelKey(sys, opt)
	d.mu.Lock()
	d.model, d.modelKey = mo, key
	d.mu.Unlock()
}

// modelKey identifies what a backorder search model depends on.
func modelKey(sys inventory.System, opt Options) string {
	return fmt.Sprintf("%s|%g|%g|%g|%g|%d", timingKey(sys), sys.Holding, sys.Shortage, sys.OrderCost, sys.UnitCost, opt.MaxStates)
}

// NewDemandTables returns empty tables.
func NewDemandTables() *DemandTables { return &DemandTables{} }

// timingKey identifies what the timing of a system depends on.
func timingKey(sys inventory.System) string {
	law := ""
	if sys.LeadTimeLaw != nil {
		law = sys.LeadTimeLaw.String()
	}
	return fmt.Sprintf("%s|%d|%s|%s|%d", sys.Demand, sys.LeadTime, law, sys.Model(), sys.Review())
}

// timing returns timingOf(sys, k), from the tables when they hold the laws
// of sys.
func (d *DemandTables) timing(sys inventory.System, k Kind) (timing, error) {
	if d == nil {
		return timingOf(sys, k)
	}
	if err := timingKindErr(sys, k); err != nil {
		return timing{}, err
	}
	key := timingKey(sys)
	d.mu.Lock()
	defer d.mu.Unlock()
	if !d.done || d.key != key {
		d.t, d.err = timingOf(sys, k)
		d.key, d.done = key, true
		d.built++
	}
	return d.t, d.err
}

// onePointLaw reports whether the lead-time law of sys has one point:
// then no order can overtake another and both models coincide.
func onePointLaw(sys inventory.System) bool {
	w, _, err := sys.LeadTimeWeights()
	if err != nil {
		return false
	}
	n := 0
	for _, p := range w {
		if p > 0 {
			n++
		}
	}
	return n == 1
}

// independentPipeline returns the laws x0 and x1 of timing for base-stock
// under independent lead times. With the position S restored at every
// review, each order is the demand of the R periods before it, D_R, and an
// order placed a periods ago is still out, on its own, with probability
// P(L > a) (Zipkin 2000, Foundations of Inventory Management, section 7.4,
// on independent lead times, from memory). At phase f = 0..R-1 of the
// review cycle (f periods since the last review, each phase with weight
// 1/R) the units missing from S before the period's demand are
//
//	X_f + sum_{k>=0} B_{f+kR} D_R^(k),   B_a ~ Bernoulli(P(L > a)),
//
// all terms independent; x1 adds one period's demand. The law is the
// convolution of the thinned order laws (1 - q) delta_0 + q D_R, each D_R
// tabulated to its SumNeglect / terms tail.
func independentPipeline(sys inventory.System, pos inventory.Distribution) (x0, x1 inventory.Distribution, err error) {
	lw, lneg, err := sys.LeadTimeWeights()
	if err != nil {
		return nil, nil, err
	}
	r := sys.Review()
	// P(L > a), a = 0..len(lw)-1.
	over := make([]float64, len(lw))
	acc := 0.0
	for a := len(lw) - 1; a >= 0; a-- {
		over[a] = acc
		acc += lw[a]
	}
	terms := len(lw)/r + r + 1
	b := pos.Bound(inventory.SumNeglect / float64(terms))
	if float64(b)*float64(terms) > 1<<24 {
		return nil, nil, &inventory.FieldError{Field: "lead_time", Value: sys.LeadTimeLaw.String(),
			Want: fmt.Sprintf("a pipeline of at most %d units to tabulate under independent lead times (%d orders of up to %d units)", 1<<24, terms, b), Err: inventory.ErrLimit}
	}
	dr := make([]float64, b+1)
	for k := range dr {
		dr[k] = pos.PMF(k)
	}
	cut := pos.Tail(b + 1)
	var mix0, mix1 []float64
	for f := range r {
		pipe := []float64{1}
		for a := f; a < len(lw); a += r {
			q := over[a]
			if q == 0 {
				continue
			}
			th := make([]float64, len(dr))
			for k, p := range dr {
				th[k] = q * p
			}
			th[0] += 1 - q
			pipe = convolveLimit(pipe, th)
		}
		for extra, mix := range []*[]float64{&mix0, &mix1} {
			xf, err := inventory.SumUpTo(sys.Demand, f+extra, len(pipe)+b)
			if err != nil {
				return nil, nil, err
			}
			w := convolveLimit(pipe, xf)
			if len(*mix) < len(w) {
				*mix = append(*mix, make([]float64, len(w)-len(*mix))...)
			}
			for k, v := range w {
				(*mix)[k] += v / float64(r)
			}
		}
	}
	t0, err := inventory.NewPMF(trimZeros(mix0))
	if err != nil {
		return nil, nil, fmt.Errorf("pipeline under independent lead times: %w", err)
	}
	t1, err := inventory.NewPMF(trimZeros(mix1))
	if err != nil {
		return nil, nil, fmt.Errorf("pipeline under independent lead times: %w", err)
	}
	negl := lneg + float64(terms)*cut + float64(r)*inventory.Neglected(sys.Demand)
	return neglectedDist{t0, negl}, neglectedDist{t1, negl}, nil
}

// neglectedDist carries a table with the mass left out of its making.
type neglectedDist struct {
	inventory.Table
	negl float64
}

func (d neglectedDist) Neglected() float64 { return d.negl }

func convolveLimit(a, b []float64) []float64 {
	out := make([]float64, len(a)+len(b)-1)
	for i, x := range a {
		if x == 0 {
			continue
		}
		for j, y := range b {
			out[i+j] += x * y
		}
	}
	return out
}

func trimZeros(w []float64) []float64 {
	n := len(w)
	for n > 1 && w[n-1] == 0 {
		n--
	}
	return w[:n]
}
