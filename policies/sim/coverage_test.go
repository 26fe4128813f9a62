package sim

import (
	"fmt"
	"math"
	"testing"

	"ergostock/inventory"
	"ergostock/policies"
)

// coverageCase is one system and policy simulated against the exact engine.
type coverageCase struct {
	demand string
	mode   inventory.Mode
	lead   int
	policy policies.Policy
}

func (c coverageCase) String() string {
	return fmt.Sprintf("%s %s L=%d %v", c.demand, c.mode, c.lead, c.policy)
}

func (c coverageCase) system(t testing.TB) inventory.System {
	return inventory.System{Demand: mustParse(t, c.demand), LeadTime: c.lead, Holding: 1, Shortage: 9, OrderCost: 20, UnitCost: 2, Mode: c.mode}
}

// coverageCases: both modes, lead times 0 to 3, the three policies under
// Poisson demand, and three negative binomial cases. Lost-sales cases use a
// smaller mean so the exact chains stay small.
func coverageCases() []coverageCase {
	var cs []coverageCase
	for _, mode := range []inventory.Mode{inventory.Backorder, inventory.Lost} {
		mean := 4
		if mode == inventory.Lost {
			mean = 2
		}
		for L := 0; L <= 3; L++ {
			base := mean*(L+1) + 3
			dem := fmt.Sprintf("poisson:mean=%d", mean)
			cs = append(cs,
				coverageCase{dem, mode, L, policies.Policy{Kind: policies.BaseStock, OrderUpTo: base}},
				coverageCase{dem, mode, L, policies.Policy{Kind: policies.SS, ReorderPoint: base - 3, OrderUpTo: base + 6}},
				coverageCase{dem, mode, L, policies.Policy{Kind: policies.SNQ, ReorderPoint: base - 2, OrderMultiple: 5}},
			)
		}
	}
	return append(cs,
		coverageCase{"negbin:mean=4,var=10", inventory.Backorder, 2, policies.Policy{Kind: policies.SS, ReorderPoint: 12, OrderUpTo: 24}},
		coverageCase{"negbin:mean=4,var=10", inventory.Backorder, 3, policies.Policy{Kind: policies.BaseStock, OrderUpTo: 21}},
		coverageCase{"negbin:mean=2,var=5", inventory.Lost, 1, policies.Policy{Kind: policies.SNQ, ReorderPoint: 5, OrderMultiple: 4}},
	)
}

// TestCoverageOfExactFigures simulates every case and checks that the 95%
// intervals cover the exact figures of policies.Evaluate.
//
// What is asserted, and why: with independent replications each 95%
// interval misses its target with probability about 0.05, so over the
// ~300 non-degenerate (case, figure) pairs about 15 misses are expected;
// the figures of one case are strongly correlated, so the count scatters
// more than a binomial. The test asserts a coverage of at least 85% overall
// (far below what a correct simulator gives, far above what a modelling
// slip gives: a wrong lead time or event order moves nearly every figure of
// a case out of its interval) and, per case, that total_cost lies in its
// 99.9% interval (all ~27 pass together with probability about 0.97 for a
// correct simulator). The thresholds were fixed before the first run; the
// seed is fixed, so the outcome is deterministic.
func TestCoverageOfExactFigures(t *testing.T) {
	var pairs, covered int
	for _, c := range coverageCases() {
		sys := c.system(t)
		ev, err := policies.Evaluate(sys, c.policy, policies.Options{})
		if err != nil {
			t.Errorf("%v: exact: %v", c, err)
			continue
		}
		res, err := Run(sys, c.policy, Options{Periods: 30_000, Warmup: 3000, Replications: 10, Seed: 2026})
		if err != nil {
			t.Fatalf("%v: %v", c, err)
		}
		ex, mf, hf := ev.Figures.Fields(), res.Mean.Fields(), res.HalfWidth.Fields()
		var misses []string
		for j := range ex {
			// The exact engine is exact to round-off: allow 1e-9 relative.
			tol := 1e-9 * math.Max(1, math.Abs(ex[j].Value))
			if hf[j].Value == 0 && math.Abs(mf[j].Value-ex[j].Value) <= tol {
				continue // degenerate: a figure that cannot vary (0 in this mode, or every order of size Q)
			}
			pairs++
			if math.Abs(mf[j].Value-ex[j].Value) <= hf[j].Value+tol {
				covered++
			} else {
				misses = append(misses, fmt.Sprintf("%s %.6g ± %.2g vs exact %.6g", ex[j].Name, mf[j].Value, hf[j].Value, ex[j].Value))
			}
		}
		if len(misses) > 0 {
			t.Logf("%v: outside the 95%% interval: %v", c, misses)
		}
		var tc []float64
		for _, f := range res.PerReplication {
			tc = append(tc, f.TotalCost)
		}
		m, h := interval(tc, 0.999)
		if !(math.Abs(m-ev.Figures.TotalCost) <= h) {
			t.Errorf("%v: total cost %.6g ± %.2g (99.9%%), exact %.6g", c, m, h, ev.Figures.TotalCost)
		}
	}
	rate := float64(covered) / float64(pairs)
	t.Logf("coverage of the exact figures by the 95%% intervals: %d of %d (case, figure) pairs = %.1f%%", covered, pairs, 100*rate)
	if rate < 0.85 {
		t.Errorf("coverage %.1f%% below 85%%", 100*rate)
	}
}

// TestWrongModelDetected simulates with the lead time one period too long
// and checks that the exact total cost at the true lead time falls outside
// the interval: the comparison has the power to catch a modelling slip.
func TestWrongModelDetected(t *testing.T) {
	for _, c := range []coverageCase{
		{"poisson:mean=4", inventory.Backorder, 1, policies.Policy{Kind: policies.SS, ReorderPoint: 8, OrderUpTo: 16}},
		{"poisson:mean=2", inventory.Lost, 1, policies.Policy{Kind: policies.BaseStock, OrderUpTo: 6}},
	} {
		sys := c.system(t)
		ev, err := policies.Evaluate(sys, c.policy, policies.Options{})
		if err != nil {
			t.Errorf("%v: exact: %v", c, err)
			continue
		}
		wrong := sys
		wrong.LeadTime++
		res, err := Run(wrong, c.policy, Options{Periods: 30_000, Warmup: 3000, Replications: 10, Seed: 2026})
		if err != nil {
			t.Fatal(err)
		}
		d := math.Abs(res.Mean.TotalCost - ev.Figures.TotalCost)
		t.Logf("%v simulated with L=%d: total cost %.4f ± %.4f, exact at L=%d %.4f (%.0f half-widths away)",
			c, wrong.LeadTime, res.Mean.TotalCost, res.HalfWidth.TotalCost, c.lead, ev.Figures.TotalCost, d/res.HalfWidth.TotalCost)
		if d <= res.HalfWidth.TotalCost {
			t.Errorf("%v: lead time off by one not detected", c)
		}
	}
}
