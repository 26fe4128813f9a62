package policies

import (
	"fmt"

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
	if sys.LeadTimeLaw != nil && sys.Model() == inventory.Independent && !onePointLaw(sys) {
		if k != BaseStock {
			return t, &inventory.FieldError{Field: "lead_time_model", Value: string(sys.Model()),
				Want: "sequential for " + string(k) + " (with independent lead times, where orders may cross, only base-stock in backorder mode is evaluated exactly: --policy base-stock)", Err: ErrNotExact}
		}
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
