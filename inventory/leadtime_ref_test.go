package inventory

import (
	"math"
	"testing"
)

// TestMixedDemandOverLPlusOne checks the law the backorder formulas use
// for the net inventory at the end of a period, MixedDemand(s, 1), against
// the random-sum formulas of Silver, Pyke & Thomas (2017, Inventory and
// Production Management in Supply Chains, 4th ed., section 6.10, from
// memory): for X the demand over M periods, M independent of demand,
// E[X] = E[M] E[D] and Var[X] = E[M] Var[D] + E[D]^2 Var[M].
//
// The mapping to the SPEC: the net inventory at the end of a period is the
// position after a review minus the demand over L + 1 periods (the lead
// time and the period itself), and with review every R periods over
// L + f + 1 periods, f the period's phase in the cycle, uniform on
// 0..R-1 and independent of L. So M = L + f + 1, E[M] = E[L] + (R-1)/2 + 1
// and Var[M] = Var[L] + (R^2-1)/12 (the variance of the discrete uniform).
// The moments are summed from the probabilities themselves, not taken
// from the Mixture.
func TestMixedDemandOverLPlusOne(t *testing.T) {
	for _, c := range []struct {
		demand, law string
		review      int
	}{
		{"poisson:mean=4", "pmf:1=0.2,2=0.5,3=0.3", 1},
		{"poisson:mean=4", "pmf:1=0.2,2=0.5,3=0.3", 3},
		{"negbin:mean=2,var=5", "pmf:0=0.1,2=0.4,4=0.5", 7},
		{"pmf:0=0.5,1=0.25,3=0.25", "poisson:mean=2", 2},
	} {
		d, err := Parse(c.demand)
		if err != nil {
			t.Fatal(err)
		}
		_, law, err := ParseLeadTime(c.law)
		if err != nil {
			t.Fatal(err)
		}
		s := System{Demand: d, LeadTimeLaw: law, ReviewPeriod: c.review, LeadTimeModel: Independent}
		x, err := MixedDemand(s, 1)
		if err != nil {
			t.Fatal(err)
		}
		var m1, m2 float64
		for k := 0; k <= x.Bound(1e-17)+10; k++ {
			p := x.PMF(k)
			m1 += float64(k) * p
			m2 += float64(k) * float64(k) * p
		}
		R := float64(c.review)
		em := law.Mean() + (R-1)/2 + 1
		vm := law.Variance() + (R*R-1)/12
		mean := em * d.Mean()
		vari := em*d.Variance() + d.Mean()*d.Mean()*vm
		if math.Abs(m1-mean) > 1e-9*mean || math.Abs(m2-m1*m1-vari) > 1e-8*vari {
			t.Errorf("%s over L+f+1, L~%s, R=%d: mean %.12g var %.12g, want %.12g and %.12g", c.demand, c.law, c.review, m1, m2-m1*m1, mean, vari)
		}
	}
}
