package policies

import (
	"fmt"
	"testing"
)

// The guarantees of the backorder searches rest on the convexity of the
// one-period cost G(y) of the position after review (Zheng & Federgruen
// 1991, Operations Research 39(4); Veinott 1966 for base-stock). Under a
// lead-time law (sequential deliveries) the lead-time demand is a mixture
// over the law, independent of the position, and under a review period G
// is the average over the R phases of the cycle: both are mixtures of the
// convex functions h E[(y - X_n)^+] + b E[(X_n - y)^+], so convex. Checked
// here on the tables the search uses: every second difference of G is >= 0
// to round-off, and the fill and stockout tables are monotone.
func TestSearchCostConvexUnderTiming(t *testing.T) {
	for _, c := range []struct {
		demand, law string
		L, R        int
	}{
		{"poisson:mean=4", "pmf:1=0.2,2=0.5,3=0.3", 0, 1},
		{"poisson:mean=4", "", 2, 7},
		{"negbin:mean=3,var=9", "pmf:0=0.1,1=0.1,2=0.3,3=0.5", 0, 3},
		{"pmf:0=0.5,5=0.3,10=0.2", "pmf:1=0.25,2=0.25,3=0.25,4=0.25", 0, 2},
	} {
		sys := backorderSystem(lawOf(t, c.demand), c.L, 1, 19, 40)
		sys.ReviewPeriod = c.R
		if c.law != "" {
			sys.LeadTimeLaw = lawOf(t, c.law)
		}
		if err := sys.Validate(); err != nil {
			t.Fatal(err)
		}
		mo, err := newBOModel(sys)
		if err != nil {
			t.Fatal(err)
		}
		name := fmt.Sprintf("%s law=%q L=%d R=%d", c.demand, c.law, c.L, c.R)
		const lo, hi = -20, 120
		mo.ensureY(lo, hi)
		for y := lo + 1; y < hi; y++ {
			d2 := mo.G(y+1) - 2*mo.G(y) + mo.G(y-1)
			if d2 < -1e-9*(1+mo.G(y)) {
				t.Errorf("%s: G not convex at %d: second difference %g", name, y, d2)
			}
			_, f1, s1 := mo.point(y)
			_, f0, s0 := mo.point(y - 1)
			if f1 < f0-1e-12 || s1 > s0+1e-12 {
				t.Errorf("%s: service not monotone at %d: fill %g -> %g, stockout %g -> %g", name, y, f0, f1, s0, s1)
			}
		}
	}
}
